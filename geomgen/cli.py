"""Command line: ``geomgen size``, ``geomgen schema``, ``geomgen --version``.

Thin on purpose: parse arguments, call the pipeline, print, map errors to exit codes
(0 done, 1 geometry could not be built or a check failed, 2 bad input).
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

from . import __version__
from .errors import GeomgenError, InputError
from .output import OutputFolder

PROFILES_DIR = Path(__file__).resolve().parent.parent / "profiles"


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="geomgen",
        description="Turn a sized light-aircraft design file into geometry and reports.",
        epilog="The output is a design aid, not an airworthiness or structural substantiation.",
    )
    p.add_argument("--version", action="version", version=f"geomgen {__version__}")
    sub = p.add_subparsers(dest="command", required=True)
    size = sub.add_parser("size", help="sizing, corner points and hinge lines; writes reports")
    size.add_argument("design", help="design file (YAML)")
    size.add_argument("--out", default="out", help="output folder (default: out)")
    size.add_argument(
        "--units",
        choices=("si", "imperial"),
        default=None,
        help="unit system of report.md (default: the design's)",
    )
    sub.add_parser("schema", help="print the JSON Schema of a design file")
    return p


def airfoil_dirs(design_path: Path) -> tuple[Path, ...]:
    """Where section files are looked up: beside the design, then the shipped profiles/."""
    return (design_path.resolve().parent, PROFILES_DIR)


def run_size(design_path: Path, out_root: Path, units: str | None) -> Path:
    """Sizing and layout of one design; writes report.json and report.md. Returns the folder."""
    from . import design as design_module
    from .layout import lay_out
    from .report import to_json, to_markdown
    from .sizing import size

    dirs = airfoil_dirs(design_path)
    d = design_module.load(design_path)
    layout = lay_out(size(d, dirs), dirs)
    system = units or d.units
    with OutputFolder(out_root / d.name) as folder:
        folder.write_text("report.json", to_json(layout))
        folder.write_text("report.md", to_markdown(layout, system))
    return out_root / d.name


def main(argv: list[str] | None = None) -> int:
    args = _parser().parse_args(argv)
    try:
        if args.command == "schema":
            from .design import json_schema

            print(json.dumps(json_schema(), indent=2))
            return 0
        if args.command == "size":
            folder = run_size(Path(args.design), Path(args.out), args.units)
            print(f"geomgen: wrote {folder / 'report.json'} and {folder / 'report.md'}")
            return 0
    except GeomgenError as err:
        print(f"geomgen: error: {err}", file=sys.stderr)
        return err.exit_code
    except KeyboardInterrupt:
        print("geomgen: interrupted; previous outputs left as they were", file=sys.stderr)
        return 130
    raise InputError(f"unknown command {args.command!r}")  # argparse prevents this


if __name__ == "__main__":
    sys.exit(main())
