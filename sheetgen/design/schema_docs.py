"""What the schema writes about itself: the README's parameter table and the
typed section classes (:mod:`sheetgen.design.sections`). ``python -m
sheetgen.design.spec`` prints the table, ``... --sections`` the classes; tests
keep both current."""

from __future__ import annotations

from sheetgen.design.schema import REQUIRED, SCHEMA, SECTIONS


def section_class_name(section: str) -> str:
    return section.capitalize() + "Params"


def sections_source() -> str:
    """The Python source of :mod:`sheetgen.design.sections`: one frozen, typed
    dataclass per section, written from SCHEMA (``python -m sheetgen.design.spec
    --sections`` prints it; a test keeps the module current)."""
    lines = ['"""Typed parameter sections, one frozen dataclass per section of the schema.',
             "",
             "Generated from sheetgen.design.schema.SCHEMA by `python -m sheetgen.design.spec --sections`;",
             "tests/test_spec.py fails while this file differs from what the schema writes. Do not edit.",
             "A derived key holds the number the layout solver set (or the pinned one) once the",
             'spec is loaded; only inside the solver may it still read "auto".',
             '"""',
             "",
             "from __future__ import annotations",
             "",
             "from dataclasses import dataclass",
             "from typing import Literal"]
    for section in SECTIONS:
        lines += ["", "", "@dataclass(frozen=True)", f"class {section_class_name(section)}:",
                  f'    """[{section}] (see the README\'s parameter table for units, ranges and meaning)."""', ""]
        for k in SCHEMA:
            if k.section != section:
                continue
            kind = "Literal[" + ", ".join(repr(c) for c in k.choices) + "]" if k.choices else k.kind.__name__
            note = f"  # {k.path}, {k.unit}" + (", derived" if k.derived else "")
            lines.append(f"    {k.attr}: {kind}{note}")
    lines += ["", "", "SECTION_CLASSES: dict[str, type] = {"]
    lines += [f'    "{s}": {section_class_name(s)},' for s in SECTIONS]
    lines += ["}", ""]
    return "\n".join(lines)


def reference_markdown() -> str:
    """The parameter reference as a Markdown table (for the README)."""
    from sheetgen.design.solver import RULES

    rule_docs = {r.name: r.doc for r in RULES}
    rows = ["| key | unit | default | allowed | derived by | meaning |", "|---|---|---|---|---|---|"]
    for k in SCHEMA:
        default = "required" if k.default is REQUIRED else (
            "true" if k.default is True else "false" if k.default is False else repr(k.default).strip("'"))
        derived = f"`{k.rule}`: {rule_docs[k.rule]}" if k.rule else "input"
        rows.append(f"| `{k.path}` | {k.unit} | {default} | {k.allowed()} | {derived} | {k.doc} |")
    rows.append("| `[[rotating_mass]]` `name`, `mass_kg`, `position_mm` | -, kg, mm | none | mass 0 to 20 kg; "
                "position [x, y, z] each within ±2000 mm | input | Hardware or a counterweight carried by the "
                "turning frame, in the kit frame. |")
    return "\n".join(rows)
