"""Quick comparison of predictor variants on the validation split (development aid)."""
import sys
import time

import numpy as np
from sklearn.ensemble import HistGradientBoostingRegressor

from shiftrank.sphere_tables import SphereTables, table_features, widest_match
from training.data import load_assigned
from training.features import oof_table_features, rows_from_assigned

t0 = time.time()
mols = load_assigned()
split = np.array([m.split for m in mols])
rows = rows_from_assigned(mols)
rs = split[rows.mol_idx]
tr, va = rows.subset(rs == "train"), rows.subset(rs == "val")
print("rows", len(tr), len(va), f"{time.time()-t0:.0f}s")
tab = SphereTables().fit(tr.codes, tr.y)
vstats = tab.lookup(va.codes)
pred, rad = widest_match(vstats)
print("table widest-match val MAE", np.nanmean(np.abs(pred - va.y)), "coverage", np.mean(~np.isnan(pred)))
Xtr = np.hstack([tr.feats, oof_table_features(tr)])
Xva = np.hstack([va.feats, table_features(vstats)])
for loss in sys.argv[1:] or ["absolute_error", "squared_error"]:
    t = time.time()
    m = HistGradientBoostingRegressor(loss=loss, max_iter=800, learning_rate=0.08, max_leaf_nodes=63,
                                      min_samples_leaf=10, l2_regularization=1.0, random_state=0)
    m.fit(Xtr, tr.y)
    p = m.predict(Xva)
    print(loss, "val MAE", np.mean(np.abs(p - va.y)), f"{time.time()-t:.0f}s")
    m2 = HistGradientBoostingRegressor(loss=loss, max_iter=800, learning_rate=0.08, max_leaf_nodes=63,
                                       min_samples_leaf=10, l2_regularization=1.0, random_state=0)
    m2.fit(tr.feats, tr.y)
    print(loss, "no-table val MAE", np.mean(np.abs(m2.predict(va.feats) - va.y)))
