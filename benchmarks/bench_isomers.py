"""Isomer generation: reproduction of the development regio cases and speed on ~40-atom molecules.

    python benchmarks/bench_isomers.py [--data DIR]

The development regio cases were made by moving one substituent around an aromatic six-membered
ring; every candidate must be among ``shiftrank.isomers(truth, kinds=("positional",))`` (compared by
constitution, whatever the stereochemistry or Kekulé form).  The generator leaves out a structure that is
only an NH tautomer of the truth or of another alternative (the same compound: 5- and 6-methoxy-1H-
benzimidazole); the cases were built without that check, so such a candidate counts as reproduced "as a
tautomer" when its compound (:func:`shiftrank.chem.isomers.compound_key`) was generated, and is counted
apart.  Timing: the default kinds (positional
and ambident) on the truths with 36–44 heavy atoms, one core.
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

    from shiftrank.chem.isomers import compound_key, isomers, structure_key

    sizes = []
    for name in ("dev_cases_regio.jsonl.gz", "dev_cases_text_regio.jsonl.gz"):
        need = missing = as_tautomer = 0
        examples = []
        with gzip.open(args.data / name, "rt") as f:
            for line in f:
                c = json.loads(line)
                cands = c["candidates"] if isinstance(c["candidates"], list) else ast.literal_eval(c["candidates"])
                truth = Chem.MolFromSmiles(c["truth"])
                sizes.append((truth.GetNumHeavyAtoms(), c["truth"]))
                alts = [Chem.MolFromSmiles(a.smiles) for a in isomers(c["truth"], kinds=("positional",))] + [truth]
                made = {structure_key(m) for m in alts}
                compounds = {compound_key(m) for m in alts}
                for s in cands:
                    need += 1
                    m = Chem.MolFromSmiles(s)
                    if structure_key(m) in made:
                        continue
                    if compound_key(m) in compounds:
                        as_tautomer += 1
                    else:
                        missing += 1
                        examples.append((c["truth"], s))
        print(f"{name}: {need} candidates, {need - missing} reproduced ({as_tautomer} of them as a tautomer of a "
              f"generated structure), {missing} missing" + (f" (e.g. {examples[0]})" if examples else ""))
    big = [s for n, s in sizes if 36 <= n <= 44]
    for s in big[:3]:
        isomers(s)  # warm-up
    ts, counts = [], []
    for s in big:
        t = time.perf_counter()
        counts.append(len(isomers(s)))
        ts.append(1000 * (time.perf_counter() - t))
    ts = np.array(ts)
    print(f"{len(big)} molecules with 36-44 heavy atoms, positional + ambident: median {np.median(ts):.1f} ms, "
          f"90th percentile {np.percentile(ts, 90):.1f} ms, max {ts.max():.1f} ms; "
          f"alternatives per molecule median {int(np.median(counts))}, max {max(counts)}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
