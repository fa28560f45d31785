"""Fuzzing: mutate the demo specs (types, units, deletions, extreme values) and require either success or the
project's own error type, never any other exception. 500 examples on validation, and fewer full computations."""
import math

import pytest
import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from refgen.changes import compare, text_report
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


# Hostile YAML shapes: aliases that repeat each other, deep nesting (flow and block), alias loops, merge keys
# and control characters, anywhere in the demo spec. Each must end in the project's own error (never a
# RecursionError, a hang or a MemoryError); the bounds are in refgen/yamlio.py.
def alias_bomb(width, depth):
    text = "a0: &a0 [" + ", ".join(["x"] * width) + "]\n"
    for i in range(1, depth + 1):
        text += f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * width) + "]\n"
    return text


def merge_bomb(depth):
    text = "m0: &m0 {k: 1, j: 2}\n"
    for i in range(1, depth + 1):
        text += f"m{i}: &m{i} {{<<: [*m{i - 1}], k{i}: [*m{i - 1}, *m{i - 1}, *m{i - 1}]}}\n"
    return text


def deep_flow(depth, opener):
    closer = {"[": "]", "{a: ": "}"}[opener]
    return "deep: " + opener * depth + "x" * (opener == "{a: ") + closer * depth + "\n"


def deep_block(depth):
    return "deep:\n" + "".join("  " * (i + 1) + ("- " if i % 2 else f"k{i}:") + "\n" for i in range(depth))


HOSTILE = st.one_of(
    st.builds(lambda w, extra: alias_bomb(w, math.ceil(math.log(2e4) / math.log(w)) + extra),
              st.integers(2, 12), st.integers(0, 30)),
    st.builds(merge_bomb, st.integers(10, 40)),
    st.builds(deep_flow, st.integers(51, 20000), st.sampled_from(["[", "{a: "])),
    st.builds(deep_block, st.integers(52, 400)),
    st.just("loop: &l [1, {x: *l}]\n"),
    st.builds(lambda c: f"x: \"{c}\"\n", st.sampled_from(["\x00", "\x07", "\x1b", "\ufffe"])),
)


@settings(max_examples=60, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
@given(HOSTILE, st.booleans())
def test_hostile_yaml_shapes_fail_cleanly(shape, at_end):
    text = DEMO.read_text() + shape if at_end else shape + DEMO.read_text()
    with pytest.raises(RefgenError) as exc:
        parse_spec(text, "fuzz.yaml")
    assert any(word in str(exc.value) for word in ("values", "levels deep", "a loop", "not allowed", "syntax")), exc.value


# `refgen compare` on arbitrary key-number trees: a report, never an exception.
JSON = st.recursive(st.one_of(st.none(), st.booleans(), st.integers(-10, 10), st.floats(allow_nan=True),
                              st.text(max_size=5)),
                    lambda inner: st.one_of(st.lists(inner, max_size=4),
                                            st.dictionaries(st.sampled_from(["name", "layer", "pair", "x_cm",
                                                                             "transmission", "spec", "layers", "0.1",
                                                                             "materials", "muon"]), inner, max_size=4)),
                    max_leaves=20)


@settings(max_examples=150, deadline=None, derandomize=True)
@given(JSON, JSON)
def test_compare_any_two_key_number_trees(old, new):
    a = {"schema": "refgen-key-numbers/1", "body": old, "spec": old}
    b = {"schema": "refgen-key-numbers/1", "body": new, "spec": new}
    for tol in (None, 0.0, 0.5):
        text_report(compare(a, b, tol), limit=5)
