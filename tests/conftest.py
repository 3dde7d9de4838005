"""Shared fixtures."""

from pathlib import Path

import pytest
from designs import DEMO


@pytest.fixture(scope="session")
def demo_path() -> Path:
    return DEMO
