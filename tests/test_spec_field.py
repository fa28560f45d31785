"""The `field:` top-level key and the `resolution:` layer key: validation with pinned messages, and the model."""
import pytest

from refgen.spec import parse_spec
from tests.test_bad_input import run

STACK = """experiment: {name: Field rig}
particles: [muon]
materials:
  si: {library: silicon}
  c: {library: carbon-fibre}
layers:
  - {name: a, material: si, thickness: 300 um, system: tracking, resolution: 10 um}
  - {name: b, material: si, thickness: 300 um, system: tracking, resolution: 10 um}
  - {name: frame, material: c, thickness: 2 mm, system: support}
  - {name: c, material: si, thickness: 300 um, system: tracking, resolution: 10 um}
"""
SAMPLING = "  - {name: cal, system: other, repeat: 2, cell: [{material: si, thickness: 1 mm}], resolution: 1 mm}\n"

CASES = [
    ("negative field", STACK + "field: {strength: -1 T, from: a, to: b}\n",
     ["line 11: field.strength: must be greater than zero (got '-1 T')"]),
    ("zero field", STACK + "field: {strength: 0 T, from: a, to: b}\n",
     ["line 11: field.strength: must be greater than zero (got '0 T')"]),
    ("field not a field", STACK + "field: {strength: 1 m, from: a, to: b}\n",
     ["line 11: field.strength: '1 m' is not a magnetic field; expected e.g. '1.5 T, 500 mT'"]),
    ("unknown from layer", STACK + "field: {strength: 1 T, from: aa, to: b}\n",
     ["line 11: field.from: unknown layer 'aa'; did you mean 'a'?"]),
    ("unknown to layer in a list", STACK + "field:\n  - {strength: 1 T, from: a, to: a}\n  - {strength: 1 T, from: c, to: dd}\n",
     ["line 13: field[1].to: unknown layer 'dd'"]),
    ("to before from", STACK + "field: {strength: 1 T, from: c, to: a}\n",
     ["line 11: field.to: layer 'a' lies before layer 'c'; a field region runs outward from 'from' to 'to'"]),
    ("overlapping regions", STACK + "field:\n  - {strength: 1 T, from: a, to: b}\n  - {strength: 1 T, from: b, to: c}\n",
     ["line 13: field[1]: field region from 'b' to 'c' overlaps the region from 'a' to 'b'"]),
    ("missing strength", STACK + "field: {from: a, to: b}\n", ["line 11: field: missing required key 'strength'"]),
    ("field not a mapping", STACK + "field: 2 T\n",
     ["line 11: field: expected {strength: ..., from: <layer>, to: <layer>} or a non-empty list of them"]),
    ("negative resolution", STACK.replace("resolution: 10 um", "resolution: -5 um", 1),
     ["line 7: layers[0].resolution: must be greater than zero (got '-5 um')"]),
    ("zero resolution", STACK.replace("resolution: 10 um", "resolution: 0 um", 1),
     ["line 7: layers[0].resolution: must be greater than zero (got '0 um')"]),
    ("resolution without unit", STACK.replace("resolution: 10 um", "resolution: 10", 1),
     ["line 7: layers[0].resolution: '10' has no unit; write it with one, e.g. '150 um, 1.2 cm'"]),
    ("resolution on a sampling structure", STACK + SAMPLING,
     ["line 11: layers[4].resolution: layer 'cal' is a sampling structure; only a single-slab layer can measure"]),
    ("resolution on a passive layer", STACK.replace("system: support}", "system: support, resolution: 1 mm}"),
     ["line 9: layers[2].resolution: layer 'frame' is not active; a measuring layer must be active"]),
]


@pytest.mark.parametrize("case, text, expected", CASES, ids=[c[0] for c in CASES])
def test_bad_field_or_resolution(tmp_path, capsys, case, text, expected):
    rc, out, err = run(tmp_path, text, capsys=capsys)
    assert (rc, out.exists(), err) == (2, False, expected)


def test_field_regions_span_front_of_from_to_back_of_to():
    spec = parse_spec(STACK + "field:\n  - {strength: 1.5 T, from: b, to: c}\n  - {strength: 500 mT, from: a, to: a}\n")
    (first, second) = spec.field
    assert (first.from_layer, first.to_layer, first.strength_tesla) == ("a", "a", pytest.approx(0.5))
    assert (first.start_cm, first.end_cm) == (0.0, pytest.approx(0.03))
    assert (second.start_cm, second.end_cm) == (pytest.approx(0.03), pytest.approx(0.03 + 0.03 + 0.2 + 0.03))
    assert [layer.resolution_cm for layer in spec.layers] == [pytest.approx(1e-3)] * 2 + [None, pytest.approx(1e-3)]


def test_no_field_by_default():
    assert parse_spec(STACK).field == ()
