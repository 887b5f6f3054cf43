"""The checks of the nominal model: interference, connection, tabs, mesh, mass;
and :func:`check_model`, which runs them all with the sweep."""

from __future__ import annotations
from __future__ import annotations

import math
import time

import numpy as np
from shapely.geometry import Polygon

from sheetgen.kitmodel.part import Kit
from sheetgen.geometry.placement import vec3
from sheetgen.model3d.bodies import CONTACT_TOL_MM, MASS_TOL, MOTOR, Prism, SHARED_VOLUME_TOL_MM3, SWEEP_STEP_DEG, _aabb_gap, _aabb_overlap, _in_frame_of, _mesh_pairs, mesh_turns_deg, parallel_shared_volume_mm3, spun, sweep_angles
from sheetgen.model3d.measures import _Measures
from sheetgen.model3d.records import AssemblyReport, Interference, MassCheck, MeshCheck, SolidInfo, TabCheck
from sheetgen.model3d.solids import Model, _occ_common_mm3, _volume_and_centre, build_model, prism_solid
from sheetgen.model3d.sweep import _sweep
from sheetgen.model3d.pairs import all_pairs




def find_interference(model: Model) -> list[Interference]:
    """Every pair of solids sharing more than SHARED_VOLUME_TOL_MM3 (at rest)."""
    return _interference(model, _Measures(model), [b.aabb() for b in model.bodies])


def find_floating(model: Model, reach_mm: float) -> tuple[list[str], list[str]]:
    """(floating bodies, bodies cut off from the largest connected group): two
    bodies are connected when they are within ``reach_mm`` of each other."""
    return _connection(model, _Measures(model), [b.aabb() for b in model.bodies], reach_mm)


def _interference(model: Model, meas: _Measures, boxes) -> list[Interference]:
    out = []
    bodies = model.bodies
    for i in range(len(bodies)):
        for j in range(i + 1, len(bodies)):
            if not _aabb_overlap(boxes[i], boxes[j], -1e-7):
                continue
            v = meas.shared_volume_mm3(bodies[i], bodies[j])
            if v > SHARED_VOLUME_TOL_MM3:
                out.append(Interference(bodies[i].name, bodies[j].name, v))
    return out


def _connection(model: Model, meas: _Measures, boxes, reach_mm: float) -> tuple[list[str], list[str]]:
    """Floating bodies (nothing within reach) and bodies cut off from the largest connected group."""
    bodies = model.bodies
    n = len(bodies)
    parent = list(range(n))

    def find(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    cands = [(i, j) for i in range(n) for j in range(i + 1, n) if _aabb_gap(boxes[i], boxes[j]) <= reach_mm]

    def parallel(i, j):
        return all(_in_frame_of(pa, pb) is not None for pa in bodies[i].pieces for pb in bodies[j].pieces)

    # exact (cheap) pairs first, then OpenCascade only where it could still join two groups
    for i, j in sorted(cands, key=lambda p: not parallel(*p)):
        if find(i) == find(j):
            continue
        if meas.within_mm(bodies[i], bodies[j], reach_mm):
            parent[find(i)] = find(j)
    groups: dict[int, list[int]] = {}
    for i in range(n):
        groups.setdefault(find(i), []).append(i)
    floating = [bodies[m[0]].name for m in groups.values() if len(m) == 1]
    main = max(groups.values(), key=len)
    detached = [bodies[i].name for g in groups.values() if g is not main and len(g) > 1 for i in g]
    return floating, detached


def _tabs(kit: Kit, model: Model, meas: _Measures, boxes) -> list[TabCheck]:
    by_pair: dict[tuple[str, str], list] = {}
    for j in kit.joints:
        by_pair.setdefault((j.tab_part, j.slot_part), []).append(j)
    index = {b.name: k for k, b in enumerate(model.bodies)}
    out = []
    for (tab_part, slot_part), joints in by_pair.items():
        slot = kit.part(slot_part)
        # a tab crossing its slot part square on fills tab width x tab thickness x slot part thickness
        expected = sum(j.tab_count * j.tab_width_mm * j.sheet_thickness_mm * slot.thickness_mm for j in joints)
        count = sum(j.tab_count for j in joints)
        tabs = [b for b in model.bodies if b.source == tab_part]
        slots = [b for b in model.bodies if b.source == slot_part]
        found, missing = 0.0, []
        for tb in tabs:
            got = 0.0
            for sb in slots:
                if not _aabb_overlap(boxes[index[tb.name]], boxes[index[sb.name]], -1e-7):
                    continue
                plate = Prism(Polygon(slot.outline.exterior), slot.thickness_mm, sb.pieces[0].placement)
                v = parallel_shared_volume_mm3(tb.pieces[0], plate)
                if v is None:
                    meas.occ_calls += 1
                    v = _occ_common_mm3(model.solids[tb.name], prism_solid(plate, filled=True))
                got += v
            if got <= SHARED_VOLUME_TOL_MM3:
                missing.append(tb.name)
            found += got
        ok = not missing and abs(found - expected) <= 1e-6 * expected + SHARED_VOLUME_TOL_MM3
        out.append(TabCheck(tab_part, slot_part, count, expected, found, tuple(missing), ok))
    return out


def _mass(kit: Kit, model: Model) -> tuple[MassCheck, list[SolidInfo]]:
    from sheetgen.mechanics.massprops import mass_properties
    from sheetgen.mechanics.materials import sheet_material

    infos = []
    items = []  # (mass, centre, rotating)
    for b in model.bodies:
        if b.kind == "fastener":
            continue  # drawn for clearance; the balance check leaves the hardware's mass out, and so does this
        vol, centre = _volume_and_centre(model.solids[b.name])
        if b.kind == "part":
            mass = vol * 1e-9 * sheet_material(b.material).density_kg_m3
        else:
            # the component's mass as given, at the centre of the shape the kit gives it
            # (the motor's shaft is drawn for the fit, weighed with the body)
            assert b.mass_kg is not None  # every component body carries the mass the kit gives
            mass = float(b.mass_kg)
            # (a keyed axle, in two pieces, weighs as the whole rod)
            _, centre = _volume_and_centre(model.piece_solids[(b.name, 0)] if b.name == MOTOR
                                           else model.solids[b.name])
        infos.append(SolidInfo(b.name, b.source, "rotating" if b.rotating else "fixed", vol, mass))
        items.append((mass, centre, b.rotating))
    for c in kit.components:
        if c.shape == "point":
            items.append((float(c.mass_kg), np.asarray(c.centre_mm, dtype=float), c.rotating))

    def total(sel):
        m = sum(i[0] for i in sel)
        cg = sum(i[0] * i[1] for i in sel) / m if m > 0 else np.zeros(3)
        return m, cg

    rot_m, rot_cg = total([i for i in items if i[2]])
    kit_m, kit_cg = total(items)
    ref = mass_properties(kit)
    ref_cg = np.asarray(ref.rotating_cg_mm, dtype=float)
    dev_m = abs(rot_m - ref.rotating_mass_kg) / ref.rotating_mass_kg if ref.rotating_mass_kg > 0 else 0.0
    dev_cg = float(np.linalg.norm(rot_cg - ref_cg))
    tol_cg = max(MASS_TOL * float(np.linalg.norm(ref_cg)), 0.01)
    check = MassCheck(rot_m, vec3(rot_cg), ref.rotating_mass_kg, vec3(ref_cg),
                      dev_m, dev_cg, tol_cg, kit_m, vec3(kit_cg),
                      dev_m <= MASS_TOL and dev_cg <= tol_cg)
    return check, infos






def _mesh(kit: Kit, spec, model: Model, angles: np.ndarray) -> list[MeshCheck]:
    """Wheel and pinion rolled together through the travel (the pinion turns
    z_wheel / z_pinion times as far, the other way): both are plates across
    the axle, so their gap and shared volume are exact in the y-z plane."""
    out = []
    ratio = spec.drive.wheel_teeth / spec.drive.pinion_teeth
    turns = mesh_turns_deg(kit, spec)
    for wheel, pinion in _mesh_pairs(kit):
        for wb in (b for b in model.bodies if b.source == wheel):
            for pb in (b for b in model.bodies if b.source == pinion):
                pw, pp = wb.pieces[0], pb.pieces[0]
                (w0, w1), (p0, p1) = pw.x_range_mm(), pp.x_range_mm()
                overlap = min(w1, p1) - max(w0, p0)
                if overlap <= 1e-9:
                    continue
                best_gap, best_deg, worst = math.inf, 0.0, 0.0
                for ang in angles:
                    a = float(ang)
                    w2 = pw.turned(a).yz_projection()
                    p2 = Prism(pp.outline, pp.depth_mm, spun(pp.placement, -a * ratio)).yz_projection()
                    gap = float(w2.distance(p2))
                    if gap <= CONTACT_TOL_MM:
                        worst = max(worst, float(w2.intersection(p2).area) * overlap)
                    if gap < best_gap - 1e-12:
                        best_gap, best_deg = gap, a
                out.append(MeshCheck(wb.name, pb.name, turns[pinion], best_gap, best_deg, worst))
    return out


def check_model(model: Model, kit: Kit, spec, step_deg: float = SWEEP_STEP_DEG) -> AssemblyReport:
    """All checks of the nominal model (see the module notes)."""
    from sheetgen.mechanics.solar import tracking_range

    timing = []
    clock = time.perf_counter()

    def lap(label):
        nonlocal clock
        now = time.perf_counter()
        timing.append((label, now - clock))
        clock = now

    meas = _Measures(model)
    boxes = [b.aabb() for b in model.bodies]
    interference = _interference(model, meas, boxes)
    lap("interference")
    reach = CONTACT_TOL_MM + spec.axle.bearing_clearance_mm / 2
    floating, detached = _connection(model, meas, boxes, reach)
    lap("connection")
    tabs = _tabs(kit, model, meas, boxes)
    lap("tabs")
    tr = tracking_range(spec.site.latitude_deg, spec.site.axle, spec.site.travel_limit_deg)
    angles = sweep_angles(tr.range_deg, step_deg)
    running, closest, frame, collisions, touching = _sweep(model, meas, angles)
    lap("sweep")
    mesh = _mesh(kit, spec, model, angles)
    lap("mesh")
    mass, infos = _mass(kit, model)
    lap("mass")
    from sheetgen.model3d.stops import check_stops

    stops = check_stops(model, spec, meas)
    lap("stops")
    gaps, gap_faults, pair_occ = all_pairs(kit, model, angles)
    lap("all pairs")
    timing.insert(0, ("build", model.build_s))
    return AssemblyReport(
        solids=tuple(infos), interference=tuple(interference), floating_parts=tuple(floating),
        detached_parts=tuple(detached), tabs=tuple(tabs), tracking_range_deg=tr.range_deg,
        step_deg=float(angles[1] - angles[0]) if len(angles) > 1 else 0.0, angles=len(angles),
        running=tuple(running), closest=tuple(closest), frame_clearance=frame,
        frame_clearance_required_mm=spec.frame.clearance_mm, collisions=tuple(collisions),
        touching=tuple(touching), mesh=tuple(mesh), mass=mass, timing_s=tuple(timing),
        occ_calls=meas.occ_calls + pair_occ, pair_gaps=tuple(gaps), pair_faults=tuple(gap_faults),
        stops=tuple(stops),
    )


def assemble(kit: Kit, spec, step_deg: float = SWEEP_STEP_DEG) -> tuple[Model, AssemblyReport]:
    """Build the solids and check them."""
    model = build_model(kit, spec)
    return model, check_model(model, kit, spec, step_deg)
