"""Validators for the experiment, the particle species and the grids (momentum, photon energy, shower energies)."""
from __future__ import annotations

import difflib

from .. import datafiles
from ..model import Experiment, Grid, Species
from ..units import parse_quantity
from .context import Context, name_ok

MAX_POINTS = 5000

EXPERIMENT_KEYS = {"name": "Experiment name (required).", "revision": "Revision label of this description.",
                   "summary": "A few lines of Markdown shown on the front page."}
GRID_KEYS = {"from": "Lower end, with unit (required).", "to": "Upper end, with unit (required).",
             "points": f"Number of log-spaced points, 2-{MAX_POINTS} (default 200)."}
CUSTOM_SPECIES_KEYS = {"mass": "Mass with unit, e.g. 1115.7 MeV (required).",
                       "charge": "Charge in units of e, an integer (required)."}


def read_experiment(ctx: Context, data) -> Experiment:
    """The required `experiment:` section: name, revision and summary as text."""
    value = data.get("experiment")
    if value is None:
        ctx.error(("experiment",), "missing required section 'experiment'")
        return Experiment("unnamed", "", "")
    if not ctx.keys(value, ("experiment",), EXPERIMENT_KEYS, ("name",)):
        return Experiment("unnamed", "", "")
    out = {}
    for key in ("name", "revision", "summary"):
        v = value.get(key, "")
        if not isinstance(v, (str, int, float)) or isinstance(v, bool):
            ctx.error(("experiment", key), "expected text")
            v = ""
        out[key] = str(v)
    if not out["name"].strip():
        ctx.error(("experiment", "name"), "the experiment needs a name")
    return Experiment(out["name"], out["revision"], out["summary"])


def read_particles(ctx: Context, data) -> tuple[Species, ...]:
    """The required `particles:` list: built-in names or aliases, or custom {name: {mass, charge}} species."""
    value = data.get("particles")
    if value is None:
        ctx.error(("particles",), "missing required section 'particles'")
        return ()
    if not isinstance(value, list) or not value:
        ctx.error(("particles",), "expected a non-empty list of species")
        return ()
    out: dict[str, Species] = {}
    for i, item in enumerate(value):
        path = ("particles", i)
        if isinstance(item, str):
            p = datafiles.find_particle(item)
            if p is None:
                close = difflib.get_close_matches(item, datafiles.particle_names(), n=1)
                hint = f"; did you mean '{close[0]}'?" if close else "; see `refgen particles`"
                ctx.error(path, f"unknown particle '{item}'{hint}")
                continue
            sp = Species(p["key"], p["label"], p["mass"], p["charge"], p["source"])
        elif isinstance(item, dict) and len(item) == 1:
            (name, props), = item.items()
            ppath = path + (name,)
            if not name_ok(ctx, name, ppath) or not ctx.keys(props, ppath, CUSTOM_SPECIES_KEYS, ("mass", "charge")):
                continue
            mass = ctx.quantity(props["mass"], ppath + ("mass",), "mass_energy")
            charge = props["charge"]
            if isinstance(charge, bool) or not isinstance(charge, int) or charge == 0 or abs(charge) > 100:
                ctx.error(ppath + ("charge",), "charge must be a non-zero integer (units of e), e.g. 1 or -1")
                continue
            if mass is None:
                continue
            sp = Species(name, name, mass, charge, "spec", custom=True)
        else:
            ctx.error(path, "expected a species name or {name: {mass: ..., charge: ...}}")
            continue
        if sp.key in out:
            ctx.error(path, f"particle '{sp.key}' is listed twice")
            continue
        out[sp.key] = sp
    return tuple(out.values())


def read_grid(ctx: Context, data, key: str, dimension: str, default: tuple[str, str, int]) -> Grid:
    """A log-spaced grid {from, to, points} under a top-level key, or the default when the key is absent."""
    value = data.get(key, {"from": default[0], "to": default[1], "points": default[2]})
    path = (key,)
    fallback = Grid(parse_quantity(default[0], dimension), parse_quantity(default[1], dimension), default[2])
    if not ctx.keys(value, path, GRID_KEYS, ("from", "to")):
        return fallback
    lo = ctx.quantity(value["from"], path + ("from",), dimension)
    hi = ctx.quantity(value["to"], path + ("to",), dimension)
    points = value.get("points", 200)
    if isinstance(points, bool) or not isinstance(points, int) or not 2 <= points <= MAX_POINTS:
        ctx.error(path + ("points",), f"points must be an integer from 2 to {MAX_POINTS} (got {points!r})")
        points = None
    if lo is None or hi is None or points is None:
        return fallback
    if not lo < hi:
        ctx.error(path, f"'from' ({value['from']}) must be below 'to' ({value['to']})")
        return fallback
    return Grid(lo, hi, points)


def derived_photon_range(ctx: Context, data, showers) -> tuple[str, str, int]:
    """The photon grid when the spec gives none: from 10 keV (softer photons are absorbed within about 0.1 mm of
    silicon and seldom matter in a particle detector) to ten times the largest shower energy (the photons of a
    shower of that energy, with a decade to spare), kept inside the photon model's validity; a note says so."""
    from ..physics.photons import VALID_MEV
    lo, hi = 1e-2, min(10.0 * max(showers, default=1e4), VALID_MEV[1])
    if "photon_energy" not in data:
        ctx.notes.append(f"photon_energy not given: {lo * 1e3:g} keV to {hi / 1e3:g} GeV, up to ten times the largest "
                         f"shower energy (at most {VALID_MEV[1] / 1e3:g} GeV, the photon model's edge)")
    return (f"{lo * 1e3:g} keV", f"{hi / 1e3:g} GeV", 200)


def read_shower_energies(ctx: Context, data) -> tuple[float, ...]:
    """The `shower_energies:` list (MeV), sorted and without repeats."""
    value = data.get("shower_energies", ["1 GeV", "10 GeV", "100 GeV"])
    if not isinstance(value, list) or not value:
        ctx.error(("shower_energies",), "expected a non-empty list of energies, e.g. [1 GeV, 10 GeV]")
        return ()
    if len(value) > 20:
        ctx.error(("shower_energies",), "at most 20 shower energies")
        return ()
    out = [ctx.quantity(v, ("shower_energies", i), "energy") for i, v in enumerate(value)]
    return tuple(sorted(set(e for e in out if e is not None)))
