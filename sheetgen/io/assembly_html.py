"""assembly.html: the step-by-step assembly guide, one self-contained printable page.

Every step is a ``<section class="step">`` with its picture inline (base64 PNG), what to
do, the parts and bought items it uses, the tool notes and the cautions. In print no
step splits across pages (``break-inside: avoid``).
"""

from __future__ import annotations

import base64
from html import escape

CSS = """
body{font-family:system-ui,-apple-system,'Segoe UI',sans-serif;margin:0;color:#1d232a;background:#f4f2ee}
main{max-width:900px;margin:0 auto;padding:24px 28px 60px;background:#fff}
h1{font-size:26px;margin:0 0 6px} h2{font-size:19px;margin:0 0 8px}
p.lead{font-size:16px;line-height:1.5}
table{border-collapse:collapse;width:100%;font-size:14px;margin:6px 0}
th,td{text-align:left;padding:4px 8px;border-bottom:1px solid #ebe6dc;vertical-align:top}
th{background:#f7f4ef;font-weight:600} td.num{text-align:right}
section.step{border:1px solid #e4ded3;border-radius:6px;padding:14px 16px;margin:16px 0;
  break-inside:avoid;page-break-inside:avoid}
section.step.bench{background:#fbfaf7}
.pic{float:right;margin:0 0 8px 14px} .pic img{display:block;border:1px solid #eee}
.caution{background:#fff6e0;border-left:4px solid #e0a100;padding:6px 10px;margin:6px 0;clear:both}
.key{display:inline-block;width:12px;height:12px;vertical-align:middle;margin:0 4px}
ul{margin:4px 0 4px 18px;padding:0} small{color:#5b6570}
.clear{clear:both}
@media print{body{background:#fff} main{padding:0;max-width:none} section.step{margin:8px 0}
  section.intro{break-inside:avoid;page-break-inside:avoid}}
"""

GENERAL_CAUTIONS = (
    ("Before you start", "Cut and check every part first (laser safety belongs to cutting: fumes, fire, never "
                         "unattended). Sand off any char that stops a tab from seating."),
    ("Pinch points", "The gears and the turning frame pinch fingers; keep the motor unpowered until the last "
                     "step, and keep children's hands clear whenever it runs."),
    ("Wind and scale", "Outdoors the panel catches wind like a sail: screw the base down or ballast it. A "
                       "full-size array is structural work for local codes and a licensed engineer, not this "
                       "guide."),
)


def _table(head, rows, num=()) -> str:
    th = "".join(f"<th>{escape(h)}</th>" for h in head)
    body = "".join("<tr>" + "".join(f'<td class="num">{c}</td>' if i in num else f"<td>{c}</td>"
                                    for i, c in enumerate(r)) + "</tr>" for r in rows)
    return f"<table><tr>{th}</tr>{body}</table>"


def render_assembly_guide(title: str, steps, pictures: tuple[bytes, ...], descriptions: tuple[str, ...],
                          parts, hardware, labels: dict[str, str]) -> str:
    """The guide page.

    ``steps``: :class:`sheetgen.design.assembly_order.Step` s; ``pictures``/``descriptions``:
    one PNG and one sentence per step; ``parts``: the kit's cut parts (``name``, ``qty``,
    ``description``); ``hardware``: bought items (``item``, ``spec``, ``qty_per_kit``);
    ``labels``: the text engraved on each part."""
    from sheetgen.model3d.stepview import NEW_COLOUR, OLD_COLOUR

    specs = {h.item: h.spec for h in hardware}
    out = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
           f"<title>Assembly guide: {escape(title)}</title><style>{CSS}</style></head><body><main>",
           f"<h1>Assembly guide: {escape(title)}</h1>",
           f'<p class="lead">{len(steps)} steps, in an order the parts can reach their places. Each part is '
           f"engraved with the number of its step and its name. In the pictures the parts of the step are "
           f'<span class="key" style="background:{NEW_COLOUR}"></span>orange and the parts already in place '
           f'<span class="key" style="background:{OLD_COLOUR}"></span>grey. The drive end (+x) is the gear '
           f"side; "
           f"the plain end (-x) the other.</p>",
           '<section class="intro"><h2>You need</h2>',
           _table(("cut part", "qty", "engraved", "what it does"),
                  [(escape(p.name), str(p.qty), escape(labels.get(p.name, "")), escape(p.description))
                   for p in parts], num=(1,)),
           _table(("bought item", "what to buy", "qty"),
                  [(escape(h.item), escape(h.spec), str(h.qty_per_kit)) for h in hardware], num=(2,)),
           "<p>Tools: a vice or a clamp with two flat wooden blocks for the press fits, a screwdriver and a "
           "spanner for the bolts, glue where the steps say so.</p>"]
    out += [f'<div class="caution"><b>{escape(k)}.</b> {escape(v)}</div>' for k, v in GENERAL_CAUTIONS]
    out.append("</section>")
    for step, png, alt in zip(steps, pictures, descriptions):
        cls = "step bench" if step.bench else "step"
        out.append(f'<section class="{cls}" id="step-{step.number}">')
        out.append(f"<h2>Step {step.number}: {escape(step.title)}</h2>")
        b64 = base64.b64encode(png).decode("ascii")
        out.append(f'<div class="pic"><img src="data:image/png;base64,{b64}" width="480" height="340" '
                   f'alt="{escape(alt)}"></div>')
        out.append(f"<p>{escape(step.how)}</p>")
        rows = [(escape(name), str(qty), escape(labels.get(name, ""))) for name, qty in step.parts]
        if rows:
            out.append(_table(("part", "qty", "engraved"), rows, num=(1,)))
        bought = {n for h in hardware if h.item in dict(step.hardware) for n in (getattr(h, "parts", ()) or ())}
        hw = [(escape(c), "1", "") for c in step.components if c not in bought]
        what = step.hardware_specs if len(step.hardware_specs) == len(step.hardware) else \
            tuple(specs.get(item, "") for item, _ in step.hardware)  # each size its own spec
        hw += [(escape(item), str(qty), escape(w)) for (item, qty), w in zip(step.hardware, what)]
        if hw:
            out.append(_table(("bought item", "qty", "what"), hw, num=(1,)))
        if step.notes:
            out.append("<ul>" + "".join(f"<li>{escape(n)}</li>" for n in step.notes) + "</ul>")
        out += [f'<div class="caution"><b>Caution.</b> {escape(c)}</div>' for c in step.cautions]
        out.append('<div class="clear"></div></section>')
    out.append("<p><small>Made by sheetgen from the kit's own geometry: the order, the pictures and the "
               "engraved numbers all follow from the parameters.</small></p></main></body></html>\n")
    return "\n".join(out)


def assembly_guide_html(kit, spec) -> str:
    """The guide for a kit: steps from its geometry, one picture per step."""
    from pathlib import Path

    from sheetgen.design.assembly_order import assembly_steps, guide_items
    from sheetgen.kitmodel.part import LAYER_LABEL
    from sheetgen.model3d.stepview import describe_picture, step_pictures

    hardware = guide_items(kit, spec)  # the kit's hardware list, fitted step by step
    steps = assembly_steps(kit, spec, hardware)
    pictures = step_pictures(kit, steps)
    labels = {p.name: next((m.text for m in p.marks if m.layer == LAYER_LABEL and m.kind == "text"), "")
              for p in kit.parts}
    title = Path(str(spec.source)).stem if getattr(spec, "source", None) else "kit"
    return render_assembly_guide(title, steps, pictures, tuple(describe_picture(s) for s in steps), kit.parts,
                                 hardware, labels)
