"""Hardening: odd input that used to end in a traceback or be taken silently.

Every refusal is one line on stderr naming the file and the key path, exit code 2, and leaves
nothing under ``--out``. Each case starts from the demo design and changes one line of its
text (the YAML as written matters here: tags, number forms, keys), then runs
``geomgen size --no-drawings`` in-process.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import pytest
from designs import DEMO

from geomgen import design
from geomgen.cli import main

DEMO_TEXT = DEMO.read_text(encoding="utf-8")
DATE = 'date: "2026-12-01"'
RATIO = "aspect_ratio: 7.8"
TITLE = "title: Veyra T2 two-seat club trainer (demo)"


def edit(old: str, new: str) -> str:
    assert old in DEMO_TEXT, old
    return DEMO_TEXT.replace(old, new, 1)


@dataclass(frozen=True)
class Case:
    id: str
    text: str
    key: str | None  # key path the line names (None: the whole file)
    words: str  # words of the line saying what is wrong or allowed


def refuse(text: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> tuple[Path, str]:
    """Run size on the text; assert one line, exit 2, nothing under --out: (design, line)."""
    path = tmp_path / "odd.yaml"
    path.write_text(text, encoding="utf-8")
    out = tmp_path / "out"
    code = main(["size", str(path), "--no-drawings", "--out", str(out)])
    captured = capsys.readouterr()
    assert code == 2, captured.err
    assert captured.out == ""
    lines = captured.err.splitlines()
    assert len(lines) == 1, captured.err
    assert lines[0].startswith(f"geomgen: error: {path}: "), lines[0]
    assert not out.exists(), sorted(out.rglob("*"))
    return path, lines[0]


def _check(case: Case, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path, line = refuse(case.text, tmp_path, capsys)
    if case.key is not None:
        assert line.startswith(f"geomgen: error: {path}: {case.key}: "), line
    assert case.words in line, line


# --- dates that match YYYY-MM-DD but are no day ------------------------------------------------

DATES = [
    Case(f"{name}-{style}", edit(DATE, f"date: {q}{day}{q}"), "date", words)
    for name, day, words in [
        ("30-february", "2026-02-30", "day is out of range for month"),
        ("29-february-2027", "2027-02-29", "day is out of range for month"),
        ("31-april", "2026-04-31", "day is out of range for month"),
        ("month-13", "2026-13-01", "month must be in 1..12"),
        ("month-00", "2026-00-10", "month must be in 1..12"),
        ("day-00", "2026-12-00", "day is out of range"),
        ("year-0000", "0000-01-01", "year 0 is out of range"),
        ("arabic-indic-digits", "٢٠٢٦-١٢-٠١", "YYYY-MM-DD in the digits 0-9"),
        ("fullwidth-digits", "２０２６-１２-０１", "YYYY-MM-DD in the digits 0-9"),
    ]
    for style, q in (("quoted", '"'), ("unquoted", ""))
]


@pytest.mark.parametrize("case", DATES, ids=[c.id for c in DATES])
def test_a_date_that_is_no_day_is_refused(case, tmp_path, capsys) -> None:
    _check(case, tmp_path, capsys)


def test_a_leap_day_is_a_day() -> None:
    assert design.loads(edit(DATE, "date: 2028-02-29")).date == "2028-02-29"
    assert design.loads(edit(DATE, 'date: "2000-02-29"')).date == "2000-02-29"


def test_the_stamp_refuses_a_date_that_is_no_day_in_one_line() -> None:
    from geomgen.errors import InputError
    from geomgen.store.stamp import output_time

    class Odd:
        date = "2026-02-30"

    with pytest.raises(InputError, match="^date: a day of the calendar"):
        output_time(Odd(), environ={})


# --- keys that are mappings or lists; merge keys; keys written twice ----------------------------

KEYS = [
    Case("mapping-key-top", DEMO_TEXT + "? {a: 1}\n: 2\n", None, "got a mapping used as a key"),
    Case("list-key-top", DEMO_TEXT + "? [1, 2]\n: 2\n", None, "got a list used as a key"),
    Case("flow-mapping-key", DEMO_TEXT + "{a: 1}: 2\n", None, "got a mapping used as a key"),
    Case("list-key-in-wing", edit("wing:\n", "wing:\n  ? [1, 2]\n  : 3\n"), "wing", "a list"),
    Case(
        "mapping-key-in-panel",
        edit("    - {span_fraction: 0.45,", "    - {? {a: 1} : 2, span_fraction: 0.45,"),
        "wing.panels[0]",
        "got a mapping used as a key",
    ),
    Case(
        "empty-mapping-key-in-apex",
        edit('apex: {x: "1.55 m",', 'apex: {? {} : 1, x: "1.55 m",'),
        "wing.apex",
        "a key must be a plain word",
    ),
    Case(
        "merge-key",
        edit("requirements:\n", "base: &b {cl_max: 1.7}\nrequirements:\n  <<: *b\n"),
        "requirements",
        "YAML merge keys (<<) are not accepted",
    ),
    Case(
        "merge-key-list",
        edit("wing:\n", "a: &a {x: 1}\nwing:\n  <<: [*a]\n"),
        "wing",
        "write the keys out in full",
    ),
    Case(
        "written-twice-in-wing",
        edit(RATIO, f"{RATIO}\n  {RATIO}"),
        "wing",
        "key 'aspect_ratio' is written twice",
    ),
]


@pytest.mark.parametrize("case", KEYS, ids=[c.id for c in KEYS])
def test_odd_keys_are_refused(case, tmp_path, capsys) -> None:
    _check(case, tmp_path, capsys)


def test_a_quoted_merge_key_is_an_unknown_key(tmp_path, capsys) -> None:
    """Quoted, ``"<<"`` is the plain text it says: an unknown key like any other."""
    _, line = refuse(edit("requirements:\n", 'requirements:\n  "<<": 1\n'), tmp_path, capsys)
    assert ": requirements.<<: unknown key" in line, line


# --- explicit tags ------------------------------------------------------------------------------

TAGS = [
    Case("float-abc", edit(RATIO, "aspect_ratio: !!float abc"), "wing.aspect_ratio", "!!float"),
    Case("int-abc", edit(RATIO, "aspect_ratio: !!int abc"), "wing.aspect_ratio", "!!int 'abc'"),
    Case("int-7.8", edit(RATIO, "aspect_ratio: !!int 7.8"), "wing.aspect_ratio", "whole number"),
    Case("int-hex", edit(RATIO, "aspect_ratio: !!int 0x1F"), "wing.aspect_ratio", "decimal"),
    Case("bool-maybe", edit(RATIO, "aspect_ratio: !!bool maybe"), "wing.aspect_ratio", "true or"),
    Case("null-zero", edit(RATIO, "aspect_ratio: !!null 0"), "wing.aspect_ratio", "!!null '0'"),
    Case("timestamp-bad", edit(DATE, "date: !!timestamp 2026-02-30"), "date", "!!timestamp"),
    Case("timestamp-good", edit(DATE, "date: !!timestamp 2026-12-01"), "date", "!!timestamp"),
    Case("set", edit(TITLE, "title: !!set {a, b}"), "title", "the tag !!set is not accepted"),
    Case("binary", edit(TITLE, "title: !!binary aGVsbG8="), "title", "!!binary is not accepted"),
    Case("omap", edit(TITLE, "title: !!omap [a: 1]"), "title", "!!omap is not accepted"),
    Case("pairs", edit(TITLE, "title: !!pairs [a: 1]"), "title", "!!pairs is not accepted"),
    Case("local-tag", edit(RATIO, "aspect_ratio: !ratio 7.8"), "wing.aspect_ratio", "!ratio"),
    Case(
        "set-in-list",
        edit("    - {span", "    - !!set {a}\n    - {span"),
        "wing.panels[0]",
        "!!set",
    ),
    Case("tag-on-key", edit(RATIO, "!!binary YQ==: 7.8"), "wing", "!!binary is not accepted"),
    Case(
        "python-name",
        edit(TITLE, "title: !!python/name:os.system ''"),
        "title",
        "!!python/name:os.system is not accepted",
    ),
]


@pytest.mark.parametrize("case", TAGS, ids=[c.id for c in TAGS])
def test_tags_other_than_plain_yaml_are_refused(case, tmp_path, capsys) -> None:
    _check(case, tmp_path, capsys)


def test_plain_tags_with_plain_values_are_taken() -> None:
    text = edit(RATIO, "aspect_ratio: !!float 7.8").replace("cl_max: 1.7", "cl_max: !!float 1.7")
    text = text.replace("name: veyra-t2", "name: !!str veyra-t2")
    d = design.loads(text)
    assert d.wing.aspect_ratio == 7.8
    assert d.name == "veyra-t2"
    assert design.loads(edit(RATIO, "aspect_ratio: !!float 8")).wing.aspect_ratio == 8.0


# --- numbers: plain decimal only, and not beyond any value --------------------------------------

NUMBERS = [
    Case("hex", edit(RATIO, "aspect_ratio: 0x1F"), "wing.aspect_ratio", "reads as 31, a hexa"),
    Case("octal", edit(RATIO, "aspect_ratio: 017"), "wing.aspect_ratio", "reads as 15, an octal"),
    Case("binary", edit(RATIO, "aspect_ratio: 0b111"), "wing.aspect_ratio", "reads as 7, a binary"),
    Case(
        "base-60", edit(RATIO, "aspect_ratio: 1:30"), "wing.aspect_ratio", "reads as 90, a base-60"
    ),
    Case("base-60-float", edit(RATIO, "aspect_ratio: 1:30.5"), "wing.aspect_ratio", "base-60"),
    Case("separator", edit(RATIO, "aspect_ratio: 1_7"), "wing.aspect_ratio", "reads as 17"),
    Case("separator-float", edit(RATIO, "aspect_ratio: 7_.8"), "wing.aspect_ratio", "separators"),
    Case("negative-hex", edit("cl_max: 1.7", "cl_max: -0x2"), "requirements.cl_max", "reads as -2"),
    Case(
        "hex-in-list",
        edit("hinge_at: [0.75, 0.72]", "hinge_at: [0x1, 0.72]"),
        "wing.controls.aileron.hinge_at[0]",
        "write numbers in plain decimal (got 0x1",
    ),
    Case(
        "400-digits", edit(RATIO, "aspect_ratio: " + "9" * 400), "wing.aspect_ratio", "400 digits"
    ),
    Case(
        "5000-digits", edit(RATIO, "aspect_ratio: " + "9" * 5000), "wing.aspect_ratio", "5000 dig"
    ),
    Case(
        "negative-digits", edit(RATIO, "aspect_ratio: -" + "1" * 31), "wing.aspect_ratio", "31 di"
    ),
    Case(
        "digits-as-float",
        edit(RATIO, "aspect_ratio: !!float " + "9" * 400),
        "wing.aspect_ratio",
        "400",
    ),
    Case("1e400", edit(RATIO, "aspect_ratio: 1e400"), "wing.aspect_ratio", "about 1.8e308"),
    Case(
        "digits-dot",
        edit(RATIO, "aspect_ratio: " + "9" * 400 + ".0"),
        "wing.aspect_ratio",
        "1.8e308",
    ),
    Case("inf", edit(RATIO, "aspect_ratio: .inf"), "wing.aspect_ratio", "must be in [0.1, 40]"),
]


@pytest.mark.parametrize("case", NUMBERS, ids=[c.id for c in NUMBERS])
def test_numbers_other_than_plain_decimal_are_refused(case, tmp_path, capsys) -> None:
    _check(case, tmp_path, capsys)


@pytest.mark.parametrize(
    ("written", "value"),
    [("8", 8.0), ("+8", 8.0), ("8.", 8.0), ("7.85", 7.85), ("785e-2", 7.85), ("0.785E+1", 7.85)],
)
def test_plain_decimal_numbers_are_taken(written: str, value: float) -> None:
    assert design.loads(edit(RATIO, f"aspect_ratio: {written}")).wing.aspect_ratio == value


def test_a_quoted_number_form_is_text() -> None:
    """Quoted, 0x1F is text: a text key takes it as written."""
    assert design.loads(edit(TITLE, 'title: "0x1F"')).title == "0x1F"


def test_huge_integers_given_as_values_are_refused_by_the_field() -> None:
    """from_mapping (no YAML): an int beyond every float, or beyond the limit of digits for
    text, is refused naming the key, not an OverflowError or a ValueError; so is one past
    the float range by the number field itself."""
    from designs import demo_document

    from geomgen.errors import InputError

    for value in (10**400, 10**5000, -(10**400)):
        doc = demo_document()
        doc["wing"]["aspect_ratio"] = value
        with pytest.raises(InputError) as err:
            design.from_mapping(doc, source="big.yaml")
        assert err.value.path == "wing.aspect_ratio"
        assert "digits is beyond any design value" in str(err.value)
        assert len(str(err.value)) < 300


def test_the_number_field_takes_an_int_beyond_every_float_as_out_of_range() -> None:
    from geomgen.design.fields import FieldError, Number, between

    field = Number(bounds=between(0.1, 40.0))
    for value in (10**400, 10**5000):
        with pytest.raises(FieldError, match=r"must be in \[0.1, 40\] \(got "):
            field.parse(value, "wing.aspect_ratio")
    with pytest.raises(FieldError, match="a whole number of about 5000 digits"):
        field.parse(10**4999 * 9, "wing.aspect_ratio")


# --- output folders -----------------------------------------------------------------------------

NAME = "veyra-t2"


def _size_ok(out: Path, capsys: pytest.CaptureFixture[str]) -> None:
    code = main(["size", str(DEMO), "--no-drawings", "--out", str(out)])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    assert captured.err == ""


def _hidden(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.startswith("."))


def test_a_cache_that_is_a_file_is_refused_before_any_work(tmp_path, capsys) -> None:
    out = tmp_path / "out"
    out.mkdir()
    (out / ".cache").write_text("not a folder\n", encoding="utf-8")
    (out / "veyra-t2-unrelated").mkdir()
    before = sorted(out.rglob("*"))
    code = main(["build", str(DEMO), "--out", str(out)])
    captured = capsys.readouterr()
    assert code == 2, captured.err
    assert captured.out == ""  # refused before sizing: not even the first progress line
    lines = captured.err.splitlines()
    assert len(lines) == 1, captured.err
    assert lines[0].startswith(f"geomgen: error: {out / '.cache'}: the build cache is in the way")
    assert sorted(out.rglob("*")) == before


def test_a_cache_that_is_a_link_to_nothing_is_refused(tmp_path, capsys) -> None:
    out = tmp_path / "out"
    out.mkdir()
    (out / ".cache").symlink_to(tmp_path / "nowhere")
    assert main(["build", str(DEMO), "--out", str(out)]) == 2
    assert "the build cache is in the way" in capsys.readouterr().err


def test_stale_temporary_folders_are_swept_by_the_next_run(tmp_path, capsys) -> None:
    """Folders a killed run left beside the target (its temporary output, an old copy) are
    removed by the next run into it, which holds the lock; those of other names are kept."""
    out = tmp_path / "out"
    out.mkdir()
    stale = [out / f".{NAME}.k1ll3d_x", out / f".{NAME}.old-4242", out / f".{NAME}.0000abcd"]
    for folder in stale:
        (folder / "stl").mkdir(parents=True)
        (folder / "stl" / "wing-right.stl").write_text("solid x\n", encoding="utf-8")
    (stale[1] / "stl").chmod(0o500)  # a read-only old copy goes too
    kept = [
        out / f".{NAME}.b.k1ll3d_x",  # design "veyra-t2.b"'s: not ours to judge
        out / f".{NAME}.notes",  # not a name OutputFolder makes
        out / f".{NAME}-model.k1ll3d_x",  # the printed model's
        out / ".cache",
    ]
    for folder in kept:
        folder.mkdir()
    _size_ok(out, capsys)
    assert _hidden(out) == sorted(p.name for p in kept)
    assert (out / NAME / "report.json").is_file()


def test_a_run_that_finds_the_folder_locked_sweeps_nothing(tmp_path, capsys) -> None:
    from geomgen.store.lock import FolderLock

    out = tmp_path / "out"
    busy = out / f".{NAME}.r4nn1ng_"
    with FolderLock(out / NAME, "build"):
        busy.mkdir()  # the holder's temporary folder, made once it holds the lock
        assert main(["size", str(DEMO), "--no-drawings", "--out", str(out)]) == 1
        assert busy.is_dir()  # the holder's own temporary folder
    assert "is being written by another geomgen run" in capsys.readouterr().err


def test_an_output_folder_that_is_a_link_is_written_through(tmp_path, capsys) -> None:
    out = tmp_path / "out"
    out.mkdir()
    real = tmp_path / "elsewhere" / "outputs"
    real.mkdir(parents=True)
    (out / NAME).symlink_to(real, target_is_directory=True)
    for _ in range(2):  # a first run into the empty folder, a second replacing its outputs
        _size_ok(out, capsys)
        assert (out / NAME).is_symlink()
        assert (out / NAME).resolve() == real
        assert (real / "report.json").is_file()
        assert sorted(p.name for p in out.iterdir()) == [NAME]
        assert sorted(p.name for p in real.parent.iterdir()) == ["outputs"]


def test_an_output_folder_that_is_a_link_to_nothing_is_refused(tmp_path, capsys) -> None:
    out = tmp_path / "out"
    out.mkdir()
    (out / NAME).symlink_to(tmp_path / "gone")
    code = main(["size", str(DEMO), "--no-drawings", "--out", str(out)])
    lines = capsys.readouterr().err.splitlines()
    assert code == 2
    assert len(lines) == 1
    assert lines[0].startswith(f"geomgen: error: {out / NAME}: output folder is a symbolic link")
    assert sorted(p.name for p in out.iterdir()) == [NAME]
    assert not (tmp_path / "gone").exists()


def test_a_read_only_old_output_folder_leaves_no_old_copy(tmp_path, capsys) -> None:
    out = tmp_path / "out"
    _size_ok(out, capsys)
    (out / NAME / "dxf").mkdir()
    (out / NAME / "dxf" / "kept.dxf").write_text("0\nEOF\n", encoding="utf-8")
    (out / NAME / "dxf").chmod(0o500)
    (out / NAME).chmod(0o500)
    _size_ok(out, capsys)
    assert sorted(p.name for p in out.iterdir()) == [NAME]
    assert not (out / NAME / "dxf").exists()


def test_remove_tree_removes_folders_made_unreadable_and_read_only(tmp_path) -> None:
    from geomgen.store.folder import remove_tree

    root = tmp_path / "old"
    (root / "a" / "b").mkdir(parents=True)
    (root / "a" / "b" / "f.txt").write_text("x", encoding="utf-8")
    (root / "link").symlink_to(tmp_path / "outside", target_is_directory=True)
    (tmp_path / "outside").mkdir()
    (tmp_path / "outside" / "keep.txt").write_text("x", encoding="utf-8")
    (root / "a" / "b").chmod(0o000)
    (root / "a").chmod(0o500)
    root.chmod(0o500)
    remove_tree(root)
    assert not root.exists()
    assert (tmp_path / "outside" / "keep.txt").is_file()  # links are not followed


def test_refused_runs_leave_no_empty_folders(tmp_path, capsys) -> None:
    """A refusal after the output folder is locked (the model's piece count, a sweep's plot
    option) removes the folders the run made on the way; one that was there stays."""
    from designs import demo_document

    deep = tmp_path / "new" / "deeper" / "out"
    doc = demo_document()
    doc["model"].update(build_volume=["60 mm"] * 3, scale="1:1")
    path = tmp_path / "model.yaml"
    import yaml

    path.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
    assert main(["model", str(path), "--out", str(deep)]) == 2
    assert "at most" in capsys.readouterr().err
    assert sorted(tmp_path.iterdir()) == [path]
    there = tmp_path / "there"
    there.mkdir()
    assert main(["model", str(path), "--out", str(there)]) == 2
    capsys.readouterr()
    assert there.is_dir() and not any(there.iterdir())


def test_a_design_name_may_not_end_as_the_files_beside_the_outputs(tmp_path, capsys) -> None:
    for name in ("a.failed-checks.json", "veyra-t2.FAILED-CHECKS.JSON", "a-model", "a-Sweep"):
        _, line = refuse(edit(f"name: {NAME}", f"name: {name}"), tmp_path, capsys)
        assert ": name: must be letters, digits" in line, line
        assert "not ending in '-model', '-sweep' or '.failed-checks.json'" in line, line
    for name in ("a.failed-checks", "a-models", "model-a", "sweep", "a.json"):
        assert design.loads(edit(f"name: {NAME}", f"name: {name}")).name == name


# --- a closed pipe or a closed stderr -------------------------------------------------------------


class _ClosedPipe:
    """A standard output whose reader has gone: every write is a broken pipe."""

    def write(self, text: str) -> int:
        raise BrokenPipeError(32, "Broken pipe")

    def flush(self) -> None:
        raise BrokenPipeError(32, "Broken pipe")


def test_build_progress_into_a_closed_pipe_ends_quietly_with_141(tmp_path, monkeypatch) -> None:
    """The first progress line (after sizing, before any solid) meets the closed pipe: the
    build stops there, exit 141, nothing written and nothing on stderr."""
    import io

    err = io.StringIO()
    monkeypatch.setattr("sys.stdout", _ClosedPipe())
    monkeypatch.setattr("sys.stderr", err)
    out = tmp_path / "out"
    assert main(["build", str(DEMO), "--out", str(out)]) == 141
    assert err.getvalue() == ""
    assert not out.exists()


def test_sweep_into_a_closed_pipe_ends_quietly_with_141(tmp_path, monkeypatch) -> None:
    import io

    err = io.StringIO()
    monkeypatch.setattr("sys.stdout", _ClosedPipe())
    monkeypatch.setattr("sys.stderr", err)
    args = ["sweep", str(DEMO), "--vary", "wing.aspect_ratio=7.5,8", "--out", str(tmp_path)]
    assert main(args) == 141
    assert "Traceback" not in err.getvalue()
    assert (tmp_path / f"{NAME}-sweep" / "summary.csv").is_file()


def test_an_error_into_a_closed_stderr_keeps_its_exit_code(tmp_path, monkeypatch) -> None:
    monkeypatch.setattr("sys.stderr", _ClosedPipe())
    path = tmp_path / "odd.yaml"
    path.write_text(edit(RATIO, "aspect_ratio: 0x1F"), encoding="utf-8")
    assert main(["size", str(path), "--out", str(tmp_path / "out")]) == 2


# --- section files whose coordinates would overflow ----------------------------------------------

#: a made-up closed section in chord units: upper surface TE -> LE, lower LE -> TE
_SECTION = [(1 - i / 20, 0.06 * (1 - i / 20) * (i / 20) ** 0.5 * 2) for i in range(21)] + [
    (i / 20, -0.04 * (1 - i / 20) * (i / 20) ** 0.5 * 2) for i in range(1, 21)
]


def _section_design(tmp_path: Path, scale: float) -> Path:
    (tmp_path / "scaled.dat").write_text(
        "scaled section\n" + "".join(f"{x * scale:.9e} {y * scale:.9e}\n" for x, y in _SECTION),
        encoding="utf-8",
    )
    return edit("root_airfoil: naca2415", "root_airfoil: scaled.dat")


@pytest.mark.parametrize("scale", [1.7e308, 1e300, 1e200, 1e155, -1e100, 1e13])
def test_coordinates_that_would_overflow_are_refused_in_one_line(
    scale: float, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    """One line (no numpy RuntimeWarning before it) naming the section key and saying the
    coordinates would overflow."""
    _, line = refuse(_section_design(tmp_path, scale), tmp_path, capsys)
    assert ": wing.root_airfoil: line 2: a coordinate beyond 1e+12 would overflow" in line, line
    assert "scaled.dat" in line


def test_a_section_in_large_units_is_read_without_numerical_warnings(tmp_path) -> None:
    import warnings

    from geomgen.shapes.coordinates import read_coordinates

    _section_design(tmp_path, 1e11)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        section = read_coordinates(tmp_path / "scaled.dat")
    assert section.upper[:, 0].max() == pytest.approx(1.0, abs=1e-9)


# --- wording --------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("old", "new", "key", "words"),
    [
        ("area: from_stall", 'area: "12 m"', "wing.area", "must be an area, e.g."),
        ('dihedral: "2.5 deg"', 'dihedral: "2.5 m"', "wing.dihedral", "must be an angle"),
        ("hinge_at: [0.75, 0.72]", "hinge_at: [0.75]", "wing.controls.aileron.hinge_at", ""),
        (
            '    - {span_fraction: 1.0, chord_ratio: 0.62, sweep: "0 deg", sweep_at: 0.25}',
            "    - 5",
            "wing.panels[1]",
            "must be a mapping of keys (got int)",
        ),
    ],
    ids=["area", "angle", "one-of-two-items", "panel-not-a-mapping"],
)
def test_messages_read_well(old, new, key, words, tmp_path, capsys) -> None:
    _, line = refuse(edit(old, new), tmp_path, capsys)
    assert f": {key}: " in line, line
    assert words in line, line
    assert "must be a a" not in line
    assert f"{key}: {key}" not in line
    assert "2 to 2 items" not in line


def test_a_list_of_fixed_length_says_exactly() -> None:
    from geomgen.design.fields import FieldError, ListOf, Number

    pair = ListOf(item=Number(), min_items=2, max_items=2)
    with pytest.raises(FieldError, match=r"must have exactly 2 items \(got 1\)"):
        pair.parse([1.0], "k")
    one = ListOf(item=Number(), min_items=1, max_items=1)
    with pytest.raises(FieldError, match=r"must have exactly 1 item \(got 3\)"):
        one.parse([1.0, 2.0, 3.0], "k")
    with pytest.raises(FieldError, match=r"must have 1 to 3 items \(got 0\)"):
        ListOf(item=Number(), min_items=1, max_items=3).parse([], "k")
