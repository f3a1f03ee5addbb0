"""Printed-text benchmark: the reader on literature paragraphs, and ranking from printed text.

    python benchmarks/bench_text.py [--data DIR] [--part heldout|dev|all] [--limit N] [--residuals]

Data: ``literature_dev.jsonl.gz`` (608 compounds with their 1H and 13C paragraphs as printed in
open-access articles; NMRExtractor, MIT licence) and the ranking cases built from them
(``dev_cases_text_regio.jsonl.gz``: the structure against its positional isomers;
``dev_cases_text_isomers.jsonl.gz``: against same-formula NMRShiftDB2 structures).

The compounds are split in two halves by a hash of their InChIKey skeleton
(:func:`training.data.literature_part`): the *dev* half is used to fit the ranking settings
(``training/calibrate_text.py``), the *held-out* half only here.  The 'truth' field is never
passed to the ranker.

Reader: printed peaks are counted independently of the reader (every decimal number outside
brackets after the δ, a range counted once), and the peaks the reader returns are compared with
that count per paragraph; crashes are counted (there must be none).

Ranking: top-1/top-2/MRR by molecule size and number of candidates, the mean −ln p of the truth and a
reliability table of the top candidate's probability (cases ranked without error), and how often one
spectrum alone already ranks the truth first.

``--residuals`` measures the predictor on the printed lists instead: each regio case's true structure is
ranked alone against its paragraph, and observed − predicted is tabulated over the pairs of the ranker's
assignment (13C after its DP4 scaling, 1H as assigned), by kind of atom and by molecule size.  The
assignment picks the closest fit, so these figures are optimistic beside the test split's; they show
where printed literature compounds differ from the database (bias) and which kinds of carbon decide.
"""
from __future__ import annotations

import argparse
import gzip
import json
import os
import re
import sys
import time
from pathlib import Path

os.environ.setdefault("OMP_NUM_THREADS", "1")

import numpy as np  # noqa: E402

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from training.data import DEFAULT_DATA, literature_part  # noqa: E402

sys.path.insert(0, str(REPO / "benchmarks"))
from bench_ranking import by_size_and_count, reliability  # noqa: E402
from cli_run import run_shiftrank  # noqa: E402

# printed cases are larger molecules with more positional isomers than the database cases
SIZE_BINS = [(0, 20), (20, 30), (30, 40), (40, 999)]
COUNT_BINS = [(2, 4), (4, 7), (7, 10), (10, 999)]


def printed_count(text: str) -> int:
    """Peaks as printed, counted without the reader: decimal numbers (or ranges) outside brackets after δ."""
    from shiftrank.inputs.text import _repair

    t = _repair(text)
    prev = None
    while prev != t:
        prev = t
        t = re.sub(r"\([^()]*\)|\[[^\[\]]*\]", " ", t)
    i = t.find("δ")
    if i >= 0:
        t = t[i:]
    t = re.sub(r"\d+(\.\d+)?\s*MHz", " ", t)
    return len(re.findall(r"(?<![\d.])\d{1,3}\.\d+(?:\s*(?:-|–|~|to)\s*\d{1,3}\.\d+)?", t))


def reader_figures(records) -> None:
    from shiftrank.errors import InputError
    from shiftrank.inputs.text import read_nmr_text

    tot = {"1H": [0, 0, 0], "13C": [0, 0, 0]}  # printed, recovered (capped per paragraph), paragraphs
    crashes, refused, slow = 0, 0, []
    for r in records:
        for key, nuc in (("text_1h", "1H"), ("text_13c", "13C")):
            text = r[key]
            exp = printed_count(text)
            t = time.perf_counter()
            try:
                got = sum(len(s.peaks) for s in read_nmr_text(text).sections if s.nucleus in ("1H", "13C"))
            except InputError:
                got = 0
                refused += 1
            except Exception as exc:  # noqa: BLE001 - counted: the target is none
                crashes += 1
                print(f"  CRASH on {r['id']} {key}: {type(exc).__name__}: {exc}")
                got = 0
            slow.append(time.perf_counter() - t)
            tot[nuc][0] += exp
            tot[nuc][1] += min(got, exp)
            tot[nuc][2] += 1
    for nuc, (exp, got, n) in tot.items():
        print(f"  {nuc}: {n} paragraphs, printed peaks {exp}, recovered {got} ({100 * got / max(exp, 1):.1f} %)")
    print(f"  crashes: {crashes}; paragraphs refused with a clear error (no peaks at all): {refused}; "
          f"median {1000 * np.median(slow):.2f} ms per paragraph")


def load_cases(path: Path, part: str, limit: int | None):
    out = []
    with gzip.open(path, "rt") as f:
        for line in f:
            c = json.loads(line)
            if part != "all" and literature_part(c["truth_skeleton"]) != part:
                continue
            out.append(c)
            if limit and len(out) >= limit:
                break
    return out


def as_case(c: dict, which: str) -> dict:
    cands = c["candidates"]
    if isinstance(cands, str):  # some cases store the list as its Python text
        import ast
        cands = ast.literal_eval(cands)
    text = {"both": c["text_1h"] + "\n" + c["text_13c"], "1H": c["text_1h"], "13C": c["text_13c"]}[which]
    d = {"id": c["id"], "text": text, "candidates": cands, "formula": c.get("formula")}
    return d, cands.index(c["truth"])


def ranking_figures(cases, label: str) -> dict:
    from shiftrank.score.ranking import rank_many

    out, right = {}, {}
    for which in ("both", "1H", "13C"):
        built = [as_case(c, which) for c in cases]
        t = time.perf_counter()
        res = rank_many([b for b, _ in built])
        dt = time.perf_counter() - t
        ranks, errors, noted, top_p, p_truth = [], 0, [], [], []
        for (case, truth), r in zip(built, res):
            if isinstance(r, Exception):
                errors += 1
                ranks.append(len(case["candidates"]))
                noted.append(False)
                top_p.append(np.nan)   # no probabilities: left out of the reliability figures
                p_truth.append(np.nan)
                continue
            order = [x.smiles for x in r.candidates]
            ranks.append(order.index(case["candidates"][truth]) + 1)
            noted.append("the spectra disagree" in r.verdict)
            top_p.append(r.candidates[0].probability)
            p_truth.append(r.candidates[ranks[-1] - 1].probability)
        ranks = np.array(ranks)
        right[which] = ranks == 1
        n_c = sum(len(b["candidates"]) for b, _ in built)
        out[which] = float(np.mean(ranks == 1))
        print(f"  {label:<9} {which:<5} n={len(ranks):4d}  top-1 {100 * np.mean(ranks == 1):5.1f} %  top-2 "
              f"{100 * np.mean(ranks <= 2):5.1f} %  MRR {np.mean(1 / ranks):.3f}  case errors {errors}  "
              f"({n_c / dt:,.0f} candidates/s in-process)")
        print(by_size_and_count(ranks, np.ones(len(ranks), bool), [b for b, _ in built],
                                size_bins=SIZE_BINS, count_bins=COUNT_BINS, prefix="        top-1"))
        if any(noted):
            nt = np.array(noted)
            print(f"        'the spectra disagree' noted: top-1 {np.sum(ranks[nt] == 1)} of {nt.sum()}; "
                  f"without the note {np.sum(ranks[~nt] == 1)} of {(~nt).sum()}")
        # are the probabilities honest? the top candidate's p against how often it is the truth
        ok = ~np.isnan(top_p)
        print(f"        cases ranked without error: mean -ln p(truth) "
              f"{np.mean(-np.log(np.maximum(np.array(p_truth)[ok], 1e-12))):.3f}; reliability:")
        print("\n".join("    " + line for line in reliability(np.array(top_p)[ok], right[which][ok])))
    either = right["1H"] | right["13C"]
    print(f"  {label:<9} one spectrum alone ranks the truth first in {either.sum()} of {len(either)} cases "
          f"({100 * either.mean():.1f} %); both spectra together in {right['both'].sum()}, of them "
          f"{np.sum(right['both'] & ~either)} where neither alone does")
    return out


def _kind(mol, i: int) -> str:
    """Benzene / six-ring heteroaromatic / five-ring heteroaromatic (smallest aromatic ring), other sp2, sp3."""
    from rdkit import Chem

    a = mol.GetAtomWithIdx(i)
    if not a.GetIsAromatic():
        return "other sp2" if a.GetHybridization() == Chem.HybridizationType.SP2 else (
            "sp" if a.GetHybridization() == Chem.HybridizationType.SP else "sp3")
    rings = [r for r in mol.GetRingInfo().AtomRings() if i in r]
    size = min(len(r) for r in rings)
    hetero = any(mol.GetAtomWithIdx(j).GetSymbol() != "C" for r in rings if len(r) == size for j in r)
    return {(6, False): "benzene ring", (6, True): "6-ring heteroaromatic",
            (5, True): "5-ring heteroaromatic"}.get((size, hetero), "other aromatic")


def residual_figures(cases) -> None:
    """Observed − predicted on each truth's own assignment, by kind of atom (see the module docstring)."""
    from rdkit import Chem

    from shiftrank.score.ranking import rank_many

    for nucleus in ("13C", "1H"):
        built = []
        for c in cases:
            case, truth = as_case(c, nucleus)
            built.append(dict(case, candidates=[case["candidates"][truth]]))
        rows = []   # (kind, carbon type, heavy atoms, residual)
        for r in rank_many(built):
            if isinstance(r, Exception) or nucleus not in r.candidates[0].nuclei:
                continue
            res = r.candidates[0].nuclei[nucleus]
            mol = Chem.MolFromSmiles(r.candidates[0].smiles)
            for q in res.assignment.pairings:
                if q.peak is None or q.deviation is None:
                    continue
                i = res.classes[q.cls].atoms[0]
                a = mol.GetAtomWithIdx(i)
                if a.GetSymbol() != "C":
                    kind, sub = "H on N, O, S", ""
                else:
                    kind = _kind(mol, i)
                    sub = ("CH" if a.GetTotalNumHs() else "C") if nucleus == "13C" and a.GetIsAromatic() else ""
                rows.append((kind, sub, mol.GetNumHeavyAtoms(), q.deviation))
        unit = "ppm"
        print(f"  {nucleus}: {len(rows)} assigned pairs of {len(built)} true structures (observed - predicted, {unit})")
        groups: dict = {}
        for kind, sub, n, d in rows:
            groups.setdefault(f"{kind} {sub}".strip(), []).append(d)
        big = 5.0 if nucleus == "13C" else 0.5
        for name in sorted(groups, key=lambda k: -len(groups[k])):
            d = np.array(groups[name])
            print(f"    {name:<26} n={len(d):5d}  MAE {np.mean(np.abs(d)):6.3f}  bias {np.mean(d):+6.3f}  "
                  f"> {big:g} {unit}: {100 * np.mean(np.abs(d) > big):4.1f} %")
        arom = [(n, d) for kind, _, n, d in rows if kind.endswith(("ring", "aromatic"))]
        if arom:
            n_at, d = (np.array(x) for x in zip(*arom))
            cells = [f"{lo}-{hi - 1 if hi < 999 else ''}: {np.mean(np.abs(d[(n_at >= lo) & (n_at < hi)])):.3f} "
                     f"(n={np.sum((n_at >= lo) & (n_at < hi))})" for lo, hi in SIZE_BINS if np.any((n_at >= lo) & (n_at < hi))]
            print("    aromatic MAE by heavy atoms: " + ", ".join(cells))


def batch_speed(cases) -> None:
    """Whole-process ``shiftrank batch`` on the same cases from the 13C paragraph alone, the 1H paragraph
    alone, and both (a fresh process each, so no run profits from another's caches)."""
    import tempfile

    n = sum(len(as_case(c, "13C")[0]["candidates"]) for c in cases)
    times = {}
    with tempfile.TemporaryDirectory() as d:
        for which in ("13C", "1H", "both"):
            path = Path(d) / f"{which}.jsonl"
            path.write_text("\n".join(json.dumps(as_case(c, which)[0]) for c in cases) + "\n")
            best = None
            for _ in range(2):
                t = time.perf_counter()
                run_shiftrank("batch", str(path), "-o", str(path) + ".out")
                dt = time.perf_counter() - t
                best = dt if best is None else min(best, dt)
            times[which] = best
            print(f"  shiftrank batch from the {which:<4} paragraph(s): {n} candidates in {best:.1f} s = {n / best:,.0f}/s "
                  f"(whole process, best of 2)")
    print(f"  1H + 13C takes {times['both'] / times['13C']:.2f}x the time of 13C alone")


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--part", choices=["heldout", "dev", "all"], default="heldout")
    ap.add_argument("--limit", type=int, default=None)
    ap.add_argument("--residuals", action="store_true",
                    help="the predictor on the printed lists (truth's own assignment) instead of the ranking")
    args = ap.parse_args()
    if args.residuals:
        print(f"== the predictor on printed lists, {args.part} part (regio cases' true structures) ==")
        residual_figures(load_cases(args.data / "dev_cases_text_regio.jsonl.gz", args.part, args.limit))
        return 0
    lit = [json.loads(line) for line in gzip.open(args.data / "literature_dev.jsonl.gz", "rt")]
    part = [r for r in lit if args.part == "all" or literature_part(r["id"].split(":")[-1]) == args.part]
    print(f"== reader on the {args.part} part of the literature paragraphs ({len(part)} compounds) ==")
    reader_figures(part)
    print(f"\n== ranking from printed text, {args.part} part ==")
    every = []
    for name, label in (("dev_cases_text_regio.jsonl.gz", "regio"), ("dev_cases_text_isomers.jsonl.gz", "isomers")):
        cases = load_cases(args.data / name, args.part, args.limit)
        every += cases
        ranking_figures(cases, label)
    print(f"\n== batch speed, {args.part} part, regio and isomer cases together ==")
    batch_speed(every)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
