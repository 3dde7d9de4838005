"""geomgen: turn a sized light-aircraft design into geometry, solids, drawings and reports.

The public API (see the README): ``geomgen.load`` a design from a file, YAML text or a
mapping, then ``.replace``, ``.size()``, ``.layout()``, ``.build()``; the names are those of
``geomgen.api.__all__``. They are looked up on first use, so that ``import geomgen`` (and
every ``import geomgen.<stage>``) stays as light as the stage itself.
"""

__version__ = "0.1.0"


def __getattr__(name: str):
    if name.startswith("_") or name == "api":  # the import machinery asks for these
        raise AttributeError(f"module 'geomgen' has no attribute {name!r}")
    from geomgen import api

    if name in api.__all__:
        return getattr(api, name)
    raise AttributeError(f"module 'geomgen' has no attribute {name!r}")


def __dir__() -> list[str]:
    from geomgen import api

    return sorted([*globals(), *api.__all__])
