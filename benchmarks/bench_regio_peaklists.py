"""Positional-isomer ranking on the peak lists of never-trained skeletons (a large, low-noise set).

    python benchmarks/bench_regio_peaklists.py [--data DIR] [--limit N] [--split val|test|both]
                                               [--nucleus 13C|1H] [--save RANKS.json] [--compare RANKS.json]

The 1,158 development regio cases give only 241 held-out cases (about ±2 points of sampling noise at
90 % top-1).  Here every validation- and test-split molecule of `peaklists.jsonl.gz` with a complete 13C
list and positional isomers gives a case (:func:`training.data.peaklist_regio_cases`; about 2,200), ranked
three ways: with the database's multiplicities, shifts only, and shifts only as a chemist prints them when
DEPT is not run (no multiplicities, and lines closer than 0.1 ppm printed once).  Reported: top-1, top-3,
mean reciprocal rank, by split, by size and by the number of candidates.  Use it to compare a predictor or
scorer change before and after; the ranking settings were fitted on validation-split cases, so the
test split is the untouched part.  ``--nucleus 1H`` does the same from the 1H lists (about 1,200 cases):
they are often incomplete and carry neither integrals nor letters, so this ranks on predicted 1H shifts
alone - a measure of the 1H predictor, harder than printed text with its multiplets.  ``--save`` writes each case's rank of the truth; ``--compare`` reads
such a file from a run before the change and counts the cases each run alone gets right (a paired
comparison: far less noisy than the difference of two top-1 figures).
"""
from __future__ import annotations

import argparse
import json
import os
import sys
import time
from pathlib import Path

os.environ.setdefault("OMP_NUM_THREADS", "1")

import numpy as np  # noqa: E402

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))
sys.path.insert(0, str(REPO / "benchmarks"))

from bench_ranking import by_size_and_count, summary  # noqa: E402
from training.data import DEFAULT_DATA, peaklist_regio_cases  # noqa: E402

FIELDS = ("id", "peaks", "peaks_1h", "candidates", "formula", "solvent")


def printed_style(case: dict, gap: float = 0.1) -> dict:
    """Shifts only, and values closer than ``gap`` ppm printed once (their mean, to 0.1 ppm)."""
    vals = sorted(p["shift"] for p in case["peaks"])
    groups = [[vals[0]]]
    for v in vals[1:]:
        if v - groups[-1][-1] < gap:
            groups[-1].append(v)
        else:
            groups.append([v])
    return {**case, "peaks": [{"shift": round(float(np.mean(g)), 1)} for g in groups]}


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--limit", type=int, default=None)
    ap.add_argument("--split", choices=("val", "test", "both"), default="both")
    ap.add_argument("--nucleus", choices=("13C", "1H"), default="13C")
    ap.add_argument("--save", type=Path, help="write the truth's rank per case and variant (JSON)")
    ap.add_argument("--compare", type=Path, help="a --save file of an earlier run: paired wins and losses")
    args = ap.parse_args()
    from shiftrank.score.ranking import rank_many

    t = time.perf_counter()
    splits = ("val", "test") if args.split == "both" else (args.split,)
    full = peaklist_regio_cases(args.data, splits, nucleus=args.nucleus)[: args.limit]
    cases = [{k: c[k] for k in FIELDS if k in c} for c in full]
    truth = [c["truth"] for c in full]
    split = np.array([c["split"] for c in full])
    print(f"{len(cases)} cases, {sum(len(c['candidates']) for c in cases)} candidates "
          f"(built in {time.perf_counter() - t:.1f} s)")
    if args.nucleus == "1H":
        variants = (("1H shifts only", cases),)
    else:
        variants = (("with multiplicities", cases),
                    ("shifts only", [{**c, "peaks": [{"shift": p["shift"]} for p in c["peaks"]]} for c in cases]),
                    ("printed style", [printed_style(c) for c in cases]))
    before = json.loads(args.compare.read_text()) if args.compare else {}
    saved = {}
    for label, cs in variants:
        t = time.perf_counter()
        res = rank_many(cs)
        dt = time.perf_counter() - t
        ranks = np.array([[c.smiles for c in r.candidates].index(tr) + 1 if not isinstance(r, Exception) else 99
                          for r, tr in zip(res, truth)])
        print(f"  {label:<20} all  {summary(ranks, np.ones(len(ranks), bool))}   ({dt:.1f} s)")
        for s in splits:
            print(f"  {label:<20} {s:<4} {summary(ranks, split == s)}")
        print(by_size_and_count(ranks, np.ones(len(ranks), bool), cases).replace("held-out top-1", "top-1"))
        saved[label] = dict(zip((c["id"] for c in cases), ranks.tolist()))
        if label in before:
            old = [(before[label][c["id"]], r) for c, r in zip(cases, ranks.tolist()) if c["id"] in before[label]]
            gained = sum(1 for o, n in old if n == 1 and o != 1)
            lost = sum(1 for o, n in old if o == 1 and n != 1)
            print(f"      against {args.compare.name}: {gained} cases now first that were not, {lost} no longer first "
                  f"(net {gained - lost:+d} of {len(old)})")
    if args.save:
        args.save.write_text(json.dumps(saved))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
