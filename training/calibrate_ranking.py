"""Fit the ranking's costs and temperatures on development cases (run after the models are trained).

    python -m training.calibrate_ranking [--data DIR] [--models models/] [--steps 13C,1H,joint,HSQC]
                                         [--params t_widen,...]

Development cases, never the test split nor the held-out half of the literature:

* database cases (``dev_cases_isomers``, ``dev_cases_regio``) whose true structure's skeleton lies
  in the predictor's *validation* split, ranked with and without DEPT multiplicities;
* printed-text cases (``dev_cases_text_regio``, ``dev_cases_text_isomers``) of the *dev* half of the
  literature split (:func:`training.data.literature_part`), ranked from the 13C paragraph, from the
  1H paragraph, and from both.

Steps:

* ``13C``: the 13C costs (overlap for near and far twins, missing for any / quaternary / crowded
  classes, extra peaks, DEPT and C–F/C–P mismatches) by coordinate descent over small grids; the
  objective is the mean top-1 over the three 13C sets (database with multiplicities, database shifts
  only, printed 13C), ties broken by the log-likelihood of the truth; then the 13C temperature by
  maximum likelihood over the same sets;
* ``1H``: the same for the 1H costs on the printed 1H paragraphs;
* ``joint``: the two temperatures used when both nuclei are observed, on cases ranked from both
  paragraphs: their ratio (the weight of 1H against 13C) by top-1, the common scale by maximum likelihood,
  for each 1H widening of a small grid (:data:`JOINT_1H_WIDEN`); the widening with the best top-1 (ties:
  likelihood) is kept for the 1H term beside another spectrum, with the temperature of that term alone;
* ``HSQC``: the HSQC temperature alone and beside a 13C list, by maximum likelihood on validation-split
  compounds whose assigned 13C and 1H shifts give the cross peaks (:func:`training.data.hsqc_cases`).

``--params`` limits the cost steps to the named costs (the others keep their values), e.g. only
``t_widen`` - how much wider printed shifts scatter than the model's own residuals - after a retrained
model changed its σ; ``--params none`` keeps every cost and refits the temperatures only.

The 'truth' field only scores the settings; it never reaches the ranker.  Writes the values into
``models/manifest.json`` under ``ranking``.
"""
from __future__ import annotations

import argparse
import ast
import gzip
import json
import time
from dataclasses import replace
from pathlib import Path

import numpy as np
from scipy.optimize import minimize

from shiftrank.score.evidence import EVIDENCE, MODELS_FOR, ClassMeans
from shiftrank.score.matching import MatchCosts
from shiftrank.score.ranking import settings_from_manifest, stage_cases
from shiftrank.score.structures import parse_candidate
from training.data import DEFAULT_DATA, hsqc_cases, literature_part, split_of

REPO = Path(__file__).resolve().parents[1]
DB_FILES = ("dev_cases_isomers.jsonl.gz", "dev_cases_regio.jsonl.gz")
TEXT_FILES = ("dev_cases_text_regio.jsonl.gz", "dev_cases_text_isomers.jsonl.gz")
GRID = {
    "13C": {
        "overlap": [0.5, 1.0, 2.0, 3.0, 4.5],
        "overlap_far": [None, 2.0, 4.0, 6.0, 9.0],
        "near_scale": [0.5, 1.0, 2.0, 4.0],
        "missing": [2.0, 3.0, 4.5, 6.0, 9.0],
        "missing_quaternary": [None, 1.0, 2.0, 3.0],
        "missing_near": [None, 1.0, 2.0, 3.0],
        "extra": [3.0, 6.0, 9.0, 12.0],
        "multiplicity_mismatch": [4.0, 6.0, 9.0, 12.0],
        "t_widen": [0.8, 1.0, 1.25, 1.5],
        "j_mismatch": [1.0, 2.0, 4.0, 6.0],
    },
    "1H": {
        "overlap": [0.5, 1.0, 2.0, 3.0],
        "overlap_far": [None, 1.0, 2.0, 4.0],
        "near_scale": [0.05, 0.1, 0.2, 0.4],
        "missing": [1.5, 3.0, 5.0, 8.0],
        "extra": [1.0, 2.0, 4.0, 6.0, 9.0],
        "multiplicity_mismatch": [0.5, 1.0, 2.0, 3.5, 5.0, 8.0],
        "j_mismatch": [0.5, 1.0, 2.0, 3.5, 5.0, 8.0],
        "missing_exchangeable": [0.1, 0.5, 1.0, 2.0],
        "integral_mismatch": [0.5, 1.0, 1.5, 2.5, 4.0],
        "t_widen": [1.0, 1.25, 1.5, 2.0, 2.5, 3.0, 3.5],
        "shared_multiplet": [0.0, 0.5, 1.0, 2.0, 3.5, 5.0, 8.0],
        "shared_unresolved": [0.0, 0.25, 0.5, 0.75, 1.0, 1.5, 2.0],
    },
}
#: 1H widenings tried for the 1H term beside 13C (the joint step), besides the 1H-alone value.
JOINT_1H_WIDEN = [1.0, 1.25, 1.5, 1.75, 2.0]
KEEP = [f for f in MatchCosts.__dataclass_fields__ if f not in ("t_df", "t_scale", "h_t_df", "h_t_scale")]


def _read_cases(data: Path, names, keep) -> list[dict]:
    """Development cases from the gzipped JSON-lines files ``names`` whose truth skeleton passes ``keep``."""
    out = []
    for name in names:
        with gzip.open(data / name, "rt") as f:
            for line in f:
                c = json.loads(line)
                if keep(c["truth_skeleton"]):
                    if isinstance(c["candidates"], str):
                        c["candidates"] = ast.literal_eval(c["candidates"])
                    out.append(c)
    return out


def load_db_cases(data: Path, split: str = "val") -> list[dict]:
    return _read_cases(data, DB_FILES, lambda sk: split_of(sk) == split)


def load_text_cases(data: Path, part: str = "dev") -> list[dict]:
    return _read_cases(data, TEXT_FILES, lambda sk: literature_part(sk) == part)


def build(c: dict, mode: str) -> dict:
    """The ranking case of development case ``c`` for ``mode``: db (with DEPT), db-shifts, 13C, 1H, both."""
    base = {"id": c["id"], "candidates": c["candidates"], "formula": c.get("formula"), "solvent": c.get("solvent")}
    if mode == "db":
        return {**base, "peaks": c["peaks"]}
    if mode == "db-shifts":
        return {**base, "peaks": [{"shift": p["shift"]} for p in c["peaks"]]}
    if mode == "hsqc":
        return {**base, "hsqc": c["hsqc"]}
    if mode == "hsqc+13C":
        return {**base, "hsqc": c["hsqc"], "peaks": c["peaks"]}
    text = {"both": c["text_1h"] + "\n" + c["text_13c"], "1H": c["text_1h"], "13C": c["text_13c"]}[mode]
    return {**base, "text": text}


def stage(cases: list[dict], mode: str) -> list:
    """Per case: (truth index, {nucleus: (peaks, [Prepared or None per candidate])})."""
    out = []
    for c, s in zip(cases, stage_cases([build(c, mode) for c in cases])):
        if isinstance(s, Exception):
            continue
        case, peaks, notes, _, _, _, preps = s
        per = {}
        for n, obs in peaks.items():
            rows = []
            for p in preps:
                if p.error or any(m not in p.preds for m in MODELS_FOR[n]):
                    rows.append(None)
                    continue
                _, ranks, _ = parse_candidate(p.smiles)
                if n == "HSQC":   # both predictions, as class means
                    mu, sg = tuple(ClassMeans(p.parts[m].centres, *p.preds[m]) for m in ("13C", "1H")), None
                else:
                    centres = p.parts[n].centres.tolist()
                    mu, sg = dict(zip(centres, p.preds[n][0])), dict(zip(centres, p.preds[n][1]))
                rows.append(EVIDENCE[n].prepare(p.mol, list(ranks), mu, sg, obs))
            per[n] = (obs, rows)
        out.append((c["candidates"].index(c["truth"]), per))
    return out


def raw_costs(staged, nucleus: str, costs: MatchCosts) -> list[tuple[np.ndarray, int]]:
    ev = EVIDENCE[nucleus]
    rows = []
    for truth, per in staged:
        if nucleus not in per:
            continue
        _, preps = per[nucleus]
        cs = np.array([ev.best_assignment(pr, costs)[0].total_cost if pr is not None else np.inf for pr in preps])
        rows.append((cs, truth))
    return rows


def nll(rows, temps: np.ndarray) -> float:
    """Mean negative log-probability of the truth; cost arrays per nucleus stacked in rows of 2-D arrays."""
    tot = 0.0
    for cs, t in rows:
        z = -(cs / temps[:, None]).sum(axis=0) if cs.ndim == 2 else -cs / temps[0]
        finite = np.isfinite(z)
        z = np.where(finite, z - z[finite].max(), -np.inf)
        tot -= z[t] - np.log(np.sum(np.exp(z[finite])))
    return tot / max(len(rows), 1)


def top1(rows) -> float:
    return float(np.mean([np.argmin(cs if cs.ndim == 1 else cs.sum(axis=0)) == t for cs, t in rows]))


def fit_temperature(rows) -> float:
    return float(min(np.exp(np.linspace(-2, 4, 61)), key=lambda T: nll(rows, np.array([T]))))


def objective(sets: list, nucleus: str, costs: MatchCosts) -> tuple[float, float]:
    """Mean top-1 over the sets, then the log-likelihood at the best common temperature."""
    rows_per = [raw_costs(s, nucleus, costs) for s in sets]
    T = fit_temperature([r for rows in rows_per for r in rows])
    return float(np.mean([top1(r) for r in rows_per])), -float(np.mean([nll(r, np.array([T])) for r in rows_per]))


def fit_costs(sets: list, nucleus: str, start: MatchCosts, passes: int = 2,
              params: list[str] | None = None) -> tuple[MatchCosts, tuple]:
    cur = start
    best = objective(sets, nucleus, cur)
    print(f"  start {nucleus}: top-1 {best[0]:.4f}, log-lik {best[1]:.4f}", flush=True)
    for _ in range(passes):
        changed = False
        for name, values in GRID[nucleus].items():
            if params is not None and name not in params:
                continue
            for v in values:
                if v == getattr(cur, name):
                    continue
                cand = replace(cur, **{name: v})
                score = objective(sets, nucleus, cand)
                if score > best:
                    best, cur, changed = score, cand, True
                    print(f"    {name} = {v}: top-1 {score[0]:.4f}, log-lik {score[1]:.4f}", flush=True)
        if not changed:
            break
    return cur, best


def _joint_fit(c13, c1h, ranking: dict) -> dict:
    """The two joint temperatures from per-nucleus costs: their ratio (the weight of 1H against 13C) by top-1
    (ties: nearest the likelihood's), then the common temperature by likelihood - the likelihood alone
    under-weights 1H for top-1 (dev half 275 vs 278 of 329 with model set 1.4.0)."""
    rows = [(np.vstack([a, b]), t) for (a, t), (b, _) in zip(c13, c1h)]
    x0 = np.log([ranking["13C"]["temperature"], ranking["1H"]["temperature"]])
    res = minimize(lambda lt: nll(rows, np.exp(lt)), x0=x0, method="Nelder-Mead")
    T13, T1 = (float(x) for x in np.exp(res.x))
    lik_ratio = T13 / T1
    ratios = np.round(np.arange(0.2, 1.51, 0.05), 2)
    hits = [float(np.mean([np.argmin(cs[0] + r * cs[1]) == t for cs, t in rows])) for r in ratios]
    best = max(hits)
    ratio = float(min((r for r, h in zip(ratios, hits) if h == best), key=lambda r: abs(np.log(r / lik_ratio))))
    T13 = float(min(np.exp(np.linspace(-2, 4, 241)), key=lambda T: nll(rows, np.array([T, T / ratio]))))
    T1 = T13 / ratio
    temps = np.array([T13, T1])
    return {"rows": rows, "T13": T13, "T1": T1, "ratio": ratio, "lik_ratio": lik_ratio, "best": best,
            "nll": nll(rows, temps),
            "top1": float(np.mean([np.argmin((cs / temps[:, None]).sum(axis=0)) == t for cs, t in rows]))}


def _kept_note(params: list[str] | None) -> str:
    if params is None:
        return ""
    return f" (only {', '.join(params)} refitted; the other costs kept)" if params else " (costs kept; temperature refitted)"


def main(argv=None) -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--models", type=Path, default=REPO / "models")
    ap.add_argument("--steps", default="13C,1H,joint,HSQC")
    ap.add_argument("--params", default=None,
                    help="refit only these costs (comma-separated), e.g. t_widen; 'none': the temperatures only")
    ap.add_argument("--printed", action="store_true",
                    help="fit the printed-text settings (ranking.printed: 13C costs, their temperature on printed "
                         "paragraphs alone, joint temperatures) instead of the ones for typed lists")
    args = ap.parse_args(argv)
    steps = args.steps.split(",")
    params = None if not args.params else [] if args.params == "none" else args.params.split(",")
    unknown = sorted(set(params or []) - {k for g in GRID.values() for k in g})
    if unknown:
        ap.error(f"--params: no grid for {', '.join(unknown)}")
    if args.printed and not set(steps) <= {"13C", "joint"}:
        ap.error("--printed fits the 13C and joint steps only")
    t0 = time.time()
    man_path = args.models / "manifest.json"
    man = json.loads(man_path.read_text())
    settings = settings_from_manifest(man)   # the settings of the manifest being refitted
    if args.printed and settings.printed is not None:
        settings = settings.printed
    ranking = man.setdefault("ranking", {})
    target = ranking.setdefault("printed", {}) if args.printed else ranking
    text_cases = load_text_cases(args.data, "dev")
    print(f"{len(text_cases)} dev-half printed-text cases", flush=True)
    fitted = dict(settings.costs)
    if "13C" in steps:
        db = load_db_cases(args.data, "val")
        sets = [stage(db, "db"), stage(db, "db-shifts"), stage(text_cases, "13C")]
        print(f"13C: {len(db)} validation-split database cases and {len(sets[2])} text cases staged "
              f"in {time.time() - t0:.0f} s", flush=True)
        costs, score = fit_costs(sets, "13C", settings.costs["13C"], params=params)
        fitted["13C"] = costs
        # printed settings: the temperature of the printed paragraphs alone (they are the only cases using it)
        T = fit_temperature([r for s in (sets[2:] if args.printed else sets) for r in raw_costs(s, "13C", costs)])
        target["13C"] = {**{k: getattr(costs, k) for k in KEEP}, "temperature": round(T, 4),
                         "fitted_on": f"{len(db)} validation-split database cases (with and without DEPT) and "
                                      f"{len(sets[2])} dev-half printed 13C paragraphs"
                                      + _kept_note(params)
                                      + ("; used for printed text, its temperature fitted on the printed paragraphs alone"
                                         if args.printed else ""),
                          "dev_top1": {"database": round(top1(raw_costs(sets[0], "13C", costs)), 4),
                                       "database_shifts_only": round(top1(raw_costs(sets[1], "13C", costs)), 4),
                                       "printed": round(top1(raw_costs(sets[2], "13C", costs)), 4)}}
        print(f"  13C: {target['13C']}", flush=True)
    if "1H" in steps:
        sets = [stage(text_cases, "1H")]
        costs, score = fit_costs(sets, "1H", settings.costs["1H"], params=params)
        fitted["1H"] = costs
        T = fit_temperature(raw_costs(sets[0], "1H", costs))
        ranking["1H"] = {**{k: getattr(costs, k) for k in KEEP}, "temperature": round(T, 4),
                         "fitted_on": f"{len(sets[0])} dev-half printed 1H paragraphs"
                                      + _kept_note(params),
                         "dev_top1": {"printed": round(score[0], 4)}}
        print(f"  1H: {ranking['1H']}", flush=True)
    if "joint" in steps:
        both = [(t, per) for t, per in stage(text_cases, "both") if "13C" in per and "1H" in per]
        c13 = raw_costs(both, "13C", fitted["13C"])
        # the 1H widening beside 13C is chosen here too (by top-1, ties by likelihood): 1H alone must carry
        # the whole decision and wants wider tails than 1H next to a 13C list does
        widen_grid = sorted({*JOINT_1H_WIDEN, fitted["1H"].t_widen})
        best_fit = None
        for w in widen_grid:
            c1h = raw_costs(both, "1H", replace(fitted["1H"], t_widen=w))
            fit = _joint_fit(c13, c1h, ranking)
            print(f"    1H widening {w:g} beside 13C: top-1 {100 * fit['top1']:.1f} %, log-lik {-fit['nll']:.4f}", flush=True)
            if best_fit is None or (fit["top1"], -fit["nll"]) > (best_fit["top1"], -best_fit["nll"]):
                best_fit = {**fit, "t_widen": w, "c1h": c1h}
        T13, T1, ratio = best_fit["T13"], best_fit["T1"], best_fit["ratio"]
        print(f"  joint: 1H weight {best_fit['lik_ratio']:.2f} by likelihood, {ratio:.2f} by top-1 "
              f"({100 * best_fit['best']:.1f} %), 1H widening {best_fit['t_widen']:g}", flush=True)
        kept = {} if args.printed else {k: v for k, v in ranking.get("joint", {}).items() if k == "HSQC"}   # own step
        j1h = {"temperature": round(T1, 4)}
        if best_fit["t_widen"] != fitted["1H"].t_widen:
            # the 1H costs beside 13C, and the temperature of that 1H term taken alone (each spectrum's own view)
            j1h.update(t_widen=best_fit["t_widen"], temperature_alone=round(fit_temperature(best_fit["c1h"]), 4))
        target["joint"] = {**kept, "13C": {"temperature": round(T13, 4)}, "1H": j1h,
                           "fitted_on": f"{len(best_fit['rows'])} dev-half printed-text cases ranked from both paragraphs"
                                        + (", with the printed 13C costs" if args.printed else ""),
                           "dev_top1": round(best_fit["top1"], 4)}
        print(f"  joint: {target['joint']}", flush=True)
    if "HSQC" in steps:
        hc = [c for c in hsqc_cases(args.data) if c["split"] == "val"]
        alone = raw_costs(stage(hc, "hsqc"), "HSQC", settings.costs["HSQC"])
        T = fit_temperature(alone)
        both = stage(hc, "hsqc+13C")
        c13, ch = raw_costs(both, "13C", fitted["13C"]), raw_costs(both, "HSQC", settings.costs["HSQC"])
        rows = [(np.vstack([a, b]), t) for (a, t), (b, _) in zip(c13, ch)]
        T13 = ranking.get("joint", {}).get("13C", {}).get("temperature", ranking["13C"]["temperature"])
        Th = float(min(np.exp(np.linspace(-2, 4, 61)), key=lambda x: nll(rows, np.array([T13, x]))))
        ranking["HSQC"] = {"temperature": round(T, 4),
                           "fitted_on": f"{len(alone)} validation-split NMRShiftDB2 compounds with assigned 13C and 1H "
                                        "shifts against their positional isomers (cross peaks from the assignments)",
                           "dev_top1": {"hsqc": round(top1(alone), 4)}}
        ranking.setdefault("joint", {})["HSQC"] = {"temperature": round(Th, 4),
                                                   "fitted_on": f"the same {len(rows)} cases with their 13C lists "
                                                                "(13C joint temperature held fixed)"}
        print(f"  HSQC: {ranking['HSQC']}; with 13C: {ranking['joint']['HSQC']}", flush=True)
    man_path.write_text(json.dumps(man, indent=1))
    print(f"done in {time.time() - t0:.0f} s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
