"""Shared fixtures."""

from __future__ import annotations

import contextlib
import io
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest
from designs import DEMO


@pytest.fixture(scope="session")
def demo_path() -> Path:
    return DEMO


@dataclass(frozen=True)
class CliRun:
    """One in-process ``geomgen build`` run: exit code, printed text, outputs, and the
    ``Build`` the pipeline made (caught on its way through, so tests can look at the
    in-memory solids without building them a second time)."""

    code: int
    stdout: str
    stderr: str
    out_root: Path
    build: Any  # geomgen.solids.records.Build, or None when the run stopped before building


def run_build_cli(argv: list[str], out_root: Path) -> CliRun:
    """``geomgen build ARGV --out OUT_ROOT`` in-process, catching the Build object."""
    # imported here: cadquery costs ~2 s, and collecting the fast tests must not pay for it
    from geomgen import cli
    from geomgen.solids import assembly

    caught: dict[str, Any] = {}
    real_build = assembly.build

    def spy(*args: Any, **kwargs: Any) -> Any:
        caught["build"] = real_build(*args, **kwargs)
        return caught["build"]

    out, err = io.StringIO(), io.StringIO()
    with (
        pytest.MonkeyPatch.context() as mp,
        contextlib.redirect_stdout(out),
        contextlib.redirect_stderr(err),
    ):
        mp.setattr(assembly, "build", spy)
        code = cli.main(["build", *argv, "--out", str(out_root)])
    return CliRun(code, out.getvalue(), err.getvalue(), out_root, caught.get("build"))


@pytest.fixture(scope="session")
def demo_build(tmp_path_factory: pytest.TempPathFactory) -> CliRun:
    """The whole demo built once per session (about 25 s): every part, STEP, STL, checks."""
    return run_build_cli([str(DEMO)], tmp_path_factory.mktemp("demo-build"))


@pytest.fixture(scope="session")
def demo_only_aileron_right(tmp_path_factory: pytest.TempPathFactory) -> CliRun:
    """The demo built with ``--only aileron-right`` (the wing's right side, about 8 s)."""
    return run_build_cli(
        [str(DEMO), "--only", "aileron-right"], tmp_path_factory.mktemp("demo-only")
    )


@pytest.fixture(scope="session")
def demo_model(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The demo's printed model at 1:10 (its own scale), made once per session (about 90 s):
    ``geomgen model examples/veyra-t2.yaml --scale 1:10``; the model's folder."""
    from geomgen.cli import main

    out = tmp_path_factory.mktemp("demo-model")
    assert main(["model", str(DEMO), "--scale", "1:10", "--out", str(out)]) == 0
    return out / "veyra-t2-model"
