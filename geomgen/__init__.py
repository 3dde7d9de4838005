"""geomgen: turn a sized light-aircraft design into geometry, solids, drawings and reports."""

__version__ = "0.1.0"
