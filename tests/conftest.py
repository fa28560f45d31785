"""Shared fixtures: the demo specs, parsed once per session."""
from __future__ import annotations

from pathlib import Path

import pytest

from refgen.spec import load_spec

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "project_spec" / "kestrel-forward.yaml"
SMALL = ROOT / "project_spec" / "tern-cosmic-telescope.yaml"


@pytest.fixture(scope="session")
def demo_spec():
    return load_spec(DEMO, strict=True)
