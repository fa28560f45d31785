"""Change tracking: compare this build's key numbers with a baseline key-numbers.json.

Every numeric leaf is compared by its dotted path (lists by index, layers by name). A number "moved" when
its relative change exceeds the comparison floor; strict mode fails the build when any moved beyond the
tolerance the user gives.
"""
from __future__ import annotations

import json
import math

from .errors import RefgenError

RELATIVE_FLOOR = 1e-9  # changes below this are rounding, not movement


class BaselineError(RefgenError):
    """A baseline file that cannot be read as key numbers."""


def load_baseline(path) -> dict:
    try:
        with open(path, encoding="utf-8") as f:
            data = json.load(f)
    except OSError as exc:
        raise BaselineError(f"cannot read the baseline {path}: {exc.strerror}") from None
    except (json.JSONDecodeError, UnicodeDecodeError) as exc:
        raise BaselineError(f"the baseline {path} is not a key-numbers JSON file: {exc}") from None
    if not isinstance(data, dict) or not str(data.get("schema", "")).startswith("refgen-key-numbers/"):
        raise BaselineError(f"the baseline {path} has no refgen key-numbers schema")
    return data


def flatten(data, prefix: str = "") -> dict[str, object]:
    """Dotted paths to leaves; list items of dicts with a 'name' are keyed by that name."""
    out: dict[str, object] = {}
    if isinstance(data, dict):
        for k, v in data.items():
            out.update(flatten(v, f"{prefix}.{k}" if prefix else str(k)))
    elif isinstance(data, list):
        for i, v in enumerate(data):
            tag = v.get("name") or v.get("layer") if isinstance(v, dict) else None
            out.update(flatten(v, f"{prefix}[{tag if tag is not None else i}]"))
    else:
        out[prefix] = data
    return out


def _number(v) -> float | None:
    return float(v) if isinstance(v, (int, float)) and not isinstance(v, bool) else None


def compare(old: dict, new: dict) -> dict:
    """Moved, added and removed numbers between two key-number sets."""
    a, b = flatten(old), flatten(new)
    moved, added, removed = [], [], []
    for key in sorted(set(a) | set(b)):
        if key in ("refgen_version", "spec_sha256_16"):
            continue
        if key not in a:
            added.append({"key": key, "new": b[key]})
            continue
        if key not in b:
            removed.append({"key": key, "old": a[key]})
            continue
        x, y = _number(a[key]), _number(b[key])
        if x is None or y is None:
            if a[key] != b[key]:
                moved.append({"key": key, "old": a[key], "new": b[key], "relative_change": None})
            continue
        scale = max(abs(x), abs(y))
        rel = 0.0 if scale == 0 else (y - x) / (abs(x) if x != 0 else scale)
        if abs(rel) > RELATIVE_FLOOR:
            moved.append({"key": key, "old": x, "new": y, "relative_change": rel})
    return {"moved": moved, "added": added, "removed": removed,
            "baseline": {"experiment": old.get("experiment"), "spec_sha256_16": old.get("spec_sha256_16"),
                         "refgen_version": old.get("refgen_version")}}


def beyond(changes: dict, tolerance: float) -> list[dict]:
    """The moved numbers whose relative change exceeds ``tolerance`` (non-numeric changes always count)."""
    return [m for m in changes["moved"] if m["relative_change"] is None or not math.isfinite(m["relative_change"])
            or abs(m["relative_change"]) > tolerance]
