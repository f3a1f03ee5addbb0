"""2D benchmark: ranking a compound against its positional isomers with and without HMBC, COSY and NOESY cross peaks.

    python benchmarks/bench_hmbc.py [--data DIR]

Cases (:func:`training.data.hmbc_cases`): every NMRShiftDB2 compound with assigned 13C and 1H shifts, against
its positional isomers (one ring substituent moved), as in ``bench_hsqc.py``.  Its HMBC cross peaks are
built from the measured shifts: every three-bond proton-carbon pair, a fixed share of the two-bond ones and a
few four-bond ones within aromatic rings (the 'ideal' variant: every two- and three-bond pair, no other); its COSY
from every pair of protons on neighbouring atoms and 30 % of the aromatic four-bond ones, its NOESY from every pair
of protons within 3.5 Å on the ranking's own RDKit conformers (so the NOESY rows measure what such a spectrum adds
given that geometry model, not how well the model matches real molecules).
The shifts are measured; which correlations a spectrum shows is a chosen model of it (the open data holds no
HMBC spectra), so these figures say how much such a spectrum can add, not how real spectra will fare.  Only
compounds whose skeleton lies in the predictor's validation or test split are measured.  The 13C list is given
without multiplicities and the 1H list without integrals, as the hardest plain lists.
"""
from __future__ import annotations

import argparse
import os
import sys
import time
from pathlib import Path

os.environ.setdefault("OMP_NUM_THREADS", "1")

import numpy as np  # noqa: E402

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from bench_hsqc import truth_ranks  # noqa: E402 - (this folder is on the path when a benchmark is run)
from training.data import DEFAULT_DATA, hmbc_cases  # noqa: E402


def _c13(c):
    return [p["shift"] for p in c["peaks"]]


MODES = {
    "HMBC alone": lambda c: {"hmbc": c["hmbc"]},
    "HMBC alone, every 2J/3J pair (ideal)": lambda c: {"hmbc": c["hmbc_ideal"]},
    "13C list (no DEPT)": lambda c: {"peaks": _c13(c)},
    "13C list (no DEPT) + HMBC": lambda c: {"peaks": _c13(c), "hmbc": c["hmbc"]},
    "1H list (no integrals)": lambda c: {"peaks_1h": c["peaks_1h"]},
    "1H list + HMBC": lambda c: {"peaks_1h": c["peaks_1h"], "hmbc": c["hmbc"]},
    "13C + 1H lists": lambda c: {"peaks": _c13(c), "peaks_1h": c["peaks_1h"]},
    "13C + 1H lists + HMBC": lambda c: {"peaks": _c13(c), "peaks_1h": c["peaks_1h"], "hmbc": c["hmbc"]},
    "1H list + COSY": lambda c: {"peaks_1h": c["peaks_1h"], "cosy": c["cosy"]},
    "1H list + NOESY": lambda c: {"peaks_1h": c["peaks_1h"], "noesy": c["noesy"]},
    "1H list + HMBC + COSY + NOESY": lambda c: {"peaks_1h": c["peaks_1h"], "hmbc": c["hmbc"], "cosy": c["cosy"],
                                                "noesy": c["noesy"]},
    "13C + 1H lists + HMBC + COSY + NOESY": lambda c: {"peaks": _c13(c), "peaks_1h": c["peaks_1h"], "hmbc": c["hmbc"],
                                                       "cosy": c["cosy"], "noesy": c["noesy"]},
}


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--split", choices=("val", "test", "both"), default="both")
    args = ap.parse_args()
    from shiftrank.score.ranking import rank_many

    splits = ("val", "test") if args.split == "both" else (args.split,)
    cases = [c for c in hmbc_cases(args.data) if c["split"] in splits]
    test = np.array([c["split"] == "test" for c in cases])
    n_cand = np.mean([len(c["candidates"]) for c in cases])
    print(f"{len(cases)} held-out compounds (validation {int((~test).sum())}, test {int(test.sum())}), "
          f"{n_cand:.1f} candidates per case on average (chance top-1 {100 * np.mean([1 / len(c['candidates']) for c in cases]):.0f} %); "
          f"{np.mean([len(c['hmbc']) for c in cases]):.1f} HMBC, {np.mean([len(c['cosy']) for c in cases]):.1f} COSY and "
          f"{np.mean([len(c['noesy']) for c in cases]):.1f} NOESY cross peaks per compound")
    for label, make in MODES.items():
        built = [{"id": c["id"], "candidates": c["candidates"], "solvent": c["solvent"], **make(c)} for c in cases]
        built = [{k: v for k, v in b.items() if v != []} for b in built]   # (a compound without such pairs: not given)
        t0 = time.perf_counter()
        results = rank_many(built)
        dt = time.perf_counter() - t0
        ranks = truth_ranks(cases, results)
        print(f"  {label:<40} top-1 {100 * np.mean(ranks == 1):5.1f} %  (validation {100 * np.mean(ranks[~test] == 1):5.1f} %, "
              f"test {100 * np.mean(ranks[test] == 1):5.1f} %)  MRR {np.mean(1 / ranks):.3f}  "
              f"{sum(len(c['candidates']) for c in cases) / dt:,.0f} candidates/s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
