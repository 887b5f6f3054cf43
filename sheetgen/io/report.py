"""report.html: one self-contained page (inline CSS and SVG, nothing fetched)."""

from __future__ import annotations

from html import escape

from sheetgen.io.sheets import sheet_name, sheet_svg

CAUTIONS = (
    ("Laser", "Never laser-cut PVC, vinyl or any other chlorinated plastic: it gives off hydrochloric acid. "
              "Run the fume extraction and ventilate: MDF and acrylic smoke is harmful. Never leave a running "
              "laser unattended, and keep a suitable fire extinguisher at hand."),
    ("Gears", "The gears and the turning frame pinch fingers. Keep hands clear while the motor is powered, "
              "and stop the motor at the travel ends."),
    ("Wind", "A tracker outdoors catches wind like a sail. Screw the base down through its anchor holes, "
             "or ballast it as the balance check advises."),
    ("Scale", "This kit is a desk or classroom model. A full-size array is structural work: its wind and "
              "snow loads follow local codes (for example ASCE 7, EN 1991-1-4) and a licensed engineer, "
              "not this tool."),
)

CSS = """
body{font-family:system-ui,-apple-system,'Segoe UI',sans-serif;margin:0;color:#1d232a;background:#f4f2ee}
main{max-width:1100px;margin:0 auto;padding:24px 28px 60px;background:#fff}
h1{font-size:26px;margin:0 0 6px} h2{font-size:19px;margin:30px 0 10px;border-bottom:2px solid #e4ded3;padding-bottom:4px}
p.lead{font-size:16px;line-height:1.5;margin:6px 0 16px}
table{border-collapse:collapse;width:100%;font-size:14px;margin:6px 0}
th,td{text-align:left;padding:5px 8px;border-bottom:1px solid #ebe6dc;vertical-align:top}
th{background:#f7f4ef;font-weight:600} td.num{text-align:right;font-variant-numeric:tabular-nums}
.pass{color:#1b6e2a;font-weight:700} .fail{color:#a11d1d;font-weight:700} .note{color:#8a5a00;font-weight:700}
.verdict{display:inline-block;padding:4px 10px;border-radius:4px;font-weight:700;margin:4px 0 10px}
.verdict.ok{background:#dff3e2;color:#1b6e2a} .verdict.bad{background:#f8dede;color:#a11d1d}
.figures{display:grid;grid-template-columns:repeat(auto-fit,minmax(150px,1fr));gap:10px;margin:12px 0}
.figure{background:#f7f4ef;border-radius:6px;padding:10px} .figure b{display:block;font-size:20px}
.figure span{font-size:12px;color:#5b6570}
.sheet{margin:14px 0 22px} .sheet svg{width:100%;height:auto;border:1px solid #ddd;background:#fff}
.model svg{max-width:100%;height:auto}
figure.plot{margin:14px 0} figure.plot svg{max-width:100%;height:auto}
.caution{background:#fff6e0;border-left:4px solid #e0a100;padding:8px 12px;margin:6px 0}
small{color:#5b6570}
"""


def _f(v, nd=1, unit=""):
    if v is None:
        return "–"
    return f"{v:,.{nd}f}{unit}"


def _row(cells, num=()):
    return "<tr>" + "".join(f'<td class="num">{c}</td>' if i in num else f"<td>{c}</td>"
                            for i, c in enumerate(cells)) + "</tr>"


def _table(head, rows, num=()):
    h = "".join(f"<th>{escape(x)}</th>" for x in head)
    return f"<table><thead><tr>{h}</tr></thead><tbody>{''.join(_row(r, num) for r in rows)}</tbody></table>"


def _sheets(build) -> list[str]:
    """The sheets as patterns: each distinct layout drawn once with the sheets cut from it."""
    s = build.summary
    groups = build.patterns or tuple((k,) for k in range(len(build.sheets)))
    bound = s["lower_bound_sheets"]
    out = ["<h2>Sheets</h2>",
           f"<p>{s['sheets']} sheet{'s' if s['sheets'] != 1 else ''} from {len(groups)} distinct "
           f"pattern{'s' if len(groups) != 1 else ''}; no layout can use fewer than {bound} "
           f"(lower bound: part areas grown by half the spacing against the usable sheet, windows counted "
           f"only as far as parts fit them and at most one of the large parts that cannot share a "
           f"window in each, parts that cannot share a sheet counted)"
           + (", so this run is at the bound." if s["sheets"] <= bound else
              f": {s['sheets'] - bound} above it.")
           + f" The layout search ended by {escape(s['stopped_by'].replace('_', ' '))}.</p>",
           "<p><small>Drawn to scale; the dashed line is the sheet margin. Each sheet's DXF lists the "
           "contours in cut order: holes and nested parts before the outlines around them. A pattern cut "
           "several times has one file per physical sheet, all with the same content.</small></p>"]
    for g in groups:
        run = build.sheets[g[0]]
        names = ", ".join(sheet_name(build.sheets[k].sheet.index) for k in g)
        times = f"cut {len(g)} times ({names})" if len(g) > 1 else names
        out.append(f'<div class="sheet"><b>{times}</b> — {len(run.sheet.polygons)} parts, utilisation '
                   f"{run.utilisation * 100:.1f} %, {run.plan.pierces} pierces, {run.plan.cut_time_s / 60:.1f} min"
                   " each" + sheet_svg(run.sheet, build.nest.sheet_size_mm, build.nest.margin_mm, fragment=True)
                   + "</div>")
    return out


def render_report(build, assembly_svg: str | None = None) -> str:
    """The report page for a finished build (sheetgen.pipeline.BuildResult)."""
    s = build.summary
    spec = build.spec
    minutes = s["cut_time_s"] / 60
    cost = f", costing {s['cost']:.2f} in sheets and machine time" if s["cost"] is not None else ""
    ok = s["checks_ok"]
    job = (f"Cut {s['kits']} kit{'s' if s['kits'] != 1 else ''} of a {spec.panel.width_mm:g} × "
           f"{spec.panel.height_mm:g} mm panel tracker from {s['sheets']} sheet{'s' if s['sheets'] != 1 else ''} "
           f"of {spec.sheet.thickness_mm:g} mm {escape(spec.sheet.material.replace('_', ' '))} "
           f"({spec.sheet.width_mm:g} × {spec.sheet.height_mm:g} mm): {s['parts']} parts in about "
           f"{minutes:.0f} minutes of laser time{cost}.")
    out = [f"<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>sheetgen report: "
           f"{escape(s['parameters'])}</title><style>{CSS}</style></head><body><main>",
           f"<h1>Tracker kit production run: {escape(s['parameters'])}</h1>",
           f"<p class=\"lead\">{job}</p>",
           '<p><a href="assembly.html">Assembly guide: the steps in order, with pictures (assembly.html)</a></p>',
           f"<div class=\"verdict {'ok' if ok else 'bad'}\">"
           f"{'All design checks pass' if ok else 'A design check fails: see the checks below before cutting'}</div>",
           '<div class="figures">',
           *(f'<div class="figure"><b>{v}</b><span>{k}</span></div>' for k, v in (
               ("sheets (lower bound " + str(s["lower_bound_sheets"]) + ")", s["sheets"]),
               ("parts", s["parts"]),
               ("laser time", f"{minutes:.1f} min"),
               ("cut length", f"{s['cut_length_mm'] / 1000:.2f} m"),
               ("pierces", s["pierces"]),
               ("travel (saved by planning)",
                f"{s['travel_mm'] / 1000:.2f} m ({(s['travel_unplanned_mm'] - s['travel_mm']) / 1000:.2f} m)"),
               ("cost", "–" if s["cost"] is None else f"{s['cost']:.2f}"),
           )),
           "</div>"]
    out += _checks(build)
    out += _derived(build)
    out += _sheets(build)
    out += _bom(build)
    out += _hardware_and_cost(build)
    out += _gears(build)
    out += _cut_table(build)
    out += _drive(build)
    if "assembly" in build.summary:
        out += _assembly(build.summary["assembly"], assembly_svg)
    out += ["<h2>Safety</h2>"]
    out += [f'<div class="caution"><b>{escape(k)}.</b> {escape(v)}</div>' for k, v in CAUTIONS]
    out += ["<p><small>Made by sheetgen from the parameters above. Figures marked as estimates rest on the "
            "sources named in the project's documentation; check press fits on a test coupon first.</small></p>",
            "</main></body></html>\n"]
    return "\n".join(out)


def _derived(build):
    """Derived values beside the inputs they follow from."""
    from sheetgen.design.solver import rule_doc

    rows = build.summary.get("derived", {})
    if not rows:
        return []
    body = []
    for key, d in rows.items():
        v = d["value"]
        value = "[" + ", ".join(f"{x:g}" for x in v) + "]" if isinstance(v, list) else f"{v:g}"
        body.append((f"<code>{escape(key)}</code>", value, f"<code>{escape(d['rule'])}</code>",
                     escape(rule_doc(d["rule"]))))
    spec = build.spec
    inputs = (f"panel {spec.panel.width_mm:g} × {spec.panel.height_mm:g} × {spec.panel.thickness_mm:g} mm, "
              f"{spec.panel.mass_kg:g} kg; sheet {spec.sheet.thickness_mm:g} mm "
              f"{spec.sheet.material.replace('_', ' ')}; kerf {spec.laser.kerf_mm:g} mm; motor "
              f"{spec.motor.stall_torque_Nm:g} N·m stall, {spec.motor.shaft_length_mm:g} mm shaft; site "
              f"{spec.site.latitude_deg:g}°, wind {spec.site.wind_speed_m_s:g} m/s")
    return ["<h2>Derived values</h2>",
            f"<p><small>From the inputs ({escape(inputs)}). Keys left at \"auto\" were set by the rule named; "
            "give a number in the parameter file to pin one.</small></p>",
            _table(["key", "value", "rule", "how"], body, num=(1,))]


def _checks(build):
    b = build.summary["balance"]
    rows = []
    for c in b["checks"]:
        if c["pass"]:
            verdict = '<span class="pass">pass</span>'
        elif c.get("binding", True):
            verdict = '<span class="fail">FAIL</span>'
        else:
            verdict = '<span class="note">advice</span>'
        rows.append((escape(c["name"]), verdict, escape(c["reason"])))
    cw = b["counterweight"]
    figures = [
        ("turning mass", _f(b["rotating_mass_kg"] * 1000, 1, " g")),
        ("CG (kit frame x, y, z)", ", ".join(_f(v, 1) for v in b["cg_mm"]) + " mm"),
        ("static unbalance", _f(b["static_unbalance_gmm"], 0, " g·mm")),
        ("tracking range", f"{b['tracking_range_deg'][0]:g} to {b['tracking_range_deg'][1]:g} deg"),
        ("torque at the axle: gravity / friction / wind", f"{b['gravity_torque_max_Nm']:.4f} / "
                                                          f"{b['friction_torque_Nm']:.4f} / {b['wind_torque_Nm']:.4f} N·m"),
        ("load torque, worst case", f"{b['load_torque_Nm']:.4f} N·m"),
        ("motor torque required / available", f"{b['motor_torque_required_Nm']:.4f} / "
                                              f"{b['motor_torque_available_Nm']:.4f} N·m (margin {b['torque_margin']:.2f})"),
        ("tooth stress / allowable", f"{b['tooth_stress_MPa']:.2f} / {b['tooth_stress_allowable_MPa']:.2f} MPa"),
        ("counterweight carried" if cw.get("carried") else "counterweight to balance",
         f"{cw['mass_kg'] * 1000:.1f} g at ({', '.join(_f(v, 1) for v in cw['position_mm'])}) mm"
         + (f"; unbalance {_f(cw['bare_unbalance_gmm'], 0)} g·mm bare, {_f(cw['residual_unbalance_gmm'], 0)} "
            "g·mm with it" if cw.get("carried") else "")
         if cw.get("found", True) else "no place found on the frame"),
        ("ballast against tipping in the design wind", f"{b['ballast_kg']:.2f} kg"),
    ]
    return ["<h2>Balance, torque and strength checks</h2>",
            _table(("check", "verdict", "why"), rows),
            _table(("figure", "value"), [(escape(k), escape(v)) for k, v in figures])]


def _drive(build):
    """Drive in time and tracking through the year: figures, hourly table, plots."""
    from sheetgen.mechanics.plots import drive_plots

    b = build.summary["balance"]
    y, cd, pulse = b["year"], b["continuous_drive"], b["pulse"]
    shortest = next(d for d in y["days"] if d["name"] == y["shortest_day"])
    figures = [("peak tracking rate over the year", f"{b['peak_tracking_rate_deg_per_h']:.1f} deg/h"),
               (f"tracked on the shortest day ({y['shortest_day']})",
                f"{b['shortest_day_tracked_h']:.1f} of {shortest['day_length_h']:.1f} h")]
    if pulse is not None:
        figures += [("angle per pulse, calm air (largest)", f"{b['pulse_step_calm_deg']:.3g} deg"),
                    ("angle per pulse, design wind (smallest)", f"{b['pulse_step_wind_deg']:.3g} deg"),
                    ("largest step allowed (drive.max_step)", f"{pulse['max_step_deg']:g} deg")]
    figures += [("steady drive: axle speed under the worst load", f"{cd['steady_speed_deg_h']:,.0f} deg/h"),
                ("steady drive: time across the travel",
                 "does not cross" if cd["crossing_time_s"] is None else f"{cd['crossing_time_s']:.3g} s")]
    head = ["solar hour"] + [f"{d['name']}: rotation deg (deg/h)" for d in y["days"]]
    hours = sorted({h for d in y["days"] for h in d["hours"]})
    rows = []
    for h in hours:
        cells = [f"{h:02.0f}:00"]
        for d in y["days"]:
            if h in d["hours"]:
                i = d["hours"].index(h)
                cells.append(f"{d['rotation_deg'][i]:+.1f} ({d['rate_deg_h'][i]:.1f})")
            else:
                cells.append("–")
        rows.append(cells)
    out = ["<h2>Drive in time and tracking through the year</h2>",
           "<div class=\"figures\">",
           *(f'<div class="figure"><b>{escape(v)}</b><span>{escape(k)}</span></div>' for k, v in figures),
           "</div>"]
    out += [f'<p class="note">{escape(w)}</p>' for w in y["warnings"]]
    if pulse is not None and pulse["fixes"]:
        out.append("<p>Would pass the pulse checks: " + "; ".join(
            escape(f"{f['text']} ({f['calm_max_deg']:.3g} deg calm, {f['wind_min_deg']:.3g} deg in the design wind)")
            for f in pulse["fixes"]) + ".</p>")
    for key, caption, svg in drive_plots(build.balance):
        body = svg.split("?>", 1)[1] if svg.startswith("<?xml") else svg
        # inline in HTML the parser knows the SVG and xlink namespaces: drop the declarations' URLs
        body = "<svg" + body.split("<svg", 1)[1].replace(' xmlns:xlink="http://www.w3.org/1999/xlink"', "")
        out.append(f'<figure class="plot" id="plot-{key}">{body}<figcaption><small>{escape(caption)}'
                   "</small></figcaption></figure>")
    out += [_table(head, rows, num=(1, 2, 3)),
            "<p><small>Rotation the sun asks of the frame at each whole solar hour while the sun is up "
            "(positive toward the afternoon), and how fast it is turning then. Keep hands clear of the gears and "
            "the frame while the drive is powered; an outdoor tracker must be secured against wind.</small></p>"]
    return out


def _assembly(a: dict, picture: str | None):
    ok = a.get("ok", False)
    rows = [
        ("solids", str(a["solid_count"])),
        ("shared volume between parts", "none" if not a["interference"] else
         f"{len(a['interference'])} pairs, up to {a['max_interference_mm3']:.2f} mm³"),
        ("floating parts", "none" if not a["floating_parts"] else escape(", ".join(a["floating_parts"]))),
        ("least clearance through the travel", f"{a['min_clearance_mm']:.2f} mm at {a['min_clearance_angle_deg']:g} deg"),
        ("turning mass and CG from the solids", f"{a['mass_kg'] * 1000:.1f} g at ("
         + ", ".join(f"{v:.1f}" for v in a["cg_mm"]) + ") mm"),
    ]
    if isinstance(a.get("frame_clearance"), dict):
        fc = a["frame_clearance"]
        need = a.get("frame_clearance_required_mm")
        rows.append(("turning frame over the fixed parts", escape(
            f"{fc['turning']} to {fc['fixed']}: {fc['distance_mm']:.2f} mm at {fc['angle_deg']:g} deg"
            + (f" (frame.clearance {need:g} mm)" if need is not None else ""))))
    out = ["<h2>Assembled kit (3D check)</h2>",
           f"<div class=\"verdict {'ok' if ok else 'bad'}\">"
           f"{'The 3D model assembles cleanly' if ok else 'The 3D model shows a fault'}</div>",
           _table(("check", "result"), rows)]
    if picture:
        body = picture.split("?>", 1)[1] if picture.startswith("<?xml") else picture
        out.append(f'<div class="model">{body}</div><p><small>The full model is model/assembly.step.</small></p>')
    return out


def _bom(build):
    rows = []
    total = 0.0
    for e in build.summary["bill_of_materials"]:
        total += e["mass_kg"] * e["qty_per_kit"]
        rows.append((escape(e["name"]), e["qty_per_kit"], e["qty"], f"{e['bbox_mm'][0]:.1f} × {e['bbox_mm'][1]:.1f}",
                     _f(e["mass_kg"] * 1000, 1), escape(e["description"])))
    return ["<h2>Parts</h2>",
            _table(("part", "per kit", f"for {build.kits} kits", "size mm", "mass g each", "what it does"), rows,
                   num=(1, 2, 4)),
            f"<p><small>Cut parts per kit weigh {total * 1000:.0f} g in "
            f"{escape(build.spec.sheet.material.replace('_', ' '))}; files for single parts are in parts/.</small></p>"]


def _money(v) -> str:
    """A cost figure; an absent one (no price given) is "-", never 0."""
    return "-" if v is None else f"{v:,.2f}"


def _hardware_and_cost(build) -> list[str]:
    """The bought items (summary.json ``hardware``, also in bom.csv) and the cost per kit."""
    s = build.summary
    if "hardware" not in s:
        return []
    rows = []
    for h in s["hardware"]:
        size = " × ".join(x for x in (
            f"Ø {h['diameter_mm']:g}" if "diameter_mm" in h else "",
            f"{h['length_mm']:g} long" if "length_mm" in h else "") if x)
        rows.append((escape(h["item"]), escape(h["spec"]), size, h["qty_per_kit"], h["qty_total"]))
    out = ["<h2>Hardware</h2>",
           _table(("item", "what to buy", "size mm", "per kit", f"for {build.kits} kits"), rows, num=(3, 4)),
           "<p><small>Sized from the kit: bolt lengths cover the plates they pass, a washer each side, the nut "
           "and two thread pitches, rounded up to the ISO 4762 length series; bolt sizes follow the ISO 273 "
           "clearance holes. The same list, with the cut parts, is in bom.csv.</small></p>"]
    c = s.get("cost_per_kit")
    if c is None:
        return out
    lines: list[tuple[str, str, str]] = [("sheets", f"{build.summary['sheets']} sheets at sheet.price, shared by {c['kits']} kits", _money(c["sheets"])),
            ("machine time", f"{build.summary['cut_time_s'] / 60:.1f} min at laser.rate, shared by {c['kits']} kits",
             _money(c["machine"]))]
    for ln in c["hardware"]:
        qty = f"{ln['qty_per_kit']:g} m" if ln["unit"] == "metre" else (
            "per kit" if ln["unit"] == "kit" else f"{ln['qty_per_kit']:g} ×")
        lines.append((escape(", ".join(ln["items"])), f"{qty} at {_money(ln['price'])} ({ln['price_key']})",
                     _money(ln["cost"])))
    lines.append(("<b>total per kit</b>", "", f"<b>{_money(c['total'])}</b>"))
    out += ["<h3>Cost per kit</h3>", _table(("what", "how", "cost"), lines, num=(2,))]
    if c["missing"]:
        out.append("<p><small>Not priced (give these keys to complete the total): "
                   + ", ".join(f"<code>{escape(k)}</code>" for k in c["missing"]) + ".</small></p>")
    return out


def _gears(build):
    g = build.summary["gears"]
    keys = (("teeth", "teeth", 0), ("module", "module_mm", 2), ("profile shift x", "shift", 3),
            ("pitch diameter", "pitch_diameter_mm", 3), ("base diameter", "base_diameter_mm", 3),
            ("tip diameter", "tip_diameter_mm", 3), ("root diameter", "root_diameter_mm", 3))
    rows = [(label, _f(g["pinion"][k], nd) if nd else g["pinion"][k], _f(g["wheel"][k], nd) if nd else g["wheel"][k])
            for label, k, nd in keys]
    rows.append(("span over k teeth", f"{g['pinion']['span_mm']:.3f} (k = {g['pinion']['span_teeth']})",
                 f"{g['wheel']['span_mm']:.3f} (k = {g['wheel']['span_teeth']})"))
    rows.append(("over two pins", f"{g['pinion']['over_pins_mm']:.3f} (pins {g['pinion']['pin_diameter_mm']:.2f})",
                 f"{g['wheel']['over_pins_mm']:.3f} (pins {g['wheel']['pin_diameter_mm']:.2f})"))
    warnings = g["warnings"] + g["pinion"]["warnings"] + g["wheel"]["warnings"]
    return ["<h2>Gears: check them with calipers</h2>",
            f"<p>Centre distance {g['centre_distance_mm']:.3f} mm, ratio {g['ratio']:g}, "
            f"transverse contact ratio {g['contact_ratio']:.2f}. Dimensions of the finished gears in mm.</p>",
            _table(("", "pinion", "wheel"), rows, num=(1, 2)),
            *(f'<p class="note">{escape(w)}</p>' for w in dict.fromkeys(warnings))]


def _cut_table(build):
    rows = []
    for e in build.summary["sheet_runs"]:
        rows.append((escape(e["file"]), e["parts"], f"{e['utilisation'] * 100:.1f} %", e["pierces"],
                     _f(e["cut_length_mm"] / 1000, 2), _f(e["travel_mm"] / 1000, 2),
                     _f(e["travel_saved_mm"] / 1000, 2), _f(e["cut_time_s"] / 60, 1),
                     "–" if e["cost"] is None else f"{e['cost']:.2f}"))
    s = build.summary
    rows.append(("<b>total</b>", s["parts"], "", s["pierces"], _f(s["cut_length_mm"] / 1000, 2),
                 _f(s["travel_mm"] / 1000, 2), _f((s["travel_unplanned_mm"] - s["travel_mm"]) / 1000, 2),
                 _f(s["cut_time_s"] / 60, 1), "–" if s["cost"] is None else f"{s['cost']:.2f}"))
    spec = build.spec
    return ["<h2>Cut time and cost</h2>",
            f"<p><small>Cutting at {spec.laser.cut_speed_mm_s:g} mm/s, travelling at {spec.laser.rapid_speed_mm_s:g} "
            f"mm/s, {spec.laser.pierce_time_s:g} s per pierce; kerf {spec.laser.kerf_mm:g} mm.</small></p>",
            _table(("sheet", "parts", "used", "pierces", "cut m", "travel m", "travel saved m", "time min", "cost"),
                   rows, num=(1, 2, 3, 4, 5, 6, 7, 8))]
