"""Boosted regression trees as flat arrays, evaluated by a compiled loop (numba).

Training fits scikit-learn's ``HistGradientBoostingRegressor``; the shipped model stores each fitted
ensemble as plain numpy arrays (no pickle) and predicts with :func:`_walk`, which gives the same
numbers as scikit-learn's own ``predict`` (same comparisons, same summation order: baseline first,
then the trees in order) at about twice the speed on one core: rows are taken in blocks, so one
tree's nodes stay in cache while a block of rows walks it.
"""
from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

import numba
import numpy as np

#: rows per block: a block of column-major rows and one tree's nodes stay in cache together
BLOCK = 2048

#: numba keeps the compiled loop beside this file (or in the user's cache); only where it can write
_CACHE = os.access(Path(__file__).parent, os.W_OK) or os.access(Path.home(), os.W_OK)

ARRAYS = ("offsets", "feature", "threshold", "left", "right", "leaf", "missing_left", "value")


@numba.njit(cache=_CACHE, nogil=True)
def _walk(X, offsets, feature, threshold, left, right, leaf, missing_left, value, baseline, block):  # pragma: no cover
    n = X.shape[0]
    out = np.full(n, baseline)
    for b0 in range(0, n, block):
        b1 = min(n, b0 + block)
        for t in range(offsets.shape[0]):
            o = offsets[t]
            for i in range(b0, b1):
                k = o
                while not leaf[k]:
                    x = X[i, feature[k]]
                    if x <= threshold[k]:
                        k = o + left[k]
                    elif np.isnan(x):
                        k = o + (left[k] if missing_left[k] else right[k])
                    else:
                        k = o + right[k]
                out[i] += value[k]
    return out


@dataclass
class Forest:
    """One boosted ensemble: the nodes of all its trees concatenated, ``offsets[t]`` = first node of tree t.

    ``left``/``right`` are node numbers within their own tree (as scikit-learn stores them).
    """

    offsets: np.ndarray
    feature: np.ndarray
    threshold: np.ndarray
    left: np.ndarray
    right: np.ndarray
    leaf: np.ndarray
    missing_left: np.ndarray
    value: np.ndarray
    baseline: float
    n_features_in_: int

    @classmethod
    def of(cls, regressor) -> "Forest":
        """A fitted ``HistGradientBoostingRegressor`` (squared or absolute error, numeric features) as a Forest."""
        if isinstance(regressor, Forest):
            return regressor
        trees = [it[0] for it in regressor._predictors]  # one tree per iteration for a regressor
        if any(t.nodes["is_categorical"].any() for t in trees):
            raise ValueError("categorical splits are not supported by the flat tree format")
        if regressor.loss not in ("squared_error", "absolute_error"):
            raise ValueError(f"loss {regressor.loss!r}: only identity-link losses are supported")
        nodes = np.concatenate([t.nodes for t in trees])
        sizes = np.array([len(t.nodes) for t in trees], dtype=np.int64)
        return cls(offsets=np.concatenate([[0], np.cumsum(sizes)[:-1]]).astype(np.int64),
                   feature=nodes["feature_idx"].astype(np.int32), threshold=nodes["num_threshold"].astype(np.float64),
                   left=nodes["left"].astype(np.int32), right=nodes["right"].astype(np.int32),
                   leaf=nodes["is_leaf"].astype(np.bool_), missing_left=nodes["missing_go_to_left"].astype(np.bool_),
                   value=nodes["value"].astype(np.float64),
                   baseline=float(np.ravel(regressor._baseline_prediction)[0]),
                   n_features_in_=int(regressor.n_features_in_))

    def to_arrays(self, prefix: str) -> dict[str, np.ndarray]:
        out = {f"{prefix}{k}": getattr(self, k) for k in ARRAYS}
        out[f"{prefix}scalars"] = np.array([self.baseline, self.n_features_in_], dtype=np.float64)
        return out

    @classmethod
    def from_arrays(cls, arrays, prefix: str) -> "Forest":
        baseline, n_features = arrays[f"{prefix}scalars"]
        forest = cls(**{k: np.ascontiguousarray(arrays[f"{prefix}{k}"]) for k in ARRAYS},
                     baseline=float(baseline), n_features_in_=int(n_features))
        forest.check()
        return forest

    def check(self) -> None:
        """Structural sanity of the arrays (indices in range), so the compiled loop cannot read out of bounds."""
        n = len(self.feature)
        if not all(len(getattr(self, k)) == n for k in ARRAYS[1:]):
            raise ValueError("tree arrays differ in length")
        ends = np.append(self.offsets[1:], n)
        size = np.repeat(ends - self.offsets, ends - self.offsets)
        inner = ~self.leaf
        local = np.arange(n) - np.repeat(self.offsets, ends - self.offsets)
        if (len(self.offsets) == 0 or self.offsets[0] != 0 or np.any(np.diff(self.offsets) <= 0)
                or np.any(self.feature[inner] < 0) or np.any(self.feature[inner] >= self.n_features_in_)
                # children come after their parent: every walk ends at a leaf
                or np.any((self.left[inner] <= local[inner]) | (self.left[inner] >= size[inner]))
                or np.any((self.right[inner] <= local[inner]) | (self.right[inner] >= size[inner]))):
            raise ValueError("tree arrays are inconsistent (node or feature index out of range)")

    def predict(self, X: np.ndarray) -> np.ndarray:
        X = np.asfortranarray(X, dtype=np.float64)
        # a forest fitted on the leading columns only (a member that sees the descriptors without the
        # table statistics appended after them) reads those columns of the full design rows
        if X.ndim != 2 or X.shape[1] < self.n_features_in_:
            raise ValueError(f"expected rows of at least {self.n_features_in_} features, got shape {X.shape}")
        return _walk(X, self.offsets, self.feature, self.threshold, self.left, self.right, self.leaf,
                     self.missing_left, self.value, self.baseline, BLOCK)
