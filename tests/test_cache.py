"""The content cache: keys follow the inputs, a cached result is what a fresh computation gives, and a change
recomputes only what it touches."""
import dataclasses
import json

import numpy as np

from refgen.cache import cached_map, content_key
from refgen.report import make_report
from refgen.spec import load_spec
from tests.conftest import SMALL

CALLS = []


def _square(x):
    CALLS.append(x)
    return {"x": x, "y": np.arange(3) * x}


@dataclasses.dataclass(frozen=True)
class _Thing:
    name: str
    density: float


def test_key_follows_every_input_field():
    a, b = _Thing("gas", 1.2e-3), _Thing("gas", 1.2e-3)
    assert content_key(b"code", a) == content_key(b"code", b)
    assert content_key(b"code", a) != content_key(b"code", _Thing("gas", 1.2000001e-3))
    assert content_key(b"code", a) != content_key(b"other code", a)
    assert content_key(b"code", np.arange(3)) != content_key(b"code", np.arange(3.0))


def test_cached_map_computes_only_what_changed(tmp_path):
    CALLS.clear()
    first = cached_map(_square, {"a": (1,), "b": (2,)}, tmp_path)
    assert sorted(CALLS) == [1, 2]
    CALLS.clear()
    again = cached_map(_square, {"a": (1,), "b": (3,)}, tmp_path)
    assert CALLS == [3]
    assert again["a"]["x"] == first["a"]["x"] and np.array_equal(again["a"]["y"], first["a"]["y"])


def test_unreadable_cache_entry_is_recomputed(tmp_path):
    cached_map(_square, {"a": (5,)}, tmp_path)
    for f in tmp_path.glob("*.pkl"):
        f.write_bytes(b"not a pickle")
    CALLS.clear()
    assert cached_map(_square, {"a": (5,)}, tmp_path)["a"]["x"] == 5
    assert CALLS == [5]


def test_cached_and_pooled_report_equals_fresh_one(tmp_path):
    spec = load_spec(SMALL)
    fresh = json.dumps(make_report(spec)["key_numbers"], sort_keys=True)
    cold = json.dumps(make_report(spec, cache_dir=tmp_path, workers=2)["key_numbers"], sort_keys=True)
    warm = json.dumps(make_report(spec, cache_dir=tmp_path, workers=2)["key_numbers"], sort_keys=True)
    assert fresh == cold == warm


def test_reach_walk_agrees_with_crossing_and_rises():
    """The vectorised backward walk: reaching the second layer means crossing the first; reach never falls
    along the stack (CSDA, a property of the walk itself)."""
    report = make_report(load_spec(SMALL))
    kn = report["key_numbers"]
    first, second = kn["layers"][0]["name"], kn["layers"][1]["name"]
    for sp, reach in kn["reach_momentum_GeV_c"].items():
        assert reach[second] == kn["cross_momentum_GeV_c"][sp][first]
        values = [v for v in reach.values() if v is not None]
        assert values == sorted(values)


def test_long_stack_tables_are_thinned():
    from refgen.handbook import MAX_TABLE_LAYERS, page_view
    layers = [{"name": f"p{i}", "system": "tracking" if i < 2000 else "muon", "active": i % 3 == 0} for i in range(3000)]
    kn = {"layers": layers, "hadron_survival": [{"layer": l["name"]} for l in layers],
          "material_budget": {"rows": [{"layer": l["name"]} for l in layers], "per_system": {}},
          "tracking_scattering": [{"layer": l["name"]} for l in layers[:2000]]}
    view, note = page_view(kn)
    names = [l["name"] for l in view["layers"]]
    assert len(names) <= MAX_TABLE_LAYERS + 6
    assert {"p0", "p1998", "p1999", "p2000", "p2997", "p2999"} <= set(names)
    assert [r["layer"] for r in view["hadron_survival"]] == names == [r["layer"] for r in view["material_budget"]["rows"]]
    assert "3000 layers" in note and len(kn["layers"]) == 3000
    assert page_view(dict(kn, layers=layers[:10])) == (dict(kn, layers=layers[:10]), None)
