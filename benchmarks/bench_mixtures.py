"""Two-isomer mixtures built from the open data: which candidate is named as the second form?

    python benchmarks/bench_mixtures.py [--data DIR]

For every development regio case (``dev_cases_regio.jsonl.gz``) one of whose candidates is itself the truth of
another case in the same solvent (two positional isomers, both with a database 13C list), the two lists are
merged without multiplicities (as a printed list of a 1:1 mixture would read), ranked against the first case's
candidates with ``mixture=True``, and the note of :func:`shiftrank.score.ranking.second_form` is read: is
the top candidate one of the pair, and is the other one named as the second form?  Reported for the dev and the
held-out (validation/test skeleton) truths separately; the second-form rule was not fitted on either.
"""
from __future__ import annotations

import argparse
import gzip
import json
import os
import sys
from collections import Counter
from pathlib import Path

os.environ.setdefault("OMP_NUM_THREADS", "1")
REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from rdkit import Chem  # noqa: E402

from training.data import DEFAULT_DATA, split_of  # noqa: E402
from shiftrank.score.ranking import rank_many  # noqa: E402


def _key(smiles: str) -> str | None:
    m = Chem.MolFromSmiles(smiles)
    return Chem.MolToSmiles(m) if m is not None else None


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    args = ap.parse_args()
    with gzip.open(args.data / "dev_cases_regio.jsonl.gz", "rt") as f:
        cases = [json.loads(line) for line in f]
    by_truth = {_key(c["truth"]): c for c in cases}
    built, pairs = [], []
    for c in cases:
        for s in dict.fromkeys(c["candidates"]):
            k = _key(s)
            other = by_truth.get(k)
            if k == _key(c["truth"]) or other is None or other["solvent"] != c["solvent"]:
                continue
            peaks = [{"shift": p["shift"]} for p in c["peaks"] + other["peaks"]]
            built.append({"id": f"{c['id']}+{other['id']}", "peaks": peaks, "candidates": list(dict.fromkeys(c["candidates"])),
                          "solvent": c["solvent"], "mixture": True})
            pairs.append((_key(c["truth"]), k, "held-out" if split_of(c["truth_skeleton"]) in ("val", "test") else "dev"))
    tally = Counter()
    for r, (a, b, part), case in zip(rank_many(built), pairs, built):
        tally[part, "cases"] += 1
        if isinstance(r, Exception):
            tally[part, "errors"] += 1
            continue
        top = _key(r.best.smiles)
        note = next((n for n in r.notes if "two isomers" in n), "")
        named = _key(note.split(" fit ")[1].split(" best as")[0]) if " fit " in note else None
        if top in (a, b):
            tally[part, "top is one of the pair"] += 1
            tally[part, "the other named second"] += named == (b if top == a else a)
        tally[part, "no second named"] += named is None
    for part in ("dev", "held-out"):
        n = tally[part, "cases"]
        top, right, none = tally[part, "top is one of the pair"], tally[part, "the other named second"], tally[part, "no second named"]
        print(f"{part:8s} {n} mixtures: top candidate one of the pair {top} ({100 * top / max(n, 1):.0f} %); "
              f"of those, the other named as the second form {right} ({100 * right / max(top, 1):.0f} %); "
              f"no second named {none}; errors {tally[part, 'errors']}")


if __name__ == "__main__":
    main()
