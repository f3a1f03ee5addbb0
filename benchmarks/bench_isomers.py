"""Isomer generation: reproduction of the development regio cases and speed on ~40-atom molecules.

    python benchmarks/bench_isomers.py [--data DIR]

The development regio cases were made by moving one substituent around an aromatic six-membered
ring; every candidate must be among ``shiftrank.isomers(truth, kinds=("positional",))`` (compared by
constitution, whatever the stereochemistry or Kekulé form).  Timing: the default kinds (positional
and ambident) on the truths with 36–44 heavy atoms, one core, best of three runs per molecule.
"""
from __future__ import annotations

import argparse
import ast
import gzip
import json
import sys
import time
from pathlib import Path

import numpy as np

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from training.data import DEFAULT_DATA  # noqa: E402


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    args = ap.parse_args()
    from rdkit import Chem

    from shiftrank.chem.isomers import isomers, structure_key

    sizes = []
    for name in ("dev_cases_regio.jsonl.gz", "dev_cases_text_regio.jsonl.gz"):
        need = missing = 0
        examples = []
        with gzip.open(args.data / name, "rt") as f:
            for line in f:
                c = json.loads(line)
                cands = c["candidates"] if isinstance(c["candidates"], list) else ast.literal_eval(c["candidates"])
                truth = Chem.MolFromSmiles(c["truth"])
                sizes.append((truth.GetNumHeavyAtoms(), c["truth"]))
                made = {structure_key(Chem.MolFromSmiles(a.smiles)) for a in isomers(c["truth"], kinds=("positional",))}
                made.add(structure_key(truth))
                for s in cands:
                    need += 1
                    if structure_key(Chem.MolFromSmiles(s)) not in made:
                        missing += 1
                        examples.append((c["truth"], s))
        print(f"{name}: {need} candidates, {need - missing} reproduced, {missing} missing" +
              (f" (e.g. {examples[0]})" if examples else ""))
    big = [s for n, s in sizes if 36 <= n <= 44]
    for s in big[:3]:
        isomers(s)  # warm-up
    ts, counts = [], []
    for s in big:   # best of three per molecule: one garbage-collection pause is not the generator's cost
        best = np.inf
        for _ in range(3):
            t = time.perf_counter()
            n = len(isomers(s))
            best = min(best, 1000 * (time.perf_counter() - t))
        counts.append(n)
        ts.append(best)
    ts = np.array(ts)
    print(f"{len(big)} molecules with 36-44 heavy atoms, positional + ambident: median {np.median(ts):.1f} ms, "
          f"90th percentile {np.percentile(ts, 90):.1f} ms, max {ts.max():.1f} ms; "
          f"alternatives per molecule median {int(np.median(counts))}, max {max(counts)}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
