"""What was derived, for summary.json, the report and the balance text.
"""

from __future__ import annotations

from sheetgen.design.solver.rules import FRAME_RULE_DOCS, RULE_BY_NAME


# ---------------------------------------------------------------------------
# what was derived, for summary.json, the report and the balance text

# figures of the kit that follow from the inputs without a key of their own,
# with the rule (in sheetgen/design/layout.py or the balance check) that sets them
FIGURE_RULES = (
    ("layout.support_spacing_mm", "support_spacing_mm", "supports_clear_frame",
     "the supports stand frame.clearance beyond the frame's ends"),
    ("layout.centre_distance_mm", "centre_distance_mm", "gears_mesh",
     "zero-backlash centre distance of the pair for its shifts (ISO 21771)"),
    ("layout.base_length_mm", "base_length_mm", "base_under_stand",
     "the base runs under both supports, the wheel and the motor"),
    ("layout.base_width_mm", "base_width_mm", "base_under_stand",
     "the base runs under both supports, the wheel and the motor"),
    ("layout.shaft_end_gap_mm", "shaft_end_gap_mm", "motor_shaft_reach",
     "gap from the motor shaft's end to the drive-side support"),
    ("layout.clamp_fingers", "clamp_fingers", "clamp_stack", FRAME_RULE_DOCS["clamp_stack"]),
    ("layout.axle_flat_mm", "axle_flat_mm", "axle_keyed", FRAME_RULE_DOCS["axle_keyed"]),
)


def derived_values(spec, kit=None, balance=None) -> dict:
    """key -> {"value": ..., "rule": ...}: every derived key the solver set (keys
    that were pinned are inputs and are left out), then the kit's figures and
    the counterweight the balance check sizes, when given."""
    out = {d.path: {"value": _json_num(d.value), "rule": d.rule} for d in spec.derived}
    if kit is not None:
        figures = dict(kit.figures)
        rim = next((p.qty for p in kit.parts if p.name == "rim"), None)
        if rim is not None:
            out["layout.rim_layers"] = {"value": rim, "rule": "clamp_stack"}
        for key, fig, rule, _ in FIGURE_RULES:
            if fig in figures:
                out[key] = {"value": _json_num(figures[fig]), "rule": rule}
    if balance is not None:
        cw = balance.counterweight
        out["counterweight.mass_kg"] = {"value": _json_num(cw.mass_kg), "rule": "counterweight_balance"}
        out["counterweight.position_mm"] = {"value": [_json_num(v) for v in cw.position_mm],
                                            "rule": "counterweight_balance"}
    return out


def _json_num(v):
    if isinstance(v, bool) or isinstance(v, int):
        return v
    return round(float(v), 4)


def rule_doc(name: str) -> str:
    if name in RULE_BY_NAME:
        return RULE_BY_NAME[name].doc
    for _, _, rule, doc in FIGURE_RULES:
        if rule == name:
            return doc
    return FRAME_RULE_DOCS.get(name, "")


def derived_lines(spec, kit=None, balance=None) -> list[str]:
    """The derived values as text lines: key = value (rule)."""
    rows = derived_values(spec, kit, balance)
    if not rows:
        return []
    width = max(len(k) for k in rows)
    return [f"  {k:<{width}}  {_text(v['value'])}  ({v['rule']})" for k, v in rows.items()]


def _text(v) -> str:
    if isinstance(v, list):
        return "[" + ", ".join(f"{x:g}" for x in v) + "]"
    return f"{v:g}"
