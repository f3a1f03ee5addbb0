"""The ``shiftrank`` command line.

Each subcommand is a thin layer: parse options, call the API, print.  Bad
input ends with one line on stderr and exit status 2.
"""
from __future__ import annotations

import argparse
import json
import sys

from . import __version__
from .errors import InputError


def _print_facts(f, out=sys.stdout) -> None:
    print(f"{f.smiles}", file=out)
    print(f"  formula {f.formula}   average mass {f.average_mass:.3f}   monoisotopic {f.monoisotopic_mass:.4f}   DBE {f.dbe:g}", file=out)
    if f.dbe_note:
        print(f"  note: {f.dbe_note}", file=out)
    mc = f.multiplicity_counts()
    kinds = ", ".join(f"{mc[k]} {k}" for k in ("CH3", "CH2", "CH", "C") if k in mc)
    print(f"  carbons {f.n_carbons} in {f.expected_13c_signals} symmetry classes (expected 13C signals: {kinds})", file=out)
    print(f"  expected 1H environments {f.expected_1h_signals}", file=out)
    for c in f.carbon_classes:
        atoms = ",".join(str(i) for i in c.atoms)
        print(f"    class {c.multiplicity:<4} x{c.size}  atoms {atoms}", file=out)


def cmd_facts(args) -> int:
    from .molecules import read_molecules
    from .structure import facts_from_mol, structure_facts
    from pathlib import Path

    items = []
    for token in args.structures:
        if Path(token).exists():
            for rec in read_molecules(token):
                items.append((rec.id, rec.error, None if rec.error else facts_from_mol(rec.mol, rec.source)))
        else:
            try:
                items.append((token, None, structure_facts(token)))
            except InputError as exc:
                items.append((token, str(exc), None))
    bad = 0
    for rid, err, f in items:
        if err:
            bad += 1
            if args.json:
                print(json.dumps({"id": rid, "error": err}))
            else:
                print(f"{rid}: error: {err}", file=sys.stderr)
            continue
        if args.json:
            print(json.dumps({"id": rid, "formula": f.formula, "average_mass": round(f.average_mass, 4),
                              "monoisotopic_mass": round(f.monoisotopic_mass, 5), "dbe": f.dbe, "dbe_note": f.dbe_note,
                              "expected_13c_signals": f.expected_13c_signals, "expected_1h_signals": f.expected_1h_signals,
                              "carbon_classes": [{"atoms": c.atoms, "multiplicity": c.multiplicity} for c in f.carbon_classes]}))
        else:
            _print_facts(f)
    return 2 if bad and bad == len(items) else 0


def cmd_formula(args) -> int:
    from .formula import average_weight, dbe, dbe_note, hill, monoisotopic_weight, parse_formula

    c = parse_formula(args.formula)
    d = dbe(c)
    print(f"{hill(c)}   average mass {average_weight(c):.3f}   monoisotopic {monoisotopic_weight(c):.4f}   DBE {d:g}")
    note = dbe_note(d)
    if note:
        print(f"note: {note}")
    return 0


def cmd_peaks(args) -> int:
    from .peaks import read_peaks

    pl = read_peaks(args.file, nucleus=args.nucleus, solvent=args.solvent)
    for p in pl.peaks:
        extra = "  ".join(x for x in (p.multiplicity or "", f"x{p.count}" if p.count > 1 else "",
                                      f"[{p.solvent} residual]" if p.solvent else "") if x)
        print(f"{p.shift:10.2f}  {extra}")
    for n in pl.notes:
        print(f"note: {n}")
    print(f"{len(pl.peaks)} signals ({len(pl.sample_peaks())} from the sample)")
    return 0


def cmd_demo(args) -> int:
    from .demo.runner import run_demo

    return run_demo(args.output)


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="shiftrank", description="Rank candidate structures against an observed 13C spectrum and the sample's history.")
    p.add_argument("--version", action="version", version=f"shiftrank {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")

    s = sub.add_parser("facts", help="formula, masses, DBE and symmetry classes of structures")
    s.add_argument("structures", nargs="+", help="SMILES strings or structure files (.sdf, .mol, .smi)")
    s.add_argument("--json", action="store_true", help="one JSON object per structure")
    s.set_defaults(func=cmd_facts)

    s = sub.add_parser("formula", help="Hill formula, masses and DBE of a formula string")
    s.add_argument("formula")
    s.set_defaults(func=cmd_formula)

    s = sub.add_parser("peaks", help="read and check a peak list (ranges, duplicates, solvent signals)")
    s.add_argument("file")
    s.add_argument("--nucleus", choices=["13C", "1H"], default="13C")
    s.add_argument("--solvent", help="NMR solvent, e.g. CDCl3, DMSO-d6")
    s.set_defaults(func=cmd_peaks)

    s = sub.add_parser("demo", help="run the bundled demo scenario (invented data) end to end")
    s.add_argument("-o", "--output", default="shiftrank-demo.html", help="where to write the HTML report")
    s.set_defaults(func=cmd_demo)
    return p


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "func", None):
        parser.print_help()
        return 0
    try:
        return int(args.func(args) or 0)
    except InputError as exc:
        print(f"shiftrank {args.command}: error: {exc}", file=sys.stderr)
        return 2
    except BrokenPipeError:
        return 0
    except KeyboardInterrupt:
        print("shiftrank: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":
    sys.exit(main())
