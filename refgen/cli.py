"""The refgen command line: build, check, materials. Prints one line per problem, never a traceback."""
from __future__ import annotations

import argparse
import os
import sys
from importlib import resources

from . import __version__, datafiles
from .errors import RefgenError, SpecError

DEMO_SPEC = "kestrel-forward.yaml"


def demo_spec_path() -> str:
    """Path of the bundled demo spec (project_spec/, installed as refgen.demo)."""
    return str(resources.files("refgen.demo").joinpath(DEMO_SPEC))


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="refgen", description="Build an offline handbook of particle-matter "
                                "interactions for one experiment's detector description.")
    p.add_argument("--version", action="version", version=f"refgen {__version__}")
    sub = p.add_subparsers(dest="command", required=True)
    b = sub.add_parser("build", help="validate a spec and build its handbook site")
    b.add_argument("spec", nargs="?", help="spec YAML file (default: the bundled demo)")
    b.add_argument("--out", default="site", help="output folder (default: ./site)")
    b.add_argument("--force", action="store_true", help="replace a non-empty output folder not made by refgen")
    b.add_argument("--strict", action="store_true", help="treat spec warnings as errors")
    b.add_argument("--build-date", help="a date to print on the pages (none by default, for reproducible builds)")
    b.add_argument("--quiet", action="store_true", help="no progress output")
    b.add_argument("--no-cache", action="store_true", help="recompute every number and redraw every figure (ignore the cache)")
    b.add_argument("--single-file", action="store_true", help="also write DIR/handbook.html, one self-contained file")
    b.add_argument("--baseline", help="an earlier key-numbers.json: write a changes page listing every number that moved")
    b.add_argument("--fail-on-change", type=float, metavar="TOL",
                   help="with --baseline: exit 3 when any key number moved by more than TOL (relative, e.g. 0.01)")
    cmp_ = sub.add_parser("compare", help="list the key numbers that moved between two key-numbers.json files")
    cmp_.add_argument("old")
    cmp_.add_argument("new")
    cmp_.add_argument("--tolerance", type=float, default=0.0, help="report only moves beyond this relative change")
    c = sub.add_parser("check", help="only validate a spec")
    c.add_argument("spec")
    c.add_argument("--strict", action="store_true", help="treat spec warnings as errors")
    sub.add_parser("materials", help="list the built-in material library")
    return p


def _materials() -> int:
    for key, entry in datafiles.library_materials().items():
        print(f"{key:20s} {entry['density']:<10g} g/cm3  {entry['state']:7s} {entry['description']}")
    return 0


def _compare(args) -> int:
    from .changes import beyond, compare, load_baseline
    changes = compare(load_baseline(args.old), load_baseline(args.new))
    over = beyond(changes, args.tolerance)
    for m in over:
        rel = "" if m["relative_change"] is None else f" ({m['relative_change'] * 100:+.3g}%)"
        print(f"{m['key']}: {m['old']} -> {m['new']}{rel}")
    for a in changes["added"]:
        print(f"added: {a['key']}")
    for r in changes["removed"]:
        print(f"removed: {r['key']}")
    return 3 if over or changes["added"] or changes["removed"] else 0


def main(argv=None) -> int:
    args = _parser().parse_args(argv)
    try:
        if args.command == "materials":
            return _materials()
        if args.command == "check":
            from .spec import load_spec
            spec = load_spec(args.spec, strict=args.strict)
            for w in spec.warnings:
                print(f"warning: {spec.source_name}: {w}", file=sys.stderr)
            for n in spec.notes:
                print(f"note: {n}", file=sys.stderr)
            print(f"{args.spec}: ok ({len(spec.materials)} materials, {len(spec.layers)} layers, "
                  f"{len(spec.species)} particles)")
            return 0
        if args.command == "compare":
            return _compare(args)
        if args.fail_on_change is not None and not args.baseline:
            print("error: --fail-on-change needs --baseline", file=sys.stderr)
            return 2
        from .build import build
        quiet = args.quiet or bool(os.environ.get("CI"))
        progress = None if quiet else (lambda msg: print(f"refgen: {msg}", file=sys.stderr))
        spec_path = args.spec or demo_spec_path()
        report = build(spec_path, args.out, force=args.force, strict=args.strict, build_date=args.build_date,
                       baseline=args.baseline, single_file=args.single_file, cache=not args.no_cache,
                       progress=progress)
        for w in report["warnings"]:
            print(f"warning: {w}", file=sys.stderr)
        for n in report["notes"]:
            print(f"note: {n}", file=sys.stderr)
        if not quiet:
            print(f"refgen: handbook written to {os.path.join(args.out, 'index.html')}", file=sys.stderr)
        if report["changes"] is not None:
            from .changes import beyond
            moved = report["changes"]["moved"]
            print(f"refgen: {len(moved)} key numbers moved since the baseline (see changes.html)", file=sys.stderr)
            if args.fail_on_change is not None:
                over = beyond(report["changes"], args.fail_on_change)
                for m in over:
                    print(f"changed: {m['key']}: {m['old']} -> {m['new']}", file=sys.stderr)
                if over:
                    print(f"error: {len(over)} key numbers moved by more than {args.fail_on_change:g}", file=sys.stderr)
                    return 3
        return 0
    except SpecError as exc:
        for p in exc.problems:
            print(f"error: {exc.source}: {p}", file=sys.stderr)
        return 2
    except RefgenError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("error: interrupted; the previous site is left as it was", file=sys.stderr)
        return 130


if __name__ == "__main__":
    sys.exit(main())
