"""The same design built twice gives the same bytes in every output file, and the one date the
files carry comes from SOURCE_DATE_EPOCH, else the design's date, else a fixed date: never the
clock (the reproducible-builds specification of SOURCE_DATE_EPOCH,
https://reproducible-builds.org/specs/source-date-epoch/).

One run of each pair is a separate process with its own PYTHONHASHSEED, so an output that
follows the iteration order of a set of strings shows up as a difference."""

from __future__ import annotations

import hashlib
import os
import re
import subprocess
import sys
import time
from datetime import UTC, datetime
from pathlib import Path

import pytest
from designs import DEMO, demo_document, make_design

from geomgen.cli import main
from geomgen.errors import InputError
from geomgen.geometry.layout import lay_out
from geomgen.outputs import dxf as shopfiles
from geomgen.sizing.aircraft import size
from geomgen.store import stamp

# 2031-05-17T09:30:00Z, a date of our own, far from the demo's 2026-12-01 and from the fallback
# (seconds by GNU coreutils: date -u -d "2031-05-17 09:30:00" +%s)
EPOCH = 1936776600
EPOCH_TIME = datetime(2031, 5, 17, 9, 30, tzinfo=UTC)


def hashes(folder: Path) -> dict[str, str]:
    """sha256 of every file under ``folder`` (hidden ones too), by relative path."""
    return {
        p.relative_to(folder).as_posix(): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.rglob("*"))
        if p.is_file()
    }


def run_elsewhere(argv: list[str], seed: str, **env: str) -> None:
    """``geomgen ARGV`` in a fresh interpreter with the given PYTHONHASHSEED (and the
    environment without SOURCE_DATE_EPOCH unless given)."""
    environ = {k: v for k, v in os.environ.items() if k != stamp.ENV_KEY}
    environ |= {"PYTHONHASHSEED": seed, **env}
    code = "import sys; from geomgen.cli import main; sys.exit(main(sys.argv[1:]))"
    done = subprocess.run(
        [sys.executable, "-c", code, *argv], env=environ, capture_output=True, text=True
    )
    assert done.returncode == 0, done.stderr


def assert_same_files(a: Path, b: Path) -> None:
    ha, hb = hashes(a), hashes(b)
    assert sorted(ha) == sorted(hb)
    differ = [name for name in ha if ha[name] != hb[name]]
    assert not differ, f"differ between two runs: {differ}"


def test_size_twice_gives_the_same_bytes(tmp_path: Path) -> None:
    # seeds 1 and 4 put the set of entity types ezdxf turns into CLASS entries in different
    # orders (measured on ezdxf 1.4.5: ACDBPLACEHOLDER, LAYOUT and the other way round)
    for run, seed in (("a", "1"), ("b", "4")):
        run_elsewhere(["size", str(DEMO), "--out", str(tmp_path / run)], seed)
    folder = "veyra-t2"
    assert (tmp_path / "a" / folder / "dxf" / "plan.dxf").is_file()
    assert_same_files(tmp_path / "a" / folder, tmp_path / "b" / folder)


def test_build_twice_gives_the_same_bytes(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.delenv(stamp.ENV_KEY, raising=False)
    argv = ["build", str(DEMO), "--only", "fin"]
    # a first export in this process: OCCT numbers assembly occurrences from a counter that
    # lives as long as the process, so the build below is the process's second export
    assert main([*argv, "--out", str(tmp_path / "warm-up")]) == 0
    assert main([*argv, "--out", str(tmp_path / "a"), "--fresh"]) == 0
    time.sleep(1.1)  # the clock's seconds move on: a time stamp from it would differ
    run_elsewhere([*argv, "--out", str(tmp_path / "b")], "0")
    a, b = tmp_path / "a" / "veyra-t2", tmp_path / "b" / "veyra-t2"
    names = hashes(a)
    for kind in ("veyra-t2.step", "stl/fin.stl", "templates.pdf", "three-view.png"):
        assert kind in names
    assert_same_files(a, b)
    # and the date written is the design file's (2026-12-01), not the clock's
    assert b"/CreationDate (D:20261201000000Z)" in (a / "templates.pdf").read_bytes()
    assert _dxf_created(a / "dxf" / "plan.dxf") == pytest.approx(_julian(datetime(2026, 12, 1)))
    # ... in the STEP header too (ISO 10303-21 FILE_NAME time stamp)
    assert _step_time(a / "veyra-t2.step") == "2026-12-01T00:00:00+00:00"


def _step_time(path: Path) -> str:
    header = path.read_text(encoding="latin-1").split("ENDSEC;")[0]
    return re.search(r"FILE_NAME\(\s*'(?:[^']|'')*'\s*,\s*'([^']*)'", header).group(1)


def _dxf_created(path: Path) -> float:
    """$TDCREATE as written (ezdxf.readfile would set it to the clock on loading)."""
    lines = [line.strip() for line in path.read_text(encoding="utf-8").splitlines()]
    at = lines.index("$TDCREATE")
    assert lines[at + 1] == "40"
    return float(lines[at + 2])


def _julian(t: datetime) -> float:
    """A DXF date: the Julian day number plus the fraction of the day since midnight (the
    DXF reference's header dates, from memory). The day number is the proleptic Gregorian
    ordinal plus 1721425 (0001-01-01 is Julian day 1721426)."""
    return t.toordinal() + 1721425 + (t.hour * 3600 + t.minute * 60 + t.second) / 86400


def test_source_date_epoch_sets_the_step_and_dxf_stamps(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    import cadquery as cq

    from geomgen.solids import records, step

    box = records.Part("fin", "fin", "vertical_tail", "centre", cq.Solid.makeBox(10, 20, 30),
                   False, 0.0, 10.0)  # fmt: skip
    box2 = records.Part("rudder", "rudder", "vertical_tail", "centre",
                    cq.Solid.makeBox(5, 5, 5, cq.Vector(20, 0, 0)), True, 0.0, 5.0)  # fmt: skip
    layout = lay_out(size(make_design(demo_document())))

    monkeypatch.delenv(stamp.ENV_KEY, raising=False)
    step.write_step([box, box2], tmp_path / "plain.step", "box")
    shopfiles.write_plan_dxf(layout, tmp_path / "plain.dxf")
    monkeypatch.setenv(stamp.ENV_KEY, str(EPOCH))
    step.write_step([box, box2], tmp_path / "epoch.step", "box")
    shopfiles.write_plan_dxf(layout, tmp_path / "epoch.dxf")

    assert _step_time(tmp_path / "plain.step") == "2000-01-01T00:00:00+00:00"  # no design
    assert _step_time(tmp_path / "epoch.step") == "2031-05-17T09:30:00+00:00"
    # $TDCREATE to within a second (1/86400 day): the design's date, then the environment's
    second = 1.0 / 86400
    plain, epoch = _dxf_created(tmp_path / "plain.dxf"), _dxf_created(tmp_path / "epoch.dxf")
    assert plain == pytest.approx(_julian(datetime(2026, 12, 1)), abs=second)
    assert epoch == pytest.approx(_julian(EPOCH_TIME), abs=second)
    # the day number itself: the epoch J2000.0 is Julian date 2451545.0, noon of 2000-01-01
    assert _julian(datetime(2000, 1, 1, 12)) == 2451545.5
    # the colours still reach the right parts after the presentation block is renumbered
    back = cq.Assembly.importStep(str(tmp_path / "epoch.step"))
    colours = {name.split("/")[-1]: c.color.toTuple()[:3] for name, c in back.traverse() if c.color}
    for name in ("fin", "rudder"):
        assert colours[name] == pytest.approx(step.COLOURS[name], abs=1e-6)


def test_output_time_order_of_precedence() -> None:
    class Dated:
        date = "2026-12-01"

    class Undated:
        date = None

    day = datetime(2026, 12, 1, tzinfo=UTC)
    assert stamp.output_time(Dated(), {}) == day
    assert stamp.output_time(Undated(), {}) == stamp.FALLBACK == datetime(2000, 1, 1, tzinfo=UTC)
    assert stamp.output_time(None, {}) == stamp.FALLBACK
    # the environment wins over the design file (the specification's rule)
    assert stamp.output_time(Dated(), {"SOURCE_DATE_EPOCH": str(EPOCH)}) == EPOCH_TIME
    assert stamp.output_time(Dated(), {"SOURCE_DATE_EPOCH": "0"}) == datetime(
        1970, 1, 1, tzinfo=UTC
    )
    # "If the value is malformed, the build process SHOULD exit with a non-zero error code."
    for bad in ("1.5", "yesterday", "0x10", "99999999999999999999"):
        with pytest.raises(InputError, match="SOURCE_DATE_EPOCH"):
            stamp.output_time(Dated(), {"SOURCE_DATE_EPOCH": bad})


def test_occurrence_ids_are_renumbered_and_rewrapped() -> None:
    """A second export in one process gets longer occurrence ids from OCCT's counter, and its
    writer breaks the line where they push it past 72 characters: after renumbering, the
    text is the same whatever the ids were (found building the demo twice in one process)."""
    pytest.importorskip("cadquery")
    from geomgen.solids.step import _numbered_occurrences

    first = "#14438 = NEXT_ASSEMBLY_USAGE_OCCURRENCE('2','aileron-right','',#5,#11777\n  ,$);\n"
    later = "#14438 = NEXT_ASSEMBLY_USAGE_OCCURRENCE('14','aileron-right','',#5,\n  #11777,$);\n"
    assert _numbered_occurrences(first) == _numbered_occurrences(later)
    one = _numbered_occurrences(later)
    assert "'1','aileron-right'" in one and max(len(line) for line in one.splitlines()) <= 72
