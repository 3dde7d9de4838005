"""Command line: ``geomgen size``, ``geomgen build``, ``geomgen schema``, ``geomgen --version``.

Thin on purpose: parse arguments, call :mod:`geomgen.api` (nothing else of the package), print, map
errors to exit codes (0 done, 1 geometry could not be built, a check failed or the outputs
could not be written, 2 bad input, 130 interrupted, 141 standard output was a pipe closed
early).
"""

from __future__ import annotations

import argparse
import contextlib
import json
import sys

from geomgen import __version__, api
from geomgen.errors import GeomgenError


class _Parser(argparse.ArgumentParser):
    """argparse, whose --help and --version text to a closed pipe or a full disk ends like
    every other output (argparse itself would drop the error and exit 0)."""

    def _print_message(self, message: str, file=None) -> None:
        if not message:
            return
        if file is None or file is sys.stderr:
            with contextlib.suppress(OSError):
                sys.stderr.write(message)
            return
        _say(message, end="", file=file)


#: each command's --help ends with an example and the files it writes (kept as written)
_EPILOGS = {
    "size": """\
example:
  geomgen size examples/veyra-t2.yaml --out out

writes in OUT/<name>/:
  report.json, report.md    every computed quantity (JSON in SI, Markdown in your units)
  report.html               tables, three-view, checks in one page
  three-view.svg, three-view.png   plan, front and side views
  dxf/plan.dxf, dxf/<surface>-planform.dxf, dxf/templates.dxf   1:1 shop drawings (mm)
with --no-drawings only report.json and report.md.""",
    "build": """\
example:
  geomgen build examples/veyra-t2.yaml --out out

writes in OUT/<name>/ everything `geomgen size` writes, and:
  <name>.step               STEP assembly (mm), every part named and coloured
  stl/<part>.stl            one STL per part
  parts.json                each part's volume and bounding box
  templates.pdf             1:1 section templates tiled on paper
  checks.json               every self-check (failed: OUT/<name>.failed-checks.json)
the cache of solids is kept in OUT/.cache/.""",
    "model": """\
example:
  geomgen model examples/veyra-t2.yaml --scale 1:10 --out out

writes in OUT/<name>-model/:
  stl/<piece>.stl           one STL per printed piece (mm)
  <name>-model.3mf          all pieces in one 3MF file
  parts.md, parts.csv       size, volume, mass and print orientation of each piece
  model-report.md           scale, holes, Reynolds numbers
  checks.json               every check of the pieces""",
    "diff": """\
example:
  geomgen diff examples/veyra-t2.yaml my-variant.yaml --format json

writes no file: the differences go to standard output (exit 0 equal, 1 different).""",
    "sweep": """\
example:
  geomgen sweep examples/veyra-t2.yaml --vary "wing.aspect_ratio=7:9:0.5" \\
      --plot wing.aspect_ratio:wing_area_m2

writes in OUT/<name>-sweep/:
  <name>-vNNN/design.yaml   each variant's design file, its outputs beside it
  summary.csv               one row per variant
  sweep.png                 with --plot: the plotted column pairs""",
    "watch": """\
example:
  geomgen watch examples/veyra-t2.yaml --size-only --port 8765

writes in OUT/<name>/, again after each save of the design file, what `geomgen size`
(--size-only) or `geomgen build` writes; a bad edit keeps the last good files:
  report.html               served on http://127.0.0.1:PORT/, reloading itself""",
    "schema": """\
example:
  geomgen schema > geomgen-design.schema.json

writes no file: the JSON Schema goes to standard output.""",
}


def _help(command: str) -> dict:
    """The keywords giving a command's --help its example and output files, kept as written."""
    return {"epilog": _EPILOGS[command], "formatter_class": argparse.RawDescriptionHelpFormatter}


def _parser() -> argparse.ArgumentParser:
    p = _Parser(
        prog="geomgen",
        description="Turn a sized light-aircraft design file into geometry and reports.",
        epilog="The output is a design aid, not an airworthiness or structural substantiation.",
    )
    p.add_argument("--version", action="version", version=f"geomgen {__version__}")
    sub = p.add_subparsers(dest="command", required=True)
    size = sub.add_parser(
        "size", help="sizing, corner points and hinge lines; writes reports", **_help("size")
    )
    build = sub.add_parser(
        "build",
        help="size, then loft the solids, cut the control surfaces, export, check",
        **_help("build"),
    )
    for command in (size, build):
        command.add_argument("design", help="design file (YAML)")
        command.add_argument("--out", default="out", help="output folder (default: out)")
        command.add_argument(
            "--units",
            choices=("si", "imperial"),
            default=None,
            help="unit system of human-readable outputs (default: the design's)",
        )
    size.add_argument(
        "--no-drawings",
        action="store_true",
        help="reports only: no three-view, DXF or report.html (fastest)",
    )
    build.add_argument(
        "--only",
        default=None,
        help="comma-separated part names to build, e.g. wing-right,aileron-right",
    )
    build.add_argument(
        "--fresh",
        action="store_true",
        help="ignore the cache of solids and the last build's outputs; build everything anew",
    )
    build.add_argument(
        "--jobs",
        type=int,
        default=None,
        help="worker processes for the solids, meshes, checks and drawings (default: one per "
        "CPU); the outputs are the same bytes whatever the number",
    )
    model = sub.add_parser(
        "model",
        help="printable wind-tunnel model pieces: STL, 3MF, parts list, checks",
        **_help("model"),
    )
    model.add_argument("design", help="design file (YAML)")
    model.add_argument("--out", default="out", help="output folder (default: out)")
    scale = model.add_mutually_exclusive_group()
    scale.add_argument("--scale", default=None, help="model scale 1:N, e.g. 1:10")
    scale.add_argument(
        "--span", default=None, help='model span tip to tip with its unit, e.g. "900 mm"'
    )
    diff = sub.add_parser(
        "diff",
        help="what changed between two design files or two output folders",
        **_help("diff"),
    )
    diff.add_argument("old", help="design file (YAML) or output folder holding report.json")
    diff.add_argument("new", help="the same kind as OLD")
    diff.add_argument("--format", choices=("md", "json"), default="md", help="(default: md)")
    diff.add_argument(
        "--tolerance",
        type=float,
        default=1e-9,
        help="relative difference below which two values are equal (default: 1e-9)",
    )
    sweep = sub.add_parser(
        "sweep",
        help="size (or build) a grid of variants of one design; one CSV row each",
        **_help("sweep"),
    )
    sweep.add_argument("design", help="design file (YAML)")
    sweep.add_argument(
        "--vary",
        action="append",
        default=[],
        metavar="KEY=VALUES",
        help="a key path and its values: START:STOP:STEP or V1,V2,...; a unit once at the end "
        'applies to every bare number, e.g. "requirements.stall_speed=40:50:5 kn" or '
        "wing.panels[1].chord_ratio=0.55,0.6 (repeat for a grid; the first changes slowest)",
    )
    sweep.add_argument("--build", action="store_true", help="build the solids of every variant")
    runner = sweep.add_mutually_exclusive_group()
    runner.add_argument(
        "--jobs", type=int, default=1, help="local worker processes (default: 1, in-process)"
    )
    runner.add_argument(
        "--scheduler",
        default=None,
        metavar="ADDRESS",
        help="run the variants on this Dask distributed scheduler, e.g. tcp://host:8786",
    )
    sweep.add_argument("--out", default="out", help="output folder (default: out)")
    sweep.add_argument(
        "--plot",
        default=None,
        metavar="X:Y[,X:Y...]",
        help="plot summary columns to sweep.png; a pair of two varied keys draws a "
        "feasibility map (each variant marked ok or by its failing key)",
    )
    watch = sub.add_parser(
        "watch",
        help="size or build again on each save; serve report.html, reloading itself",
        **_help("watch"),
    )
    watch.add_argument("design", help="design file (YAML)")
    watch.add_argument(
        "--size-only", action="store_true", help="size on each save (no solids): fast"
    )
    watch.add_argument("--out", default="out", help="output folder (default: out)")
    watch.add_argument(
        "--port", type=int, default=8765, help="local port of the page (default: 8765; 0: any)"
    )
    sub.add_parser("schema", help="print the JSON Schema of a design file", **_help("schema"))
    return p


def _terminate_as_interrupt() -> None:
    """SIGTERM ends a run like Ctrl-C (exit 130): Python's default would end the process at
    once, skipping the cleanup of temporary output and cache folders. Later SIGTERMs are
    ignored while that cleanup runs; child processes (sweep workers) keep the default."""
    import os
    import signal

    owner = os.getpid()

    def handler(signum, frame):
        if os.getpid() != owner:  # a forked worker: die as SIGTERM would have it
            signal.signal(signum, signal.SIG_DFL)
            os.kill(os.getpid(), signum)
            return
        signal.signal(signum, signal.SIG_IGN)
        raise KeyboardInterrupt

    import threading

    if threading.current_thread() is threading.main_thread():  # only it may set handlers
        signal.signal(signal.SIGTERM, handler)


class _StdoutClosed(Exception):
    """The reader of standard output went away (``geomgen schema | head -1``)."""


class _StdoutFailed(Exception):
    """Standard output cannot be written (a full disk, ``> /dev/full``); args[0] the OSError."""


def _tell(line: str) -> None:
    """One line on standard error; a closed or full stderr (``2>&1 | head -1``) loses the line,
    never the exit code."""
    with contextlib.suppress(OSError, ValueError):
        print(line, file=sys.stderr, flush=True)


def _say(*args, **kwargs) -> None:
    """print() to standard output, its failures told apart from those of the commands."""
    try:
        print(*args, **kwargs)
    except BrokenPipeError:
        raise _StdoutClosed from None
    except OSError as err:
        raise _StdoutFailed(err) from None


def _flush_stdout() -> None:
    """Flush standard output now: a write error may only surface at the flush."""
    try:
        sys.stdout.flush()
    except BrokenPipeError:
        raise _StdoutClosed from None
    except OSError as err:
        raise _StdoutFailed(err) from None


def _silence_stdout() -> None:
    """Point the file descriptor of standard output at the null device, so that the
    interpreter's own flush at exit does not fail again on what is still buffered."""
    import os

    try:
        fd = sys.stdout.fileno()
    except (AttributeError, OSError, ValueError):  # replaced in-process (tests): nothing to do
        return
    null = os.open(os.devnull, os.O_WRONLY)
    try:
        os.dup2(null, fd)
    finally:
        os.close(null)


def main(argv: list[str] | None = None) -> int:
    """Run one command; the exit code. A closed pipe on standard output ends the run quietly
    with 141 (128 + SIGPIPE, what a shell reports for a process a broken pipe ended); a
    standard output that cannot be written gives one line on stderr and 1."""
    import signal

    try:
        try:
            args = _parser().parse_args(argv)
        except SystemExit:  # --help, --version (on stdout) or a usage error (on stderr)
            _flush_stdout()
            raise
        if argv is None:  # run as the command (tests call main with arguments, in-process)
            _terminate_as_interrupt()
        code = _run(args)
        _flush_stdout()
        return code
    except _StdoutClosed:
        _silence_stdout()
        return 128 + signal.SIGPIPE
    except _StdoutFailed as failed:
        _silence_stdout()
        err = failed.args[0]
        print(f"geomgen: error: cannot write the output: {err.strerror or err}", file=sys.stderr)
        return 1


def _run(args: argparse.Namespace) -> int:
    try:
        if args.command == "schema":
            _say(json.dumps(api.schema(), indent=2))
            return 0
        if args.command == "diff":
            result = api.diff_files(args.old, args.new, args.tolerance)
            text = api.diff_text(result, args.old, args.new, args.format)
            # the closing newline as a write of its own: CPython drops the error of a single
            # long write that a closed pipe cut short, and the next write reports it (141)
            _say(text.removesuffix("\n"), end="\n" if text.endswith("\n") else "")
            return 0 if result["equal"] else 1
        if args.command == "sweep":
            swept = api.sweep_file(
                args.design,
                args.vary,
                args.out,
                build=args.build,
                jobs=args.jobs,
                scheduler=args.scheduler,
                plot=args.plot,
            )
            plotted = f" and {swept.plot_path}" if swept.plot_path else ""
            _say(
                f"geomgen: wrote {swept.csv_path}{plotted}: {swept.passed} variant(s) ran, "
                f"{swept.failed} failed"
            )
            return 1 if swept.failed else 0
        if args.command == "size":
            folder = api.size_file(args.design, args.out, args.units, drawings=not args.no_drawings)
            written = (
                "report.json and report.md (no drawings)"
                if args.no_drawings
                else "report.json, report.md, report.html, three-view.svg, three-view.png "
                "and the DXF files in dxf/"
            )
            _say(f"geomgen: wrote {written} in {folder}")
            return 0
        if args.command == "build":
            only = None
            if args.only:
                only = {n.strip() for n in args.only.split(",") if n.strip()}
            result = api.build_file(
                args.design,
                args.out,
                args.units,
                only,
                progress=lambda line: _say(f"geomgen: {line}", flush=True),
                fresh=args.fresh,
                jobs=args.jobs,  # None: one per CPU
            )
            _summary(result)
            return 0
        if args.command == "watch":
            return api.watch_file(
                args.design,
                args.out,
                size_only=args.size_only,
                port=args.port,
                say=lambda line: _say(line, flush=True),
                tell=_tell,
            )
        if args.command == "model":
            result = api.model_file(
                args.design,
                args.out,
                args.scale,
                args.span,
                progress=lambda line: _say(f"geomgen: {line}", flush=True),
            )
            _say(f"\n{'piece':<34} {'volume (cm^3)':>14} {'mass (g)':>9}")
            for name, volume_mm3, mass in result.pieces:
                _say(f"{name:<34} {volume_mm3 / 1000:>14.2f} {mass:>9.1f}")
            _say(
                f"\ngeomgen: model at 1:{1 / result.scale:.4g}; all {result.checks} checks "
                f"passed; outputs in {result.folder}"
            )
            return 0
    except GeomgenError as err:
        _tell(f"geomgen: error: {err}")
        return err.exit_code
    except KeyboardInterrupt:
        _tell("geomgen: interrupted; previous outputs left as they were")
        return 130
    raise AssertionError(f"unknown command {args.command!r}")  # argparse prevents this


def _summary(result) -> None:
    if result.unchanged:
        _say(f"geomgen: unchanged since the last build; outputs kept in {result.folder}")
        return
    _say(f"\n{'part':<20} {'volume (cm^3)':>14} {'STL tolerance (mm)':>19}")
    for name, volume_mm3, deflection in result.parts:
        _say(f"{name:<20} {volume_mm3 / 1000:>14.1f} {deflection:>19.3f}")
    _say(f"\ngeomgen: all {result.checks} checks passed; outputs in {result.folder}")


if __name__ == "__main__":
    sys.exit(main())
