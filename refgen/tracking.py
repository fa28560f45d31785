"""Report section: tracking resolution of the layer stack (momentum, position and angle at the origin).

Plain data out; the fit is in refgen.physics.tracking, the scattering width in refgen.physics.scattering.
Tracks leave the origin along the stack axis (normal incidence); each layer with a `resolution` measures once,
at its mid-plane. Every layer from the origin up to the last measurement scatters, spread uniformly over its
thickness. Energy loss is neglected in the fit; the momenta where it matters are flagged.
"""
from __future__ import annotations

import numpy as np
from scipy.optimize import brentq

from .physics.kinematics import kinetic_energy, momentum_of_kinetic
from .physics.identification import field_path_length
from .physics.scattering import highland_theta0, highland_valid
from .physics.tracking import (CURVATURE_CONSTANT, design_matrix, field_double_integral, fit_covariance,
                               parameters_measurable, scattering_covariance, scattering_limited_covariance)

LOSS_LIMIT = 0.05  # flag momenta that lose more than 5 % of their momentum before the last measurement
QUICK_MOMENTA_GEV = (1.0, 10.0, 100.0)
COLUMNS = ["momentum_GeV_c", "sigma_p_over_p", "sigma_p_over_p_measurement", "sigma_p_over_p_scattering",
           "sigma_origin_um", "sigma_angle_mrad", "momentum_loss_fraction"]


def layout(spec, x0s) -> dict:
    """The measuring planes, the scatterers up to the last plane, and the field regions, as plain data.

    x0s: radiation length per material, g/cm2. Positions in cm from the origin.
    """
    starts = spec.layer_starts()
    planes = [{"layer": l.name, "z_cm": starts[l.name] + l.thickness / 2, "resolution_um": l.resolution_cm * 1e4}
              for l in spec.layers if l.resolution_cm is not None]
    z_last = max((p["z_cm"] for p in planes), default=0.0)
    scatterers = []
    for layer in spec.layers:
        s = starts[layer.name]
        if s >= z_last:
            break
        e = min(s + layer.thickness, z_last)
        x_over_x0 = spec.layer_depth(layer, x0s) * (e - s) / layer.thickness
        scatterers.append({"layer": layer.name, "start_cm": s, "end_cm": e, "x_over_X0": x_over_x0})
    total = sum(s["x_over_X0"] for s in scatterers)
    regions = [{"from": r.from_layer, "to": r.to_layer, "start_cm": r.start_cm, "end_cm": r.end_cm,
                "strength_T": r.strength_tesla, "field_integral_T_m": r.strength_tesla * (r.end_cm - r.start_cm) / 100}
               for r in spec.field]
    z = np.array([p["z_cm"] for p in planes])
    bending = None
    if regions and len(planes) >= 3:
        j = field_double_integral(z, [r["start_cm"] for r in regions], [r["end_cm"] for r in regions],
                                  [r["strength_T"] for r in regions])
        bending = CURVATURE_CONSTANT * j if parameters_measurable(design_matrix(z, j)) else None
    return {"planes": planes, "scatterers": scatterers, "field": regions, "x_over_X0_to_last_plane": total,
            "highland_valid": bool(highland_valid(total)) if total > 0 else True,
            "fits_position": len(planes) >= 2, "fits_momentum": bending is not None,
            "bending_cm_per_GeV_inv": None if bending is None else bending.tolist(),
            "momentum_note": _momentum_note(regions, len(planes), bending is not None)}


def _momentum_note(regions, n_planes: int, measurable: bool) -> str | None:
    """Why sigma(p)/p is not given, or None when it is."""
    if measurable:
        return None
    if not regions:
        return "no magnetic field: the momentum is not measured; position and angle at the origin only"
    if n_planes < 3:
        return "fewer than three measuring layers: the momentum cannot be fitted"
    return "the field does not bend the track between the measuring layers: the momentum cannot be fitted"


def momentum_loss_fraction(spec, tables, species, lay: dict, p) -> np.ndarray:
    """Mean fractional momentum loss (CSDA, total stopping power) from the origin to the last measuring plane;
    nan where the species stops before it (or starts below the range table, where the loss model is not valid).
    """
    p = np.asarray(p, dtype=float)
    t = kinetic_energy(p, species.mass)
    by_name = {l.name: l for l in spec.layers}
    for sc in lay["scatterers"]:
        layer = by_name[sc["layer"]]
        fraction = (sc["end_cm"] - sc["start_cm"]) / layer.thickness
        for _ in range(layer.repeat):
            for slab in layer.slabs:
                table = tables[(slab.material, species.key)]
                areal = slab.thickness * fraction * spec.materials[slab.material].density
                below = ~(t >= table.t[0])
                left = table.range_of(np.where(below, table.t[0], t)) - areal
                t = np.where(below | (left <= table.r[0]), np.nan, table.kinetic_for_range(np.maximum(left, table.r[0])))
    return 1.0 - momentum_of_kinetic(t, species.mass) / p


def _equal_parts_momentum(species, total_x0: float, ratio: float) -> float | None:
    """Momentum (GeV/c) where the scattering part equals the measurement part: Highland's theta0 through the
    whole material equals ``ratio`` = sqrt(C_meas / C_scat per unit theta0^2). None outside 1 MeV/c-1 PeV/c."""
    def f(log_p):
        return np.log(float(highland_theta0(np.exp(log_p), species.mass, species.charge, total_x0)) / ratio)
    lo, hi = np.log(1.0), np.log(1e12)
    if f(lo) < 0 or f(hi) > 0:
        return None
    return float(np.exp(brentq(f, lo, hi, xtol=1e-10))) / 1e3


def _fit_model(lay: dict, species) -> dict | None:
    """The momentum-independent parts of the fit for one species: design matrix, point-resolution covariance,
    the scattering covariance per unit of Highland's theta0^2, and the two single-source fits."""
    if not lay["fits_position"]:
        return None
    planes, sc = lay["planes"], lay["scatterers"]
    z = np.array([pl["z_cm"] for pl in planes])
    point_var = np.diag((np.array([pl["resolution_um"] for pl in planes]) * 1e-4) ** 2)
    bending = lay["bending_cm_per_GeV_inv"]
    h = design_matrix(z, None if bending is None else abs(species.charge) * np.asarray(bending))
    total_x0 = lay["x_over_X0_to_last_plane"]
    unit = scattering_covariance(z, [s["start_cm"] for s in sc], [s["end_cm"] for s in sc],
                                 [s["x_over_X0"] / total_x0 for s in sc]) if total_x0 > 0 else np.zeros_like(point_var)
    return {"h": h, "point_var": point_var, "unit": unit, "total_x0": total_x0, "bends": bending is not None,
            "measurement_only": fit_covariance(h, point_var), "scattering_only": scattering_limited_covariance(h, unit)}


def _evaluate(model: dict, species, p_mev, reached) -> dict[str, list]:
    """The resolution columns at the momenta p (MeV/c); None where ``reached`` is False (or no field)."""
    p = np.asarray(p_mev, dtype=float)
    x0 = model["total_x0"]
    theta = highland_theta0(p, species.mass, species.charge, x0) if x0 > 0 else np.zeros_like(p)
    cov = fit_covariance(model["h"], model["point_var"] + theta[:, None, None] ** 2 * model["unit"])
    columns = {"sigma_origin_um": np.sqrt(cov[:, 0, 0]) * 1e4, "sigma_angle_mrad": np.sqrt(cov[:, 1, 1]) * 1e3}
    if model["bends"]:
        p_gev = p / 1e3
        columns["sigma_p_over_p"] = p_gev * np.sqrt(cov[:, 2, 2])
        columns["sigma_p_over_p_measurement"] = p_gev * np.sqrt(model["measurement_only"][2, 2])
        columns["sigma_p_over_p_scattering"] = p_gev * theta * np.sqrt(model["scattering_only"][2, 2])
    return {k: [float(v) if ok else None for v, ok in zip(np.broadcast_to(values, p.shape), reached)]
            for k, values in columns.items()}


def clears_field(lay: dict, species, p_mev) -> np.ndarray:
    """True where a track of this species gets through the field regions to the last plane; below that the
    field turns it back (its arc in the field reaches 90 degrees) and it counts as not reaching the plane."""
    p = np.asarray(p_mev, dtype=float)
    if not lay["field"] or not lay["planes"]:
        return np.ones(p.shape, dtype=bool)
    z_last = max(pl["z_cm"] for pl in lay["planes"])
    regions = [(r["start_cm"], r["end_cm"], r["strength_T"]) for r in lay["field"]]
    return np.isfinite(field_path_length(p, species.charge, z_last, regions))


def species_resolution(spec, tables, species, lay: dict, p_mev) -> dict:
    """sigma(p)/p (total, point-resolution and scattering parts), and the position (um) and angle (mrad)
    resolution at the origin, on the momentum grid (MeV/c). None where the species cannot reach the last plane,
    and sigma(p)/p None throughout without a momentum measurement."""
    p = np.asarray(p_mev, dtype=float)
    loss = momentum_loss_fraction(spec, tables, species, lay, p)
    loss = np.where(clears_field(lay, species, p), loss, np.nan)
    reached = np.isfinite(loss)
    out = {c: [None] * len(p) for c in COLUMNS}
    out["momentum_GeV_c"] = (p / 1e3).tolist()
    out["momentum_loss_fraction"] = [float(v) if ok else None for v, ok in zip(loss, reached)]
    flagged = ~reached | (loss > LOSS_LIMIT)
    out["energy_loss_flag_below_GeV_c"] = float(p[np.nonzero(flagged)[0][-1]] / 1e3) if flagged.any() else None
    out["unreachable_below_GeV_c"] = float(p[np.nonzero(~reached)[0][-1]] / 1e3) if (~reached).any() else None
    out.update(at_round_momenta=None, parts_equal_at_GeV_c=None)
    model = _fit_model(lay, species)
    if model is None:
        return out
    out.update(_evaluate(model, species, p, reached))
    quick = np.array(QUICK_MOMENTA_GEV) * 1e3
    quick_loss = np.where(clears_field(lay, species, quick), momentum_loss_fraction(spec, tables, species, lay, quick), np.nan)
    values = _evaluate(model, species, quick, np.isfinite(quick_loss))
    out["at_round_momenta"] = {"momentum_GeV_c": list(QUICK_MOMENTA_GEV), **values,
                               "momentum_loss_fraction": [float(v) if np.isfinite(v) else None for v in quick_loss]}
    c_meas, c_scat = model["measurement_only"], model["scattering_only"]
    if model["bends"] and c_scat[2, 2] > 0:
        out["parts_equal_at_GeV_c"] = _equal_parts_momentum(species, model["total_x0"],
                                                            float(np.sqrt(c_meas[2, 2] / c_scat[2, 2])))
    return out


def tracking_report(spec, x0s, tables) -> tuple[dict, dict]:
    """(the layout, the resolution per species key), both plain data."""
    lay = layout(spec, x0s)
    p = spec.momentum.values()
    return lay, {sp.key: species_resolution(spec, tables, sp, lay, p) for sp in spec.species}


def csv_table(resolution: dict) -> tuple[list[str], list[list]]:
    """Header and rows of data/tracking/<species>.csv (the key-number lists as columns; empty = not reached)."""
    rows = [[float("nan") if v is None else v for v in row] for row in zip(*(resolution[c] for c in COLUMNS))]
    return COLUMNS, rows
