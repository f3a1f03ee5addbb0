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
from .chem.formula import ADDUCTS
from .errors import InputError
from .words import count


def _proton_classes(mol) -> list[dict]:
    """Each proton class of ``mol``: its atoms, proton count, expected first-order multiplet and whether its two
    protons may show as two signals (ring or diastereotopic CH2, a primary amide's NH2)."""
    from .chem.couplings import expected_multiplets

    return [{"atoms": e.atoms, "h": e.n_h, "multiplet": e.letters(), "exchangeable": e.exchangeable,
             "may_split": e.may_split} for e in expected_multiplets(mol)]


def _print_facts(f, out=None, protons: list[dict] | None = None) -> None:
    from .chem.structure import TWIN_WHY

    out = out or sys.stdout
    print(f"{f.smiles}", file=out)
    print(f"  formula {f.formula}   average mass {f.average_mass:.3f}   monoisotopic {f.monoisotopic_mass:.4f}   DBE {f.dbe:g}", file=out)
    if f.dbe_note:
        print(f"  note: {f.dbe_note}", file=out)
    mc = f.multiplicity_counts()
    kinds = ", ".join(f"{mc[k]} {k}" for k in ("CH3", "CH2", "CH", "C") if k in mc)
    print(f"  carbons {f.n_carbons} in {f.expected_13c_signals} symmetry classes (expected 13C signals: {kinds})", file=out)
    split = sum(1 for pc in protons or [] if pc["may_split"])
    print(f"  expected 1H environments {f.expected_1h_signals}"
          + (f" (up to {f.expected_1h_signals + split}: the two protons of {count(split, 'CH2 or NH2 group')} may "
             "show apart)" if split else ""), file=out)
    for c in f.carbon_classes:
        atoms = ",".join(str(i) for i in c.atoms)
        twin = ""
        if c.twin:
            d, why = c.twin
            twin = f"  (a signal apart from alike {'atom' if len(d) == 1 else 'atoms'} {','.join(str(i) for i in d)}: {TWIN_WHY[why]})"
        print(f"    class {c.multiplicity:<4} x{c.size}  atoms {atoms}{twin}", file=out)
    for pc in protons or []:
        atoms = ",".join(str(i) for i in pc["atoms"])
        note = "  exchangeable (may be broad or absent)" if pc["exchangeable"] else ""
        note += "  may show as two signals" if pc["may_split"] else ""
        print(f"    1H   {pc['h']}H {pc['multiplet']:<8} atoms {atoms}{note}", file=out)


_STRUCTURE_FILES = (".sdf", ".mol", ".smi", ".txt", ".smiles", ".sdf.gz", ".sd", ".ism", ".can", ".csv", ".tsv")


def _structure_token(token: str) -> str:
    """'file' or 'smiles' for a command-line structure argument, decided by content: an existing path is a
    file; otherwise a string that RDKit parses is a SMILES; otherwise the message says both were tried."""
    from .inputs.molecules import to_mol

    try:
        is_file = len(token) < 4096 and Path(token).exists()
    except (OSError, ValueError):   # a long SMILES is not a path the system can even look up
        is_file = False
    if is_file:
        return "file"
    try:
        to_mol(token)
        return "smiles"
    except InputError as exc:
        if token.lower().endswith(_STRUCTURE_FILES) or "/" in token and not any(ch in token for ch in "=#()[]"):
            raise InputError(f"{token}: no such file") from None
        if token.startswith("InChI="):
            raise
        raise InputError(f"{exc} (and no file of that name exists)") from None


def _sample_name(source: str) -> str:
    """A sample's name from its first input: the file's stem; a Bruker data set by its name and experiment
    number ('ab123/10'), as the instrument's folders name it; 'stdin' for standard input."""
    if source == "-":
        return "stdin"
    from .inputs.spectra import bruker_pdata

    pdir = bruker_pdata(source)
    if pdir is not None:
        exp = pdir.parent.parent
        return f"{exp.parent.name}/{exp.name}" if exp.parent.name else exp.name
    return Path(source).stem


def cmd_facts(args) -> int:
    from .chem.structure import facts_from_mol, structure_facts
    from .inputs.molecules import read_molecules, to_mol

    items = []
    for token in args.structures:
        try:
            kind = _structure_token(token)
        except InputError as exc:
            items.append((token[:60], str(exc), None, None))
            continue
        if kind == "file":
            for rec in read_molecules(token):
                try:
                    items.append((rec.id, rec.error, None if rec.error else facts_from_mol(rec.mol, rec.source),
                                  None if rec.error else rec.mol))
                except InputError as exc:
                    items.append((rec.id, str(exc), None, None))
        else:
            try:
                items.append((token, None, structure_facts(token), to_mol(token)))
            except InputError as exc:
                items.append((token, str(exc), None, None))
    bad = 0
    for rid, err, f, mol in items:
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
                              "carbon_classes": [{"atoms": c.atoms, "multiplicity": c.multiplicity,
                                                  **({"twin": {"atoms": c.twin[0], "why": c.twin[1]}} if c.twin else {})}
                                                 for c in f.carbon_classes],
                              "proton_classes": _proton_classes(mol)}))
        else:
            _print_facts(f, protons=_proton_classes(mol))
    if bad and len(items) > 1:
        print(f"{bad} of {len(items)} structures could not be read", file=sys.stderr)
    return 2 if bad else 0


def cmd_formula(args) -> int:
    from .chem.formula import (average_weight, charged_mz, dbe, dbe_note, hill, monoisotopic_weight, neutral_parent,
                               sample_formula, written_whole)

    c, charge, notes = sample_formula(args.formula)
    if not sum(c.values()):
        raise InputError(f"formula '{args.formula}': no atoms")
    if charge:
        # the ion as written, then the neutral parent a proton gained or lost would leave (not for a
        # permanently charged ion such as a quaternary ammonium: the note says so)
        sign = "+" if charge > 0 else "-"
        print(f"[{hill(c)}]{abs(charge) if abs(charge) > 1 else ''}{sign}   ion m/z {charged_mz(c, charge):.4f} "
              "(monoisotopic, electron mass counted)")
        c = neutral_parent(c, charge)
        if c is None:
            raise InputError(f"formula '{args.formula}': no neutral parent (too few H for charge {charge:+d})")
        notes = [f"below: the neutral parent if the charge is {abs(charge)} proton(s) {'gained' if charge > 0 else 'lost'} "
                 "(not so for a permanently charged ion, e.g. a quaternary ammonium)"]
    d = dbe(c)
    print(f"{hill(c)}   average mass {average_weight(c):.3f}   monoisotopic {monoisotopic_weight(c):.4f}   DBE {d:g}")
    whole = written_whole(args.formula)
    if whole is not None:   # a salt or solvate: what a balance weighs is the whole
        print(f"as written, {args.formula.strip()}: {hill(whole)}   average mass {average_weight(whole):.3f}")
    for n in notes:
        print(f"note: {n}")
    note = dbe_note(d)
    if note:
        print(f"note: {note}")
    return 0


def cmd_peaks(args) -> int:
    from .inputs.peaks import read_peak_lists

    lists = read_peak_lists(args.file, nucleus=args.nucleus, solvent=args.solvent)
    for k, pl in enumerate(lists):
        if len(lists) > 1:   # a printed paragraph's sections, each in turn
            print(("\n" if k else "") + f"{pl.nucleus}:")
        for p in pl.peaks:
            where = f"{p.hi:.2f}–{p.lo:.2f}" if p.lo is not None and p.hi is not None and p.hi > p.lo else f"{p.shift:.2f}"
            extra = "  ".join(x for x in (p.multiplicity or "", f"x{p.count}" if p.count > 1 else "",
                                          f"∫{p.intensity:g}" if pl.nucleus == "1H" and p.intensity is not None else "",
                                          "J = " + ", ".join(f"{j:g}" for j in p.j) + " Hz" if p.j else "",
                                          f"[{p.solvent} residual]" if p.solvent else "") if x)
            print(f"{where:>13}  {extra}")
        for n in pl.notes:
            print(f"note: {n}")
        print(f"{count(len(pl.peaks), 'signal')} ({len(pl.sample_peaks())} from the sample)")
    return 0


def cmd_predict(args) -> int:
    from .chem.structure import MULTIPLICITY
    from .inputs.molecules import read_molecules
    from .prediction.api import predict_records
    from .prediction.model import Z90
    from .prediction.model_files import default_manifest
    from .prediction.configuration import increment_note

    nuclei = ["13C", "1H"] if args.nucleus == "both" else [args.nucleus]
    if _structure_token(args.file) == "smiles":   # a structure typed on the command line, as rank and facts take it
        from .inputs.molecules import MolRecord, to_mol
        records = [MolRecord(args.file, to_mol(args.file), args.file)]
    else:
        records = read_molecules(args.file)
    runs = {n: predict_records(records, args.solvent, n) for n in nuclei}
    version = default_manifest().get("version")
    n_bad = 0
    written: list = []
    for k, rec in enumerate(records):
        err = next((runs[n][k][2] for n in nuclei if runs[n][k][2]), None)
        if err:
            n_bad += 1
            if args.jsonl:
                print(json.dumps({"id": rec.id, "error": err}))
            else:
                print(f"{rec.id}: error: {err}", file=sys.stderr)
            continue
        preds = {n: runs[n][k][1] for n in nuclei}
        if args.jcamp:
            from .outputs.jcamp import write_predicted

            for n, pred in preds.items():
                written.append(write_predicted(args.jcamp, rec.id, rec.mol, pred, args.mhz, args.solvent, version))
        if args.jsonl:
            obj = {"id": rec.id}
            for n, pred in preds.items():
                tag = "" if n == "13C" else "_1h"
                obj[f"shifts{tag}"] = {str(c.atom): round(c.shift, 2 if n == "13C" else 3) for c in pred.atoms}
                obj[f"sigma{tag}"] = {str(c.atom): round(c.sigma, 2 if n == "13C" else 3) for c in pred.atoms}
                obj[f"interval90{tag}"] = {str(c.atom): [round(lo, 2), round(hi, 2)] for c in pred.atoms
                                           for lo, hi in [c.interval90]}
                measured = [str(c.atom) for c in pred.atoms if c.whole_molecule]
                if measured:  # the compound is in the training data: these values are its measured shifts
                    obj[f"measured_in_data{tag}"] = measured
                ez = {str(c.atom): c.configuration for c in pred.atoms if c.configuration}
                if ez:   # ppm of the shift that comes from the E/Z increment (a group cis across a double bond)
                    obj[f"ez_increment{tag}"] = ez
                if pred.cis_trans_pairs:   # a pair the drawing leaves unassigned: each atom has the mean
                    obj[f"cis_trans_pairs{tag}"] = [{"atoms": [i, j], "shifts": [lo, hi]} for i, j, lo, hi in pred.cis_trans_pairs]
            obj["model"] = version
            notes = next(iter(preds.values())).notes
            if notes:
                obj["standardised"] = notes
            print(json.dumps(obj))
            continue
        print(f"{rec.id}")
        for note in next(iter(preds.values())).notes:
            print(f"  note: {note}")
        for n, pred in preds.items():
            nd = 1 if n == "13C" else 2
            for i, j, lo, hi in pred.cis_trans_pairs:
                print(f"  note: atoms {i} and {j} are alike groups cis and trans across a double bond, predicted "
                      f"{lo:.{nd}f} and {hi:.{nd}f}; the drawing does not say which is which, so each shows their mean "
                      "(a molfile's coordinates would tell)")
            head = "CHn" if n == "13C" else "H on"
            print(f"  {n}: {'atom':>4}  {head:<5} {'shift':>7}  {'±90%':>6}  sphere match")
            for c in pred.atoms:
                a = rec.mol.GetAtomWithIdx(c.atom)
                nh = a.GetTotalNumHs()
                what = (MULTIPLICITY.get(nh, f"CH{nh}") + ("ar" if a.GetIsAromatic() else "") if n == "13C"
                        else f"{nh}H@{a.GetSymbol()}")
                match = (f"whole molecule in data (n={c.sphere_count})" if c.whole_molecule else
                         f"r={c.sphere_radius} (n={c.sphere_count})" if c.sphere_radius else "none (descriptors only)")
                if c.configuration:
                    match += f"; {increment_note(c.configuration, nd)}"
                print(f"       {c.atom:>4}  {what:<6}{c.shift:7.{nd}f}  {Z90 * c.sigma:6.{nd}f}  {match}")
    if written:
        print(f"{count(len(written), 'predicted peak table')} written to {args.jcamp} (JCAMP-DX)", file=sys.stderr)
    if n_bad:   # every record is written (an error object for a bad one); the status tells a script
        print(f"{args.file}: {n_bad} of {len(records)} records could not be predicted"
              + (" (see their 'error' fields)" if args.jsonl else ""), file=sys.stderr)
        return 2
    return 0


def _read_candidates(tokens: list[str]) -> list:
    """Candidates from files (.sdf/.mol/.smi/.txt) and SMILES strings, in order; bad records kept for reporting."""
    from rdkit import Chem

    from .inputs.molecules import read_molecules

    out = []
    for tok in tokens:
        try:
            kind = _structure_token(tok)
        except InputError as exc:
            if "no such file" in str(exc):
                raise
            out.append((None, tok, str(exc)))   # listed last with its error; the other candidates run
            continue
        if kind == "file":
            for rec in read_molecules(tok):
                if rec.error:
                    out.append((rec.id, rec.source, rec.error))
                else:
                    smi = rec.source if not rec.source.startswith(Path(tok).name + ":") else Chem.MolToSmiles(rec.mol)
                    out.append((rec.id if rec.id != smi else None, smi, None))
        else:
            out.append((None, tok, None))
    return out


def _read_text_arg(spec: str) -> tuple[str, str]:
    """Printed characterisation text from a file, or from standard input for '-': (text, source name)."""
    from .inputs.files import read_stdin_text, read_user_text
    if spec == "-":
        return read_stdin_text(), "stdin"
    if not Path(spec).exists():
        raise InputError(f"{spec}: no such file (give a file of printed NMR text, or - for standard input)")
    return read_user_text(spec, "a text file"), Path(spec).name


def _case_from_args(args) -> tuple[dict, dict]:
    """The ranking case the options describe, and the peak lists read (for the report and inventory)."""
    from .inputs.peaks import read_cosy, read_hmbc, read_hsqc, read_noesy, read_peaks

    hsqc, hmbc = getattr(args, "hsqc", None), getattr(args, "hmbc", None)
    cosy, noesy = getattr(args, "cosy", None), getattr(args, "noesy", None)
    if not (args.peaks or args.peaks_1h or args.text or hsqc or hmbc or cosy or noesy):
        raise InputError("give --peaks (13C), --peaks-1h (1H), --hsqc, --hmbc, --cosy or --noesy (cross peaks) and/or "
                         "--text (printed characterisation)")
    piped = [f"--{n.replace('_', '-')}" for n in ("peaks", "peaks_1h", "dept135", "text", "hsqc", "hmbc", "cosy", "noesy")
             if getattr(args, n, None) == "-"]
    if len(piped) > 1:
        raise InputError(f"{' and '.join(piped)} both read standard input ('-'): one of them can; give the other as a file")
    lists = {}
    case = {"formula": args.formula, "mass": getattr(args, "mass", None), "solvent": args.solvent,
            "rotamers": bool(getattr(args, "rotamers", False)), "mixture": bool(getattr(args, "mixture", False))}
    if args.peaks:
        lists["13C"] = case["peaks"] = read_peaks(args.peaks, solvent=args.solvent)
    if getattr(args, "dept135", None):
        from .inputs.peaks import merge_dept135

        if not args.peaks:
            raise InputError("--dept135 gives the multiplicities of a 13C list: give the 13C list with --peaks too")
        lists["13C"] = case["peaks"] = merge_dept135(lists["13C"], read_peaks(args.dept135, solvent=args.solvent, dept135=True))
    if args.peaks_1h:
        lists["1H"] = case["peaks_1h"] = read_peaks(args.peaks_1h, nucleus="1H", solvent=args.solvent)
    if args.text:
        case["text"], _ = _read_text_arg(args.text)
    if hsqc:
        lists["HSQC"] = case["hsqc"] = read_hsqc(hsqc)
    if hmbc:
        lists["HMBC"] = case["hmbc"] = read_hmbc(hmbc)
    if cosy:
        lists["COSY"] = case["cosy"] = read_cosy(cosy)
    if noesy:
        lists["NOESY"] = case["noesy"] = read_noesy(noesy)
    sources = [s for s in (args.peaks, args.peaks_1h, args.text, hsqc, hmbc, cosy, noesy) if s]
    case["id"] = _sample_name(sources[0])
    return case, lists


def _rank_sample(args, case: dict):
    """``rank`` and the one-sample ``report``: the same options give the same ranking."""
    from .score.ranking import rank

    cands = _read_candidates(args.candidates or [])
    reaction = getattr(args, "reaction", None)   # its products join the candidates, named by where it acted
    if reaction and not args.reactants:
        raise InputError("--reaction needs --reactants (the reaction's reactants as SMILES separated by '.')")
    if not cands and not reaction:
        raise InputError("give --candidates (SMILES or structure files) and/or --reaction NAME --reactants A.B")
    return rank(case.get("peaks"), cands, formula=args.formula, mass=args.mass,
                solvent=args.solvent, id=case["id"], demote_history_mismatch=not args.keep_mismatches,
                peaks_1h=case.get("peaks_1h"), text=case.get("text"), with_isomers=args.with_isomers or False,
                hsqc=case.get("hsqc"), mz=_mz_arg(args), rotamers=case["rotamers"], mixture=case["mixture"],
                reaction=reaction, reactants=args.reactants if reaction else None, hmbc=case.get("hmbc"),
                cosy=case.get("cosy"), noesy=case.get("noesy"))


def _write_sample_report(args, case: dict, result, path: str) -> None:
    """The HTML report of one ranked sample (``rank --report`` and ``report``): its lists, history, inventory."""
    from .outputs.report import write_report
    from .score.ranking import case_peaklists

    lists, _, _ = case_peaklists(case)
    write_report([result], path, [lists], [_history(args)], [_inventory_for(args, lists, case, for_ranking=True)])


def cmd_rank(args) -> int:
    from .outputs.terminal import print_ranking

    case, _ = _case_from_args(args)
    result = _rank_sample(args, case)
    if args.json:
        print(json.dumps(result.to_dict(detail=True), indent=1))
    else:
        print_ranking(result, {"peaks": args.peaks, "peaks_1h": args.peaks_1h, "text": args.text, "hsqc": args.hsqc,
                               "hmbc": args.hmbc, "cosy": args.cosy, "noesy": args.noesy})
    if all(c.error for c in result.candidates):
        print("shiftrank rank: error: no candidate could be evaluated", file=sys.stderr)
        return 2
    if args.report:
        _write_sample_report(args, case, result, args.report)
        print(f"report written to {args.report}", file=sys.stderr)
    return 0


def cmd_batch(args) -> int:
    from .score.batch import run_batch

    if args.jobs == 0 or args.jobs < -1:
        raise InputError(f"--jobs {args.jobs}: use a positive number of processes (or -1 for every core)")
    try:
        out = open(args.output, "w") if args.output else sys.stdout
    except OSError as exc:
        raise InputError(f"{args.output}: cannot write ({exc.strerror or exc})") from None
    try:
        summary = run_batch(args.cases, out, jobs=args.jobs, detail=args.detail,
                            progress=True if args.progress else None, dask=args.dask)
    finally:
        if args.output:
            out.close()
    if summary["errors"]:
        # every line is written; the status tells a script that some cases could not be ranked (bad input)
        print(f"{args.cases}: {summary['errors']} of {summary['cases']} cases could not be ranked (see their 'error' fields)", file=sys.stderr)
        return 2
    return 0


def _history(args) -> dict:
    return {"formula": args.formula, "mass": getattr(args, "mass", None), "solvent": args.solvent}


def _mz_arg(args):
    """The measured m/z of the options: a number, or {"found": …, "adduct": …} when --adduct is given."""
    mz = getattr(args, "mz", None)
    adduct = getattr(args, "adduct", None)
    if adduct is not None and mz is None:
        raise InputError("--adduct needs --mz (the measured m/z)")
    return {"found": mz, "adduct": adduct} if adduct else mz


def _inventory_for(args, lists: dict, case: dict | None = None, notes: list | None = None,
                   for_ranking: bool = False):
    """The inventory of the lists against the options' formula and m/z; without them, against a
    high-resolution mass statement printed in the text (its molecule's formula and found m/z, noted).
    Beside a ranking (``for_ranking``) an m/z without a formula is left to the candidates' own ion
    checks instead of being refused."""
    from .chem.inventory import take_inventory

    if lists.get("13C") is None and lists.get("1H") is None:
        return None   # cross peaks alone: nothing to count pieces from
    formula, mz = args.formula, getattr(args, "mz", None)
    if case is not None and formula is None:
        from .inputs.mass import read_analysis_formula

        formula = read_analysis_formula(case.get("text") or "")
        if formula and notes is not None:
            notes.append(f"formula {formula} taken from the text's elemental analysis")
    if case is not None and (formula is None or mz is None):
        from .inputs.mass import read_mass_statements

        printed = [st for st in read_mass_statements(case.get("text") or "") if st.high_resolution]
        if printed:
            st = printed[0]
            if formula is None and st.neutral:
                formula = st.neutral
                if notes is not None:
                    notes.append(f"formula {formula} taken from the text's MS statement ({st.describe()})")
            if mz is None and formula is not None:
                mz = st.found
                if notes is not None:
                    notes.append(f"m/z {st.found} taken from the text's MS statement")
    if for_ranking and formula is None:
        mz = None
    from .score.ranking import printed_counted_lines

    return take_inventory(lists.get("13C"), lists.get("1H"), formula, mz, getattr(args, "ppm", 5.0), hsqc=lists.get("HSQC"),
                          counted_lines=printed_counted_lines(case) if case is not None else None,
                          cosy=lists.get("COSY"), hmbc=lists.get("HMBC"))


def cmd_inventory(args) -> int:
    from dataclasses import asdict

    from .score.ranking import case_peaklists

    case, _ = _case_from_args(args)
    lists, _, notes = case_peaklists(case)
    inv = _inventory_for(args, lists, case, notes)
    if args.json:
        print(json.dumps(asdict(inv), indent=1))
        return 0
    for n in notes:
        print(f"note: {n}")
    for line in inv.lines():
        print(line)
    if inv.regions:
        print("\n13C regions (common practice ranges):")
        for s, m, h in inv.regions:
            print(f"  {s:8.2f}  {m or '':<4} {h}")
    return 0


def cmd_report(args) -> int:
    from .outputs.report import write_report
    from .score.ranking import case_peaklists

    if args.batch:
        from .score.batch import error_line, read_cases
        from .score.ranking import rank_many

        items = read_cases(args.batch)
        cases = [c for _, c in items if isinstance(c, dict)]
        results_all = iter(rank_many(cases))
        ranked, failed = [], []
        for n, c in items:
            r = next(results_all) if isinstance(c, dict) else c
            if isinstance(r, Exception):   # the error as batch writes it
                line = error_line(n, c, r)
                failed.append((line["id"] if line["id"] is not None else f"line {n}", line["error"]))
            else:
                ranked.append((c, r))
        if not ranked:
            raise InputError(f"{args.batch}: no case could be ranked")
        results = [r for _, r in ranked]
        hist = [{"formula": c.get("formula"), "mass": c.get("mass"), "solvent": c.get("solvent")} for c, _ in ranked]
        lists = [case_peaklists(c)[0] for c, _ in ranked]
        write_report(results, args.output, lists, hist, title=f"shiftrank batch report: {Path(args.batch).name}",
                     failed=failed)
        if failed:
            print(f"report written to {args.output}")
            print(f"{args.batch}: {len(failed)} of {len(items)} cases could not be ranked (listed in the report)",
                  file=sys.stderr)
            return 2
    else:
        if not args.candidates and not args.reaction:
            raise InputError("report: give --candidates (or --reaction with --reactants) with --peaks/--peaks-1h/--hsqc/"
                             "--hmbc/--cosy/--noesy/--text, or --batch CASES.jsonl")
        case, _ = _case_from_args(args)
        _write_sample_report(args, case, _rank_sample(args, case), args.output)
    print(f"report written to {args.output}")
    return 0


def cmd_isomers(args) -> int:
    from .chem.isomers import KINDS, isomers

    if not args.smiles and not args.reaction:
        raise InputError("isomers: give a SMILES, or --reaction SMARTS with --reactants")
    alts = isomers(args.smiles, kinds=args.kind, reaction=args.reaction, reactants=args.reactants, limit=args.limit)
    if args.jsonl:
        for a in alts:
            print(json.dumps(a.to_dict()))
        return 0
    if args.smi:   # a candidates file for rank: the given structure first, each alternative named by its relation
        if args.smiles:
            print(f"{args.smiles}\tgiven structure")
        for a in alts:
            print(f"{a.smiles}\t{a.relation}")
        return 0
    if args.smiles:
        print(f"{count(len(alts), 'alternative')} to {args.smiles} ({args.kind}):")
        if not alts:
            others = [k for k in KINDS if k not in args.kind.split(",")]
            asked = args.kind.split(",")
            why = {"positional": "no ring substituent can move to a position that is not equivalent by symmetry",
                   "ambident": "no group sits on an ambident site (N against O, N1 against N2, N against S, N against C "
                               "of a pyrrole or indole)",
                   "tautomer": "no tautomer keeps the aromatic rings and moves H between heteroatoms",
                   "stereo": "no double bond has its E/Z configuration drawn"}
            print("  none: " + ", and ".join(why[k] for k in KINDS if k in asked)
                  + (f"; other kinds: --kind {','.join(others)}" if others else "")
                  + "; the products of a named reaction: --reaction NAME --reactants A.B")
    else:
        print(f"{count(len(alts), 'reaction product')} of {args.reaction} on {args.reactants}:")
    for k, a in enumerate(alts, 1):
        print(f"  {k:>3}  {a.kind:<10} {a.smiles:<45} {a.relation}")
    return 0


def _one_list(args, which: str, nucleus: str, texts: dict):
    """The sample's or the reference's ``nucleus`` peak list for ``compare``: a peak file, or printed text
    (FILE or -, read once into ``texts`` for every nucleus); None when printed text holds no such section."""
    from .inputs.peaks import read_peaks
    from .inputs.text import read_nmr_text

    path, text = getattr(args, which), getattr(args, which + "_text")
    if bool(path) == bool(text):
        raise InputError(f"compare: give --{which} FILE or --{which}-text FILE_OR_- (one of them)")
    if path:
        return read_peaks(path, nucleus=nucleus, solvent=args.solvent)
    if which not in texts:
        texts[which] = _read_text_arg(text)
    body, name = texts[which]
    return read_nmr_text(body, name).peaklist(nucleus, args.solvent, source=f"{name} ({nucleus})")


def _compare_nuclei(args) -> list[str]:
    """The nuclei ``compare`` pairs: the one asked for; without --nucleus, each one both sides print when both
    are printed text (a paragraph usually has 1H and 13C), the one an instrument file declares, else 13C."""
    if args.nucleus:
        return [args.nucleus]
    if args.sample_text and args.reference_text and not args.sample and not args.reference:
        return ["13C", "1H"]
    from .inputs.spectra import bruker_pdata, instrument_nucleus, is_jcamp

    # an instrument file (JCAMP-DX, a Bruker data set) says which nucleus it holds
    declared = {instrument_nucleus(f) for f in (args.sample, args.reference)
                if f and f != "-" and (is_jcamp(f) or bruker_pdata(f) is not None)}
    return [declared.pop()] if len(declared) == 1 else ["13C"]


def cmd_compare(args) -> int:
    from .inputs.peaks import looks_like_1h, not_13c_message
    from .score.reference import CAUTION, compare_spectra

    texts: dict = {}
    nuclei = _compare_nuclei(args)
    done = []
    for nucleus in nuclei:
        sample, reference = _one_list(args, "sample", nucleus, texts), _one_list(args, "reference", nucleus, texts)
        if nucleus == "13C" and not (args.sample_text and args.reference_text):
            lists = [pl for pl in (sample, reference) if pl is not None]
            if lists and args.nucleus is None and all(looks_like_1h(p.shift for p in pl.peaks) for pl in lists):
                # two peak files of 1H values and no --nucleus: compared as 1H, with its tolerance
                print("  note: every value of both lists lies below 12.5 ppm: compared as 1H (give --nucleus 13C "
                      "to insist)", file=sys.stderr)
                nucleus = "1H"
                sample, reference = (_one_list(args, "sample", nucleus, texts),
                                     _one_list(args, "reference", nucleus, texts))
            else:
                bad = next((pl for pl in lists if looks_like_1h(p.shift for p in pl.peaks)), None)
                if bad is not None and args.nucleus is None:
                    raise InputError(not_13c_message(bad, "compare lists of one nucleus (--nucleus 1H for 1H lists)"))
        if sample is None or reference is None:
            if len(nuclei) == 1 or (sample is None) != (reference is None):
                who = "sample" if sample is None else "reference"
                if len(nuclei) == 1:
                    raise InputError(f"compare: {texts[who][1]} prints no {nucleus} peaks")
                print(f"{nucleus}: not compared: the {who} prints no {nucleus} peaks", file=sys.stderr)
            continue
        done.append((nucleus, sample, reference, compare_spectra(sample, reference, args.tolerance)))
    if not done:
        raise InputError("compare: the sample and the reference print no nucleus in common (13C or 1H)")
    for nucleus, sample, reference, c in done:
        if args.json:
            print(json.dumps(c.to_dict()))
            continue
        for pl, who in ((sample, "sample"), (reference, "reference")):
            for n in pl.notes:
                print(f"  note ({who}): {n}")
        print(f"{nucleus}: {c.verdict()}")
        for n in c.notes:
            print(f"  note: {n}")
        nd = 2 if nucleus == "13C" else 3
        print(f"  {'reference':>10}  {'sample':>10}  {'diff':>7}  note")
        rows = [(p.reference, p.sample, p.deviation, p.note or ("broad line (NH/OH): wider tolerance"
                                                               if p.broad and abs(p.deviation) > c.tolerance else ""))
                for p in c.pairs] + [
            (x, None, None, "not found in the sample") for x in c.missing]
        for ref, smp, dev, note in sorted(rows, key=lambda r: -r[0]):
            print(f"  {ref:10.{nd}f}  {'–' if smp is None else f'{smp:.{nd}f}':>10}  "
                  f"{'' if dev is None else f'{round(dev, nd) + 0.0:+.{nd}f}':>7}  {note}")
        if c.extra:
            print("  sample lines without a reference line: " + ", ".join(f"{x:.{nd}f}" for x in c.extra))
        print()
    if not args.json:
        print(f"Caution: {CAUTION}")
    return 0


def cmd_demo(args) -> int:
    from .demo.runner import run_demo

    return run_demo(args.output)


DEPT135_HELP = ("DEPT-135 peak list of the same sample (signed intensities, or CH2 / CH/CH3): gives the --peaks list "
                "its multiplicities (no line: quaternary)")
ROTAMERS_HELP = ("the spectra show two forms (amide or carbamate rotamers, an isomer mixture): a line beside another "
                 "may be the second form's (a paragraph saying 'mixture of rotamers' is read so without this)")


def _sample_options(s) -> None:
    """The options that describe one sample and its candidates: the same for ``rank`` and ``report``."""
    from .chem.reactions import reaction_names
    s.add_argument("--peaks", help="13C peak list (.txt, .csv, .json) or JCAMP-DX spectrum / peak table (.jdx, .dx), or a Bruker processed data set (its folder, pdata/N or 1r); - reads stdin")
    s.add_argument("--peaks-1h", help="1H peak list: shift or range, integral, multiplicity, J values (.txt, .csv, .json), "
                   "or JCAMP-DX spectrum / peak table (.jdx, .dx), or a Bruker processed data set (its folder, pdata/N or 1r); - reads stdin")
    s.add_argument("--dept135", metavar="FILE", help=DEPT135_HELP)
    s.add_argument("--text", metavar="FILE_OR_-", help="printed characterisation text (1H, 13C and HSQC paragraphs, also prose or a pasted assignment table); - reads stdin")
    s.add_argument("--hsqc", help="HSQC cross peaks: one 'δC δH' (or 'δC/δH') pair per line (.txt, .csv), a JSON list of "
                   "pairs, a printed HSQC paragraph, or a Bruker 2D data set (its cross peaks picked); - reads stdin")
    s.add_argument("--hmbc", help="HMBC cross peaks (two- and three-bond H-C correlations): one 'δC δH' (or 'δC/δH') pair "
                   "per line (.txt, .csv), a JSON list of pairs, or a Bruker 2D data set; read beside the 1D spectra's "
                   "assignments; - reads stdin")
    s.add_argument("--cosy", help="COSY cross peaks (coupled protons): one 'δH δH' pair per line, a JSON list, or a Bruker "
                   "2D data set; - reads stdin")
    s.add_argument("--noesy", help="NOESY or ROESY cross peaks (protons close in space): one 'δH δH' pair per line, a JSON "
                   "list, or a Bruker 2D data set; judged on RDKit conformers of each candidate; - reads stdin")
    s.add_argument("--candidates", nargs="+", metavar="FILE_OR_SMILES",
                   help="SMILES (or InChI) strings and/or structure files (.sdf, .mol, .smi, .csv); or give --reaction")
    s.add_argument("--formula", help="molecular formula of the sample, e.g. C9H9N3O2")
    s.add_argument("--mass", type=float, help="molecular mass of the neutral sample (Da)")
    s.add_argument("--mz", type=float, help="measured m/z of the molecular ion (high resolution: within 10 ppm)")
    s.add_argument("--adduct", choices=list(ADDUCTS), help="the ion --mz was measured as (default: any common one)")
    s.add_argument("--solvent", help="NMR solvent; its residual signals are set aside")
    s.add_argument("--rotamers", action="store_true", help=ROTAMERS_HELP)
    s.add_argument("--mixture", action="store_true", help="the sample is a mixture of two isomers (a reaction's two "
                   "products): lines are read as for --rotamers, and a note names the candidate that best explains the "
                   "13C lines the best one leaves")
    s.add_argument("--keep-mismatches", action="store_true",
                   help="do not demote candidates contradicting formula, mass or m/z")
    s.add_argument("--with-isomers", nargs="?", const="positional,ambident", metavar="KINDS",
                   help="add the alternatives each candidate's reaction could have given (default kinds: positional,ambident; also tautomer, stereo)")
    s.add_argument("--reaction", metavar="NAME_OR_SMARTS", help="add every product of this reaction on --reactants as a "
                   f"candidate: a named reaction ({reaction_names()}; see isomers --help) or a reaction SMARTS")
    s.add_argument("--reactants", metavar="A.B", help="the reaction's reactants as SMILES separated by '.'")


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="shiftrank", description="Rank candidate structures against observed 1H and/or 13C spectra (peak lists or printed text) and the sample's history.")
    p.add_argument("--version", action="version", version=f"shiftrank {__version__}")
    p.add_argument("--debug", action="store_true", help="show the traceback of an internal error")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")

    s = sub.add_parser("facts", help="formula, masses, DBE and symmetry classes of structures")
    s.add_argument("structures", nargs="+", help="SMILES strings or structure files (.sdf, .mol, .smi)")
    s.add_argument("--json", action="store_true", help="one JSON object per structure")
    s.set_defaults(func=cmd_facts)

    s = sub.add_parser("formula", help="Hill formula, masses and DBE of a formula string")
    s.add_argument("formula")
    s.set_defaults(func=cmd_formula)

    s = sub.add_parser("peaks", help="read and check a peak list (ranges, duplicates, solvent signals)")
    s.add_argument("file", help="peak list (.txt, .csv, .json) or JCAMP-DX spectrum / peak table (.jdx, .dx), or a Bruker processed data set (its folder, pdata/N or 1r); - reads stdin")
    s.add_argument("--nucleus", choices=["13C", "1H"],
                   help="read the file as this nucleus's list (default: each section of a printed paragraph; a plain "
                        "list as 13C, or as 1H when every value lies below 12.5 ppm)")
    s.add_argument("--solvent", help="NMR solvent, e.g. CDCl3, DMSO-d6")
    s.set_defaults(func=cmd_peaks)

    s = sub.add_parser("predict", help="predict 13C and/or 1H shifts for the structures in a file (SDF, mol, SMILES) or of one SMILES")
    s.add_argument("file", metavar="FILE_OR_SMILES", help=".sdf, .mol, .smi, .txt or .csv (one SMILES per line, optional id after whitespace, "
                   "tab or comma; a header line naming a SMILES column is read), or one SMILES or InChI")
    s.add_argument("--jsonl", action="store_true", help="one JSON object per record, atoms keyed by atom index")
    s.add_argument("--nucleus", choices=["13C", "1H", "both"], default="13C",
                   help="13C (each carbon), 1H (mean shift of the protons on each heavy atom) or both")
    s.add_argument("--solvent", help="NMR solvent (CDCl3, DMSO-d6, CD3OD; others are treated as unknown)")
    s.add_argument("--jcamp", metavar="DIR", help="also write each prediction as a JCAMP-DX peak table, DIR/<id>_<nucleus>.jdx "
                   "(1H: first-order multiplet lines), to lay over a measured spectrum")
    s.add_argument("--mhz", type=float, default=400.0, help="1H frequency for the 1H multiplet lines of --jcamp (default 400)")
    s.set_defaults(func=cmd_predict)

    s = sub.add_parser("compare", help="pair a sample's peaks with a reference spectrum of the compound (identity check)")
    s.add_argument("--sample", help="the sample's peak file (.txt, .csv, .json, JCAMP-DX .jdx, a Bruker data set)")
    s.add_argument("--sample-text", metavar="FILE_OR_-", help="or the sample's printed characterisation text")
    s.add_argument("--reference", help="the reference's peak file (an authentic sample, a standard)")
    s.add_argument("--reference-text", metavar="FILE_OR_-", help="or the reference's printed text (e.g. from the literature)")
    s.add_argument("--nucleus", choices=["13C", "1H"],
                   help="the nucleus to pair (default: 13C for peak files; for two printed texts, each nucleus both print)")
    s.add_argument("--tolerance", type=float, help="largest difference of one signal, ppm (default 13C 0.5, 1H 0.05)")
    s.add_argument("--solvent", help="NMR solvent; its residual signals are set aside in both lists")
    s.add_argument("--json", action="store_true", help="the comparison as one JSON object")
    s.set_defaults(func=cmd_compare)

    s = sub.add_parser("rank", help="rank candidate structures against 13C and/or 1H peaks or printed NMR text")
    _sample_options(s)
    s.add_argument("--json", action="store_true", help="print the full result as JSON")
    s.add_argument("--report", metavar="HTML", help="also write an HTML report")
    s.set_defaults(func=cmd_rank)

    s = sub.add_parser("batch", help="rank many cases from a JSON Lines file, one output line per case")
    s.add_argument("cases", help="JSONL (.jsonl or .jsonl.gz), one case per line")
    s.add_argument("-o", "--output", help="write JSONL here instead of standard output")
    s.add_argument("--jobs", type=int, default=1, help="parallel worker processes on this machine (joblib)")
    s.add_argument("--dask", metavar="local[:N]|tcp://HOST:PORT",
                   help="rank on a Dask cluster: a local one of N workers, or a running scheduler")
    s.add_argument("--detail", action="store_true", help="include assignment tables")
    s.add_argument("--progress", action="store_true", help="show a progress bar even when stderr is not a terminal")
    s.set_defaults(func=cmd_batch)

    s = sub.add_parser("inventory", help="count CHn pieces and H, compare with the formula, DBE, regions, mass check")
    s.add_argument("--peaks", help="13C peak list (with DEPT multiplicities when known), or a JCAMP-DX file or Bruker data set; - reads stdin")
    s.add_argument("--dept135", metavar="FILE", help=DEPT135_HELP)
    s.add_argument("--peaks-1h", help="1H peak list with integrals (shift or range, integral, multiplicity per line), "
                   "or a JCAMP-DX file or Bruker data set; - reads stdin")
    s.add_argument("--text", metavar="FILE_OR_-", help="printed characterisation text (1H, 13C and 2D paragraphs); - reads stdin")
    s.add_argument("--cosy", help="COSY cross peaks ('δH δH' per line): the spin systems are listed")
    s.add_argument("--hmbc", help="HMBC cross peaks ('δC δH' per line): carbons the 13C list lacks are named")
    s.add_argument("--formula", help="molecular formula of the sample")
    s.add_argument("--mz", type=float, help="measured m/z, checked as [M]+, [M+H]+ and [M+Na]+")
    s.add_argument("--ppm", type=float, default=5.0, help="m/z tolerance in ppm (default 5)")
    s.add_argument("--solvent", help="NMR solvent; its residual signals are set aside")
    s.add_argument("--rotamers", action="store_true", help=ROTAMERS_HELP)
    s.add_argument("--json", action="store_true")
    s.set_defaults(func=cmd_inventory)

    s = sub.add_parser("report", help="write a self-contained HTML report for one sample or a batch")
    s.add_argument("--batch", metavar="CASES.jsonl", help="rank a JSONL batch and report every case")
    _sample_options(s)
    s.add_argument("--ppm", type=float, default=5.0, help="m/z tolerance of the report's inventory in ppm (default 5)")
    s.add_argument("-o", "--output", required=True, help="HTML file to write")
    s.set_defaults(func=cmd_report)

    from .chem.reactions import REACTIONS

    s = sub.add_parser("isomers", help="alternatives a reaction could have given: positional, ambident, tautomers",
                       formatter_class=argparse.RawDescriptionHelpFormatter,
                       epilog="named reactions (--reaction NAME; also for rank):\n"
                              + "\n".join(f"  {k:<14} {r.what}" for k, r in REACTIONS.items()))
    s.add_argument("smiles", nargs="?", help="the intended product (SMILES)")
    s.add_argument("--kind", default="positional,ambident", help="comma list of positional, ambident, tautomer, stereo (E/Z of each double bond the SMILES states)")
    s.add_argument("--reaction", metavar="NAME_OR_SMARTS", help="a named reaction (listed below; run on the reactants' "
                   "NH/OH tautomers too) or a reaction SMARTS; every product is listed")
    s.add_argument("--reactants", metavar="A.B", help="the reaction's reactants as SMILES separated by '.'")
    s.add_argument("--limit", type=int, default=500, help="refuse to list more alternatives than this (default 500)")
    s.add_argument("--jsonl", action="store_true", help="one JSON object per alternative: smiles, relation, kind")
    s.add_argument("--smi", action="store_true", help="'SMILES<TAB>relation' lines, the given structure first: a "
                   "candidates file for rank")
    s.set_defaults(func=cmd_isomers)

    s = sub.add_parser("demo", help="run the bundled demo scenario (invented data) end to end")
    s.add_argument("-o", "--output", default="shiftrank-demo.html", help="where to write the HTML report")
    s.set_defaults(func=cmd_demo)
    return p


#: Where the files of a command go, for the message when one is given without its option.
_FILE_OPTIONS = {
    "rank": "--peaks FILE (13C), --peaks-1h FILE (1H), --text FILE (a printed paragraph), --candidates FILE_OR_SMILES …",
    "report": "--peaks FILE (13C), --peaks-1h FILE (1H), --text FILE (a printed paragraph), --candidates FILE_OR_SMILES …",
    "inventory": "--peaks FILE (13C), --peaks-1h FILE (1H), --text FILE (a printed paragraph)",
}

#: Exit status of an unexpected failure inside shiftrank (bad input is 2).
INTERNAL_ERROR = 3


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args, extra = parser.parse_known_args(argv)
    if extra:
        # argparse would print the whole usage; name what was not understood and where such a value goes
        where = f"shiftrank {args.command}" if getattr(args, "command", None) else "shiftrank"
        hint = f"see {where} --help"
        if getattr(args, "command", None) in _FILE_OPTIONS and not extra[0].startswith("-"):
            hint = f"files and structures are given with an option: {_FILE_OPTIONS[args.command]}"
        print(f"{where}: error: unrecognized arguments: {' '.join(extra)} ({hint})", file=sys.stderr)
        return 2
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
    except Exception as exc:  # noqa: BLE001 - the last line of defence: one line, a distinct status
        if args.debug:
            raise
        what = " ".join(str(a) for a in (argv if argv is not None else sys.argv[1:]))[:120]
        print(f"shiftrank {args.command}: internal error ({type(exc).__name__}: {str(exc)[:200]}) while running "
              f"'{what}'; please report it (rerun with --debug for the traceback)", file=sys.stderr)
        return INTERNAL_ERROR


if __name__ == "__main__":
    sys.exit(main())
