"""Parameter files: every error path names the key and the allowed range."""

from __future__ import annotations

import copy
import tomllib
from pathlib import Path

import pytest

from sheetgen.errors import InputFileError, ParameterError
from sheetgen.design.schema_docs import reference_markdown
from sheetgen.design.spec import load_spec, parse_override, spec_from_dict
from sheetgen.design.schema import SCHEMA
from tests.conftest import DEMO, PARAMS


@pytest.fixture()
def doc():
    return tomllib.loads(DEMO.read_text())


def test_demo_loads_with_units_in_field_names(demo_spec):
    assert demo_spec.panel.width_mm == 150
    assert demo_spec.sheet.material == "mdf"
    assert demo_spec.rotating_masses[0].position_mm == (40.0, -30.0, -4.0)


@pytest.mark.parametrize("path", sorted(PARAMS.glob("*.toml")), ids=lambda p: p.name)
def test_every_shipped_parameter_file_loads(path):
    load_spec(path)


def test_contract_keys_exist():
    paths = {k.path for k in SCHEMA}
    for key in ("panel.width", "panel.height", "panel.thickness", "panel.mass", "sheet.width", "sheet.height",
                "sheet.thickness", "sheet.margin", "sheet.material", "laser.kerf", "nest.spacing"):
        assert key in paths


def test_every_key_is_documented_with_unit_and_range():
    table = reference_markdown()
    for k in SCHEMA:
        assert f"`{k.path}`" in table
        assert k.doc
        assert k.choices or k.kind is bool or k.form or (k.lo is not None and k.hi is not None), k.path


def test_unknown_key_gets_did_you_mean(doc):
    doc["panel"]["widht"] = 100
    with pytest.raises(ParameterError, match=r"panel\.widht: unknown key; did you mean panel\.width\?"):
        spec_from_dict(doc)


def test_unknown_section(doc):
    doc["lazer"] = {"kerf": 0.2}
    with pytest.raises(ParameterError, match=r"\[lazer\]: unknown section; did you mean laser\?"):
        spec_from_dict(doc)


def test_wrong_type(doc):
    doc["panel"]["width"] = "wide"
    with pytest.raises(ParameterError, match=r"panel\.width = 'wide': must be a number from 40 to 600 mm"):
        spec_from_dict(doc)


def test_bool_is_not_a_number(doc):
    doc["panel"]["width"] = True
    with pytest.raises(ParameterError, match="panel.width"):
        spec_from_dict(doc)


def test_whole_number_required(doc):
    doc["drive"]["wheel_teeth"] = 36.5
    with pytest.raises(ParameterError, match=r"drive\.wheel_teeth = 36\.5: must be a whole number"):
        spec_from_dict(doc)


def test_out_of_range(doc):
    doc["panel"]["width"] = 5
    with pytest.raises(ParameterError, match=r"panel\.width = 5: must be from 40 to 600 mm"):
        spec_from_dict(doc)


def test_choice(doc):
    doc["sheet"]["material"] = "pvc"
    with pytest.raises(ParameterError, match=r"sheet\.material = 'pvc': must be one of 'mdf', 'birch_plywood'"):
        spec_from_dict(doc)


def test_missing_required(doc):
    del doc["panel"]["mass"]
    with pytest.raises(ParameterError, match=r"panel\.mass: missing; give it from 0\.005 to 5 kg"):
        spec_from_dict(doc)


def test_nan_rejected(doc):
    doc["panel"]["width"] = float("nan")
    with pytest.raises(ParameterError, match="panel.width"):
        spec_from_dict(doc)


@pytest.mark.parametrize("kerf", [0.15, 0.18, 0.2, 0.25])
def test_typical_kerf_for_3mm_wood_and_acrylic_accepted(doc, kerf):
    # Typical kerf for 3 mm wood and acrylic on a CO2 laser: 0.15 to 0.25 mm (common practice)
    for material in ("mdf", "birch_plywood", "cast_acrylic"):
        d = copy.deepcopy(doc)
        d["sheet"]["material"] = material
        d["laser"]["kerf"] = kerf
        assert spec_from_dict(d).laser.kerf_mm == kerf


@pytest.mark.parametrize("kerf", [-0.2, 0.0, 0.01, 0.7, 3.0])
def test_nonsense_kerf_rejected(doc, kerf):
    doc["laser"]["kerf"] = kerf
    with pytest.raises(ParameterError, match=r"laser\.kerf"):
        spec_from_dict(doc)


def test_kerf_small_against_smallest_slot(doc):
    doc["sheet"]["thickness"] = 1.5
    doc["laser"]["kerf"] = 0.5
    with pytest.raises(ParameterError, match=r"laser\.kerf = 0\.5: must be at most a quarter of the smallest slot"):
        spec_from_dict(doc)


def test_overrides_parse_toml_values_and_bare_words():
    assert parse_override("laser.kerf=0.2") == ("laser.kerf", 0.2)
    assert parse_override("sheet.material=birch_plywood") == ("sheet.material", "birch_plywood")
    assert parse_override('sheet.material="cast_acrylic"') == ("sheet.material", "cast_acrylic")
    assert parse_override("sheet.grain=true") == ("sheet.grain", True)


def test_override_errors():
    with pytest.raises(ParameterError, match=r"--set laser\.kerf: must be KEY=VALUE"):
        parse_override("laser.kerf")
    with pytest.raises(ParameterError, match=r"--set laser\.kref: unknown key; did you mean laser\.kerf\?"):
        parse_override("laser.kref=0.2")
    with pytest.raises(ParameterError, match="rotating_mass"):
        parse_override("rotating_mass.mass_kg=1")


def test_override_applies_and_is_validated():
    spec = load_spec(DEMO, ["laser.kerf=0.2", "panel.width=140"])
    assert spec.laser.kerf_mm == 0.2 and spec.panel.width_mm == 140
    with pytest.raises(ParameterError, match=r"^panel\.width = 1000: must be from 40 to 600 mm$"):
        load_spec(DEMO, ["panel.width=1000"])


def test_rotating_mass_errors(doc):
    d = copy.deepcopy(doc)
    d["rotating_mass"][0]["mass"] = 1
    with pytest.raises(ParameterError, match=r"rotating_mass\[0\]\.mass: unknown key; did you mean mass_kg\?"):
        spec_from_dict(d)
    d = copy.deepcopy(doc)
    d["rotating_mass"][0]["position_mm"] = [1, 2]
    with pytest.raises(ParameterError, match=r"rotating_mass\[0\]\.position_mm"):
        spec_from_dict(d)
    d = copy.deepcopy(doc)
    d["rotating_mass"][0]["mass_kg"] = -1
    with pytest.raises(ParameterError, match=r"rotating_mass\[0\]\.mass_kg = -1: must be a number from 0 to 20 kg"):
        spec_from_dict(d)
    d = copy.deepcopy(doc)
    del d["rotating_mass"][1]["name"]
    with pytest.raises(ParameterError, match=r"rotating_mass\[1\]\.name: missing"):
        spec_from_dict(d)
    d = copy.deepcopy(doc)
    d["rotating_mass"][1]["name"] = d["rotating_mass"][0]["name"]
    with pytest.raises(ParameterError, match="used twice"):
        spec_from_dict(d)


@pytest.mark.parametrize("edit, pattern", [
    (("drive", "wheel_teeth", 10), r"drive\.wheel_teeth = 10: must be at least drive\.pinion_teeth"),
    (("motor", "shaft_flat", 6.0), r"motor\.shaft_flat = 6: must be less than motor\.shaft_diameter"),
    (("drive", "pulse_voltage", 0), r"drive\.pulse_capacitance and drive\.pulse_voltage"),
    (("frame", "ledge", 39), r"frame\.ledge = 39: must be less than a third"),
    (("motor", "screw_spacing", 6), r"motor\.screw_spacing = 6: the screw holes would cut into the shaft hole"),
    ((("sheet", "height", 140), ("sheet", "margin", 50)), r"sheet\.margin = 50: leaves 500 x 40 mm"),
])
def test_cross_field_rules(doc, edit, pattern):
    edits = edit if isinstance(edit[0], tuple) else (edit,)
    for section, key, value in edits:
        doc[section][key] = value
    with pytest.raises(ParameterError, match=pattern):
        spec_from_dict(doc)


def test_unreadable_files(tmp_path):
    with pytest.raises(InputFileError, match="no such parameter file"):
        load_spec(tmp_path / "missing.toml")
    bad = tmp_path / "bad.toml"
    bad.write_text("[panel\nwidth = 3")
    with pytest.raises(InputFileError, match=r"bad\.toml: not valid TOML"):
        load_spec(bad)
    binary = tmp_path / "bin.toml"
    binary.write_bytes(b"\xff\xfe\x00")
    with pytest.raises(InputFileError, match="cannot read"):
        load_spec(binary)


def test_derived_keys_take_auto_or_a_number(doc):
    d = copy.deepcopy(doc)
    d["axle"]["height"] = "auto"
    assert spec_from_dict(d, resolve=False).axle.height_mm == "auto"
    d["axle"]["height"] = 95
    assert spec_from_dict(d, resolve=False).axle.height_mm == 95.0
    d["axle"]["height"] = "high"
    with pytest.raises(ParameterError, match=r'^axle\.height = \'high\': must be "auto" or a number from 20 to 800 mm$'):
        spec_from_dict(d, resolve=False)
    d["axle"]["height"] = 5
    with pytest.raises(ParameterError, match=r'^axle\.height = 5: must be "auto" or from 20 to 800 mm$'):
        spec_from_dict(d, resolve=False)
    with pytest.raises(ParameterError, match=r"^drive\.layers = 2\.5: must be a whole number"):
        load_spec(DEMO, ["drive.layers=2.5"])


def test_a_resolved_spec_lists_what_was_derived(demo_spec):
    assert demo_spec.is_resolved()
    paths = {d.path for d in demo_spec.derived}
    assert "axle.height" in paths and "panel.width" not in paths
    assert all(d.rule for d in demo_spec.derived)


def test_typed_sections_are_generated_from_the_schema():
    # internal consistency: sheetgen/design/sections.py is what the schema writes, field for field
    import dataclasses
    import typing

    from sheetgen.design import sections
    from sheetgen.design.schema_docs import section_class_name, sections_source
    from sheetgen.design.schema import SCHEMA, SECTIONS

    path = Path(sections.__file__)
    assert path.read_text(encoding="utf-8") == sections_source(), \
        "sheetgen/design/sections.py is stale: run `python -m sheetgen.design.spec --sections > sheetgen/design/sections.py`"
    for section in SECTIONS:
        cls = getattr(sections, section_class_name(section))
        assert dataclasses.is_dataclass(cls) and cls.__dataclass_params__.frozen
        hints = typing.get_type_hints(cls)
        keys = [k for k in SCHEMA if k.section == section]
        assert [f.name for f in dataclasses.fields(cls)] == [k.attr for k in keys]
        for k in keys:
            if k.choices:
                assert typing.get_args(hints[k.attr]) == k.choices, k.path
            else:
                assert hints[k.attr] is k.kind, k.path


def test_a_loaded_spec_holds_typed_sections_with_every_derived_key_solved():
    from sheetgen.design import sections

    spec = load_spec(DEMO)
    assert isinstance(spec.panel, sections.PanelParams) and isinstance(spec.drive, sections.DriveParams)
    assert spec.is_resolved()
    assert isinstance(spec.axle.height_mm, float) and isinstance(spec.drive.wheel_teeth, int)
