"""Shared fixtures: the demo parameters, built once per session."""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import HealthCheck, settings

ROOT = Path(__file__).resolve().parents[1]
PARAMS = ROOT / "params"
DEMO = PARAMS / "demo.toml"

settings.register_profile("ci", max_examples=25, deadline=None,
                          suppress_health_check=[HealthCheck.too_slow])
settings.load_profile("ci")


@pytest.fixture(scope="session")
def demo_spec():
    from sheetgen.spec import load_spec

    return load_spec(DEMO)


@pytest.fixture(scope="session")
def demo_kit(demo_spec):
    from sheetgen.kit import build_kit

    return build_kit(demo_spec)
