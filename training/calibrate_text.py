"""Fit the ranking settings on printed-text development cases (run after the models are trained).

    python -m training.calibrate_text [--data DIR] [--models models/] [--nuclei 1H,joint]

Cases: ``dev_cases_text_regio`` and ``dev_cases_text_isomers`` whose compound lies in the *dev*
half of the literature split (:func:`training.data.literature_part`); the held-out half is left to
``benchmarks/bench_text.py``.  The 'truth' field only scores the settings; it never reaches the ranker.

* ``1H``: the 1H match costs (coordinate descent over a small grid; objective: top-1 of 1H-only
  ranking, ties broken by the log-likelihood of the truth at the best temperature), then the 1H
  temperature by maximum likelihood;
* ``13C``: the same for the 13C costs on printed 13C paragraphs (``--nuclei 13C``);
* ``joint``: the two temperatures used when both nuclei are observed, by maximum likelihood on
  cases ranked from both paragraphs.

Writes the values into ``models/manifest.json`` under ``ranking``.
"""
from __future__ import annotations

import argparse
import gzip
import json
import time
from dataclasses import replace
from pathlib import Path

import numpy as np
from scipy.optimize import minimize

from shiftrank.score.evidence import EVIDENCE
from shiftrank.score.matching import MatchCosts, assign
from shiftrank.score.ranking import ranking_settings, stage_cases
from training.data import DEFAULT_DATA, literature_part

REPO = Path(__file__).resolve().parents[1]
FILES = ("dev_cases_text_regio.jsonl.gz", "dev_cases_text_isomers.jsonl.gz")
GRID = {
    "overlap": [0.5, 1.0, 2.0, 3.0],
    "missing": [1.5, 3.0, 5.0, 8.0],
    "extra": [2.0, 4.0, 6.0, 9.0],
    "multiplicity_mismatch": [0.5, 1.0, 2.0, 3.5, 5.0, 8.0],
    "j_mismatch": [0.25, 0.5, 1.0, 2.0, 3.5, 5.0, 8.0],
    "missing_exchangeable": [0.1, 0.5, 1.0, 2.0],
    "integral_mismatch": [0.5, 1.0, 1.5, 2.5, 4.0],
}
GRID_13C = {k: GRID[k] for k in ("overlap", "missing", "extra")}


def load_cases(data: Path, part: str = "dev") -> list[dict]:
    out = []
    for name in FILES:
        with gzip.open(data / name, "rt") as f:
            for line in f:
                c = json.loads(line)
                if literature_part(c["truth_skeleton"]) == part:
                    if isinstance(c["candidates"], str):
                        import ast
                        c["candidates"] = ast.literal_eval(c["candidates"])
                    c["set"] = name.split("_")[3].split(".")[0]
                    out.append(c)
    return out


def staged_mode(cases: list[dict], mode: str) -> list:
    """Per case: (truth index, {nucleus: [(prepared, peaks) per candidate or None]}), for ranking from
    the 1H paragraph, the 13C paragraph or both."""
    built = []
    for c in cases:
        text = {"both": c["text_1h"] + "\n" + c["text_13c"], "1H": c["text_1h"], "13C": c["text_13c"]}[mode]
        built.append({"id": c["id"], "text": text, "candidates": c["candidates"], "formula": c.get("formula")})
    out = []
    for c, s in zip(cases, stage_cases(built)):
        if isinstance(s, Exception):
            continue
        case, peaks, notes, _, _, _, preps = s
        per = {}
        for n, obs in peaks.items():
            ev = EVIDENCE[n]
            rows = []
            for p in preps:
                if p.error or n not in p.preds:
                    rows.append(None)
                    continue
                from shiftrank.score.ranking import _parse
                _, ranks, _ = _parse(p.smiles)
                centres = p.parts[n].centres.tolist()
                mu, sg = dict(zip(centres, p.preds[n][0])), dict(zip(centres, p.preds[n][1]))
                rows.append(ev.prepare(p.mol, list(ranks), mu, sg, obs))
            per[n] = (obs, rows)
        out.append((c["candidates"].index(c["truth"]), per, c["set"]))
    return out


def raw_costs(stage, nucleus: str, costs: MatchCosts) -> list[tuple[np.ndarray, int]]:
    ev = EVIDENCE[nucleus]
    rows = []
    for truth, per, _ in stage:
        obs, preps = per[nucleus]
        cs = np.array([assign(pr.classes, pr.peaks, costs, ev.mismatch(pr, costs)).total_cost if pr is not None else np.inf
                       for pr in preps])
        rows.append((cs, truth))
    return rows


def nll(rows, temps: np.ndarray) -> float:
    """Mean negative log-probability of the truth; ``rows`` hold cost arrays per nucleus (stacked)."""
    tot = 0.0
    for cs, t in rows:
        z = -(cs / temps[:, None]).sum(axis=0) if cs.ndim == 2 else -cs / temps[0]
        finite = np.isfinite(z)
        z = np.where(finite, z - z[finite].max(), -np.inf)
        tot -= z[t] - np.log(np.sum(np.exp(z[finite])))
    return tot / len(rows)


def top1(rows) -> float:
    return float(np.mean([np.argmin(cs if cs.ndim == 1 else cs.sum(axis=0)) == t for cs, t in rows]))


def fit_temperature(rows) -> float:
    best = min(np.exp(np.linspace(-2, 4, 61)), key=lambda T: nll(rows, np.array([T])))
    return float(best)


def objective(rows) -> tuple[float, float]:
    T = fit_temperature(rows)
    return top1(rows), -nll(rows, np.array([T]))


def fit_costs(stage, nucleus: str, start: MatchCosts, grid: dict, passes: int = 2) -> tuple[MatchCosts, dict]:
    cur = start
    best = objective(raw_costs(stage, nucleus, cur))
    print(f"  start {nucleus}: top-1 {best[0]:.3f}, log-lik {best[1]:.3f}", flush=True)
    for _ in range(passes):
        changed = False
        for name, values in grid.items():
            for v in values:
                if v == getattr(cur, name):
                    continue
                cand = replace(cur, **{name: v})
                score = objective(raw_costs(stage, nucleus, cand))
                if score > best:
                    best, cur, changed = score, cand, True
                    print(f"    {name} = {v}: top-1 {score[0]:.3f}, log-lik {score[1]:.3f}", flush=True)
        if not changed:
            break
    return cur, {"top1": round(best[0], 4), "loglik": round(best[1], 4)}


def main(argv=None) -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--models", type=Path, default=REPO / "models")
    ap.add_argument("--nuclei", default="1H,joint", help="comma list of 1H, 13C, joint")
    args = ap.parse_args(argv)
    which = args.nuclei.split(",")
    t0 = time.time()
    cases = load_cases(args.data, "dev")
    settings = ranking_settings()
    man_path = args.models / "manifest.json"
    man = json.loads(man_path.read_text())
    ranking = man.setdefault("ranking", {})
    print(f"{len(cases)} dev-half text cases", flush=True)
    keep = [f for f in MatchCosts.__dataclass_fields__ if f not in ("t_df", "t_scale")]
    for nucleus in [n for n in ("1H", "13C") if n in which]:
        stage = staged_mode(cases, nucleus)
        print(f"{nucleus}: {len(stage)} cases staged in {time.time() - t0:.0f} s", flush=True)
        grid = GRID if nucleus == "1H" else GRID_13C
        costs, score = fit_costs(stage, nucleus, settings.costs[nucleus], grid)
        T = fit_temperature(raw_costs(stage, nucleus, costs))
        entry = ranking.setdefault(nucleus, {})
        entry.pop("fitted_on", None) if nucleus == "1H" else None
        entry.update({k: getattr(costs, k) for k in keep})
        entry["temperature"] = round(T, 4)
        entry["text_fit"] = {"cases": len(stage), **score,
                              "fitted_on": "dev half of the printed-text development cases (regio + isomers), "
                                           f"ranking from the {nucleus} paragraph alone"}
        print(f"  {nucleus}: {entry}", flush=True)
    if "joint" in which:
        from shiftrank.score.ranking import RankingSettings  # noqa: F401
        costs = {n: MatchCosts(**{**{k: getattr(settings.costs[n], k) for k in ("t_df", "t_scale")},
                                  **{k: ranking.get(n, {}).get(k, getattr(settings.costs[n], k)) for k in keep}})
                 for n in ("13C", "1H")}
        stage = staged_mode(cases, "both")
        both = [(t, per, s) for t, per, s in stage if "13C" in per and "1H" in per]
        c13 = raw_costs(both, "13C", costs["13C"])
        c1h = raw_costs(both, "1H", costs["1H"])
        rows = [(np.vstack([a, b]), t) for (a, t), (b, _) in zip(c13, c1h)]
        res = minimize(lambda lt: nll(rows, np.exp(lt)), x0=np.log([ranking["13C"]["temperature"], ranking["1H"]["temperature"]]),
                       method="Nelder-Mead")
        T13, T1 = (float(x) for x in np.exp(res.x))
        ranking["joint"] = {"13C": {"temperature": round(T13, 4)}, "1H": {"temperature": round(T1, 4)},
                            "fitted_on": f"{len(rows)} dev-half printed-text cases ranked from both paragraphs",
                            "top1": round(float(np.mean([np.argmin((cs / np.array([[T13], [T1]])).sum(axis=0)) == t
                                                         for cs, t in rows])), 4)}
        print(f"joint: {ranking['joint']}", flush=True)
    man_path.write_text(json.dumps(man, indent=1))
    print(f"done in {time.time() - t0:.0f} s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
