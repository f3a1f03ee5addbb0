"""Feature matrices for training: environments of every labelled carbon, out-of-fold table statistics."""
from __future__ import annotations

import hashlib

import numpy as np

from shiftrank.prediction.environment import environments_of, mol_parts
from shiftrank.prediction.ring_systems import KEY_NAMES, RingTables
from shiftrank.prediction.sphere_tables import SphereTables, table_features

N_FOLDS = 5


def fold_of(skel: str) -> int:
    return int(hashlib.sha256(f"fold:{skel}".encode()).hexdigest()[:8], 16) % N_FOLDS


class RowSet:
    """Rows of labelled carbons: codes, descriptors, targets and bookkeeping arrays."""

    def __init__(self, codes, feats, y, mol_idx, atom_idx, fold, weight=None, rkeys=None):
        self.codes, self.feats, self.y = codes, feats, y
        self.mol_idx, self.atom_idx, self.fold = mol_idx, atom_idx, fold
        self.weight = np.ones(len(y), np.float32) if weight is None else weight
        # ring-system keys (shiftrank.prediction.ring_systems; zeros where not computed, e.g. 1H)
        self.rkeys = np.zeros((len(y), len(KEY_NAMES)), np.uint32) if rkeys is None else np.asarray(rkeys, np.uint32)

    def __len__(self):
        return len(self.y)

    @classmethod
    def concat(cls, parts):
        parts = [p for p in parts if p is not None and len(p)]   # None: no rows of that kind
        return cls(*(np.concatenate([getattr(p, k) for p in parts]) for k in
                     ("codes", "feats", "y", "mol_idx", "atom_idx", "fold", "weight", "rkeys")))

    def subset(self, mask):
        return RowSet(self.codes[mask], self.feats[mask], self.y[mask], self.mol_idx[mask],
                      self.atom_idx[mask], self.fold[mask], self.weight[mask], self.rkeys[mask])


def rows_from_assigned(mols, nucleus: str = "13C") -> RowSet:
    """One row per assigned centre (carbon for 13C, H-bearing heavy atom for 1H)."""
    codes, feats, ys, mi, ai, fo, rk = [], [], [], [], [], [], []
    envs = []
    for start in range(0, len(mols), 2000):
        envs.extend(environments_of([mol_parts(m.mol, m.solvent, nucleus) for m in mols[start:start + 2000]]))
    for i, (m, env) in enumerate(zip(mols, envs)):
        pos = {int(a): k for k, a in enumerate(env.centres)}
        for atom, shift in m.shifts.items():
            k = pos[atom]
            codes.append(env.codes[k]); feats.append(env.features[k]); ys.append(shift)
            mi.append(i); ai.append(atom); fo.append(fold_of(m.skeleton)); rk.append(env.ring_keys[k])
    return RowSet(np.array(codes, np.uint32), np.array(feats, np.float32), np.array(ys, np.float32),
                  np.array(mi), np.array(ai), np.array(fo), rkeys=np.array(rk, np.uint32).reshape(-1, len(KEY_NAMES)))


def oof_table_stats(train: RowSet) -> np.ndarray:
    """Lookup statistics (n, R, 3) of training rows from tables built without their own fold."""
    out = None
    for f in range(N_FOLDS):
        held = train.fold == f
        t = SphereTables().fit(train.codes[~held], train.y[~held])
        stats = t.lookup(train.codes[held])
        if out is None:
            out = np.zeros((len(train),) + stats.shape[1:], np.float32)
        out[held] = stats
    return out


def oof_ring_features(train: RowSet) -> np.ndarray:
    """Ring-table columns of training rows from ring tables built without their own fold."""
    out = np.zeros((len(train), RingTables.WIDTH), np.float32)
    for f in range(N_FOLDS):
        held = train.fold == f
        t = RingTables().fit(train.rkeys[~held], train.y[~held], train.feats[~held, 0])
        out[held] = t.features(train.rkeys[held])
    return out


def oof_table_features(train: RowSet) -> np.ndarray:
    """Table features of training rows from tables built without their own fold."""
    return table_features(oof_table_stats(train))


def masked_copies(stats: np.ndarray, fraction: float, seed: int) -> tuple[np.ndarray, np.ndarray]:
    """Indices of a random ``fraction`` of rows and their table statistics with spheres from a random
    radius k ∈ {1, 2, 3} outwards hidden, as for a carbon whose wider surroundings were never seen
    (tiny molecules, new scaffolds): teaches the model to lean on its descriptors there."""
    rng = np.random.default_rng(seed)
    idx = np.flatnonzero(rng.random(len(stats)) < fraction)
    masked = stats[idx].copy()
    k = rng.integers(0, 3, size=len(idx))
    for r in range(stats.shape[1]):
        hide = r >= k
        masked[hide, r, :2] = np.nan
        masked[hide, r, 2] = 0.0
    return idx, masked
