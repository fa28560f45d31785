"""Fuzzing: mutate the demo specs (types, units, deletions, extreme values) and require either success or the
project's own error type, never any other exception. 500 examples on validation, and fewer full computations."""
import math

import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from refgen.errors import RefgenError
from refgen.report import make_report
from refgen.spec import parse_spec
from tests.conftest import DEMO, SMALL

DEMO_DATA = yaml.safe_load(DEMO.read_text())
SMALL_DATA = yaml.safe_load(SMALL.read_text())

UNITS = ["um", "mm", "cm", "m", "km", "g/cm3", "kg/m3", "MeV", "GeV", "keV", "eV", "MeV/c", "GeV/c", "degC", "K",
         "atm", "bar", "Pa", "mrad", "kg", "s", "", "furlong", "cm3", "1/cm"]
NUMBERS = st.one_of(st.integers(-10 ** 6, 10 ** 6), st.floats(allow_nan=True, allow_infinity=True),
                    st.sampled_from([0, -1, 1e-300, 1e300, 2, 5001, 10 ** 9]))
QUANTITIES = st.builds(lambda n, u: f"{n} {u}".strip(), st.one_of(st.integers(-1000, 10 ** 7),
                       st.floats(allow_nan=True, allow_infinity=True, width=32)), st.sampled_from(UNITS))
LEAVES = st.one_of(st.none(), st.booleans(), NUMBERS, QUANTITIES, st.text(max_size=12),
                   st.sampled_from(["silicon", "iron", "muon", "PbWO4", "Ar", "gas", "<script>x</script>", "../x"]),
                   st.lists(st.integers(), max_size=3), st.dictionaries(st.text(max_size=5), st.integers(), max_size=2))


def paths(node, prefix=()):
    """Every path into the parsed spec."""
    yield prefix
    if isinstance(node, dict):
        for k, v in node.items():
            yield from paths(v, prefix + (k,))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            yield from paths(v, prefix + (i,))


def mutate(data, path, action, leaf):
    """Apply one mutation at path; a path that no longer exists (after an earlier mutation) changes nothing."""
    data = yaml.safe_load(yaml.safe_dump(data))
    if not path:
        return leaf if action == "replace" else data
    parent = data
    for p in path[:-1]:
        if not isinstance(parent, (dict, list)) or (isinstance(parent, dict) and p not in parent) \
                or (isinstance(parent, list) and not (isinstance(p, int) and p < len(parent))):
            return data
        parent = parent[p]
    key = path[-1]
    if not isinstance(parent, (dict, list)) or (isinstance(parent, dict) and key not in parent) \
            or (isinstance(parent, list) and not (isinstance(key, int) and key < len(parent))):
        return data
    if action == "delete":
        del parent[key]
    elif action == "replace":
        parent[key] = leaf
    elif action == "duplicate" and isinstance(parent, list):
        parent.append(parent[key])
    elif action == "rename" and isinstance(parent, dict):
        parent[f"{key}x"] = parent.pop(key)
    return data


def mutation(base):
    all_paths = list(paths(base))
    return st.tuples(st.sampled_from(all_paths), st.sampled_from(["delete", "replace", "duplicate", "rename"]), LEAVES)


def to_text(data) -> str | None:
    try:
        return yaml.safe_dump(data, allow_unicode=True)
    except (yaml.YAMLError, ValueError):
        return None


@settings(max_examples=500, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
@given(mutation(DEMO_DATA), mutation(DEMO_DATA))
def test_mutated_demo_spec_validates_or_fails_cleanly(first, second):
    data = mutate(mutate(DEMO_DATA, *first), *second) if first[0] != second[0] else mutate(DEMO_DATA, *first)
    text = to_text(data)
    if text is None:
        return
    try:
        parse_spec(text, "fuzz.yaml")
    except RefgenError:
        pass


@settings(max_examples=25, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
@given(mutation(SMALL_DATA))
def test_mutated_small_spec_builds_or_fails_cleanly(m):
    text = to_text(mutate(SMALL_DATA, *m))
    if text is None:
        return
    try:
        spec = parse_spec(text, "fuzz.yaml")
    except RefgenError:
        return
    kn = make_report(spec)["key_numbers"]
    for m_numbers in kn["materials"].values():
        assert math.isfinite(m_numbers["radiation_length_g_cm2"])
