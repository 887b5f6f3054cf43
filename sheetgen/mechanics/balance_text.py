"""The balance report as a readable table of figures and verdicts.
"""

from __future__ import annotations

from sheetgen.mechanics.balance_report import BalanceReport, CAUTIONS


# ---------------------------------------------------------------------------
# text


def render_text(report: BalanceReport) -> str:
    """A readable table of the figures and the verdicts."""
    m = report.mass
    rows: list[tuple[str, str]] = []

    def row(label, value, unit=""):
        rows.append((label, f"{value}{(' ' + unit) if unit else ''}"))

    lines = [f"Balance and drive check: {'PASS' if report.ok else 'FAIL'}", ""]
    row("rotating mass", f"{m.rotating_mass_kg * 1000:.1f}", "g")
    row("whole kit", f"{m.total_mass_kg * 1000:.1f}", "g")
    row("CG of the rotating frame", _pos3(m.rotating_cg_mm), "mm")
    row("static unbalance", f"{m.static_unbalance_gmm:.0f}", "g·mm")
    tr = report.tracking
    row("axle", f"{tr.axle}, tilt {report.axle_tilt_deg:.1f}", "deg")
    row("tracking range", f"{tr.range_deg[0]:.1f} to {tr.range_deg[1]:.1f}", "deg")
    row("daylight followed", f"{tr.tracked_hours_h:.1f} of {tr.day_length_h:.1f}", "h")
    row("gravity torque, worst", f"{report.gravity_torque_max_Nm:.4f}", "N·m")
    row("friction torque", f"{report.friction_torque_Nm:.4f}", "N·m")
    row("wind torque", f"{report.wind.torque_Nm:.4f}", "N·m")
    row("load torque at the axle", f"{report.load_torque_Nm:.4f}", "N·m")
    d = report.drive
    row("gear ratio", f"{d.gear_ratio:.3f}")
    row("motor torque needed", f"{d.motor_torque_required_Nm:.4f}", "N·m")
    row("motor torque available", f"{d.motor_torque_available_Nm:.4f}", "N·m")
    row("torque margin", f"{d.torque_margin:.2f}")
    row("axle speed under load", f"{d.output_speed_deg_h:.0f}", "deg/h")
    y = report.year
    row("sun", f"{tr.sun_rate_deg_h:.0f} (frame up to {tr.peak_rate_deg_h:.2f} in June)", "deg/h")
    row("peak tracking rate over the year", f"{y.peak_rate_deg_h:.1f}", "deg/h")
    sd = y.shortest_day
    row("tracked on the shortest day", f"{sd.tracked_h:.1f} of {sd.day_length_h:.1f} h ({sd.name})")
    for dd in y.days:
        row(f"  {dd.name}", f"day {dd.day_length_h:.1f} h, tracked {dd.tracked_h:.1f} h, "
                            f"up to {dd.peak_rate_deg_h:.1f} deg/h")
    dtm = report.drive_time
    cd = dtm.continuous
    row("steady drive: speed under worst load", f"{cd.steady_speed_deg_h:.4g}", "deg/h")
    row("steady drive: time across the travel",
        f"{cd.crossing_time_s:.3g}" if cd.crosses else "does not cross", "s" if cd.crosses else "")
    sw = dtm.sweep
    if sw is not None:
        row("frame inertia about the axle", f"{dtm.frame_inertia_kgm2 * 1e6:.0f}", "kg·mm²")
        row("angle per pulse, calm (largest)", f"{sw.calm_max_deg:.3g}", "deg")
        row("angle per pulse, design wind (smallest)", f"{sw.wind_min_deg:.3g}", "deg")
        for label, key in (("calm", "calm"), ("design wind", "wind")):
            r, e = sw.at_rest[key], sw.at_ends[key]
            row(f"  {label}: at rest +/-, from the ends",
                f"{r[0]:.3g} / {r[1]:.3g}, {e[0]:.3g} / {e[1]:.3g}", "deg")
    t = report.tooth
    row(f"tooth stress ({t.weaker_gear})", f"{t.stress_MPa:.3f} of {t.allowable_MPa:.2f}", "MPa")
    cw = report.counterweight
    row("counterweight" + (" (carried)" if cw.carried else ""), f"{cw.mass_kg * 1000:.1f} g at {_pos3(cw.position_mm)}",
        "mm")
    if cw.carried:
        row("unbalance bare / with the counterweight",
            f"{cw.bare_unbalance_gmm:.0f} / {cw.residual_unbalance_gmm:.0f}", "g·mm")
    row("ballast for the design wind", f"{report.tipping.ballast_kg:.3f}", "kg")
    width = max(len(a) for a, _ in rows)
    lines += [f"  {a:<{width}}  {b}" for a, b in rows]
    lines += ["", "Checks:"]
    for c in report.checks:
        tag = ("pass" if c.passed else "FAIL") if c.binding else ("ok" if c.passed else "note")
        lines.append(f"  [{tag:>4}] {c.name}: {c.reason}")
    notes = [f"counterweight: {cw.rule}", *report.notes]
    lines += ["", "Notes:"] + [f"  - {n}" for n in notes]
    lines += ["", *CAUTIONS]
    return "\n".join(lines)


def _pos3(p) -> str:
    return "[" + ", ".join(f"{v:.1f}" for v in p) + "]"
