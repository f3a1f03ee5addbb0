"""Fit the ranking's penalty terms and temperature on development cases (run after train_13c).

    python -m training.calibrate_ranking [--data DIR] [--models models/]

Only cases whose true structure's skeleton lies in the predictor's *validation*
split are used (the predictor never trained on them); cases in the *test*
split are kept for the reliability table in benchmarks/bench_ranking.py.
The 'truth' field is used here only to score the settings, never passed to
the ranker.  Writes the chosen values into models/manifest.json under "ranking".
"""
from __future__ import annotations

import argparse
import gzip
import itertools
import json
import time
from pathlib import Path

import numpy as np
from scipy.optimize import minimize_scalar

from shiftrank.score.matching import MatchCosts, assign
from shiftrank.prediction.model_files import load_shift_model, read_manifest
from shiftrank.prediction.environment import environments_of
from shiftrank.score.ranking import _candidate, _prepare, as_peaklist, observed_peaks
from training.data import DEFAULT_DATA, split_of

REPO = Path(__file__).resolve().parents[1]
FILES = ("dev_cases_isomers.jsonl.gz", "dev_cases_regio.jsonl.gz")


def load(data: Path, which: str):
    cases = []
    for name in FILES:
        with gzip.open(data / name, "rt") as f:
            for line in f:
                c = json.loads(line)
                if split_of(c["truth_skeleton"]) == which:
                    cases.append(c)
    return cases


def staged(cases, model, drop_mult: bool):
    out = []
    for c in cases:
        pk = [{"shift": p["shift"]} if drop_mult else p for p in c["peaks"]]
        peaks = observed_peaks(as_peaklist(pk))
        preps = [_prepare(s, i, None) for i, s in enumerate(c["candidates"])]
        preds = []
        for p in preps:
            if p.parts is None:
                preds.append(None)
                continue
            mu, sg, _, _ = model.predict_env_arrays(environments_of([p.parts]))
            preds.append((mu, sg))
        truth = c["candidates"].index(c["truth"])
        base = [_candidate(p, pr, peaks, MatchCosts()) if pr is not None else None for p, pr in zip(preps, preds)]
        out.append((peaks, base, truth))
    return out


def case_costs(stage, costs: MatchCosts):
    rows = []
    for peaks, base, truth in stage:
        cs = np.array([assign(b.classes, peaks, costs).total_cost if b is not None else np.inf for b in base])
        rows.append((cs, truth))
    return rows


def top1(rows) -> float:
    return float(np.mean([np.argmin(cs) == t for cs, t in rows]))


def nll(rows, T: float) -> float:
    tot = 0.0
    for cs, t in rows:
        z = -cs / T
        z = z - np.max(z[np.isfinite(z)])
        z[~np.isfinite(z)] = -np.inf
        tot -= z[t] - np.log(np.sum(np.exp(z)))
    return tot / len(rows)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--models", type=Path, default=REPO / "models")
    args = ap.parse_args(argv)
    t0 = time.time()
    model = load_shift_model(args.models)
    man = read_manifest(args.models)
    u = man["nuclei"]["13C"]["uncertainty"]
    cases = load(args.data, "val")
    with_m = staged(cases, model, False)
    no_m = staged(cases, model, True)
    print(f"{len(cases)} validation-split cases staged in {time.time() - t0:.0f} s", flush=True)
    best = None
    grid = itertools.product([1.0, 2.5, 4.0], [3.0, 6.0, 9.0], [3.0, 6.0, 9.0], [4.0, 9.0, 15.0])
    for ov, mi, ex, mm in grid:
        costs = MatchCosts(u["t_df"], u["t_scale"], ov, mi, ex, mm)
        a = top1(case_costs(with_m, costs))
        b = top1(case_costs(no_m, costs))
        score = a + b
        if best is None or score > best[0]:
            best = (score, costs, a, b)
            print(f"  overlap {ov} missing {mi} extra {ex} mult {mm}: top-1 {a:.3f} / no mult {b:.3f}", flush=True)
    _, costs, a, b = best
    rows = case_costs(with_m, costs) + case_costs(no_m, costs)
    res = minimize_scalar(lambda lt: nll(rows, float(np.exp(lt))), bounds=(-3, 4), method="bounded")
    T = float(np.exp(res.x))
    man["ranking"] = {"overlap": costs.overlap, "missing": costs.missing, "extra": costs.extra,
                      "multiplicity_mismatch": costs.multiplicity_mismatch, "temperature": round(T, 4),
                      "fitted_on": f"{len(cases)} development cases with truth skeleton in the validation split, "
                                   "with and without multiplicities",
                      "val_top1": round(a, 4), "val_top1_no_multiplicity": round(b, 4)}
    (args.models / "manifest.json").write_text(json.dumps(man, indent=1))
    print(f"chosen {man['ranking']} in {time.time() - t0:.0f} s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
