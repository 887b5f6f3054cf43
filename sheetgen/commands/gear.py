"""``sheetgen gear --module M --teeth Z ... -o FILE.dxf``: one involute gear blank to cut."""

from __future__ import annotations

import click

GEAR_CAUTION = ("Cautions: gears pinch fingers, so guard the mesh of a running drive. Cut only materials known "
                "to be safe (never PVC, vinyl or other chlorinated plastics), run the fume extraction and never "
                "leave the laser unattended.")

OPTION_LABELS = {
    "module_mm": "--module",
    "teeth": "--teeth",
    "pressure_angle_deg": "--pressure-angle",
    "shift": "--shift",
    "backlash_mm": "--backlash",
    "kerf_mm": "--kerf",
    "chord_tol_mm": "--chord-tol",
    "bore_mm": "--bore",
    "bore_shape": "--bore-shape",
    "across_flats_mm": "--across-flats",
}


@click.command("gear")
@click.option("--module", "module_mm", type=float, required=True, metavar="M",
              help="Module in mm (0.3 to 25): pitch diameter = module x teeth.")
@click.option("--teeth", "teeth", type=int, required=True, metavar="Z", help="Number of teeth (6 to 500).")
@click.option("--pressure-angle", "pressure_angle_deg", type=float, default=20.0, show_default=True, metavar="A",
              help="Pressure angle in degrees (14.5 to 25).")
@click.option("--shift", "shift", type=float, default=0.0, show_default=True, metavar="X",
              help="Profile shift coefficient x (-1 to 1.5; the tip diameter is m (z + 2 + 2x)).")
@click.option("--backlash", "backlash_mm", type=float, default=0.0, show_default=True, metavar="B",
              help="Thin each tooth by B mm at the pitch circle (0 to 0.5 x module).")
@click.option("--bore", "bore_mm", type=float, default=0.0, show_default=True, metavar="D",
              help="Bore diameter in mm (0 = none, else at least 1).")
@click.option("--bore-shape", "bore_shape", type=click.Choice(["round", "d", "square", "hex"]), default="round",
              show_default=True, help="round; d (bore with one flat, for motor shafts); square or hex (axles).")
@click.option("--across-flats", "across_flats_mm", type=float, default=None, metavar="F",
              help="d: flat to opposite side of the bore, mm; square/hex: size across flats, mm.")
@click.option("--lighten", "lightening", is_flag=True, default=False,
              help="Cut lightening windows between hub and rim when the wheel has room.")
@click.option("--kerf", "kerf_mm", type=float, default=0.0, show_default=True, metavar="K",
              help="Laser kerf in mm (0 to 1): the cut path is offset by K/2 so the gear comes out true.")
@click.option("--chord-tol", "chord_tol_mm", type=float, default=None, metavar="T",
              help="Largest distance from the drawn polygon to the true curves, mm (default 0.0025).")
@click.option("-o", "--output", "output", required=True, metavar="FILE.dxf", help="Cut file to write.")
@click.option("--dxf-version", "dxf_version", type=click.Choice(["R2000", "R12"]), default="R2000",
              show_default=True, help="DXF version (R12 for older laser software; it carries no units).")
def command(module_mm, teeth, pressure_angle_deg, shift, backlash_mm, bore_mm, bore_shape, across_flats_mm,
            lightening, kerf_mm, chord_tol_mm, output, dxf_version) -> None:
    """Write one involute gear blank (layer CUT, millimetres, centred on the
    origin, one tooth on +x) and print the sizes to check the cut gear with
    calipers. The teeth are those the ISO 53 basic rack cuts, undercut
    included; the kerf is compensated exactly (the cut flanks are involutes
    of the same base circle). The sizes printed are those of the finished
    gear."""
    from shapely.geometry import Polygon

    from sheetgen.drive.gears import GearSpec, Hub, gear_blank
    from sheetgen.drive.involute import DEFAULT_CHORD_TOL_MM
    from sheetgen.errors import GeometryBug
    from sheetgen.io.dxf import write_cut_dxf
    from sheetgen.io.output import check_output_file, staged_file

    check_output_file(output)  # refuse a bad target before any work
    tol = DEFAULT_CHORD_TOL_MM if chord_tol_mm is None else chord_tol_mm
    spec = GearSpec(module_mm=module_mm, teeth=teeth, pressure_angle_deg=pressure_angle_deg, shift=shift,
                    backlash_mm=backlash_mm,
                    hub=Hub(bore_mm=bore_mm, bore_shape=bore_shape, across_flats_mm=across_flats_mm,
                            lightening=lightening))
    g = gear_blank(spec, kerf_mm, tol, labels=OPTION_LABELS)
    polygon = g.polygon
    if not isinstance(polygon, Polygon):  # the blank's field is typed loosely; it is always one polygon
        raise GeometryBug(f"gear blank is a {type(polygon).__name__}, not one polygon")

    with staged_file(output) as tmp:
        write_cut_dxf(tmp, [polygon], circles=g.round_holes_mm, circle_offset_mm=kerf_mm / 2.0,
                      dxf_version=dxf_version)

    for w in g.warnings:
        click.echo(f"warning: {w}", err=True)
    n_vertices = len(polygon.exterior.coords) - 1
    pins = "opposite spaces" if teeth % 2 == 0 else "spaces nearest opposite"
    rows = [
        ("pitch diameter", g.pitch_diameter_mm, ""),
        ("base diameter", g.base_diameter_mm, ""),
        ("tip diameter", g.tip_diameter_mm, ""),
        ("root diameter", g.root_diameter_mm, ""),
        ("form diameter", g.form_diameter_mm, "involute flank starts here"),
        ("tooth at pitch circle", g.pitch_thickness_mm, "arc thickness"),
        (f"span over {g.span_teeth} teeth", g.span_mm, "caliper jaws flat on the flanks"),
        (f"over two {g.pin_diameter_mm:g} mm pins", g.over_pins_mm, pins),
    ]
    lines = [
        f"wrote {output}: {teeth} teeth, module {module_mm:g} mm, pressure angle {pressure_angle_deg:g} deg, "
        f"shift {shift:g}, backlash {backlash_mm:g} mm",
        "sizes of the finished gear (mm):",
    ]
    lines += [f"  {label:<26s}{value:10.4f}" + (f"   ({note})" if note else "") for label, value, note in rows]
    if g.spec.hub.bore_mm or g.spec.hub.across_flats_mm:
        hub = g.spec.hub
        size = hub.across_flats_mm if hub.bore_shape in ("square", "hex") and hub.across_flats_mm else hub.bore_mm
        extra = f", {hub.across_flats_mm:g} mm across the flat" if hub.bore_shape == "d" else ""
        lines.append(f"  hole: {hub.bore_shape} {size:g} mm{extra}")
    if g.windows:
        lines.append(f"  {g.windows} lightening windows")
    if kerf_mm:
        lines.append(f"cut path offset by {kerf_mm / 2:g} mm (kerf {kerf_mm:g} mm): outline out, holes in")
    lines.append(f"outline: {n_vertices} vertices, within {tol:g} mm of the true curves")
    for line in lines:
        click.echo(line)
    click.echo(GEAR_CAUTION)
