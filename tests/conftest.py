"""Shared fixtures: the demo parameters, kit and production build, each made once per session;
and the tally of refused property-test draws around every test call."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from hypothesis import HealthCheck, settings

from tests import _refs

ROOT = Path(__file__).resolve().parents[1]
PARAMS = ROOT / "params"
DEMO = PARAMS / "demo.toml"

settings.register_profile("ci", max_examples=25, deadline=None,
                          suppress_health_check=[HealthCheck.too_slow])
settings.load_profile("ci")


@pytest.hookimpl(wrapper=True)
def pytest_runtest_call(item):
    """Open a draw tally for the test; fail it when most of its draws were refused
    (see tests/_refs.py: ``kept()`` and ``refused(reason)``)."""
    tally = _refs.open_tally(item.nodeid)
    try:
        result = yield
    finally:
        _refs.close_tally(tally)
    verdict = tally.verdict()
    if verdict:
        pytest.fail(verdict, pytrace=False)
    return result


@pytest.fixture(scope="session")
def demo_spec():
    from sheetgen.design.spec import load_spec

    return load_spec(DEMO)


@pytest.fixture(scope="session")
def demo_kit(demo_spec):
    from sheetgen.design.kit import build_kit

    return build_kit(demo_spec)


@pytest.fixture(scope="session")
def demo_build_3(tmp_path_factory):
    """The samples' demo build (`sheetgen build params/demo.toml --kits 3` with a fixed work
    budget, 3D model included), run once per test session: test_build reads it and
    test_samples compares it with output_samples/.

    Returns (folder, summary.json as a dict). Tests only read the folder; a test that needs to
    change or rebuild it makes its own copy."""
    from click.testing import CliRunner

    from sheetgen.cli import main
    from sheetgen.samples import BUILD_ARGS, command_line

    out = tmp_path_factory.mktemp("demo-build-3") / "out"
    res = CliRunner().invoke(main, command_line([*BUILD_ARGS, "-o", "{out}"], out))
    assert res.exit_code == 0, res.output
    return out, json.loads((out / "summary.json").read_text(encoding="utf-8"))
