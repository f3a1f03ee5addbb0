"""Choose which boosted members of a trained shift model to keep, on the validation split.

    python -m training.select_members --nucleus 13C                 # validation MAE of every subset
    python -m training.select_members --nucleus 13C --keep 0,1,3,4  # keep those, drop the others

Members are numbered in the order they were added: 0 by ``training.train_shifts``, then one per
``training.add_member`` run.  Without ``--keep`` the script only prints the validation MAE (13C:
every carbon; 1H: C–H protons) of each subset's mean, so the choice is made on the validation
split.  With ``--keep`` the other members are dropped, the error model (σ) is refitted on the
validation split for the new mean, validation and test figures are measured again, and the model
file, its manifest entry and ``training/last_metrics_<nucleus>.json`` are rewritten.

Why: members that read the descriptors alone (``add_member --descriptors-only``) and members that
also read the sphere-table statistics make different errors, so a mean over two of each beats a
mean over more members of one kind for fewer trees (prediction time grows with the member count).
"""
from __future__ import annotations

import argparse
import itertools
import json
import time
from pathlib import Path

import numpy as np

import training.train_shifts as T
from shiftrank.prediction.environment import feature_names
from shiftrank.prediction.model_files import load_shift_model
from training.data import DEFAULT_DATA, LoadReport


def member_predictions(model, rows) -> np.ndarray:
    """(members, rows) estimates of each member on ``rows``."""
    X, _ = model.design(rows.feats, rows.codes, rows.rkeys)
    return np.array([m.predict(X) for m in model.regressors])


def subset_maes(model, val) -> dict[tuple[int, ...], float]:
    """Validation MAE of the mean of every non-empty subset of the members."""
    P = member_predictions(model, val)
    keep = np.ones(len(val), bool)
    if model.nucleus == "1H":
        keep = val.feats[:, feature_names("1H").index("exchangeable")] == 0
    out = {}
    for r in range(1, len(P) + 1):
        for idx in itertools.combinations(range(len(P)), r):
            out[idx] = float(np.abs(P[list(idx)].mean(axis=0) - val.y)[keep].mean())
    return out


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--nucleus", choices=["13C", "1H"], default="13C")
    ap.add_argument("--keep", default=None, help="comma-separated member numbers to keep, e.g. 0,1,3,4")
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--models", type=Path, default=T.REPO / "models")
    args = ap.parse_args(argv)
    n = args.nucleus
    t0 = time.time()
    model = load_shift_model(args.models, n)
    k = len(model.regressors)
    keep = None
    if args.keep is not None:
        try:
            keep = sorted({int(x) for x in args.keep.split(",")})
        except ValueError:
            ap.error(f"--keep {args.keep!r}: give member numbers such as 0,1,3")
        if not keep or keep[0] < 0 or keep[-1] >= k:
            ap.error(f"--keep {args.keep!r}: the {n} model has members 0 to {k - 1}")
    mols, _, val, test = T.assigned_splits(args.data, n, LoadReport())
    maes = subset_maes(model, val)
    for idx, mae in sorted(maes.items(), key=lambda kv: (len(kv[0]), kv[0])):
        T.log(f"{n} members {','.join(map(str, idx)):12s} validation MAE {mae:.4f}")
    if keep is None:
        return 0
    before = maes[tuple(range(k))]
    model.regressor = [model.regressors[i] for i in keep]
    model.drop_unread_ring_tables()
    path = T.report_path(n)
    report = json.loads(path.read_text()) if path.exists() else {"nucleus": n}
    ensemble = report.get("ensemble", [])
    report["members_kept"] = {"kept": keep, "of": k, "val_mae_before": before, "val_mae_after": maes[tuple(keep)],
                              "note": "member 0 from train_shifts, member i >= 1 from the i-th entry of 'ensemble'"}
    report["uncertainty"] = T.fit_sigma(model, val)
    report["val"] = T.metrics(model, val, mols, "val")
    report["test"] = T.metrics(model, test, mols, "test")
    T.log(f"{n}: kept members {keep} of {k}: val MAE {before:.4f} -> {maes[tuple(keep)]:.4f}; "
          f"test MAE {T.headline(report, n, 'test'):.3f}, 90% coverage {report['test']['coverage90']:.3f}")
    rows = max([e.get("train_rows", 0) for e in ensemble] + [report.get("train_rows", 0)])
    T.save_model(model, report, mols, args.models, args.data, n, rows)
    report["seconds_select"] = round(time.time() - t0)
    T.write_report(report, n)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
