"""Every command's --help: an example line that runs as written, and the names of the files the
command writes, checked against the files a run leaves on disk.

The quick examples (size, diff, sweep, schema) are run in-process in a scratch folder holding a
copy of the demo; the slow commands' examples (build, model) are parsed, and the files their
--help names are compared with the session's demo build and printed model (marked slow).
"""

from __future__ import annotations

import contextlib
import io
import re
import shlex
from pathlib import Path

import pytest
import yaml
from designs import DEMO, demo_document

from geomgen.cli import _parser, main

COMMANDS = ("size", "build", "model", "diff", "sweep", "schema")
#: the endings of the files geomgen writes
FILE_NAME = re.compile(r"[\w<>./-]+\.(?:json|md|html|svg|png|dxf|step|stl|pdf|3mf|csv|yaml)\b")


def _help_text(command: str) -> str:
    out = io.StringIO()
    with contextlib.redirect_stdout(out), pytest.raises(SystemExit) as done:
        main([command, "--help"])
    assert done.value.code == 0
    return out.getvalue()


def _example(text: str) -> list[str]:
    """The example command of a --help text (its continuation lines joined), as arguments."""
    lines = text.split("example:\n", 1)[1].splitlines()
    command = ""
    for line in lines:
        command += line.strip().rstrip("\\")
        if not line.rstrip().endswith("\\"):
            break
    words = shlex.split(command)
    assert words[0] == "geomgen", command
    return words[1:]


def _named_files(text: str) -> list[str]:
    """The file names in the part of a --help text after its example (the 'writes' part)."""
    after = text.split("example:\n", 1)[1].split("\n\n", 1)[1]
    return FILE_NAME.findall(after)


def _present(folder: Path, pattern: str, name: str) -> bool:
    """Whether a file named in --help is in ``folder``: <name> is the design's name, any
    other <...> stands for one or more files, NNN for a variant's three digits."""
    concrete = pattern.replace("<name>", name).replace("NNN", "[0-9][0-9][0-9]")
    glob = re.sub(r"<[^>]+>", "*", concrete)
    return any(folder.glob(glob))


@pytest.mark.parametrize("command", COMMANDS)
def test_help_has_an_example_and_says_what_is_written(command: str) -> None:
    text = _help_text(command)
    words = _example(text)
    assert words[0] == command
    assert "writes" in text.split("example:", 1)[1]
    if command not in ("diff", "schema"):  # these two write only to standard output
        assert _named_files(text), text
    # the example is a valid command line for the parser itself (less a shell redirection)
    _parser().parse_args(words[: words.index(">")] if ">" in words else words)


@pytest.fixture
def scratch(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """A folder laid out like the repository for the examples: the demo in examples/ and a
    variant of it (another aspect ratio) as my-variant.yaml; the working folder."""
    (tmp_path / "examples").mkdir()
    (tmp_path / "examples" / DEMO.name).write_bytes(DEMO.read_bytes())
    doc = demo_document()
    doc["wing"]["aspect_ratio"] = 8.4
    (tmp_path / "my-variant.yaml").write_text(yaml.safe_dump(doc), encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    return tmp_path


def _run(words: list[str]) -> tuple[int, str]:
    out = io.StringIO()
    if ">" in words:  # a shell redirection: the test takes standard output itself
        words = words[: words.index(">")]
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(io.StringIO()):
        code = main(words)
    return code, out.getvalue()


@pytest.mark.parametrize(
    ("command", "expected_code"),
    # diff: the variant differs from the demo (exit 1 = different, documented in --help)
    [("size", 0), ("diff", 1), ("sweep", 0), ("schema", 0)],
)
def test_quick_examples_run_and_write_the_named_files(
    scratch: Path, command: str, expected_code: int
) -> None:
    text = _help_text(command)
    code, stdout = _run(_example(text))
    assert code == expected_code, stdout
    folder = {"size": scratch / "out" / "veyra-t2", "sweep": scratch / "out" / "veyra-t2-sweep"}
    if command in folder:
        for name in _named_files(text):
            assert _present(folder[command], name, "veyra-t2"), (
                name,
                sorted(folder[command].rglob("*")),
            )
    else:
        assert stdout.strip(), "the example printed nothing"
        assert not (scratch / "out").exists()


def test_size_says_what_it_wrote(scratch: Path) -> None:
    """The closing line names exactly the files the folder holds (with and without drawings)."""
    code, stdout = _run(["size", "examples/veyra-t2.yaml", "--no-drawings"])
    assert code == 0
    folder = Path("out") / "veyra-t2"  # as the user named it (--out's default, relative)
    assert sorted(p.name for p in folder.iterdir()) == ["report.json", "report.md"]
    assert stdout.strip() == f"geomgen: wrote report.json and report.md (no drawings) in {folder}"
    code, stdout = _run(["size", "examples/veyra-t2.yaml"])
    assert code == 0
    named = set(re.findall(r"[\w-]+\.\w+|dxf/", stdout.rsplit(" in ", 1)[0]))
    on_disk = {p.name + ("/" if p.is_dir() else "") for p in folder.iterdir()}
    assert named == on_disk, (named, on_disk)


@pytest.mark.slow
def test_build_help_names_the_files_a_build_writes(demo_build) -> None:
    assert demo_build.code == 0, demo_build.stderr
    folder = demo_build.out_root / "veyra-t2"
    for name in _named_files(_help_text("build")):
        if name.startswith("OUT/"):  # written only when a check fails
            continue
        assert _present(folder, name, "veyra-t2"), name


@pytest.mark.slow
def test_model_help_names_the_files_a_model_writes(demo_model: Path) -> None:
    for name in _named_files(_help_text("model")):
        assert _present(demo_model, name, "veyra-t2"), name
