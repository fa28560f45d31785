"""Build benchmark: prints how the build cost follows the size of the spec and the size of a change.

    python -m refgen.bench [--quick]

Every figure is a ratio of two builds run on the same machine in the same run (each build a fresh
interpreter, imports included), printed beside its target:
- a stack of 3000 thin layers against one of 300 (cold caches; target <= 12, i.e. linear in the layers);
- the demo spec scaled ten times (every material and layer copied, each copy's densities changed slightly so
  that no cache can share them) against the demo itself, both with empty caches (target <= 10);
- the 10x spec rebuilt after one layer's thickness changed, against its cold build (target <= 0.05);
- the peak memory (resident set) of the 10x cold build, and of the largest worker process.
Also printed: the cold demo build, the rebuild with the spec unchanged, the dE/dx kernel throughput and
the site size. Not a test: no assertions. ``--quick`` uses a 3x spec and 100/1000 layers.
"""
from __future__ import annotations

import json
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import yaml

from .cli import demo_spec_path
from .spec import load_spec

# A build in a fresh interpreter that reports its own peak resident set and that of its largest child (KiB).
_BUILD = """
import resource, sys
from refgen.cli import main
code = main(["build", sys.argv[1], "--out", sys.argv[2], "--quiet", "--force"])
print({"self_kib": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss,
       "child_kib": resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss})
sys.exit(code)
"""


def scaled_spec_text(path: Path, factor: int) -> str:
    """The spec with every material and layer repeated ``factor`` times. Copy k (k >= 1) gets a name suffix and
    densities raised by 0.3 k %, so no cached result of one copy serves another."""
    spec = load_spec(path)
    data = yaml.safe_load(path.read_text())
    mats, layers, radiators = {}, [], []
    for k in range(factor):
        suffix = "" if k == 0 else f"-copy{k}"
        for name, m in data["materials"].items():
            m = dict(m)
            if k:
                m["density"] = f"{spec.materials[name].density * (1 + 0.003 * k):.9g} g/cm3"
            mats[name + suffix] = m
        for layer in data["layers"]:
            layer = yaml.safe_load(yaml.safe_dump(layer))
            layer["name"] += suffix
            if "material" in layer:
                layer["material"] += suffix
            for slab in layer.get("cell", []):
                slab["material"] += suffix
            layers.append(layer)
        for r in data.get("radiators", []):
            r = dict(r)
            r["layer"] += suffix
            radiators.append(r)
    data.update(materials=mats, layers=layers, radiators=radiators)
    return yaml.safe_dump(data, sort_keys=False)


def thin_stack_text(layers: int) -> str:
    """A tracker of ``layers`` thin planes: 300 um silicon sensors alternating with 300 um carbon-fibre
    supports, five species, the demo's grids."""
    planes = [{"name": f"plane-{i:05d}", "material": "silicon" if i % 2 == 0 else "carbon-fibre",
               "thickness": "300 um", "system": "tracking" if i % 2 == 0 else "support"} for i in range(layers)]
    return yaml.safe_dump({
        "experiment": {"name": f"Thin-plane stack ({layers} layers)", "revision": "bench"},
        "particles": ["electron", "muon", "pion", "kaon", "proton"],
        "momentum": {"from": "50 MeV/c", "to": "500 GeV/c", "points": 240},
        "photon_energy": {"from": "10 keV", "to": "100 GeV", "points": 240},
        "shower_energies": ["1 GeV", "10 GeV"],
        "materials": {"silicon": {"library": "silicon"}, "carbon-fibre": {"library": "carbon-fibre"}},
        "layers": planes}, sort_keys=False)


def one_layer_changed(text: str) -> str:
    """The spec with the first single-slab layer 1 % thicker."""
    data = yaml.safe_load(text)
    layer = next(l for l in data["layers"] if "thickness" in l)
    value, unit = layer["thickness"].split()
    layer["thickness"] = f"{float(value) * 1.01:g} {unit}"
    return yaml.safe_dump(data, sort_keys=False)


def timed_build(spec: Path, out: Path, cache: Path) -> tuple[float, dict]:
    """(wall time in s, peak memory in KiB) of one `refgen build` in a fresh interpreter."""
    env = dict(os.environ, REFGEN_CACHE=str(cache), CI="true")
    t = time.perf_counter()
    done = subprocess.run([sys.executable, "-c", _BUILD, str(spec), str(out)], check=True, env=env,
                          capture_output=True, text=True)
    wall = time.perf_counter() - t
    return wall, json.loads(done.stdout.strip().splitlines()[-1].replace("'", '"'))


def kernel_throughput(points: int = 10 ** 6) -> tuple[float, float]:
    """(dE/dx evaluations per second, time ratio to np.log) over ``points`` (material, particle, momentum)."""
    from .materials import library_material
    from .physics.medium import medium_of
    from .physics.stopping import bethe_stopping
    media = [medium_of(library_material(k)) for k in ("silicon", "iron", "lead", "water", "argon-gas")]
    masses = [(105.6583755, 1), (139.57039, 1), (938.27208816, 1), (3727.3794066, 2)]
    combos = [(m, s) for m in media for s in masses]
    per = points // len(combos)
    p = np.geomspace(50.0, 5e5, per)
    t = time.perf_counter()
    for medium, (mass, z) in combos:
        bethe_stopping(p, mass, z, medium)
    t_kernel = time.perf_counter() - t
    x = np.geomspace(50.0, 5e5, per * len(combos))
    t = time.perf_counter()
    np.log(x)
    t_log = time.perf_counter() - t
    return per * len(combos) / t_kernel, t_kernel / t_log


def site_size(site: Path) -> tuple[float, str, float]:
    """(total MB, name of the largest page, its MB)."""
    files = [p for p in site.rglob("*") if p.is_file()]
    pages = [p for p in files if p.suffix == ".html"]
    largest = max(pages, key=lambda p: p.stat().st_size)
    return sum(p.stat().st_size for p in files) / 1e6, largest.name, largest.stat().st_size / 1e6


def _verdict(value: float, target: float) -> str:
    return f"(target <= {target:g}: {'met' if value <= target else 'missed'})"


def main(argv=None) -> int:
    quick = "--quick" in (argv if argv is not None else sys.argv[1:])
    factor, (few, many) = (3, (100, 1000)) if quick else (10, (300, 3000))
    demo = Path(demo_spec_path())
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        specs = {"big": scaled_spec_text(demo, factor), "few": thin_stack_text(few), "many": thin_stack_text(many)}
        specs["big-changed"] = one_layer_changed(specs["big"])
        for name, text in specs.items():
            (tmp / f"{name}.yaml").write_text(text)
        cold, _ = timed_build(demo, tmp / "site", tmp / "cache-demo")
        warm, _ = timed_build(demo, tmp / "site", tmp / "cache-demo")
        size, largest, largest_mb = site_size(tmp / "site")
        cold_big, mem = timed_build(tmp / "big.yaml", tmp / "site-big", tmp / "cache-big")
        changed_big, _ = timed_build(tmp / "big-changed.yaml", tmp / "site-big", tmp / "cache-big")
        cold_few, _ = timed_build(tmp / "few.yaml", tmp / "site-few", tmp / "cache-few")
        cold_many, _ = timed_build(tmp / "many.yaml", tmp / "site-many", tmp / "cache-many")
        rate, ratio_log = kernel_throughput()
    r_layers, r_big, r_change = cold_many / cold_few, cold_big / cold, changed_big / cold_big
    print(f"machine: {os.cpu_count()} cores, Python {sys.version.split()[0]}")
    print(f"cold build, demo spec:                    {cold:8.2f} s")
    print(f"rebuild, demo spec unchanged:             {warm:8.2f} s   {warm / cold:6.3f} of cold")
    print(f"cold build, {many} layers / {few} layers:   {cold_many:8.2f} s / {cold_few:.2f} s   "
          f"ratio {r_layers:6.2f}  {_verdict(r_layers, 10 if quick else 12)}")
    print(f"cold build, {factor}x spec / demo spec:          {cold_big:8.2f} s / {cold:.2f} s   "
          f"ratio {r_big:6.2f}  {_verdict(r_big, factor)}")
    print(f"rebuild, {factor}x spec with one layer changed: {changed_big:8.2f} s   "
          f"ratio to its cold build {r_change:6.3f}  {_verdict(r_change, 0.05)}")
    print(f"peak memory, {factor}x cold build:               {mem['self_kib'] / 1024:8.0f} MiB "
          f"(largest worker {mem['child_kib'] / 1024:.0f} MiB)")
    print(f"dE/dx kernel: {rate:,.0f} evaluations/s over 1e6 points; time ratio to np.log {ratio_log:5.1f}")
    print(f"site size {size:.2f} MB; largest page {largest} {largest_mb:.3f} MB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
