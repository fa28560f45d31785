"""The refgen command line: build, compare, check, materials. Prints one line per problem, never a traceback.

Exit status: 0 success, 2 bad input (spec, baseline, option or output folder), 3 key numbers moved beyond the
tolerance, 130 interrupted. A closed output pipe (``refgen ... | head``) ends quietly with 0.
"""
from __future__ import annotations

import argparse
import math
import os
import sys
from importlib import resources

from . import __version__, datafiles
from .errors import RefgenError, SpecError

DEMO_SPEC = "kestrel-forward.yaml"


def demo_spec_path() -> str:
    """Path of the bundled demo spec (project_spec/, installed as refgen.demo)."""
    return str(resources.files("refgen.demo").joinpath(DEMO_SPEC))


def _tolerance(text: str) -> float:
    """A relative tolerance: a finite number >= 0."""
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"not a number: '{text}'") from None
    if not math.isfinite(value) or value < 0:
        raise argparse.ArgumentTypeError(f"must be a finite number >= 0 (got '{text}')")
    return value


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
    b.add_argument("--fail-on-change", type=_tolerance, metavar="TOL",
                   help="with --baseline: exit 3 when any key number moved by more than TOL (relative, e.g. 0.01)")
    cmp_ = sub.add_parser("compare", help="list what changed between two key-numbers.json files; exit 3 if any "
                          "number moved beyond the tolerance")
    cmp_.add_argument("old", help="the baseline key-numbers.json")
    cmp_.add_argument("new", help="the new key-numbers.json")
    cmp_.add_argument("--tolerance", type=_tolerance, default=0.0, metavar="TOL",
                      help="relative change that counts as moved, e.g. 0.01 for 1%% (default 0: any move)")
    cmp_.add_argument("--all", action="store_true", help="list every row (default: the largest 40 of each list)")
    c = sub.add_parser("check", help="only validate a spec")
    c.add_argument("spec")
    c.add_argument("--strict", action="store_true", help="treat spec warnings as errors")
    sub.add_parser("materials", help="list the built-in material library with each material's composition")
    sub.add_parser("particles", help="list the built-in particle species: names accepted, mass, charge")
    sub.add_parser("keys", help="print the reference of every spec key (generated from the validator's schema)")
    return p


def _composition(text: str) -> str:
    """A library composition as a reader writes it: 'mass:C=0.5;H=0.5' -> 'C 50 %, H 50 % by mass'."""
    kind, _, body = text.partition(":")
    if kind == "formula":
        return body
    if kind == "mass":
        parts = [p.partition("=") for p in body.split(";") if p]
        return ", ".join(f"{name} {float(f) * 100:.4g} %" for name, _, f in parts) + " by mass"
    if kind == "pseudo":
        return "pseudo-element " + body.replace(";", ", ")
    return text


def _materials() -> int:
    rows = [(key, f"{e['density']:g}", e["state"], "" if e["I_eV"] is None else f"{e['I_eV']:g}",
             _composition(e["composition"]), e["description"]) for key, e in datafiles.library_materials().items()]
    header = ("key", "density g/cm3", "state", "I eV", "composition", "description")
    widths = [max(len(r[i]) for r in rows + [header]) for i in range(5)]
    print("  ".join(h.ljust(w) for h, w in zip(header, widths)) + "  " + header[5])
    for r in rows:
        print("  ".join(c.ljust(w) for c, w in zip(r, widths)) + "  " + r[5])
    print(f"\n{len(rows)} materials. Use one in a spec as {{library: KEY}}; I blank = Bragg additivity.")
    return 0


def _particles() -> int:
    import particle
    rows = [(p["key"], p["label"], f"{p['mass']:.10g}", f"{p['charge']:+d}", ", ".join(p["aliases"]))
            for p in datafiles.particles().values()]
    header = ("key", "label", "mass MeV", "charge", "also accepted as")
    widths = [max(len(r[i]) for r in rows + [header]) for i in range(4)]
    print("  ".join(h.ljust(w) for h, w in zip(header, widths)) + "  " + header[4])
    for r in rows:
        print("  ".join(c.ljust(w) for c, w in zip(r, widths)) + "  " + r[4])
    print(f"\nMasses and charges from the particle package {particle.__version__} (Particle Data Group tables); "
          "masses of the bare nuclei d, t, He-3 and alpha from CODATA via scipy.constants. Names are matched "
          "ignoring case and spaces. Any other species: particles: [{NAME: {mass: ..., charge: ...}}].")
    return 0


def _keys() -> int:
    from .reference import key_reference
    print(key_reference(), end="")
    return 0


def _compare(args) -> int:
    from .changes import compare, counted, load_baseline, text_report
    changes = compare(load_baseline(args.old), load_baseline(args.new), args.tolerance)
    for line in text_report(changes, limit=None if args.all else 40):
        print(line)
    return 3 if counted(changes) else 0


def main(argv=None) -> int:
    args = _parser().parse_args(argv)
    try:
        status = _run(args)
        sys.stdout.flush()  # inside the try: a closed pipe is noticed here, not at interpreter exit
        return status
    except BrokenPipeError:
        _silence_stdout()
        return 0


def _silence_stdout() -> None:
    """The reader of our output went away (``| head``): point stdout at /dev/null so the final flush is quiet."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except (OSError, ValueError):
        pass


def _run(args) -> int:
    try:
        if args.command == "materials":
            return _materials()
        if args.command == "particles":
            return _particles()
        if args.command == "keys":
            return _keys()
        if args.command in ("check", "build"):
            from .yamlio import precheck_file
            precheck_file(args.spec or demo_spec_path(), str(args.spec or demo_spec_path()))
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
                       baseline=args.baseline, tolerance=args.fail_on_change, single_file=args.single_file,
                       cache=not args.no_cache, progress=progress)
        for w in report["warnings"]:
            print(f"warning: {w}", file=sys.stderr)
        for n in report["notes"]:
            print(f"note: {n}", file=sys.stderr)
        if not quiet:
            print(f"refgen: handbook written to {os.path.join(args.out, 'index.html')}", file=sys.stderr)
        if report["changes"] is not None:
            from .changes import counted, text_report
            for line in text_report(report["changes"], limit=15):
                print(f"refgen: {line}", file=sys.stderr)
            print(f"refgen: the full comparison is in {os.path.join(args.out, 'changes.html')}", file=sys.stderr)
            n = counted(report["changes"])
            if args.fail_on_change is not None and n:
                print(f"error: {n} key numbers moved by more than {args.fail_on_change * 100:g} % (or appeared or "
                      "disappeared); exit status 3", file=sys.stderr)
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
