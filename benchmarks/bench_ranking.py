"""Ranking benchmark on the development cases of ../shared/data (the 'truth' field is never passed on).

    python benchmarks/bench_ranking.py [--data DIR] [--limit N]

For dev_cases_isomers and dev_cases_regio, with and without multiplicities:
top-1, top-3, mean reciprocal rank, for all cases and for the held-out cases
(truth skeleton in the predictor's validation/test split, i.e. never trained on) and for the
test-split cases alone (the ranking's penalties and temperature were fitted on validation-split cases);
a reliability table of the top candidate's probability; and candidates per
second for the whole `shiftrank batch` process (start-up included).
"""
from __future__ import annotations

import argparse
import gzip
import json
import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("OMP_NUM_THREADS", "1")

import numpy as np  # noqa: E402

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from training.data import DEFAULT_DATA, split_of  # noqa: E402

from cli_run import run_shiftrank  # noqa: E402  (benchmarks/, the script's own folder)

FIELDS = ("id", "peaks", "candidates", "formula", "solvent")


def load_cases(path: Path, limit: int | None):
    cases, truth = [], []
    with gzip.open(path, "rt") as f:
        for line in f:
            c = json.loads(line)
            truth.append((c["truth"], split_of(c["truth_skeleton"])))
            cases.append({k: c[k] for k in FIELDS if k in c})
            if limit and len(cases) >= limit:
                break
    return cases, truth


def strip_multiplicity(cases):
    return [{**c, "peaks": [{"shift": p["shift"]} for p in c["peaks"]]} for c in cases]


def evaluate(results, truth):
    ranks, top_p, top_ok = [], [], []
    for r, (t, _) in zip(results, truth):
        order = [c.smiles for c in r.candidates]
        k = order.index(t) + 1
        ranks.append(k)
        top_p.append(r.candidates[0].probability)
        top_ok.append(k == 1)
    return np.array(ranks), np.array(top_p), np.array(top_ok)


def summary(ranks, mask) -> str:
    r = ranks[mask]
    if not len(r):
        return "n=0"
    return f"n={len(r):5d}  top-1 {100 * np.mean(r == 1):5.1f} %  top-3 {100 * np.mean(r <= 3):5.1f} %  MRR {np.mean(1 / r):.3f}"


def reliability(top_p, top_ok) -> list[str]:
    bins = [0, 0.5, 0.7, 0.8, 0.9, 0.95, 0.99, 1.0001]
    lines = ["    p(top) bin     n   mean p   fraction right"]
    for lo, hi in zip(bins[:-1], bins[1:]):
        m = (top_p >= lo) & (top_p < hi)
        if m.sum():
            lines.append(f"    [{lo:.2f},{min(hi, 1):.2f})  {m.sum():5d}   {top_p[m].mean():.3f}    {top_ok[m].mean():.3f}")
    return lines


SIZE_BINS = [(0, 15), (15, 25), (25, 35), (35, 999)]
COUNT_BINS = [(2, 3), (3, 5), (5, 7), (7, 999)]


def by_size_and_count(ranks, held, cases, size_bins=SIZE_BINS, count_bins=COUNT_BINS,
                      prefix: str = "      held-out top-1") -> str:
    """Top-1 of the cases in ``held`` by the true structure's size (heavy atoms of the first candidate;
    positional isomers share it) and by the number of candidates ranked."""
    from rdkit import Chem

    sizes = np.array([Chem.MolFromSmiles(c["candidates"][0]).GetNumHeavyAtoms() for c in cases])
    counts = np.array([len(c["candidates"]) for c in cases])
    out = []
    for name, values, bins in (("heavy atoms", sizes, size_bins), ("candidates", counts, count_bins)):
        parts = []
        for lo, hi in bins:
            m = held & (values >= lo) & (values < hi)
            if m.any():
                span = f"{lo}+" if hi >= 999 else (f"{lo}" if hi == lo + 1 else f"{lo}-{hi - 1}")
                parts.append(f"{span}: {100 * np.mean(ranks[m] == 1):.1f} % (n={m.sum()})")
        out.append(f"{prefix} by {name}: " + ", ".join(parts))
    return "\n".join(out)


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--limit", type=int, default=None)
    args = ap.parse_args()
    from shiftrank.score.ranking import rank_many

    all_p, all_ok, all_held = [], [], []
    n_total_cands = 0
    for name in ("dev_cases_isomers.jsonl.gz", "dev_cases_regio.jsonl.gz"):
        cases, truth = load_cases(args.data / name, args.limit)
        held = np.array([s != "train" for _, s in truth])
        test_only = np.array([s == "test" for _, s in truth])
        print(f"\n== {name} ({len(cases)} cases, {sum(len(c['candidates']) for c in cases)} candidates) ==")
        for label, cs in (("with multiplicities", cases), ("shifts only", strip_multiplicity(cases))):
            t = time.perf_counter()
            res = rank_many(cs)
            dt = time.perf_counter() - t
            ranks, top_p, top_ok = evaluate(res, truth)
            print(f"  {label:<20} all      {summary(ranks, np.ones(len(ranks), bool))}   ({dt:.1f} s in-process)")
            print(f"  {label:<20} held-out {summary(ranks, held)}   (val+test skeletons)")
            print(f"  {label:<20} test     {summary(ranks, test_only)}   (untouched by any fitting)")
            if name == "dev_cases_regio.jsonl.gz":
                print(by_size_and_count(ranks, held, cases))
            if label == "with multiplicities":
                all_p.append(top_p); all_ok.append(top_ok); all_held.append(test_only)
                n_total_cands += sum(len(c["candidates"]) for c in cases)
    top_p, top_ok, held = np.concatenate(all_p), np.concatenate(all_ok), np.concatenate(all_held)
    print("\nReliability of the top candidate's probability (both sets, with multiplicities), test-split cases"
          " (the temperature was fitted on validation-split cases):")
    print("\n".join(reliability(top_p[held], top_ok[held])))
    print("all cases:")
    print("\n".join(reliability(top_p, top_ok)))

    with tempfile.TemporaryDirectory() as d:
        path = Path(d) / "cases.jsonl"
        n = 0
        with open(path, "w") as f:
            for name in ("dev_cases_isomers.jsonl.gz", "dev_cases_regio.jsonl.gz"):
                cases, _ = load_cases(args.data / name, args.limit)
                for c in cases:
                    f.write(json.dumps(c) + "\n")
                    n += len(c["candidates"])
        t = time.perf_counter()
        run_shiftrank("batch", str(path), "-o", str(Path(d) / "out.jsonl"))
        dt = time.perf_counter() - t
    print(f"\nshiftrank batch, whole process, 1 thread: {n} candidates in {dt:.1f} s = {n / dt:,.0f} candidates/s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
