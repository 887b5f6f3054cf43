"""Parameter files: TOML in, a validated frozen :class:`Spec` out.

The schema (:mod:`sheetgen.design.schema`) is the single source of truth for
every key: its type, unit, valid range, default and meaning. The README's
parameter reference is written from it (``python -m sheetgen.design.spec``
prints it as a Markdown table), and every error names the key and the valid
range.

Keys in a file are written without units (``panel.width = 160``); the unit is
part of the key's documentation. In Python the fields carry their unit
(``spec.panel.width_mm``).
"""

from __future__ import annotations

import difflib
import math
import re
import tomllib
from pathlib import Path
from typing import Any

from sheetgen.design.schema import (AUTO, COLOUR_FORM, POSITION_LIMIT_MM, REQUIRED, ROTATING_MASS_KEYS,
                                    ROTATING_MASS_LIMIT_KG, SCHEMA, SCHEMA_BY_PATH, SECTIONS, Derived, Key,
                                    RotatingMass, Spec, check_cross_rules)
from sheetgen.design.sections import SECTION_CLASSES
from sheetgen.errors import InputFileError, ParameterError
from sheetgen.geometry.placement import vec3

# ---------------------------------------------------------------------------
# reading and validating


def _did_you_mean(word: str, options) -> str:
    best = difflib.get_close_matches(word, list(options), n=1, cutoff=0.6)
    return f"; did you mean {best[0]}?" if best else ""


def _coerce(key: Key, value: Any, where: str):
    if key.derived and value == AUTO:
        return AUTO
    if key.kind is bool:
        if isinstance(value, bool):
            return value
        raise ParameterError(f"{where}{key.path} = {value!r}: must be {key.allowed()}")
    if key.kind is str:
        if not isinstance(value, str):
            raise ParameterError(f"{where}{key.path} = {value!r}: must be {key.allowed()}")
        if key.choices and value not in key.choices:
            raise ParameterError(f"{where}{key.path} = {value!r}: must be {key.allowed()}")
        if key.form == COLOUR_FORM and not re.fullmatch(r"#[0-9a-fA-F]{6}", value):
            raise ParameterError(f"{where}{key.path} = {value!r}: must be {key.allowed()}")
        return value
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        if key.derived:
            raise ParameterError(f'{where}{key.path} = {value!r}: must be "auto" or a number {key._allowed()}')
        raise ParameterError(f"{where}{key.path} = {value!r}: must be a number {key.allowed()}")
    if key.kind is int:
        if isinstance(value, float) and not value.is_integer():
            raise ParameterError(f"{where}{key.path} = {value!r}: must be a whole number {key.allowed()}")
        value = int(value)
    else:
        value = float(value)
        if not math.isfinite(value):
            raise ParameterError(f"{where}{key.path} = {value!r}: must be a finite number {key.allowed()}")
    if (key.lo is not None and value < key.lo) or (key.hi is not None and value > key.hi):
        raise ParameterError(f"{where}{key.path} = {value:g}: must be {key.allowed()}")
    return value


def parse_override(text: str) -> tuple[str, Any]:
    """``KEY=VALUE`` from the command line; VALUE is read as a TOML value, and
    a bare word that is not valid TOML is taken as a string."""
    if "=" not in text:
        raise ParameterError(f"--set {text}: must be KEY=VALUE, for example --set laser.kerf=0.2")
    path, raw = text.split("=", 1)
    path = path.strip()
    raw = raw.strip()
    if path not in SCHEMA_BY_PATH:
        if path.startswith("rotating_mass"):
            raise ParameterError(f"--set {path}: [[rotating_mass]] entries can only be given in the parameter file")
        raise ParameterError(f"--set {path}: unknown key{_did_you_mean(path, SCHEMA_BY_PATH)}")
    try:
        value = tomllib.loads(f"v = {raw}")["v"]
    except tomllib.TOMLDecodeError:
        value = raw
    return path, value


def _flatten(doc: dict, where: str) -> tuple[dict[str, Any], list]:
    flat: dict[str, Any] = {}
    masses = []
    for section, body in doc.items():
        if section == "rotating_mass":
            if not isinstance(body, list):
                raise ParameterError(f"{where}rotating_mass: must be an array of tables [[rotating_mass]]")
            masses = body
            continue
        if section not in SECTIONS:
            raise ParameterError(f"{where}[{section}]: unknown section{_did_you_mean(section, SECTIONS + ('rotating_mass',))}")
        if not isinstance(body, dict):
            raise ParameterError(f"{where}{section}: must be a table [{section}]")
        for name, value in body.items():
            path = f"{section}.{name}"
            if path not in SCHEMA_BY_PATH:
                raise ParameterError(f"{where}{path}: unknown key{_did_you_mean(path, SCHEMA_BY_PATH)}")
            flat[path] = value
    return flat, masses


def _rotating_masses(entries: list, where: str) -> tuple[RotatingMass, ...]:
    out = []
    for i, entry in enumerate(entries):
        tag = f"{where}rotating_mass[{i}]"
        if not isinstance(entry, dict):
            raise ParameterError(f"{tag}: must be a table with {', '.join(ROTATING_MASS_KEYS)}")
        for key in entry:
            if key not in ROTATING_MASS_KEYS:
                raise ParameterError(f"{tag}.{key}: unknown key{_did_you_mean(key, ROTATING_MASS_KEYS)}")
        for key in ROTATING_MASS_KEYS:
            if key not in entry:
                raise ParameterError(f"{tag}.{key}: missing (each [[rotating_mass]] needs {', '.join(ROTATING_MASS_KEYS)})")
        name = entry["name"]
        if not isinstance(name, str) or not name.strip():
            raise ParameterError(f"{tag}.name = {name!r}: must be a non-empty string")
        mass = entry["mass_kg"]
        lo, hi = ROTATING_MASS_LIMIT_KG
        if isinstance(mass, bool) or not isinstance(mass, (int, float)) or not (lo <= mass <= hi):
            raise ParameterError(f"{tag}.mass_kg = {mass!r}: must be a number from {lo:g} to {hi:g} kg")
        pos = entry["position_mm"]
        if (not isinstance(pos, list) or len(pos) != 3
                or any(isinstance(v, bool) or not isinstance(v, (int, float)) or abs(v) > POSITION_LIMIT_MM
                       for v in pos)):
            raise ParameterError(
                f"{tag}.position_mm = {pos!r}: must be [x, y, z] in mm, each from "
                f"{-POSITION_LIMIT_MM:g} to {POSITION_LIMIT_MM:g}")
        out.append(RotatingMass(name.strip(), float(mass), vec3(pos)))
    names = [m.name for m in out]
    dupes = sorted({n for n in names if names.count(n) > 1})
    if dupes:
        raise ParameterError(f"{where}rotating_mass: name {dupes[0]!r} is used twice; names must be unique")
    return tuple(out)


def spec_from_dict(doc: dict, overrides: tuple[tuple[str, Any], ...] = (), source: str = "",
                   resolve: bool = True) -> Spec:
    """Validate a TOML-shaped dict (plus ``--set`` overrides) into a Spec.

    Derived keys left at "auto" are set by the layout solver (sheetgen.design.solver)
    unless ``resolve`` is false; ``spec.derived`` then says which, and by which rule."""
    where = f"{source}: " if source else ""
    flat, masses = _flatten(doc, where)
    for path, value in overrides:
        if path not in SCHEMA_BY_PATH:
            raise ParameterError(f"--set {path}: unknown key{_did_you_mean(path, SCHEMA_BY_PATH)}")
        flat[path] = value
    sections: dict[str, dict] = {s: {} for s in SECTIONS}
    for key in SCHEMA:
        if key.path in flat:
            value = _coerce(key, flat[key.path], "" if any(p == key.path for p, _ in overrides) else where)
        elif key.default is REQUIRED:
            raise ParameterError(f"{where}{key.path}: missing; give it {key.allowed()}")
        else:
            value = key.default
        sections[key.section][key.attr] = value
    spec = Spec(
        **{s: SECTION_CLASSES[s](**sections[s]) for s in SECTIONS},
        rotating_masses=_rotating_masses(masses, where),
        source=source,
    )
    check_cross_rules(spec)
    if resolve:
        from sheetgen.design.solver import solve

        spec = solve(spec)
        check_cross_rules(spec)
    return spec


def load_spec(path: str | Path, overrides: tuple[str, ...] | list[str] = ()) -> Spec:
    """Read a parameter file and apply ``--set KEY=VALUE`` overrides."""
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise InputFileError(f"{p}: no such parameter file") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise InputFileError(f"{p}: cannot read the parameter file ({exc.__class__.__name__})") from None
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputFileError(f"{p}: not valid TOML ({exc})") from None
    return spec_from_dict(doc, tuple(parse_override(o) for o in overrides), source=str(p))


def demo_params_path() -> Path:
    """The demo parameter file shipped inside the package."""
    return Path(__file__).resolve().parents[1] / "data" / "demo.toml"


# ---------------------------------------------------------------------------
if __name__ == "__main__":  # pragma: no cover
    import sys

    from sheetgen.design.schema_docs import reference_markdown, sections_source

    print(sections_source() if sys.argv[1:] == ["--sections"] else reference_markdown(), end="" if sys.argv[1:] else "\n")
