"""The build, read top to bottom as the pipeline: validate -> compute -> render -> write -> swap into place.

Everything is computed and rendered in memory before anything is written. The site is written into a
temporary folder beside the output and swapped in only when complete; a marker file tells refgen's own
output folders from anyone else's.
"""
from __future__ import annotations

import os
import shutil
import tempfile
from pathlib import Path

from . import __version__
from .cache import cache_root
from .errors import BuildError
from .render import render_site
from .report import make_report
from .changes import compare, load_baseline
from .spec import load_spec

MARKER = ".refgen-site"


def build_info(spec, build_date: str | None) -> dict:
    """Provenance shown on every page: refgen version, spec hash and revision, optional build date."""
    return {"version": __version__, "spec_hash": spec.spec_hash, "spec_source": Path(spec.source_name).name,
            "revision": spec.experiment.revision, "build_date": build_date}


def check_output_folder(out: Path, force: bool) -> None:
    """Refuse to replace a non-empty folder that refgen did not create, unless forced."""
    if out.exists() and not out.is_dir():
        raise BuildError(f"output path {out} exists and is not a folder")
    if out.is_dir() and any(out.iterdir()) and not (out / MARKER).exists() and not force:
        raise BuildError(f"output folder {out} is not empty and was not made by refgen; "
                         "choose another --out or pass --force")


def write_site(files: dict[str, bytes], out: Path, force: bool) -> None:
    """Write all files into a temporary sibling folder, then swap it in for ``out``."""
    out = out.resolve()
    check_output_folder(out, force)
    out.parent.mkdir(parents=True, exist_ok=True)
    tmp = Path(tempfile.mkdtemp(prefix=f".{out.name}.tmp-", dir=out.parent))
    try:
        for rel, data in sorted(files.items()):
            target = (tmp / rel).resolve()
            if tmp not in target.parents:
                raise BuildError(f"refusing to write outside the output folder: {rel}")
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_bytes(data)
        (tmp / MARKER).write_text(f"made by refgen {__version__}\n")
        old = None
        if out.exists():
            old = out.parent / f".{out.name}.old-{os.getpid()}"
            out.rename(old)
        tmp.rename(out)
        if old is not None:
            shutil.rmtree(old)
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise


def build(spec_path, out, *, force: bool = False, strict: bool = False, build_date: str | None = None,
          baseline=None, tolerance: float | None = None, single_file: bool = False, workers: int | None = None,
          cache: bool = True, progress=None) -> dict:
    """Build the handbook for one spec into ``out``. Returns the report (with ``changes`` when a baseline
    key-numbers.json is given; moves beyond ``tolerance`` are listed first)."""
    say = progress or (lambda msg: None)
    say("validating the spec")
    spec = load_spec(spec_path, strict=strict)
    check_output_folder(Path(out).resolve(), force)
    old = load_baseline(baseline) if baseline else None
    workers = workers or min(2, os.cpu_count() or 1)
    cache_dir = cache_root() if cache else None
    report = make_report(spec, progress=say, cache_dir=cache_dir, workers=workers)
    report["changes"] = compare(old, report["key_numbers"], tolerance) if old is not None else None
    say("rendering the pages and figures")
    files = render_site(report, build_info(spec, build_date), single=single_file,
                        workers=workers, cache_dir=cache_dir / "figures" if cache else None)
    say(f"writing {len(files)} files")
    write_site(files, Path(out), force)
    return report
