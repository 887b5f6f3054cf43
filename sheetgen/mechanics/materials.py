"""Materials table: density and bending strength, each with where it comes from.

Two tables:

* sheet materials (the keys of ``sheet.material``), used for part masses and for
  the allowable tooth stress of the laser-cut gears;
* axle rod materials (the keys of ``axle.material``), used for the axle mass.

Each figure carries its source. "common practice" marks a fact of the trade;
"from memory" marks a value recalled without reading its source for this
table: check it against your supplier's data sheet before relying on it.

Standard minimums (EN 622-5) are acceptance values for the board, not design
values: the tooth check divides them by ``check.tooth_safety``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sheetgen.errors import ParameterError


@dataclass(frozen=True)
class SheetMaterial:
    key: str
    name: str
    density_kg_m3: float  # nominal, used for masses
    density_range_kg_m3: tuple[float, float]
    density_source: str
    bending_strength_MPa: float  # modulus of rupture used for the tooth check
    bending_strength_source: str
    note: str = ""
    # edge bearing: compressive strength in the sheet's plane, for a stop pressing on the cut edge
    bearing_strength_MPa: float = 0.0
    bearing_strength_source: str = ""
    modulus_MPa: float = 0.0  # modulus of elasticity in bending, taken low (the mount's stiffness check)
    modulus_source: str = ""


@dataclass(frozen=True)
class RodMaterial:
    key: str
    name: str
    density_kg_m3: float
    density_source: str


SHEET_MATERIALS: dict[str, SheetMaterial] = {
    "mdf": SheetMaterial(
        key="mdf",
        name="MDF (medium density fibreboard)",
        density_kg_m3=750.0,
        density_range_kg_m3=(650.0, 800.0),
        density_source=(
            "EN 622-5:2009 (MDF: density from 650 to 800 kg/m3); 750 is a mid-range nominal "
            "(thin boards sit toward the top of the range: common practice)"),
        bending_strength_MPa=23.0,
        bending_strength_source=(
            "EN 622-5:2009, general-purpose MDF up to 9 mm: bending strength at least 23 N/mm2 "
            "(a board acceptance minimum, not a design value)"),
        note="Laser-cut MDF gives off formaldehyde-laden smoke: cut only with extraction.",
        bearing_strength_MPa=12.0,
        bearing_strength_source=(
            "from memory: compressive strength of MDF in the plane of the board, taken low (about 12 N/mm2; "
            "the core is less dense than the faces); verify with the board maker's data sheet"),
        modulus_MPa=2500.0,
        modulus_source=(
            "EN 622-5:2009, general-purpose MDF: modulus of elasticity in bending at least about 2500 N/mm2 "
            "for thin boards (from memory; a board acceptance minimum, taken as the design value)"),
    ),
    "birch_plywood": SheetMaterial(
        key="birch_plywood",
        name="birch plywood",
        density_kg_m3=680.0,
        density_range_kg_m3=(630.0, 720.0),
        density_source="manufacturers' data sheets for birch plywood: about 680 kg/m3 (range from memory)",
        bending_strength_MPa=40.0,
        bending_strength_source=(
            "from memory: in-plane bending strength of thin 3-ply birch across its weaker direction, "
            "taken low (about a third of clear birch's modulus of rupture); verify with the supplier's data sheet"),
        note="Glue lines vary between suppliers; laser-grade boards cut cleaner.",
        bearing_strength_MPa=20.0,
        bearing_strength_source=(
            "from memory: compressive strength of thin birch plywood in its plane, across its weaker direction, "
            "taken low (about half of clear birch's compression parallel to the grain); verify with the supplier"),
        modulus_MPa=4000.0,
        modulus_source=(
            "from memory: bending modulus of thin 3-ply birch plywood across its weaker direction, taken "
            "low (clear birch is near 14000 N/mm2 along the grain); verify with the supplier's data sheet"),
    ),
    "cast_acrylic": SheetMaterial(
        key="cast_acrylic",
        name="cast acrylic (PMMA)",
        density_kg_m3=1190.0,
        density_range_kg_m3=(1180.0, 1200.0),
        density_source="manufacturers' data sheets for cast PMMA, measured to ISO 1183: 1190 kg/m3 (from memory)",
        bending_strength_MPa=110.0,
        bending_strength_source=(
            "manufacturers' data sheets for cast PMMA, flexural strength to ISO 178: about 110 MPa (from memory); "
            "acrylic is notch-sensitive and laser-cut edges carry residual stress"),
        note="Acrylic burns: never leave the laser unattended.",
        bearing_strength_MPa=100.0,
        bearing_strength_source=(
            "manufacturers' data sheets for cast PMMA, compressive strength to ISO 604: about 100 to 120 MPa "
            "(from memory; the lower end taken)"),
        modulus_MPa=3000.0,
        modulus_source=(
            "manufacturers' data sheets for cast PMMA, flexural modulus to ISO 178: about 3000 to 3300 N/mm2 "
            "(from memory; the lower figure)"),
    ),
}

ROD_MATERIALS: dict[str, RodMaterial] = {
    "steel": RodMaterial("steel", "steel rod", 7850.0, "common practice (carbon steel, 7850 kg/m3)"),
    "aluminium": RodMaterial(
        "aluminium", "aluminium rod", 2700.0,
        "common practice (aluminium 2700 kg/m3; wrought alloys 2660 to 2810, from memory)"),
    "beech": RodMaterial(
        "beech", "beech dowel", 720.0,
        "from memory (European beech at about 12 % moisture content, 680 to 750 kg/m3)"),
}


def sheet_material(key: str) -> SheetMaterial:
    """The sheet material for a ``sheet.material`` key."""
    try:
        return SHEET_MATERIALS[key]
    except KeyError:
        allowed = ", ".join(repr(k) for k in SHEET_MATERIALS)
        raise ParameterError(f"sheet.material = {key!r}: must be one of {allowed}") from None


def rod_material(key: str) -> RodMaterial:
    """The axle rod material for an ``axle.material`` key."""
    try:
        return ROD_MATERIALS[key]
    except KeyError:
        allowed = ", ".join(repr(k) for k in ROD_MATERIALS)
        raise ParameterError(f"axle.material = {key!r}: must be one of {allowed}") from None


def axle_mass_kg(material: str, diameter_mm: float, length_mm: float) -> float:
    """Mass of a round rod: pi d^2 / 4 x length x density."""
    volume_m3 = math.pi * (diameter_mm * 1e-3) ** 2 / 4.0 * (length_mm * 1e-3)
    return volume_m3 * rod_material(material).density_kg_m3
