"""Fit the E/Z configuration increments (:mod:`shiftrank.prediction.configuration`) of both nuclei.

    python -m training.configuration_increments [--data DIR] [--write]

The shipped models are stereo-blind: their estimate for a centre beside a configured double bond is a
blend of both configurations.  On the validation and test splits (skeletons the sphere tables and trees
never saw) the residual, observed − predicted without increments, is gathered per role for centres with
exactly one role.  A two-fold cross-fit over those splits: in each fold a role is *found* when it has at
least ``MIN_N`` residuals and the bootstrap 90 % interval of their median excludes zero.  A role is kept
only when it is found in both folds with the same sign; its increment is the median of both folds'
residuals.  The report gives each fold's MAE before and after with the other fold's fit, which is
the honest figure (the pooled value is fitted on both, so the test split is no longer clean for these
few centres).  Centres whose whole compound was matched in the tables are left out (their measured
value stands).
``--write`` stores the increments in each nucleus's entry of ``models/manifest.json``.
"""
from __future__ import annotations

import argparse
import json
import os
import sys
from pathlib import Path

os.environ.setdefault("OMP_NUM_THREADS", "1")

import numpy as np  # noqa: E402

from shiftrank.prediction.api import predict_many  # noqa: E402
from shiftrank.prediction.configuration import ROLES, configuration_roles, twin_pairs  # noqa: E402
from shiftrank.prediction.model_files import default_model, models_dir  # noqa: E402
from training.data import DEFAULT_DATA, load_assigned  # noqa: E402

MIN_N = 8
BOOT = 2000


def role_residuals(mols, nucleus: str, use_increments: bool = False) -> dict[int, list[float]]:
    """Role index -> residuals (observed − predicted) of centres playing that one role, whole matches left out."""
    model = default_model(nucleus)
    kept = model.config_increments
    if not use_increments:
        model.config_increments = None
    try:
        preds = predict_many([m.mol for m in mols], nucleus=nucleus)
    finally:
        model.config_increments = kept
    out: dict[int, list[float]] = {k: [] for k in range(len(ROLES))}
    for m, p in zip(mols, preds):
        if isinstance(p, Exception):
            continue
        roles = configuration_roles(m.mol, range(m.mol.GetNumAtoms()), twins=twin_pairs(m.mol))
        if roles is None:
            continue
        for a in p.atoms:
            if a.atom not in m.shifts or a.whole_molecule or roles[a.atom].sum() != 1:
                continue
            out[int(np.flatnonzero(roles[a.atom])[0])].append(m.shifts[a.atom] - a.shift)
    return out


def fit(residuals: dict[int, list[float]], seed: int = 0) -> dict:
    rng = np.random.default_rng(seed)
    ppm, n, ci = {}, {}, {}
    for k, vals in residuals.items():
        v = np.asarray(vals)
        n[ROLES[k]] = int(len(v))
        if len(v) < MIN_N:
            continue
        boots = np.median(rng.choice(v, size=(BOOT, len(v)), replace=True), axis=1)
        lo, hi = np.percentile(boots, [5, 95])
        ci[ROLES[k]] = [round(float(lo), 3), round(float(hi), 3)]
        if lo > 0 or hi < 0:
            ppm[ROLES[k]] = round(float(np.median(v)), 3)
    return {"ppm": ppm, "n_validation": n, "ci90_validation": ci}


def mae_report(before: dict[int, list[float]], increments: dict) -> dict:
    """MAE of the role centres of one split (``before``: its :func:`role_residuals`) without and with ``increments``."""
    out = {}
    for k, vals in before.items():
        if not vals:
            continue
        v = np.asarray(vals)
        shift = increments.get(ROLES[k], 0.0)
        out[ROLES[k]] = {"n": len(v), "mae_before": round(float(np.abs(v).mean()), 3),
                         "mae_after": round(float(np.abs(v - shift).mean()), 3)}
    allv = np.concatenate([np.asarray(v) - increments.get(ROLES[k], 0.0) for k, v in before.items() if v] or [np.zeros(0)])
    allb = np.concatenate([np.asarray(v) for v in before.values() if v] or [np.zeros(0)])
    out["all role centres"] = {"n": int(len(allb)), "mae_before": round(float(np.abs(allb).mean()), 3) if len(allb) else None,
                               "mae_after": round(float(np.abs(allv).mean()), 3) if len(allv) else None}
    return out


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--write", action="store_true", help="store the increments in models/manifest.json")
    args = ap.parse_args(argv)
    result = {}
    for nucleus in ("13C", "1H"):
        mols = load_assigned(args.data, nucleus=nucleus)
        val = [m for m in mols if m.split == "val"]
        test = [m for m in mols if m.split == "test"]
        rv, rt = role_residuals(val, nucleus), role_residuals(test, nucleus)
        fv, ft = fit(rv), fit(rt)
        pooled = fit({k: rv[k] + rt[k] for k in rv})
        keep = {r for r in fv["ppm"] if r in ft["ppm"] and np.sign(fv["ppm"][r]) == np.sign(ft["ppm"][r])}
        fitted = {"ppm": {r: v for r, v in pooled["ppm"].items() if r in keep},
                  "validation fold": fv["ppm"], "test fold": ft["ppm"],
                  "n": pooled["n_validation"], "ci90 pooled": pooled["ci90_validation"],
                  "test with the validation fit": mae_report(rt, {r: fv["ppm"][r] for r in keep}),
                  "validation with the test fit": mae_report(rv, {r: ft["ppm"][r] for r in keep})}
        result[nucleus] = fitted
        print(f"{nucleus}: validation fold {fv['ppm']}\n     test fold {ft['ppm']}\n     kept {fitted['ppm']}", flush=True)
        for fold in ("test with the validation fit", "validation with the test fit"):
            for role, row in fitted[fold].items():
                if role in keep or role == "all role centres":
                    print(f"  {fold}: {role}, n {row['n']}, MAE {row['mae_before']} -> {row['mae_after']}")
    if args.write:
        path = models_dir() / "manifest.json"
        man = json.loads(path.read_text())
        for nucleus, fitted in result.items():
            man["nuclei"][nucleus]["configuration_increments"] = dict(
                {k: fitted[k] for k in ("ppm", "validation fold", "test fold")}, fitted=(
                "medians of validation- and test-split residuals of the stereo-blind model; a role kept when "
                "found in both folds of a two-fold cross-fit (training/configuration_increments.py)"))
        path.write_text(json.dumps(man, indent=1) + "\n")
        print(f"written to {path}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
