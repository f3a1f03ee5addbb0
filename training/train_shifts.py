"""Train a shipped shift model from ../shared/data (one command per nucleus, fixed seeds).

    python -m training.train_shifts --nucleus 13C [--data DIR] [--out models/] [--rounds 3]
    python -m training.train_shifts --nucleus 1H

The same steps for both nuclei (each reported in training/out/metrics_<nucleus>.json and in the
nucleus's section of models/manifest.json); only the data, the outlier floor and the self-training
label rules differ:
1. assigned centres of NMRShiftDB2 (13C: carbons; 1H: the mean shift of the protons on each heavy
   atom), split 80/10/10 by InChIKey skeleton;
2. sphere tables + gradient boosting on the training split (table features out-of-fold);
3. outlier handling: training rows whose in-sample residual exceeds max(floor, 5 × robust residual
   scale) are dropped (floor 8 ppm for 13C, 0.8 ppm for 1H) and the model refitted, with 10 % of
   the rows duplicated with their wider sphere statistics hidden (tiny molecules and new scaffolds
   have no wide-sphere match; the copies teach the model to rely on its descriptors there);
4. self-training: unassigned peak lists of training-split skeletons are assigned with the
   current model, confident labels added, model refitted; repeated ``--rounds`` times and kept
   only while the validation MAE improves;
5. error model fitted on validation residuals, scaled so ±1.645 σ covers 90 %;
6. Student-t parameters for the ranking fitted to standardised validation residuals;
7. test-split metrics (never used for any choice above), files written with SHA-256.
"""
from __future__ import annotations

import argparse
import json
import time
from pathlib import Path

import numpy as np
from scipy import stats as sps
from sklearn.ensemble import HistGradientBoostingRegressor

from shiftrank.prediction.environment import feature_names
from shiftrank.prediction.model import Z90, ShiftModel
from shiftrank.prediction.sphere_tables import SphereTables, table_features
from shiftrank.prediction.trees import Forest
from shiftrank.prediction.model_files import FILES, boost_arrays, read_manifest, sha256_file
from training.data import DEFAULT_DATA, LoadReport, load_assigned, load_peaklists
from shiftrank.prediction.ring_systems import RingTables
from training.features import RowSet, masked_copies, oof_ring_features, oof_table_stats, rows_from_assigned
from training.pseudo_labels import pseudo_label

SEED = 20261201
RARE_RADIUS, RARE_COUNT = 3, 3  # environment shared by fewer carbons than this (out of fold): not judged an outlier
MASK_FRACTION = 0.1  # share of training rows duplicated with their wider sphere statistics hidden
OUTLIER_FLOOR = {"13C": 8.0, "1H": 0.8}  # ppm: residuals below this are never called outliers
SIGMA_FLOOR = {"13C": 0.3, "1H": 0.03}   # ppm: smallest stated uncertainty
VERSION = {"13C": "1.8.0", "1H": "1.4.0"}
MODELS_VERSION = "1.11.0"  # the shipped set of models (both nuclei, the E/Z increments, the ranking settings)
REPO = Path(__file__).resolve().parents[1]
LITERATURE_WEIGHT = 0.0  # labels from printed paragraphs (training.literature_labels); 0: not used


def log(msg: str) -> None:
    print(f"[{time.strftime('%H:%M:%S')}] {msg}", flush=True)


#: Gradient-boosting settings for the large (self-trained) fit, chosen on the validation split
#: (comparison in DEVELOPERS.md): larger trees with feature subsampling and strong leaf
#: regularisation beat 1200 trees of 127 leaves; 400 trees at a higher rate cost 0.025 ppm against
#: 600 but predict 1.6x faster, which the 20,000 carbons/s target needs.
BIG = dict(max_iter=400, max_leaf_nodes=255, learning_rate=0.15, max_features=0.5, min_samples_leaf=40, l2_regularization=10.0)
SMALL = dict(max_iter=700, max_leaf_nodes=63, learning_rate=0.07, max_features=0.5, min_samples_leaf=20, l2_regularization=3.0)


def _hgb(n_rows: int, quick: bool = False) -> HistGradientBoostingRegressor:
    kw = dict(BIG if n_rows > 100_000 else SMALL)
    if quick:  # the outlier pass only needs residuals
        kw["max_iter"] //= 2
    return HistGradientBoostingRegressor(loss="squared_error", random_state=SEED, **kw)


def fit_shift_model(rows: RowSet, report: dict, nucleus: str = "13C",
                    descriptors_only: bool = False, ring_tables: bool = False) -> tuple[ShiftModel, RowSet]:
    """Tables + regressor on ``rows`` with residual-based outlier removal.

    ``descriptors_only``: the final regressor sees the descriptors without the table statistics (and
    needs no masked copies); it reads the leading columns of the usual design rows, so it can sit in
    one ensemble with members that see both (its errors differ more from theirs than another seed's).

    ``ring_tables``: the regressor also sees the ring-system tables' statistics
    (:class:`~shiftrank.prediction.ring_systems.RingTables`, out-of-fold like the sphere tables),
    after the sphere-table columns; the returned model carries those tables."""
    stats = oof_table_stats(rows)
    X = np.hstack([rows.feats, table_features(stats)])
    ring_X = oof_ring_features(rows) if ring_tables else None
    if ring_X is not None:
        X = np.hstack([X, ring_X])
    reg = _hgb(len(rows), quick=True).fit(X, rows.y, sample_weight=rows.weight)
    res = rows.y - reg.predict(X)
    scale = 1.4826 * np.median(np.abs(res - np.median(res)))
    limit = max(OUTLIER_FLOOR[nucleus], 5.0 * scale)
    # an outlier is a carbon that disagrees with its peers; one whose surroundings (3 bonds out) no other
    # training carbon shares has no peers to disagree with, and is kept (small and unusual molecules)
    rare = stats[:, RARE_RADIUS - 1, 2] < RARE_COUNT
    keep = (np.abs(res) <= limit) | rare
    report["rare_kept_beyond_limit"] = int(((np.abs(res) > limit) & rare).sum())
    report["outlier_limit_ppm"] = round(float(limit), 2)
    report["outliers_dropped"] = int((~keep).sum())
    rows = rows.subset(keep)
    tables = SphereTables().fit(rows.codes, rows.y)
    if descriptors_only:
        reg = _hgb(len(rows)).fit(rows.feats, rows.y, sample_weight=rows.weight)
        return ShiftModel(tables, Forest.of(reg), None, sigma_floor=SIGMA_FLOOR[nucleus], nucleus=nucleus), rows
    X = X[keep]
    idx, masked = masked_copies(stats[keep], MASK_FRACTION, SEED)
    report["masked_copies"] = int(len(idx))
    copies = [rows.feats[idx], table_features(masked)]
    if ring_X is not None:   # the copies hide wide spheres only: a ring system is known or not at any radius
        copies.append(ring_X[keep][idx])
    Xa = np.vstack([X, np.hstack(copies)])
    reg = _hgb(len(Xa)).fit(Xa, np.concatenate([rows.y, rows.y[idx]]),
                            sample_weight=np.concatenate([rows.weight, rows.weight[idx]]))
    rt = RingTables().fit(rows.rkeys, rows.y, rows.feats[:, 0]) if ring_tables else None
    return ShiftModel(tables, reg, None, sigma_floor=SIGMA_FLOOR[nucleus], nucleus=nucleus, ring_tables=rt), rows


def predict_mu(model: ShiftModel, rows: RowSet) -> np.ndarray:
    X, _ = model.design(rows.feats, rows.codes, rows.rkeys)
    return model.predict_mu(X)


def selection_mae(model: ShiftModel, val: RowSet) -> float:
    """Validation MAE used to choose between self-training rounds: every carbon (13C); C–H protons
    only (1H), as exchangeable protons move with concentration, water and temperature."""
    err = np.abs(predict_mu(model, val) - val.y)
    if model.nucleus == "1H":
        err = err[val.feats[:, feature_names("1H").index("exchangeable")] == 0]
    return float(err.mean())


def fit_sigma(model: ShiftModel, val: RowSet) -> dict:
    """Error model on validation residuals; scale from a 2-fold cross-fit so coverage is honest."""
    X, _ = model.design(val.feats, val.codes, val.rkeys)
    mu = model.predict_mu(X)
    X2 = np.hstack([X, mu[:, None]])
    absres = np.abs(val.y - mu)
    folds = val.mol_idx % 2
    pred = np.zeros(len(val))

    def make():
        return HistGradientBoostingRegressor(loss="absolute_error", max_iter=100, learning_rate=0.1,
                                             max_leaf_nodes=15, min_samples_leaf=40, random_state=SEED)
    for f in (0, 1):
        m = make().fit(X2[folds != f], absres[folds != f])
        pred[folds == f] = m.predict(X2[folds == f])
    pred = np.maximum(pred, 1e-3)
    # scale s such that |res| <= Z90 * s * pred for 90 % of validation carbons
    scale = float(np.quantile(absres / pred, 0.90) / Z90)
    model.sigma_regressor = make().fit(X2, absres)
    model.sigma_scale = scale
    z = (val.y - mu) / np.maximum(pred * scale, model.sigma_floor)
    df, loc, sc = sps.t.fit(z, floc=0.0)
    return {"sigma_scale": scale, "t_df": float(df), "t_scale": float(sc)}


def metrics(model: ShiftModel, rows: RowSet, mols, name: str) -> dict:
    """MAE and friends on ``rows``; for 1H also on C–H rows only (exchangeable protons excluded)."""
    mu, sigma, radius, _ = model.predict_arrays(rows.feats, rows.codes, ring_keys=rows.rkeys)
    err = mu - rows.y
    ae = np.abs(err)
    out = {"split": name, "atoms": int(len(rows)), "molecules": int(len(set(rows.mol_idx.tolist()))),
           "mae": float(ae.mean()), "rmse": float(np.sqrt((err ** 2).mean())), "median_ae": float(np.median(ae)),
           "coverage90": float(np.mean(ae <= Z90 * sigma))}
    nh = rows.feats[:, 0]
    if model.nucleus == "13C":
        out["beyond_10ppm"] = float(np.mean(ae > 10))
        out["by_multiplicity"] = {k: float(ae[nh == h].mean()) for h, k in enumerate(["C", "CH", "CH2", "CH3"]) if (nh == h).any()}
    else:
        ch = rows.feats[:, feature_names("1H").index("exchangeable")] == 0
        out.update(ch_atoms=int(ch.sum()), ch_mae=float(ae[ch].mean()), ch_coverage90=float(np.mean((ae <= Z90 * sigma)[ch])),
                   exchangeable_mae=float(ae[~ch].mean()) if (~ch).any() else None, beyond_1ppm=float(np.mean(ae[ch] > 1.0)))
        out["by_h_count"] = {k: float(ae[ch & (nh == h)].mean()) for h, k in ((1, "CH"), (2, "CH2"), (3, "CH3")) if (ch & (nh == h)).any()}
    return out


def headline(report: dict, nucleus: str, split: str) -> float:
    """The figure the targets speak of: all carbons (13C), C–H protons (1H)."""
    m = report[split]
    return m["mae"] if nucleus == "13C" else m["ch_mae"]


def report_path(nucleus: str) -> Path:
    """The committed training report of ``nucleus`` (a copy also goes to training/out/)."""
    return REPO / "training" / f"last_metrics_{'13c' if nucleus == '13C' else '1h'}.json"


def write_report(report: dict, nucleus: str) -> None:
    out_dir = REPO / "training" / "out"
    out_dir.mkdir(exist_ok=True)
    text = json.dumps(report, indent=1)
    (out_dir / f"metrics_{'13c' if nucleus == '13C' else '1h'}.json").write_text(text)
    report_path(nucleus).write_text(text)


def save_model(model: ShiftModel, report: dict, mols, out: Path, data: Path, nucleus: str, n_train_rows: int) -> None:
    """Write the model files of ``nucleus`` into ``out`` and its manifest entry (hashes, metrics, sample)."""
    out.mkdir(parents=True, exist_ok=True)
    tables_name, boost_name = FILES[nucleus]
    ring = model.ring_tables.to_arrays() if model.ring_tables is not None else {}
    np.savez_compressed(out / tables_name, **model.tables.to_arrays(), **ring)
    np.savez_compressed(out / boost_name, **boost_arrays(model))  # trees as flat arrays, no pickle
    # fixed test sample for the regression test: ids of the first 300 test molecules
    test_ids = sorted({m.id for m in mols if m.split == "test"})[:300]
    sample = [m for m in mols if m.id in set(test_ids)]
    sample_rows = rows_from_assigned(sample, nucleus)
    smu, _, _, _ = model.predict_arrays(sample_rows.feats, sample_rows.codes, ring_keys=sample_rows.rkeys)
    data_file = "assigned_13c.csv.gz" if nucleus == "13C" else "assigned_1h.csv.gz"
    entry = {
        "version": VERSION[nucleus], "created": time.strftime("%Y-%m-%d"),
        "data": {name: sha256_file(data / name) for name in ("assigned_structures.sdf.gz", data_file, "peaklists.jsonl.gz")},
        "files": [tables_name, boost_name],
        "n_features": int(model.regressors[0].n_features_in_),
        "boosting": {k: v for k, v in _hgb(n_train_rows).get_params().items()
                     if k in ("max_iter", "max_leaf_nodes", "learning_rate", "max_features", "min_samples_leaf", "l2_regularization")},
        "feature_names": feature_names(nucleus),
        "uncertainty": report["uncertainty"],
        "metrics": {"val_mae": round(report["val"]["mae"], 3), "test_mae": round(report["test"]["mae"], 3),
                    "test_coverage90": round(report["test"]["coverage90"], 3)},
        "test_sample": {"nmrshiftdb2_ids": test_ids, "atoms": len(sample_rows), "mae": round(float(np.mean(np.abs(smu - sample_rows.y))), 4)},
    }
    if nucleus == "1H":
        entry["metrics"].update(val_ch_mae=round(report["val"]["ch_mae"], 3), test_ch_mae=round(report["test"]["ch_mae"], 3),
                                test_ch_coverage90=round(report["test"]["ch_coverage90"], 3))
    man_path = out / "manifest.json"
    man = read_manifest(out) if man_path.exists() else {}
    man.update({
        "name": "shiftrank-models", "version": MODELS_VERSION,
        "licence": "Derived from NMRShiftDB2 data; distributed under the nmrshiftdb2 database licence (ODbL-1.0 derived): attribution, share-alike.",
        "split": "InChIKey skeleton, sha256('shiftrank-split-v1:'+skeleton) mod 20: 0-1 test, 2-3 val, rest train",
        "sklearn": __import__("sklearn").__version__,
    })
    man.setdefault("files", {}).update({name: sha256_file(out / name) for name in (tables_name, boost_name)})
    man.setdefault("nuclei", {})[nucleus] = entry
    man_path.write_text(json.dumps(man, indent=1))


def assigned_splits(data: Path, nucleus: str, lr: LoadReport) -> tuple[list, RowSet, RowSet, RowSet]:
    """The assigned molecules of ``nucleus`` and their rows split train / val / test by skeleton."""
    mols = load_assigned(data, lr, nucleus)
    split = np.array([m.split for m in mols])
    rows = rows_from_assigned(mols, nucleus)
    rsplit = split[rows.mol_idx]
    return (mols, *(rows.subset(rsplit == s) for s in ("train", "val", "test")))


def unassigned_peaklists(data: Path, nucleus: str, lr: LoadReport, mols) -> list:
    """Peak lists of training-split molecules not among the assigned ones (for self-training labels)."""
    ids = {m.id for m in mols}
    return [p for p in load_peaklists(data, lr, nucleus) if p.split == "train" and p.id not in ids]


def literature_training_rows(data: Path, nucleus: str, weight: float, report: dict) -> RowSet | None:
    """Labels from the dev half's printed paragraphs (:mod:`training.literature_labels`), or None."""
    if weight <= 0:
        return None
    from training.literature_labels import literature_rows

    st: dict = {"weight": weight}
    rows = literature_rows(data, nucleus, weight=weight, stats=st)
    report["literature_labels"] = st
    log(f"{nucleus}: labels from printed paragraphs {st}")
    return rows


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--nucleus", choices=["13C", "1H"], default="13C")
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--out", type=Path, default=REPO / "models")
    ap.add_argument("--rounds", type=int, default=3)
    ap.add_argument("--pseudo-weight", type=float, default=1.0)
    ap.add_argument("--literature-weight", type=float, default=LITERATURE_WEIGHT,
                    help="weight of the labels read from the dev half's printed paragraphs (0: none)")
    args = ap.parse_args(argv)
    nucleus = args.nucleus
    np.random.seed(SEED)
    t0 = time.time()
    report: dict = {"seed": SEED, "nucleus": nucleus}
    lr = LoadReport()
    mols, train, val, test = assigned_splits(args.data, nucleus, lr)
    report["load"] = lr.counts
    report["rows"] = {"train": len(train), "val": len(val), "test": len(test)}
    log(f"{nucleus}: assigned rows train/val/test {len(train)}/{len(val)}/{len(test)}")

    lit = literature_training_rows(args.data, nucleus, args.literature_weight, report)
    train = RowSet.concat([train, lit])
    fit_report: dict = {}
    model, train_clean = fit_shift_model(train, fit_report, nucleus)
    fit_sigma(model, val)
    best_val = selection_mae(model, val)
    history = [{"round": 0, "train_rows": len(train_clean), "val_mae": best_val, **fit_report}]
    log(f"round 0 (assigned only): val MAE {best_val:.3f}")

    peakmols = unassigned_peaklists(args.data, nucleus, lr, mols)
    report["peaklist_candidates"] = len(peakmols)
    for rnd in range(1, args.rounds + 1):
        st: dict = {}
        pseudo = pseudo_label(model, peakmols, weight=args.pseudo_weight, stats=st)
        fr: dict = {}
        cand, cand_rows = fit_shift_model(RowSet.concat([train, pseudo]), fr, nucleus)
        fit_sigma(cand, val)
        v = selection_mae(cand, val)
        history.append({"round": rnd, "pseudo": st, "train_rows": len(cand_rows), "val_mae": v, **fr})
        log(f"round {rnd}: {st}; val MAE {v:.3f}")
        if v >= best_val:
            log("no improvement: keeping the previous model")
            break
        model, best_val = cand, v
    report["self_training"] = history

    report["uncertainty"] = fit_sigma(model, val)
    report["val"] = metrics(model, val, mols, "val")
    report["test"] = metrics(model, test, mols, "test")
    log(f"test MAE {headline(report, nucleus, 'test'):.3f}, 90% coverage {report['test']['coverage90']:.3f}")

    save_model(model, report, mols, args.out, args.data, nucleus, len(train_clean))
    report["seconds"] = round(time.time() - t0)
    write_report(report, nucleus)
    log(f"done in {report['seconds']} s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
