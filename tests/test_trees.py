"""The flat-array tree evaluator against scikit-learn's own HistGradientBoostingRegressor.predict
(the reference library): same numbers, bit for bit, on data with missing values; and a damaged tree
file is refused instead of walked."""
from __future__ import annotations

import numpy as np
import pytest
from sklearn.ensemble import HistGradientBoostingRegressor

from shiftrank.prediction.model_files import default_model
from shiftrank.prediction.trees import Forest


@pytest.fixture(scope="module")
def fitted():
    rng = np.random.default_rng(3)
    X = rng.normal(size=(3000, 12))
    X[rng.random(X.shape) < 0.05] = np.nan          # missing values take their learned side
    y = np.nan_to_num(X[:, 0]) * 3 + np.sin(np.nan_to_num(X[:, 1])) + rng.normal(scale=0.1, size=3000)
    reg = HistGradientBoostingRegressor(max_iter=60, max_leaf_nodes=31, random_state=0).fit(X, y)
    Xt = rng.normal(size=(5000, 12))
    Xt[rng.random(Xt.shape) < 0.05] = np.nan
    return reg, Xt


def test_forest_equals_sklearn_bit_for_bit(fitted):
    reg, Xt = fitted
    forest = Forest.of(reg)
    assert np.array_equal(forest.predict(Xt), reg.predict(Xt))
    # row-major input and a round trip through the stored arrays give the same numbers
    again = Forest.from_arrays(forest.to_arrays("m0_"), "m0_")
    assert np.array_equal(again.predict(np.ascontiguousarray(Xt)), reg.predict(Xt))


def test_damaged_arrays_are_refused(fitted):
    reg, _ = fitted
    arrays = Forest.of(reg).to_arrays("m0_")
    inner = np.flatnonzero(~arrays["m0_leaf"])[0]
    arrays["m0_left"] = arrays["m0_left"].copy()
    arrays["m0_left"][inner] = 0                      # a child pointing back at the root: an endless walk
    with pytest.raises(ValueError, match="inconsistent"):
        Forest.from_arrays(arrays, "m0_")


def test_wrong_width_is_refused(fitted):
    reg, Xt = fitted
    with pytest.raises(ValueError, match="at least 12 features"):
        Forest.of(reg).predict(Xt[:, :5])


def test_forest_of_leading_columns_reads_wider_rows(fitted):
    """A member fitted on the descriptors alone sits beside members that also see the table statistics
    appended after them: it reads the leading columns of the wider rows, exactly as scikit-learn reads
    the narrow ones."""
    _, Xt = fitted
    rng = np.random.default_rng(5)
    X = rng.normal(size=(2000, 7))
    narrow = HistGradientBoostingRegressor(max_iter=40, random_state=0).fit(X, X[:, 0] - 2 * X[:, 3])
    wide = np.hstack([Xt[:, :7], rng.normal(size=(len(Xt), 20))])   # descriptors, then other columns
    assert np.array_equal(Forest.of(narrow).predict(wide), narrow.predict(Xt[:, :7]))


def test_shipped_models_are_flat_forests():
    for nucleus in ("13C", "1H"):
        m = default_model(nucleus)
        assert all(isinstance(r, Forest) for r in m.regressors) and isinstance(m.sigma_regressor, Forest)
        # four members averaged: two read the descriptors alone, two the descriptors and the sphere-table
        # statistics (1H) or those and the ring-system tables' statistics after them (13C, model set 1.9.0)
        widths = sorted(r.n_features_in_ for r in m.regressors)
        assert len(widths) == 4 and widths[0] == widths[1] < widths[2] == widths[3]
        assert (m.ring_tables is not None) == (nucleus == "13C")

