"""`sheetgen balance`: JSON keys, table, exit codes."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from click.testing import CliRunner

from sheetgen import cli
from sheetgen.commands.balance import command
from sheetgen.errors import SheetgenError

DEMO = Path(__file__).resolve().parents[1] / "params" / "demo.toml"

KEYS = ("rotating_mass_kg", "cg_mm", "static_unbalance_gmm", "axle_tilt_deg", "tracking_range_deg",
        "gravity_torque_max_Nm", "friction_torque_Nm", "wind_torque_Nm", "load_torque_Nm", "gear_ratio",
        "motor_torque_required_Nm", "motor_torque_available_Nm", "torque_margin", "tooth_stress_MPa",
        "tooth_stress_allowable_MPa", "counterweight", "ballast_kg", "ok", "checks")


@pytest.fixture
def group():
    """The real CLI group, which maps SheetgenError to exit code 2."""
    assert cli.main.get_command(None, "balance") is command
    return cli.main


def test_json_has_the_keys(group):
    res = CliRunner().invoke(group, ["balance", str(DEMO), "--json"])
    assert res.exit_code == 0, res.output
    j = json.loads(res.output)
    for k in KEYS:
        assert k in j, k
    assert len(j["cg_mm"]) == 3 and len(j["tracking_range_deg"]) == 2
    assert set(j["counterweight"]) >= {"mass_kg", "position_mm"} and len(j["counterweight"]["position_mm"]) == 3
    assert isinstance(j["ok"], bool)
    for c in j["checks"]:
        assert set(c) >= {"name", "pass", "value", "limit", "reason"}
    assert j["ok"] == all(c["pass"] for c in j["checks"] if c["binding"])


def test_table_and_cautions(group):
    res = CliRunner().invoke(group, ["balance", str(DEMO)])
    assert res.exit_code == 0, res.output
    assert "static unbalance" in res.output and "Checks:" in res.output
    assert "ASCE 7" in res.output and "EN 1991-1-4" in res.output and "licensed engineer" in res.output


def test_failing_design_still_exits_0(group):
    res = CliRunner().invoke(group, ["balance", str(DEMO), "--json", "--set", "motor.stall_torque=0.001",
                                        "--set", "drive.wheel_teeth=60"])  # pinned: the solver may not help
    assert res.exit_code == 0
    j = json.loads(res.output)
    assert j["ok"] is False
    assert any(c["name"] == "motor torque" and not c["pass"] for c in j["checks"])


@pytest.mark.parametrize("args,word", [
    (["--set", "site.latitude=80"], "site.latitude"),
    (["--set", "site.windspeed=3"], "site.wind_speed"),
    (["--set", "drive.pinion_teeth=10"], "drive.pinion_teeth"),
])
def test_bad_input_exits_2_naming_the_key(group, args, word):
    res = CliRunner().invoke(group, ["balance", str(DEMO), *args])
    assert res.exit_code == 2
    assert word in res.output and "Traceback" not in res.output


def test_missing_file_exits_2(group, tmp_path):
    res = CliRunner().invoke(group, ["balance", str(tmp_path / "nope.toml")])
    assert res.exit_code == 2 and "nope.toml" in res.output


def test_command_object_raises_sheetgen_error():
    # the command itself raises; the group turns it into exit code 2
    res = CliRunner().invoke(command, [str(DEMO), "--set", "site.latitude=80"])
    assert isinstance(res.exception, SheetgenError)


NEW_KEYS = ("pulse_step_calm_deg", "pulse_step_wind_deg", "peak_tracking_rate_deg_per_h", "shortest_day_tracked_h")


def test_json_and_table_carry_the_drive_and_year_figures(group):
    res = CliRunner().invoke(group, ["balance", str(DEMO), "--json"])
    j = json.loads(res.output)
    for k in NEW_KEYS:
        assert isinstance(j[k], float), k
    # the figures are the extremes of the pulse table the JSON also carries
    p = j["pulse"]
    calm = [v for v in p["calm_plus_deg"] + p["calm_minus_deg"] if v is not None]
    wind = [v for v in p["wind_plus_deg"] + p["wind_minus_deg"] if v is not None]
    assert j["pulse_step_calm_deg"] == max(calm) and j["pulse_step_wind_deg"] == min(wind)
    assert j["peak_tracking_rate_deg_per_h"] == j["year"]["peak_rate_deg_h"]
    names = [c["name"] for c in j["checks"]]
    assert "pulse step in calm air" in names and "pulse moves the frame in the design wind" in names
    text = CliRunner().invoke(group, ["balance", str(DEMO)]).output
    for label in ("angle per pulse, calm (largest)", "angle per pulse, design wind (smallest)",
                  "peak tracking rate over the year", "tracked on the shortest day"):
        assert label in text


def test_continuous_drive_has_no_pulse_figures(group):
    res = CliRunner().invoke(group, ["balance", str(DEMO), "--json", "--set", "drive.pulse_capacitance=0",
                                     "--set", "drive.pulse_voltage=0"])
    j = json.loads(res.output)
    assert j["pulse_step_calm_deg"] is None and j["pulse_step_wind_deg"] is None and j["pulse"] is None
    assert j["continuous_drive"]["crossing_time_s"] > 0
    assert not any(c["name"].startswith("pulse") for c in j["checks"])


def test_max_step_key_is_checked(group):
    res = CliRunner().invoke(group, ["balance", str(DEMO), "--set", "drive.max_step=0"])
    assert res.exit_code == 2 and "drive.max_step" in res.output
