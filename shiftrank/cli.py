"""The ``shiftrank`` command line.

Each subcommand is a thin layer: parse options, call the API, print.  Bad
input ends with one line on stderr and exit status 2.
"""
from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

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
    from .inputs.molecules import read_molecules
    from .chem.structure import facts_from_mol, structure_facts
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
    from .chem.formula import average_weight, dbe, dbe_note, hill, monoisotopic_weight, parse_formula

    c = parse_formula(args.formula)
    d = dbe(c)
    print(f"{hill(c)}   average mass {average_weight(c):.3f}   monoisotopic {monoisotopic_weight(c):.4f}   DBE {d:g}")
    note = dbe_note(d)
    if note:
        print(f"note: {note}")
    return 0


def cmd_peaks(args) -> int:
    from .inputs.peaks import read_peaks

    pl = read_peaks(args.file, nucleus=args.nucleus, solvent=args.solvent)
    for p in pl.peaks:
        extra = "  ".join(x for x in (p.multiplicity or "", f"x{p.count}" if p.count > 1 else "",
                                      f"[{p.solvent} residual]" if p.solvent else "") if x)
        print(f"{p.shift:10.2f}  {extra}")
    for n in pl.notes:
        print(f"note: {n}")
    print(f"{len(pl.peaks)} signals ({len(pl.sample_peaks())} from the sample)")
    return 0


def cmd_predict(args) -> int:
    from .prediction.model_files import default_manifest
    from .inputs.molecules import read_molecules
    from .prediction.api import predict_records
    from .prediction.model import Z90
    from .chem.structure import MULTIPLICITY

    results = predict_records(read_molecules(args.file), args.solvent)
    version = default_manifest().get("version")
    n_bad = 0
    for rec, pred, err in results:
        if err:
            n_bad += 1
            if args.jsonl:
                print(json.dumps({"id": rec.id, "error": err}))
            else:
                print(f"{rec.id}: error: {err}", file=sys.stderr)
            continue
        if args.jsonl:
            obj = {
                "id": rec.id,
                "shifts": {str(c.atom): round(c.shift, 2) for c in pred.carbons},
                "sigma": {str(c.atom): round(c.sigma, 2) for c in pred.carbons},
                "interval90": {str(c.atom): [round(lo, 2), round(hi, 2)] for c in pred.carbons for lo, hi in [c.interval90]},
                "model": version,
            }
            measured = [str(c.atom) for c in pred.carbons if c.whole_molecule]
            if measured:  # the compound is in the training data: these values are its measured shifts
                obj["measured_in_data"] = measured
            print(json.dumps(obj))
            continue
        print(f"{rec.id}")
        print(f"  {'atom':>4}  {'CHn':<4} {'shift':>7}  {'±90%':>6}  sphere match")
        for c in pred.carbons:
            a = rec.mol.GetAtomWithIdx(c.atom)
            chn = MULTIPLICITY.get(a.GetTotalNumHs(), f"CH{a.GetTotalNumHs()}")
            arom = "ar" if a.GetIsAromatic() else ""
            match = (f"whole molecule in data (n={c.sphere_count})" if c.whole_molecule else
                     f"r={c.sphere_radius} (n={c.sphere_count})" if c.sphere_radius else "none (descriptors only)")
            print(f"  {c.atom:>4}  {chn + arom:<5}{c.shift:7.1f}  {Z90 * c.sigma:6.1f}  {match}")
    if n_bad and not args.jsonl:
        print(f"{n_bad} of {len(results)} records could not be predicted", file=sys.stderr)
    return 2 if n_bad == len(results) else 0


def _read_candidates(tokens: list[str]) -> list:
    """Candidates from files (.sdf/.mol/.smi/.txt) and SMILES strings, in order; bad records kept for reporting."""
    from rdkit import Chem

    from .inputs.molecules import read_molecules

    out = []
    for tok in tokens:
        if Path(tok).exists():
            for rec in read_molecules(tok):
                if rec.error:
                    out.append((rec.id, rec.source, rec.error))
                else:
                    smi = rec.source if not rec.source.startswith(Path(tok).name + ":") else Chem.MolToSmiles(rec.mol)
                    out.append((rec.id if rec.id != smi else None, smi, None))
        elif tok.lower().endswith((".sdf", ".mol", ".smi", ".txt", ".smiles", ".sdf.gz")):
            raise InputError(f"{tok}: no such file")
        else:
            out.append((None, tok, None))
    return out


def cmd_rank(args) -> int:
    from .outputs.terminal import print_ranking
    from .inputs.peaks import read_peaks
    from .score.ranking import rank

    pl = read_peaks(args.peaks, solvent=args.solvent)
    result = rank(pl, _read_candidates(args.candidates), formula=args.formula, mass=args.mass, solvent=args.solvent,
                  id=Path(args.peaks).stem, demote_history_mismatch=not args.keep_mismatches)
    if args.json:
        print(json.dumps(result.to_dict(detail=True), indent=1))
    else:
        print_ranking(result, args.peaks)
    if all(c.error for c in result.candidates):
        print("shiftrank rank: error: no candidate could be evaluated", file=sys.stderr)
        return 2
    if args.report:
        from .outputs.report import write_report
        write_report([result], args.report, [pl], [_history(args)], [_inventory_for(args, pl)])
        print(f"report written to {args.report}", file=sys.stderr)
    return 0


def cmd_batch(args) -> int:
    from .score.batch import run_batch

    out = open(args.output, "w") if args.output else sys.stdout
    try:
        summary = run_batch(args.cases, out, jobs=args.jobs, detail=args.detail,
                            progress=True if args.progress else None)
    finally:
        if args.output:
            out.close()
    if summary["errors"]:
        print(f"{summary['errors']} of {summary['cases']} cases had errors (see their 'error' fields)", file=sys.stderr)
    return 0


def _history(args) -> dict:
    return {"formula": args.formula, "mass": getattr(args, "mass", None), "solvent": args.solvent}


def _inventory_for(args, pl):
    from .chem.inventory import take_inventory
    from .inputs.peaks import read_peaks

    h1 = read_peaks(args.peaks_1h, nucleus="1H", solvent=args.solvent) if getattr(args, "peaks_1h", None) else None
    return take_inventory(pl, h1, args.formula, getattr(args, "mz", None), getattr(args, "ppm", 5.0))


def cmd_inventory(args) -> int:
    from dataclasses import asdict

    from .inputs.peaks import read_peaks

    pl = read_peaks(args.peaks, solvent=args.solvent)
    inv = _inventory_for(args, pl)
    if args.json:
        print(json.dumps(asdict(inv), indent=1))
        return 0
    for n in pl.notes:
        print(f"note: {n}")
    for line in inv.lines():
        print(line)
    print("\nregions (common practice ranges):")
    for s, m, h in inv.regions:
        print(f"  {s:8.2f}  {m or '':<4} {h}")
    return 0


def cmd_report(args) -> int:
    from .outputs.report import write_report

    if args.batch:
        from .score.batch import read_cases
        from .score.ranking import rank_many

        items = read_cases(args.batch)
        cases = [c for _, c in items if isinstance(c, dict)]
        ranked = [(c, r) for c, r in zip(cases, rank_many(cases)) if not isinstance(r, Exception)]
        skipped = len(items) - len(ranked)
        if not ranked:
            raise InputError(f"{args.batch}: no case could be ranked")
        results = [r for _, r in ranked]
        hist = [{"formula": c.get("formula"), "mass": c.get("mass"), "solvent": c.get("solvent")} for c, _ in ranked]
        write_report(results, args.output, histories=hist, title=f"shiftrank batch report: {Path(args.batch).name}")
        if skipped:
            print(f"{skipped} cases could not be ranked and are not in the report", file=sys.stderr)
    else:
        if not args.peaks or not args.candidates:
            raise InputError("report: give --peaks and --candidates, or --batch CASES.jsonl")
        from .inputs.peaks import read_peaks
        from .score.ranking import rank

        pl = read_peaks(args.peaks, solvent=args.solvent)
        result = rank(pl, _read_candidates(args.candidates), formula=args.formula, mass=args.mass,
                      solvent=args.solvent, id=Path(args.peaks).stem)
        inv = _inventory_for(args, pl)
        write_report([result], args.output, [pl], [_history(args)], [inv])
    print(f"report written to {args.output}")
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

    s = sub.add_parser("predict", help="predict 13C shifts for the structures in a file (SDF, mol, SMILES)")
    s.add_argument("file", help=".sdf, .mol, .smi or .txt (one SMILES per line, optional id after whitespace)")
    s.add_argument("--jsonl", action="store_true", help="one JSON object per record, carbons keyed by atom index")
    s.add_argument("--solvent", help="NMR solvent (CDCl3, DMSO-d6, CD3OD; others are treated as unknown)")
    s.set_defaults(func=cmd_predict)

    s = sub.add_parser("rank", help="rank candidate structures against a 13C peak list")
    s.add_argument("--peaks", required=True, help="13C peak list (.txt, .csv, .json)")
    s.add_argument("--candidates", required=True, nargs="+", metavar="FILE_OR_SMILES",
                   help="SMILES strings and/or structure files (.sdf, .mol, .smi)")
    s.add_argument("--formula", help="molecular formula of the sample, e.g. C9H9N3O2")
    s.add_argument("--mass", type=float, help="molecular mass of the neutral sample (Da)")
    s.add_argument("--solvent", help="NMR solvent; its residual signals are set aside")
    s.add_argument("--keep-mismatches", action="store_true", help="do not demote candidates contradicting formula/mass")
    s.add_argument("--json", action="store_true", help="print the full result as JSON")
    s.add_argument("--report", metavar="HTML", help="also write an HTML report")
    s.add_argument("--peaks-1h", help="1H peak list with integrals, for the report's inventory")
    s.set_defaults(func=cmd_rank)

    s = sub.add_parser("batch", help="rank many cases from a JSON Lines file, one output line per case")
    s.add_argument("cases", help="JSONL (.jsonl or .jsonl.gz), one case per line")
    s.add_argument("-o", "--output", help="write JSONL here instead of standard output")
    s.add_argument("--jobs", type=int, default=1, help="parallel worker processes (joblib)")
    s.add_argument("--detail", action="store_true", help="include assignment tables")
    s.add_argument("--progress", action="store_true", help="show a progress bar even when stderr is not a terminal")
    s.set_defaults(func=cmd_batch)

    s = sub.add_parser("inventory", help="count CHn pieces and H, compare with the formula, DBE, regions, mass check")
    s.add_argument("--peaks", required=True, help="13C peak list (with DEPT multiplicities when known)")
    s.add_argument("--peaks-1h", help="1H peak list with integrals (shift integral per line)")
    s.add_argument("--formula", help="molecular formula of the sample")
    s.add_argument("--mz", type=float, help="measured m/z, checked as [M]+, [M+H]+ and [M+Na]+")
    s.add_argument("--ppm", type=float, default=5.0, help="m/z tolerance in ppm (default 5)")
    s.add_argument("--solvent", help="NMR solvent; its residual signals are set aside")
    s.add_argument("--json", action="store_true")
    s.set_defaults(func=cmd_inventory)

    s = sub.add_parser("report", help="write a self-contained HTML report for one sample or a batch")
    s.add_argument("--peaks", help="13C peak list of one sample")
    s.add_argument("--candidates", nargs="+", metavar="FILE_OR_SMILES")
    s.add_argument("--batch", metavar="CASES.jsonl", help="rank a JSONL batch and report every case")
    s.add_argument("--peaks-1h", help="1H peak list with integrals")
    s.add_argument("--formula")
    s.add_argument("--mass", type=float)
    s.add_argument("--mz", type=float)
    s.add_argument("--ppm", type=float, default=5.0)
    s.add_argument("--solvent")
    s.add_argument("-o", "--output", required=True, help="HTML file to write")
    s.set_defaults(func=cmd_report)

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
