"""HSQC benchmark: ranking a compound against its positional isomers from (δC, δH) cross peaks.

    python benchmarks/bench_hsqc.py [--data DIR]

Cases (:func:`training.data.hsqc_cases`): every NMRShiftDB2 compound with assigned 13C and 1H shifts
gives its cross peaks (one per protonated carbon: the carbon's shift and its protons' mean shift) and
its 13C list with multiplicities; the candidates are the compound and its positional isomers (one
ring substituent moved).  Only compounds whose skeleton lies in the predictor's validation or test
split are measured (the HSQC temperature was fitted on the validation split; the test split is also
shown alone).  The edited variant adds the phase a multiplicity-edited spectrum shows (CH2 against
CH/CH3), from the structure's own CHn.  For comparison the same cross peaks are ranked as two plain lists: their carbon shifts
as a 13C list without multiplicities, their proton shifts as a 1H list without integrals.
"""
from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

os.environ.setdefault("OMP_NUM_THREADS", "1")

import numpy as np  # noqa: E402

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from training.data import DEFAULT_DATA, hsqc_cases  # noqa: E402

MODES = {
    "HSQC cross peaks": lambda c: {"hsqc": c["hsqc"]},
    "edited HSQC (CH2 phase apart)": lambda c: {"hsqc": c["hsqc_edited"]},
    "their δC alone (13C list, no DEPT)": lambda c: {"peaks": sorted({h[0] for h in c["hsqc"]})},
    "their δH alone (1H list, no integrals)": lambda c: {"peaks_1h": sorted({h[1] for h in c["hsqc"]})},
    "full 13C list with DEPT": lambda c: {"peaks": c["peaks"]},
    "full 13C list with DEPT + HSQC": lambda c: {"peaks": c["peaks"], "hsqc": c["hsqc"]},
}


def truth_ranks(cases: list[dict], results: list) -> np.ndarray:
    """The rank of each case's truth among its ranked candidates (a case that could not be ranked: last)."""
    ranks = []
    for c, r in zip(cases, results):
        if isinstance(r, Exception):
            ranks.append(len(c["candidates"]))
            continue
        ranks.append([x.smiles for x in r.candidates].index(c["truth"]) + 1)
    return np.array(ranks)


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    args = ap.parse_args()
    from shiftrank.score.ranking import rank_many

    cases = [c for c in hsqc_cases(args.data) if c["split"] in ("val", "test")]
    test = np.array([c["split"] == "test" for c in cases])
    n_cand = np.mean([len(c["candidates"]) for c in cases])
    print(f"{len(cases)} held-out compounds (validation {int((~test).sum())}, test {int(test.sum())}), "
          f"{n_cand:.1f} candidates per case on average (chance top-1 {100 * np.mean([1 / len(c['candidates']) for c in cases]):.0f} %)")
    for label, make in MODES.items():
        built = [{"id": c["id"], "candidates": c["candidates"], "solvent": c["solvent"], **make(c)} for c in cases]
        ranks = truth_ranks(cases, rank_many(built))
        print(f"  {label:<42} top-1 {100 * np.mean(ranks == 1):5.1f} %  (test split alone {100 * np.mean(ranks[test] == 1):5.1f} %)"
              f"  top-2 {100 * np.mean(ranks <= 2):5.1f} %  MRR {np.mean(1 / ranks):.3f}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
