"""Shared fixtures: the demo parameters, kit and production build, each made once per session;
and the tally of refused property-test draws around every test call."""

from __future__ import annotations

import functools
import json
from pathlib import Path

import pytest
from hypothesis import HealthCheck, settings

from tests import _refs

ROOT = Path(__file__).resolve().parents[1]
PARAMS = ROOT / "params"
DEMO = PARAMS / "demo.toml"

# The suite's draws are derandomized: the same examples on every run and machine, so a CI run
# fails only on a change of the code. `--hypothesis-profile explore` draws afresh (and keeps the
# failures it finds in .hypothesis/ for the next run), for a search beyond the fixed draws.
settings.register_profile("ci", max_examples=25, deadline=None, derandomize=True,
                          suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("explore", max_examples=25, deadline=None,
                          suppress_health_check=[HealthCheck.too_slow])
settings.load_profile("ci")


# Costly fixtures, by the module that holds them: the tests that use one run on one worker
# (`--dist loadgroup` in pyproject.toml), so the suite makes it once, not once per worker.
SHARED_FIXTURES = {
    "test_step_machine": ("kit",),  # one STEP file per shipped variant (a group per variant)
    "test_assembly": ("kits", "wrong", "demo_run"),
    "test_machine_motor": ("demo_model",),
    "test_clipped_distance": ("demo_model",),
    "test_derive": ("demo",),
    "test_cli_parts": ("demo_out",),
    "test_output_safety": ("previous_build",),
}


@pytest.hookimpl(tryfirst=True)
def pytest_collection_modifyitems(config, items):
    """Mark the tests that share a costly fixture (SHARED_FIXTURES, and the session's demo build)
    with one xdist group each; a parametrized fixture gets a group per value."""
    for item in items:
        module = item.module.__name__.rsplit(".", 1)[-1]
        names = getattr(item, "fixturenames", ())
        spec = getattr(item, "callspec", None)
        for name in SHARED_FIXTURES.get(module, ()):
            if name in names:
                value = spec.params.get(name) if spec is not None else None
                suffix = f"-{Path(str(value)).stem}" if value is not None else ""
                item.add_marker(pytest.mark.xdist_group(f"{module}-{name}{suffix}"))
                break
        else:
            if "demo_build_3" in names:
                item.add_marker(pytest.mark.xdist_group("demo-build-3"))


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


@functools.lru_cache(maxsize=None)
def _shipped(path: Path) -> tuple:
    from sheetgen.design.kit import build_kit
    from sheetgen.design.spec import load_spec

    spec = load_spec(path)
    return spec, build_kit(spec)


def shipped(path) -> tuple:
    """(spec, kit) of a parameter file as shipped (no overrides), built once per test process and
    shared by every test that reads it: both are frozen, so a test cannot change them."""
    return _shipped(Path(path).resolve())


@pytest.fixture(scope="session")
def demo_spec():
    return shipped(DEMO)[0]


@pytest.fixture(scope="session")
def demo_kit(demo_spec):
    return shipped(DEMO)[1]


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
