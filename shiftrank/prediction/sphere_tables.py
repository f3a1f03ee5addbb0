"""Shift statistics per sphere code (HOSE-style lookup tables).

For every radius r = 1 … R the table holds, per sphere code seen in training,
the median shift, a robust spread (1.4826 × MAD) and the number of training
carbons.  Lookup is vectorised (sorted keys + ``numpy.searchsorted``) and falls
back from the widest matching sphere to narrower ones.
"""
from __future__ import annotations

import numpy as np

STATS = 3  # median, spread, count


class SphereTables:
    """Per-radius tables of shift statistics keyed by sphere code.

    >>> t = SphereTables().fit(np.array([[1, 10], [1, 10], [1, 11]], np.uint32), np.array([20.0, 22.0, 30.0]))
    >>> float(t.lookup(np.array([[1, 10]], np.uint32))[0, 1, 0])
    21.0
    """

    def __init__(self, min_count: int = 1):
        self.min_count = min_count

    def fit(self, codes: np.ndarray, shifts: np.ndarray) -> "SphereTables":
        codes = np.asarray(codes, dtype=np.uint32)
        shifts = np.asarray(shifts, dtype=np.float64)
        self.keys_, self.stats_ = [], []
        for r in range(codes.shape[1]):
            k = codes[:, r]
            order = np.lexsort((shifts, k))
            ks, vs = k[order], shifts[order]
            uniq, start, count = np.unique(ks, return_index=True, return_counts=True)
            med = _group_median(vs, start, count)
            absdev = np.abs(vs - np.repeat(med, count))
            order2 = np.lexsort((absdev, np.repeat(np.arange(len(uniq)), count)))
            mad = _group_median(absdev[order2], start, count)
            spread = np.where(count > 2, 1.4826 * mad, np.nan)
            keep = count >= self.min_count
            self.keys_.append(uniq[keep])
            self.stats_.append(np.stack([med[keep], spread[keep], count[keep]], axis=1).astype(np.float32))
        return self

    def lookup(self, codes: np.ndarray) -> np.ndarray:
        """(n, R, 3) array of median, spread, count; NaN median and 0 count where a code is unseen."""
        codes = np.asarray(codes, dtype=np.uint32)
        n, R = codes.shape
        out = np.full((n, R, STATS), np.nan, np.float32)
        out[:, :, 2] = 0.0
        for r in range(min(R, len(self.keys_))):
            keys = self.keys_[r]
            if len(keys) == 0:
                continue
            pos = np.searchsorted(keys, codes[:, r])
            pos = np.minimum(pos, len(keys) - 1)
            hit = keys[pos] == codes[:, r]
            out[hit, r, :] = self.stats_[r][pos[hit]]
        return out

    def to_arrays(self) -> dict:
        d = {"min_count": np.array(self.min_count)}
        for r, (k, s) in enumerate(zip(self.keys_, self.stats_)):
            d[f"keys_{r}"] = k
            d[f"stats_{r}"] = s
        return d

    @classmethod
    def from_arrays(cls, d) -> "SphereTables":
        t = cls(int(d["min_count"]))
        R = sum(1 for name in d if str(name).startswith("keys_"))
        t.keys_ = [np.asarray(d[f"keys_{r}"]) for r in range(R)]
        t.stats_ = [np.asarray(d[f"stats_{r}"]) for r in range(R)]
        return t


def _group_median(sorted_values: np.ndarray, start: np.ndarray, count: np.ndarray) -> np.ndarray:
    """Median of each contiguous, already sorted group."""
    lo = sorted_values[start + (count - 1) // 2]
    hi = sorted_values[start + count // 2]
    return (lo + hi) / 2.0


def widest_match(stats: np.ndarray, min_count: int = 1) -> tuple[np.ndarray, np.ndarray]:
    """Median of the widest sphere seen at least ``min_count`` times, and that radius (0 = none)."""
    n, R, _ = stats.shape
    pred = np.full(n, np.nan, np.float32)
    radius = np.zeros(n, np.int32)
    for r in range(R):
        ok = stats[:, r, 2] >= min_count
        pred[ok] = stats[ok, r, 0]
        radius[ok] = r + 1
    return pred, radius


def table_features(stats: np.ndarray) -> np.ndarray:
    """Flatten lookup statistics into model features: per radius median, spread, log(1+count), plus widest match."""
    n, R, _ = stats.shape
    f = stats.copy()
    f[:, :, 2] = np.log1p(f[:, :, 2])
    pred, radius = widest_match(stats)
    return np.hstack([f.reshape(n, R * 3), pred[:, None], radius[:, None].astype(np.float32)])
