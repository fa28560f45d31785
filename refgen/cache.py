"""Content-addressed caching of computed results, shared by the physics and the figures.

A result is stored under the SHA-256 of (what computed it, the code that computed it, its inputs). Inputs are
plain data: numbers, strings, numpy arrays, lists, tuples, dicts and frozen dataclasses (the model's Material,
Species, Grid). The same inputs and code always give the same key, so a cached result is exactly the one a
fresh computation would give, and any change of the code or of an input computes afresh.

``cached_map`` runs the misses of a batch of jobs in a process pool and keeps each result on disk;
the folder is ``$REFGEN_CACHE`` (or ``~/.cache/refgen``), one subfolder per kind of result.
"""
from __future__ import annotations

import dataclasses
import functools
import hashlib
import multiprocessing
import os
import pickle
import sys
from concurrent.futures import ProcessPoolExecutor
from importlib import metadata
from pathlib import Path

import numpy as np

PACKAGE_ROOT = Path(__file__).resolve().parent
# Libraries whose data or numerics enter the physics results: a new version invalidates the physics cache.
PHYSICS_LIBRARIES = ("numpy", "scipy", "xraydb", "periodictable", "pint", "particle")


def cache_root() -> Path:
    """$REFGEN_CACHE, else ~/.cache/refgen."""
    return Path(os.environ.get("REFGEN_CACHE") or os.path.join(os.path.expanduser("~"), ".cache", "refgen"))


def feed(obj, h) -> None:
    """Feed plain data into a hash: numbers, strings, arrays, lists, tuples, dicts and dataclasses."""
    if isinstance(obj, np.ndarray):
        h.update(b"A" + str(obj.dtype).encode() + str(obj.shape).encode() + np.ascontiguousarray(obj).tobytes())
    elif isinstance(obj, dict):
        h.update(b"D")
        for k in sorted(obj, key=str):
            feed(str(k), h)
            feed(obj[k], h)
    elif isinstance(obj, (list, tuple)):
        h.update(b"L" + str(len(obj)).encode())
        for v in obj:
            feed(v, h)
    elif dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        h.update(b"C" + type(obj).__qualname__.encode())
        for f in dataclasses.fields(obj):
            feed(f.name, h)
            feed(getattr(obj, f.name), h)
    else:
        h.update(b"S" + repr(obj).encode())


def content_key(code: bytes, *inputs) -> str:
    """SHA-256 hex digest of the code version and the inputs."""
    h = hashlib.sha256(code)
    feed(inputs, h)
    return h.hexdigest()


@functools.cache
def physics_code_version() -> bytes:
    """Every Python source and data file of the refgen package, and the versions of the libraries the physics
    uses: a change to any of them invalidates every cached physics result."""
    h = hashlib.sha256()
    for path in sorted(PACKAGE_ROOT.rglob("*")):
        if path.suffix in (".py", ".csv") and "__pycache__" not in path.parts:
            h.update(str(path.relative_to(PACKAGE_ROOT)).encode() + b"\0" + path.read_bytes())
    for lib in PHYSICS_LIBRARIES:
        h.update(f"{lib}={metadata.version(lib)}".encode())
    return h.digest()


def _run(job):
    fn, args = job
    return fn(*args)


def process_pool(workers: int) -> ProcessPoolExecutor:
    """A pool of worker processes (forked where the platform allows, so workers start at once)."""
    ctx = multiprocessing.get_context("spawn" if sys.platform == "darwin" else "fork")
    return ProcessPoolExecutor(max_workers=workers, mp_context=ctx)


def _store(path: Path, value) -> None:
    """Write atomically, so that a concurrent or interrupted build never reads half a file."""
    path.parent.mkdir(parents=True, exist_ok=True)
    tmp = path.with_name(f".{path.name}.{os.getpid()}.tmp")
    tmp.write_bytes(pickle.dumps(value, protocol=pickle.HIGHEST_PROTOCOL))
    tmp.replace(path)


def _load(path: Path):
    """A cached result, or None when absent or unreadable (then it is computed again)."""
    try:
        return pickle.loads(path.read_bytes())
    except (OSError, EOFError, pickle.UnpicklingError, AttributeError, ImportError, IndexError, TypeError, ValueError):
        return None


def cached_map(fn, jobs: dict, cache_dir: Path | None = None, workers: int = 1) -> dict:
    """{name: fn(*args)} for ``jobs`` = {name: args}. Results found in ``cache_dir`` (by the content key of fn,
    the physics code and args) are loaded; the others are computed, in a process pool of ``workers`` when
    there are several, and stored. Without a cache folder everything is computed."""
    keys = {name: content_key(physics_code_version(), fn.__module__, fn.__qualname__, args) for name, args in jobs.items()}
    done, todo = {}, []
    for name in jobs:
        hit = _load(cache_dir / f"{keys[name]}.pkl") if cache_dir is not None else None
        if hit is not None:
            done[name] = hit
        else:
            todo.append(name)
    if workers > 1 and len(todo) > 1:
        with process_pool(min(workers, len(todo))) as pool:
            results = list(pool.map(_run, [(fn, jobs[n]) for n in todo]))
    else:
        results = [fn(*jobs[n]) for n in todo]
    for name, value in zip(todo, results):
        done[name] = value
        if cache_dir is not None:
            _store(cache_dir / f"{keys[name]}.pkl", value)
    return {name: done[name] for name in jobs}
