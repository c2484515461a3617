"""Shared test fixtures.

The real-board corpus lives outside the repository, in ``../shared/realboards`` beside the
checkout (read-only, never copied in). Tests that need it use the ``realboards`` fixture and
are skipped cleanly when it is absent.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest
from hypothesis import HealthCheck, settings

REPO = Path(__file__).resolve().parents[1]
SHARED = REPO.parent / "shared"
REALBOARDS = SHARED / "realboards"
REALBOARDS_ODB = SHARED / "realboards-odb"

# The reader fuzz tests share one profile: fixed examples (derandomized, no example
# database) and a per-example deadline, so a hang fails and every run is the same.
settings.register_profile(
    "fuzz",
    max_examples=250,
    deadline=3000,
    derandomize=True,
    database=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large],
)

# Every other property test runs the same fixed examples on every machine, so CI results
# are reproducible (a red run can be re-run and read). Wider random exploration is for an
# explicit run: ``pytest --hypothesis-profile=explore``.
settings.register_profile("ci", derandomize=True, database=None)
settings.register_profile("explore", max_examples=1000, database=None)
settings.load_profile("ci")

BOARD_NAMES = (
    "bq25798-mppt-v2.1",
    "cheap-focer-2",
    "huvud-tiny2",
    "incunest-motherboard",
    "limesdr-xtrx-1v1",
    "pycubed-mainboard-v05",
    "thunderscope-rev5.3",
)


@pytest.fixture(scope="session")
def realboards() -> Path:
    """Folder of the shared real fabrication packages; skips the test when absent."""
    if not REALBOARDS.is_dir():
        pytest.skip("../shared/realboards is not present")
    return REALBOARDS


@pytest.fixture(scope="session")
def realboard() -> Callable[[str], Path]:
    """Factory: ``realboard("cheap-focer-2")`` gives that board's folder or skips the test."""

    def get(name: str) -> Path:
        path = REALBOARDS / name
        if not path.is_dir():
            pytest.skip(f"../shared/realboards/{name} is not present")
        return path

    return get


@pytest.fixture(scope="session")
def realboard_odb() -> Callable[[str], Path]:
    """Factory: ``realboard_odb("thunderscope-rev5.3")`` gives that folder of
    ``../shared/realboards-odb`` or skips the test when absent."""

    def get(name: str) -> Path:
        path = REALBOARDS_ODB / name
        if not path.is_dir():
            pytest.skip(f"../shared/realboards-odb/{name} is not present")
        return path

    return get
