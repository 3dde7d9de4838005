"""The README's Python API example runs as written: its ```python blocks, in order, in a
folder holding a copy of examples/."""

from __future__ import annotations

import contextlib
import io
import re
import shutil
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


def blocks() -> list[str]:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    section = text[text.index("## Python API") :]
    section = section[: section.index("\n## ", 1)]
    return re.findall(r"^```python\n(.*?)^```$", section, re.S | re.M)


def _run(codes: list[str], where: Path, monkeypatch: pytest.MonkeyPatch) -> str:
    shutil.copytree(ROOT / "examples", where / "examples")
    monkeypatch.chdir(where)
    scope: dict = {"__name__": "readme"}
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        for code in codes:
            exec(compile(code, "README.md", "exec"), scope)  # the README's own example
    return out.getvalue()


def test_the_readme_has_the_two_blocks() -> None:
    assert len(blocks()) == 2


def test_the_readme_sizing_example_runs(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    printed = _run(blocks()[:1], tmp_path, monkeypatch)
    # the Quantity prints as value and unit; the example asserts the smaller wing itself
    assert re.search(r"^\d+\.\d+ m\^2$", printed, re.M)
    assert (tmp_path / "out" / "veyra-t2" / "report.json").is_file()
    assert (tmp_path / "out" / "veyra-t2.design.yaml").is_file()
    assert "'report.html'" in printed


@pytest.mark.slow
def test_the_readme_build_example_runs(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    _run(blocks(), tmp_path, monkeypatch)
    stl = sorted((tmp_path / "for-the-shop" / "stl").glob("*.stl"))
    assert [p.name for p in stl] == sorted(
        p.name for p in (tmp_path / "out" / "veyra-t2" / "stl").glob("*.stl")
    )
    assert (tmp_path / "for-the-shop" / "veyra-t2.step").is_file()
