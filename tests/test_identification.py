"""The identification section of the demo handbooks: key names, the closed form behind the time-of-flight key
number, and consistency of the coverage with every technique's separation curve."""
import collections
import math

import pytest

from refgen.report import make_report
from refgen.spec import load_spec
from tests.conftest import DEMO, SMALL

C_M_PER_S = 299792458.0  # exact (SI)


@pytest.fixture(scope="module", params=[DEMO, SMALL], ids=["kestrel", "tern"])
def report(request):
    return make_report(load_spec(request.param, strict=True))


def test_pairs_are_named_by_species_keys_lighter_first(report):
    kn = report["key_numbers"]
    mass = {k: p["mass_MeV"] for k, p in kn["particles"].items()}
    ident = kn["identification"]
    for pairs in [ident["coverage"], *ident["time_of_flight"].values(), *ident["energy_loss"].values()]:
        for pair in pairs:
            a, b = pair.split("/")
            assert mass[a] <= mass[b]
    assert set(ident["time_of_flight"]) == {l["name"] for l in kn["layers"] if l["name"] in ident["timing_layers"]}


def test_time_of_flight_key_number_is_the_closed_form_root(report):
    # analytic: at the reported momentum, L/c (sqrt(1 + m_b^2/p^2) - sqrt(1 + m_a^2/p^2)) = 3 sigma on a straight
    # path; along an arc in a field (never shorter) the root can only move up
    kn = report["key_numbers"]
    mass = {k: p["mass_MeV"] for k, p in kn["particles"].items()}
    for layer, pairs in kn["identification"]["time_of_flight"].items():
        facts = kn["identification"]["timing_layers"][layer]
        straight = facts["path"] == "straight line"
        l_over_c = facts["straight_path_cm"] / 100.0 / C_M_PER_S * 1e12
        for pair, entry in pairs.items():
            p = entry["separated_up_to_GeV_c"]
            if p is None:
                continue
            a, b = (mass[k] / 1e3 for k in pair.split("/"))
            dt = l_over_c * (math.sqrt(1 + b * b / p / p) - math.sqrt(1 + a * a / p / p))
            if straight:
                assert dt == pytest.approx(3 * facts["combined_resolution_ps"], rel=1e-3)
            else:
                assert dt <= 3 * facts["combined_resolution_ps"] * (1 + 1e-3)
            assert entry["separated_from_GeV_c"] < p


def separations(report) -> dict:
    """(pair, momentum) -> the best separation of any technique, from the per-technique CSVs."""
    best = collections.defaultdict(float)
    for path, (header, rows) in report["csv_tables"].items():
        if not path.startswith("data/identification/") or path.endswith("coverage.csv"):
            continue
        i_pair, i_p, i_s = header.index("pair"), header.index("momentum_GeV_c"), header.index("separation_sigma")
        for row in rows:
            if math.isfinite(row[i_s]):
                key = (row[i_pair], row[i_p])
                best[key] = max(best[key], row[i_s])
    return best


def test_a_pair_is_never_separated_where_every_technique_is_below_three_sigma(report):
    best = separations(report)
    grid = report["identification"]["momentum_GeV_c"]
    checked = 0
    for pair, entries in report["key_numbers"]["identification"]["coverage"].items():
        for lo, hi, technique in entries:
            inside = [p for p in grid if lo < p < hi]
            if technique == "gap":
                assert all(best[(pair, p)] < 3.0 for p in inside), (pair, lo, hi)
            else:
                # edges are interpolated between grid points: every grid point strictly inside is >= 3 sigma
                assert all(best[(pair, p)] >= 3.0 for p in inside), (pair, lo, hi, technique)
            checked += len(inside)
    assert checked > 0


def test_coverage_tiles_the_momentum_range(report):
    # the technique ranges and the gaps together cover the momentum range once, with no overlap between gaps
    lo_all, hi_all = report["key_numbers"]["identification"]["momentum_range_GeV_c"]
    for pair, entries in report["key_numbers"]["identification"]["coverage"].items():
        spans = sorted([e[0], e[1]] for e in entries)
        edge = lo_all
        for lo, hi in spans:
            assert lo <= edge * (1 + 1e-9), (pair, lo, edge)
            edge = max(edge, hi)
        assert edge == pytest.approx(hi_all)


def test_demo_has_all_three_techniques(report):
    if report["key_numbers"]["experiment"]["name"] != "Kestrel Forward Spectrometer":
        pytest.skip("the small demo has time of flight only")
    kn = report["key_numbers"]["identification"]
    techniques = {t for entries in kn["coverage"].values() for _, _, t in entries}
    assert {t.split(" (")[0] for t in techniques} == {"time of flight", "energy loss", "Cherenkov", "gap"}
    assert kn["sampling_layers"]["drift-chamber"]["resolution_valid"]


FIELD_SPEC = """\
experiment: {name: Field rig}
particles: [pion, kaon]
momentum: {from: 200 MeV/c, to: 20 GeV/c, points: 100}
materials:
  si: {library: silicon}
  air: {library: air}
layers:
  - {name: plane-1, material: si, thickness: 300 um, system: tracking}
  - {name: magnet-gap, material: air, thickness: 100 cm, system: other}
  - {name: plane-2, material: si, thickness: 300 um, system: tracking}
  - {name: drift, material: air, thickness: 200 cm, system: other}
  - {name: wall, material: si, thickness: 1 cm, system: other, timing: 50 ps}
field: {strength: 1.0 T, from: magnet-gap, to: magnet-gap}
"""


def test_time_of_flight_uses_the_arc_in_a_field():
    # the 3-sigma momentum on the arc: Delta t over the arc length (physics.field_path_length) equals 3 sigma,
    # and it lies above the straight-path root because the arc is longer
    from refgen.physics.identification import field_path_length, time_difference_ps, tof_separation_momentum
    from refgen.spec import parse_spec
    spec = parse_spec(FIELD_SPEC)
    kn = make_report(spec)["key_numbers"]["identification"]
    facts = kn["timing_layers"]["wall"]
    assert facts["path"] == "arc length in the field"
    p = kn["time_of_flight"]["wall"]["pion/kaon"]["separated_up_to_GeV_c"] * 1e3
    z = facts["straight_path_cm"]
    regions = [(f.start_cm, f.end_cm, f.strength_tesla) for f in spec.field]
    arc = float(field_path_length(p, 1, z, regions))
    assert arc > z
    mpi, mk = spec.species[0].mass, spec.species[1].mass
    assert float(time_difference_ps(p, mpi, mk, arc)) == pytest.approx(3 * 50.0, rel=1e-6)
    assert p > tof_separation_momentum(mpi, mk, z, 50.0)
