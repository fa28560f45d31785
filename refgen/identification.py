"""Report section: particle identification reach. For every pair of species, the momentum ranges in which time
of flight, energy loss in gas and each Cherenkov radiator separate them at >= 3 sigma, and the gaps no system
covers. Plain data out; the physics is in refgen.physics.identification and refgen.physics.cherenkov.

Assumptions (stated on the page): tracks leave the origin along the stack axis; momenta are those at the
origin, and energy loss before a layer is neglected except that a species must reach the layer (CSDA reach);
the momentum is taken as exactly known.
"""
from __future__ import annotations

import itertools
import math

import numpy as np

from .physics.cherenkov import cherenkov_angle, photons_per_cm, threshold_momentum
from .physics.identification import (SEPARATION_SIGMAS, combined_time_resolution_ps, crossovers,
                                     energy_loss_separation, field_path_length, last_crossing,
                                     ring_angle_separation, sample_loss_valid, sample_most_probable_loss,
                                     separated_ranges, threshold_counter_separation, time_difference_ps,
                                     tof_separation_momentum, truncated_mean_resolution,
                                     truncated_mean_resolution_valid, TRUNCATION_VALID)
from .physics.bethe_corrections import bethe_regime_min_beta_gamma
from .physics.straggling import landau_xi
from .radiators import _index_function

POINTS_PER_DECADE = 100
ATM_PA = 101325.0
DEFAULT_TRUNCATION = 0.7  # common practice: keep the lowest 70 % of the samples
GAP = "gap"
CSV_DESCRIPTIONS = {
    "data/identification/time-of-flight.csv": "flight-time difference and separation per timing layer, species pair and momentum",
    "data/identification/energy-loss.csv": "most probable loss per sample and truncated-mean separation per sampling layer, pair and momentum",
    "data/identification/cherenkov.csv": "Cherenkov separation (threshold counting or ring angle) per radiator, pair and momentum",
    "data/identification/coverage.csv": "momentum ranges separated at 3 sigma per species pair and technique, and the gaps",
}


def grid(spec) -> np.ndarray:
    """The momentum grid (MeV/c) for identification: the spec's grid, refined to at least POINTS_PER_DECADE."""
    lo, hi = spec.momentum.start, spec.momentum.stop
    points = max(spec.momentum.points, int(math.ceil(POINTS_PER_DECADE * math.log10(hi / lo))) + 1)
    return np.geomspace(lo, hi, points)


def species_groups(spec) -> list[list]:
    """Species that no technique here can tell apart (equal mass and equal |charge|), lightest first."""
    groups: list[list] = []
    for sp in sorted(spec.species, key=lambda s: (s.mass, abs(s.charge))):
        if groups and abs(groups[-1][0].mass - sp.mass) < 1e-6 and abs(groups[-1][0].charge) == abs(sp.charge):
            groups[-1].append(sp)
        else:
            groups.append([sp])
    return groups


def pair_key(a, b) -> str:
    return f"{a.key}/{b.key}"


def field_regions(spec) -> list[tuple[float, float, float]]:
    """(start_cm, end_cm, strength_T) of every field region of the spec (none without a field)."""
    return [(f.start_cm, f.end_cm, f.strength_tesla) for f in spec.field]


def reach_mask(p, reach: dict, layer: str, *species) -> np.ndarray:
    """True where every given species reaches the front of the layer (CSDA reach from the report, GeV/c)."""
    ok = np.ones_like(p, dtype=bool)
    for sp in species:
        r = reach[sp.key][layer]
        ok &= p >= r * 1e3 if r is not None else False
    return ok


def reach_from(reach: dict, layer: str, a, b) -> float | None:
    ra, rb = reach[a.key][layer], reach[b.key][layer]
    return None if ra is None or rb is None else max(ra, rb)


# --- time of flight ---------------------------------------------------------------------------------------

def time_of_flight(spec, p, reach: dict, groups) -> tuple[dict, dict, dict]:
    """Per timing layer: (layer facts, pair numbers, curves n_sigma per group pair)."""
    starts = spec.layer_starts()
    regions = field_regions(spec)
    layers, pairs, curves = {}, {}, {}
    for layer in spec.layers:
        if layer.timing_ps is None:
            continue
        z = starts[layer.name] + 0.5 * layer.thickness
        sigma = combined_time_resolution_ps(layer.timing_ps, spec.start_time_ps)
        bent = any(lo < z and hi > 0 for lo, hi, _ in regions)
        layers[layer.name] = {"timing_resolution_ps": layer.timing_ps, "start_time_resolution_ps": spec.start_time_ps,
                              "start_exact": spec.start_time_ps is None, "combined_resolution_ps": sigma,
                              "straight_path_cm": z, "path": "arc length in the field" if bent else "straight line"}
        pairs[layer.name], curves[layer.name] = {}, {}
        for light, heavy in itertools.combinations(groups, 2):
            a, b = light[0], heavy[0]
            path_a = field_path_length(p, a.charge, z, regions) if bent else np.full_like(p, z)
            path_b = field_path_length(p, b.charge, z, regions) if bent else np.full_like(p, z)
            reached = reach_mask(p, reach, layer.name, a, b) & np.isfinite(path_a) & np.isfinite(path_b)
            with np.errstate(invalid="ignore"):
                dt = np.where(reached, time_difference_ps(p, a.mass, b.mass, path_a, path_b), np.nan)
            n_sigma = dt / sigma
            if bent:
                upto = _field_separation_momentum(a, b, z, regions, sigma)
            else:
                upto = tof_separation_momentum(a.mass, b.mass, z, sigma) / 1e3
            start = reach_from(reach, layer.name, a, b)
            clear = np.isfinite(path_a) & np.isfinite(path_b)
            if start is not None and bent:  # below this grid momentum a track curls back inside the field
                start = max(start, float(p[np.argmax(clear)]) / 1e3) if clear.any() else None
            if start is None or upto is None or upto <= start:
                upto_reported = None
            else:
                upto_reported = upto
            entry = {"separated_up_to_GeV_c": upto_reported,
                     "separated_from_GeV_c": start if upto_reported is not None else None,
                     "time_difference_ps_at_1_GeV_c": _at(p, dt, 1e3)}
            for x in light:
                for y in heavy:
                    pairs[layer.name][pair_key(x, y)] = entry
            exact = [] if upto_reported is None else [[start * 1e3, min(upto_reported * 1e3, float(p[-1]))]]
            curves[layer.name][(a.key, b.key)] = {"n_sigma": n_sigma, "time_difference_ps": dt, "path_a_cm": path_a,
                                                  "path_b_cm": path_b, "ranges": exact}
    return layers, pairs, curves


def _at(p, y, p0: float):
    """y at momentum p0 (MeV/c) by log interpolation on the grid; None outside it or where y is not finite."""
    if not p[0] <= p0 <= p[-1]:
        return None
    v = float(np.interp(math.log(p0), np.log(p), y))
    return v if math.isfinite(v) else None


def _field_separation_momentum(a, b, z: float, regions, sigma: float) -> float | None:
    """GeV/c up to which a and b differ by 3 sigma in flight time over their arcs in the field (numerical root;
    the straight-path root is a lower bound for equal charges, since the arc is never shorter)."""
    guess = tof_separation_momentum(a.mass, b.mass, z, sigma)

    def f(p):
        pa, pb = field_path_length(p, a.charge, z, regions), field_path_length(p, b.charge, z, regions)
        if not (np.isfinite(pa) and np.isfinite(pb)):
            return -1.0
        return float(time_difference_ps(p, a.mass, b.mass, pa, pb)) / sigma - SEPARATION_SIGMAS

    root = last_crossing(f, guess * 1e-3, guess * 1e2)
    return None if root is None else root / 1e3


# --- energy loss --------------------------------------------------------------------------------------------

def energy_loss(spec, p, reach: dict, groups, media) -> tuple[dict, dict, dict, dict]:
    """Per sampling layer: (layer facts, pair numbers, curves n_sigma per group pair, most probable loss per
    species in keV per sample)."""
    layers, pairs, curves, losses = {}, {}, {}, {}
    for layer in spec.layers:
        if layer.samples is None:
            continue
        slab = layer.slabs[0]
        material = spec.materials[slab.material]
        medium = media[slab.material]
        x = layer.thickness / layer.samples
        areal = x * material.density
        pressure_atm = (material.pressure_Pa or ATM_PA) / ATM_PA
        truncation = layer.truncation if layer.truncation is not None else DEFAULT_TRUNCATION
        resolution = float(truncated_mean_resolution(layer.samples, x, pressure_atm))
        valid_fit = truncated_mean_resolution_valid(layer.samples, x, pressure_atm, truncation)
        layers[layer.name] = {"material": material.name, "samples": layer.samples, "sample_thickness_cm": x,
                              "pressure_atm": pressure_atm, "truncation": truncation,
                              "truncation_is_default": layer.truncation is None,
                              "thickness_pressure_cm_atm": x * pressure_atm,
                              "resolution": resolution, "resolution_percent": 100.0 * resolution,
                              "resolution_valid": valid_fit,
                              "resolution_note": None if valid_fit else
                              (f"outside the range of the Allison-Cobb fit (N 10-1000, x P 0.1-100 cm atm, truncation "
                               f"{TRUNCATION_VALID[0]:g}-{TRUNCATION_VALID[1]:g}): indicative only")}
        layers[layer.name].update(most_probable_rise(medium, areal))
        mpv, ok = {}, {}
        for sp in spec.species:
            mpv[sp.key] = sample_most_probable_loss(p, sp.mass, sp.charge, medium, areal)
            ok[sp.key] = (sample_loss_valid(p, sp.mass, sp.charge, medium, areal, bethe_regime_min_beta_gamma(medium.Z))
                          & reach_mask(p, reach, layer.name, sp))
        losses[layer.name] = {k: np.where(ok[k], v * 1e3, np.nan) for k, v in mpv.items()}
        pairs[layer.name], curves[layer.name] = {}, {}
        for light, heavy in itertools.combinations(groups, 2):
            a, b = light[0], heavy[0]
            both = ok[a.key] & ok[b.key]
            n_sigma = np.where(both, energy_loss_separation(mpv[a.key], mpv[b.key], resolution), np.nan)
            entry = {"separated_GeV_c": [[lo / 1e3, hi / 1e3] for lo, hi in separated_ranges(p, n_sigma)],
                     "crossover_GeV_c": [c / 1e3 for c in crossovers(p, np.where(both, mpv[a.key], np.nan),
                                                                      np.where(both, mpv[b.key], np.nan))],
                     "separation_sigma_at_1_GeV_c": _at(p, n_sigma, 1e3)}
            for x_ in light:
                for y in heavy:
                    pairs[layer.name][pair_key(x_, y)] = entry
            curves[layer.name][(a.key, b.key)] = {"n_sigma": n_sigma}
    return layers, pairs, curves, losses


def most_probable_rise(medium, areal: float) -> dict:
    """The relativistic rise of the most probable loss per sample (plateau over minimum, for z = 1) and xi/I at
    the minimum: Landau's theory assumes xi much larger than the atomic binding energies, which thin gas samples
    do not meet, so the rise it gives is an upper estimate."""
    bg = np.geomspace(0.5, 1e5, 800)
    loss = sample_most_probable_loss(bg, 1.0, 1, medium, areal)
    i = int(np.argmin(loss))
    return {"most_probable_rise": float(loss[-1] / loss[i]), "minimum_beta_gamma": float(bg[i]),
            "xi_over_I_at_minimum": float(landau_xi(bg[i], 1, medium, areal) * 1e6 / medium.i_ev)}


# --- Cherenkov ----------------------------------------------------------------------------------------------

def cherenkov(spec, p, reach: dict, groups) -> tuple[dict, dict]:
    """Per radiator: (facts, curves n_sigma per group pair), threshold counting and, with an angle resolution,
    ring angles (the larger separation of the two)."""
    facts, curves = {}, {}
    for r in spec.radiators:
        layer = next(l for l in spec.layers if l.name == r.layer)
        slab = layer.slabs[0]
        material = spec.materials[slab.material]
        n_of = _index_function(material)
        n_c = float(n_of(np.array([0.5 * (r.band_eV[0] + r.band_eV[1])]))[0])
        npe, theta = {}, {}
        for group in groups:
            sp = group[0]
            beta = p / np.sqrt(p ** 2 + sp.mass ** 2)
            npe[sp.key] = photons_per_cm(beta, abs(sp.charge), r.band_eV, n_of) * slab.thickness * r.detection_efficiency
            theta[sp.key] = cherenkov_angle(p, sp.mass, n_c) * 1e3
        facts[r.layer] = {"ring_imaging": r.angle_resolution_mrad is not None,
                          "thresholds_GeV_c": {g[0].key: float(threshold_momentum(g[0].mass, n_c)) / 1e3 for g in groups}}
        curves[r.layer] = {}
        for light, heavy in itertools.combinations(groups, 2):
            a, b = light[0], heavy[0]
            n_sigma = threshold_counter_separation(npe[a.key], npe[b.key])
            if r.angle_resolution_mrad is not None:
                ring = ring_angle_separation(theta[a.key], theta[b.key], npe[b.key], r.angle_resolution_mrad)
                n_sigma = np.fmax(n_sigma, ring)
            curves[r.layer][(a.key, b.key)] = {"n_sigma": np.where(reach_mask(p, reach, r.layer, a, b), n_sigma, np.nan)}
    return facts, curves


# --- the combined picture -------------------------------------------------------------------------------------

def technique_curves(tof_curves, dedx_curves, ckov_curves, dedx_layers) -> list[tuple[str, str, dict]]:
    """(technique label, family, curves per group pair) of every technique, in a fixed order."""
    out = [(f"time of flight ({name})", "time of flight", c) for name, c in tof_curves.items()]
    for name, c in dedx_curves.items():
        note = "" if dedx_layers[name]["resolution_valid"] else ", resolution outside the fit's range"
        out.append((f"energy loss ({name}{note})", "energy loss", c))
    out += [(f"Cherenkov ({name})", "Cherenkov", c) for name, c in ckov_curves.items()]
    return out


def merge(ranges) -> list[list[float]]:
    """The union of [from, to] ranges, as disjoint sorted ranges."""
    out: list[list[float]] = []
    for lo, hi in sorted((r[0], r[1]) for r in ranges):
        if out and lo <= out[-1][1]:
            out[-1][1] = max(out[-1][1], hi)
        else:
            out.append([lo, hi])
    return out


def coverage(p, techniques, a_key: str, b_key: str) -> tuple[list, list]:
    """(technique ranges [from, to, label], gaps [from, to]) for one group pair, in GeV/c over the grid. A curve
    that carries exact 'ranges' (time of flight: the analytic root) uses them; the others are read off their
    n_sigma curves."""
    ranges = []
    for label, _, curves in techniques:
        c = curves[(a_key, b_key)]
        found = c["ranges"] if "ranges" in c else separated_ranges(p, c["n_sigma"])
        ranges += [[lo / 1e3, hi / 1e3, label] for lo, hi in found]
    gaps, edge = [], float(p[0]) / 1e3
    for lo, hi in merge(ranges):
        if lo > edge:
            gaps.append([edge, lo])
        edge = max(edge, hi)
    if edge < float(p[-1]) / 1e3:
        gaps.append([edge, float(p[-1]) / 1e3])
    return sorted(ranges, key=lambda r: (r[0], r[1], r[2])), gaps


def _shown(lo: float, hi: float, p_range: tuple[float, float], **extra) -> dict:
    """A range for the page, saying whether it runs into an end of the momentum range considered."""
    return {"from": lo, "to": hi, "open_low": lo <= p_range[0] * (1 + 1e-9),
            "open_high": hi >= p_range[1] * (1 - 1e-9), **extra}


def identification(spec, media, reach: dict) -> tuple[dict, dict, dict]:
    """(key numbers, page and figure data, CSV tables) of the identification section."""
    p = grid(spec)
    p_range = (float(p[0]) / 1e3, float(p[-1]) / 1e3)
    groups = species_groups(spec)
    tof_layers, tof_pairs, tof_curves = time_of_flight(spec, p, reach, groups)
    dedx_layers, dedx_pairs, dedx_curves, losses = energy_loss(spec, p, reach, groups, media)
    ckov_facts, ckov_curves = cherenkov(spec, p, reach, groups)
    techniques = technique_curves(tof_curves, dedx_curves, ckov_curves, dedx_layers)
    cover, rows = {}, []
    for light, heavy in itertools.combinations(groups, 2):
        ranges, gaps = coverage(p, techniques, light[0].key, heavy[0].key)
        entries = sorted(ranges + [[lo, hi, GAP] for lo, hi in gaps], key=lambda e: (e[0], e[1], e[2]))
        for x in light:
            for y in heavy:
                cover[pair_key(x, y)] = entries
        rows.append({"key": pair_key(light[0], heavy[0]), "light": [s.key for s in light], "heavy": [s.key for s in heavy],
                     "ranges": [_shown(lo, hi, p_range, technique=t) for lo, hi, t in ranges],
                     "gaps": [_shown(lo, hi, p_range) for lo, hi in gaps],
                     "covered": [_shown(lo, hi, p_range) for lo, hi in merge(ranges)],
                     "by_technique": [{"technique": label, "ranges": [_shown(lo, hi, p_range) for lo, hi, t in ranges if t == label]}
                                      for label, _, _ in techniques if any(t == label for _, _, t in ranges)],
                     "lanes": [{"label": label, "family": family,
                                "ranges": [r[:2] for r in ranges if r[2] == label]} for label, family, _ in techniques],
                     "crossovers": sorted({c for pairs in dedx_pairs.values()
                                           for c in pairs[pair_key(light[0], heavy[0])]["crossover_GeV_c"]})})
    key_numbers = {"time_of_flight": tof_pairs, "energy_loss": dedx_pairs, "coverage": cover,
                   "timing_layers": tof_layers, "sampling_layers": dedx_layers, "radiators": ckov_facts,
                   "momentum_range_GeV_c": list(p_range), "separation_sigmas": SEPARATION_SIGMAS}
    neighbours = {pair_key(a[0], b[0]) for a, b in zip(groups, groups[1:])}
    page = {"rows": rows, "neighbour_rows": [row for row in rows if row["key"] in neighbours], "techniques": [{"label": t[0], "family": t[1]} for t in techniques],
            "momentum_GeV_c": p / 1e3, "momentum_range_GeV_c": p_range, "losses_keV": losses,
            "radiator_slugs": [r.layer for r in spec.radiators],
            "separation_curves": {"time of flight": _neighbour_curves(tof_curves, groups),
                                  "energy loss": _neighbour_curves(dedx_curves, groups)}}
    return key_numbers, page, csv_tables(spec, p, groups, tof_curves, dedx_curves, losses, ckov_curves, cover)


def _neighbour_curves(curves_by_layer: dict, groups) -> dict:
    """Per layer: the n_sigma curves of neighbouring groups in mass (the hardest pairs), for the figures."""
    return {layer: [{"light": [s.key for s in a], "heavy": [s.key for s in b], "n_sigma": curves[(a[0].key, b[0].key)]["n_sigma"]}
                    for a, b in zip(groups, groups[1:])]
            for layer, curves in curves_by_layer.items()}


def _pairs(groups):
    """(representative a, representative b, every species pair they stand for)."""
    for light, heavy in itertools.combinations(groups, 2):
        yield light[0], heavy[0], [(x, y) for x in light for y in heavy]


def csv_tables(spec, p, groups, tof_curves, dedx_curves, losses, ckov_curves, cover) -> dict:
    """One CSV per technique (long format: one row per layer, pair and momentum) and one of the coverage."""
    pg = (p / 1e3).tolist()
    tof_rows, dedx_rows, ckov_rows = [], [], []
    for a, b, members in _pairs(groups):
        for layer, curves in tof_curves.items():
            c = curves[(a.key, b.key)]
            for x, y in members:
                tof_rows += [[layer, pair_key(x, y), q, float(pa), float(pb), float(dt), float(ns)]
                             for q, pa, pb, dt, ns in zip(pg, c["path_a_cm"], c["path_b_cm"], c["time_difference_ps"],
                                                         c["n_sigma"])]
        for layer, curves in dedx_curves.items():
            c = curves[(a.key, b.key)]
            for x, y in members:
                dedx_rows += [[layer, pair_key(x, y), q, float(la), float(lb), float(ns)]
                              for q, la, lb, ns in zip(pg, losses[layer][x.key], losses[layer][y.key], c["n_sigma"])]
        for name, curves in ckov_curves.items():
            c = curves[(a.key, b.key)]
            for x, y in members:
                ckov_rows += [[name, pair_key(x, y), q, float(ns)] for q, ns in zip(pg, c["n_sigma"])]
    out = {"data/identification/coverage.csv": (["pair", "from_GeV_c", "to_GeV_c", "technique"],
                                                [[pair] + e for pair, entries in cover.items() for e in entries])}
    if tof_rows:
        out["data/identification/time-of-flight.csv"] = (
            ["layer", "pair", "momentum_GeV_c", "path_a_cm", "path_b_cm", "time_difference_ps", "separation_sigma"], tof_rows)
    if dedx_rows:
        out["data/identification/energy-loss.csv"] = (
            ["layer", "pair", "momentum_GeV_c", "most_probable_a_keV", "most_probable_b_keV", "separation_sigma"], dedx_rows)
    if ckov_rows:
        out["data/identification/cherenkov.csv"] = (["radiator", "pair", "momentum_GeV_c", "separation_sigma"], ckov_rows)
    return out
