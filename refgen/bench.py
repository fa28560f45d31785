"""Build benchmark: prints the figures of merit of issue "build performance" in one run.

    python -m refgen.bench

Measures, on this machine: the cold build time of the demo spec and of a spec scaled four times (ratio,
target <= 4.4); the same number of figures drawn by bare matplotlib (ratio of build to bare, target <= 1.3);
the dE/dx kernel throughput over 10^6 points against numpy's log (target within 15x); the rebuild time with
the spec unchanged (target <= 20% of the cold build); and the site's size. Not a test: no assertions.
"""
from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
from concurrent.futures import ProcessPoolExecutor
from pathlib import Path

import numpy as np
import yaml

from .cli import demo_spec_path


def scaled_spec_text(text: str, factor: int) -> str:
    """The spec with every material and layer repeated ``factor`` times (copies get a suffix)."""
    data = yaml.safe_load(text)
    mats, layers, radiators = {}, [], []
    for k in range(factor):
        suffix = "" if k == 0 else f"-copy{k}"
        for name, m in data["materials"].items():
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


def timed_build(spec: Path, out: Path, cache: Path) -> float:
    """Wall time of one `refgen build` in a fresh interpreter (imports included)."""
    env = dict(os.environ, REFGEN_CACHE=str(cache), CI="true")
    t = time.perf_counter()
    subprocess.run([sys.executable, "-m", "refgen.cli", "build", str(spec), "--out", str(out), "--quiet", "--force"],
                   check=True, env=env)
    return time.perf_counter() - t


def _bare_figure(i: int) -> int:
    import io

    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    x = np.geomspace(0.05, 500, 240)
    fig, ax = plt.subplots(figsize=(6.4, 4.0))
    for k in range(8):
        ax.plot(x, (k + 1) * (1 + 1 / x ** 2) * np.log(10 + x), label=f"series {k}")
    ax.set_xscale("log")
    ax.set_yscale("log")
    ax.set_xlabel("x")
    ax.set_ylabel("y")
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0))
    buf = io.BytesIO()
    fig.savefig(buf, format="svg", bbox_inches="tight")
    plt.close(fig)
    return len(buf.getvalue())


def bare_matplotlib(n: int, workers: int) -> float:
    """Wall time to draw and save n comparable SVG figures with bare matplotlib, in the same pool size."""
    t = time.perf_counter()
    with ProcessPoolExecutor(max_workers=workers) as pool:
        list(pool.map(_bare_figure, range(n)))
    return time.perf_counter() - t


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
    files = [p for p in site.rglob("*") if p.is_file()]
    pages = [p for p in files if p.suffix == ".html"]
    largest = max(pages, key=lambda p: p.stat().st_size)
    return sum(p.stat().st_size for p in files) / 1e6, largest.name, largest.stat().st_size / 1e6


def main() -> int:
    demo = Path(demo_spec_path())
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        scaled = tmp / "scaled.yaml"
        scaled.write_text(scaled_spec_text(demo.read_text(), 4))
        cold = timed_build(demo, tmp / "site", tmp / "cache-a")
        cold4 = timed_build(scaled, tmp / "site4", tmp / "cache-b")
        rebuild = timed_build(demo, tmp / "site", tmp / "cache-a")
        n_figures = len(list((tmp / "site" / "fig").glob("*.svg")))
        bare = bare_matplotlib(n_figures, workers=min(2, os.cpu_count() or 1))
        rate, ratio_log = kernel_throughput()
        size, largest, largest_mb = site_size(tmp / "site")
    print(f"machine: {os.cpu_count()} cores, Python {sys.version.split()[0]}")
    print(f"cold build, demo spec:             {cold:7.2f} s")
    print(f"cold build, 4x scaled spec:        {cold4:7.2f} s   ratio {cold4 / cold:5.2f}  (target <= 4.4)")
    print(f"bare matplotlib, {n_figures} figures:      {bare:7.2f} s   build/bare {cold / bare:5.2f}  (target <= 1.3)")
    print(f"dE/dx kernel: {rate:,.0f} evaluations/s over 1e6 points; time ratio to np.log {ratio_log:5.1f}  (target <= 15)")
    print(f"rebuild, spec unchanged:           {rebuild:7.2f} s   {100 * rebuild / cold:5.1f}% of cold  (target <= 20%)")
    print(f"site size {size:.2f} MB; largest page {largest} {largest_mb:.3f} MB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
