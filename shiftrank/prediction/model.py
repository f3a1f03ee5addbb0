"""Shift prediction for one nucleus: sphere-code tables + a gradient-boosted correction, with uncertainty.

One class serves both nuclei; a 13C model predicts each carbon, a 1H model the mean shift of the
protons on each heavy atom.  The model combines two things learned from NMRShiftDB2 data:

1. :class:`~shiftrank.prediction.sphere_tables.SphereTables` — median shift per sphere
   code (HOSE-style, Bremser 1978), looked up from the widest sphere down;
   for 13C also :class:`~shiftrank.prediction.ring_systems.RingTables` — shifts per position of
   the parent ring system, with the substituents stripped (members that read them are marked by
   their input width);
2. a ``HistGradientBoostingRegressor`` that predicts the shift from the
   carbon's shell descriptors plus those table statistics, and a second one
   that predicts the size of the error, scaled so that the stated 90 %
   interval (±1.645 σ) covers about 90 % of held-out atoms.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from rdkit import Chem

from .environment import MolEnvironments, environments, feature_names
from .ring_systems import KEY_NAMES, RingTables
from .sphere_tables import SphereTables, table_features, widest_match

Z90 = 1.6448536269514722
#: σ (ppm) of a shift taken from spectra of the same compound: solvent, concentration and
#: referencing differences between spectra of one compound are about this size (common practice)
EXACT_SIGMA = {"13C": 1.0, "1H": 0.1}


@dataclass
class AtomPrediction:
    """Predicted shift of one centre: a carbon (13C) or the protons on one heavy atom (1H)."""

    atom: int
    shift: float
    sigma: float
    sphere_radius: int        # widest sphere with a table match (0 = none)
    sphere_count: int         # training atoms behind that match
    whole_molecule: bool = False  # the match covers the whole molecule: the shift is the measured one
    configuration: float = 0.0    # ppm of E/Z increments in ``shift`` (:mod:`.configuration`)

    @property
    def interval90(self) -> tuple[float, float]:
        return (self.shift - Z90 * self.sigma, self.shift + Z90 * self.sigma)


@dataclass
class MolPrediction:
    """Predicted shifts of one molecule for one nucleus, keyed by heavy-atom index."""

    atoms: list[AtomPrediction] = field(default_factory=list)
    nucleus: str = "13C"
    notes: list[str] = field(default_factory=list)   # what standardisation did to the input
    #: (atom, atom, lower ppm, higher ppm) of alike groups cis and trans across a double bond that a drawing without
    #: coordinates leaves unassigned: both atoms carry the mean, the pair's two values are these
    cis_trans_pairs: list[tuple] = field(default_factory=list)

    @property
    def carbons(self) -> list[AtomPrediction]:
        """The 13C predictions (the same list as :attr:`atoms` for a 13C prediction)."""
        return self.atoms if self.nucleus == "13C" else []

    @property
    def shifts(self) -> dict[int, float]:
        return {c.atom: c.shift for c in self.atoms}

    @property
    def sigmas(self) -> dict[int, float]:
        return {c.atom: c.sigma for c in self.atoms}


class ShiftModel:
    """Sphere tables + boosted correction + error model.

    ``fit``-style training lives in ``training/``; this class only predicts.
    """

    def __init__(self, tables: SphereTables, regressor, sigma_regressor, sigma_scale: float = 1.0,
                 sigma_floor: float = 0.3, nucleus: str = "13C", ring_tables: RingTables | None = None):
        self.nucleus = nucleus
        self.tables = tables
        self.ring_tables = ring_tables
        self.regressor = regressor
        self.sigma_regressor = sigma_regressor
        self.sigma_scale = sigma_scale
        self.sigma_floor = sigma_floor
        #: ppm per E/Z role (:mod:`.configuration`), from the manifest; None: the stereo-blind estimate alone
        self.config_increments: np.ndarray | None = None

    @property
    def regressors(self) -> list:
        """The boosted members: one, or several whose mean is the estimate (an ensemble over seeds)."""
        return list(self.regressor) if isinstance(self.regressor, (list, tuple)) else [self.regressor]

    @property
    def sphere_width(self) -> int:
        """Columns of a design row up to the sphere-table statistics ([descriptors | sphere-table columns])."""
        return len(feature_names(self.nucleus)) + table_features(np.zeros((1, len(self.tables.keys_), 3), np.float32)).shape[1]

    def drop_unread_ring_tables(self) -> None:
        """Forget the ring tables when no member reads their columns, so they are neither computed nor saved."""
        if self.ring_tables is not None and all(m.n_features_in_ <= self.sphere_width for m in self.regressors):
            self.ring_tables = None

    def predict_mu(self, X: np.ndarray) -> np.ndarray:
        """The boosted estimate for design rows ``X``: the mean over the members."""
        members = self.regressors
        mu = members[0].predict(X)
        for m in members[1:]:
            mu = mu + m.predict(X)
        return mu / len(members)

    def design(self, env_feats: np.ndarray, codes: np.ndarray,
               ring_keys: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
        """Model input rows and the raw sphere-lookup statistics for centres given by descriptors, sphere
        codes and (when the model has ring tables) ring-system keys.

        A row is [descriptors | sphere-table columns | ring-table columns]; each member reads the
        leading columns it was trained on (descriptors only, up to the sphere columns, or all)."""
        stats = self.tables.lookup(codes)
        blocks = [env_feats, table_features(stats)]
        if self.ring_tables is not None:
            if ring_keys is None:
                ring_keys = np.zeros((len(env_feats), len(KEY_NAMES)), np.uint32)
            blocks.append(self.ring_tables.features(ring_keys))
        return np.hstack(blocks), stats

    def predict_arrays(self, env_feats: np.ndarray, codes: np.ndarray, eccentricity: np.ndarray | None = None,
                       ring_keys: np.ndarray | None = None):
        """Shift, sigma, widest radius and its count for rows of carbons.

        Where ``eccentricity`` is given and the widest sphere match reaches past every atom of the
        molecule (all MAX_RADIUS spheres matched, no atom farther than MAX_RADIUS - 1 bonds), the
        compound itself is in the training data: the measured median is returned instead of the
        model's estimate, with the spread between its spectra (at least EXACT_SIGMA) as σ.
        """
        if len(env_feats) == 0:
            z = np.zeros(0)
            return z, z, z.astype(int), z.astype(int)
        X, stats = self.design(env_feats, codes, ring_keys)
        # identical rows (symmetry-equivalent carbons, shared parts of isomers) are predicted once
        rows = np.ascontiguousarray(X).view(np.dtype((np.void, X.dtype.itemsize * X.shape[1]))).ravel()
        _, first, back = np.unique(rows, return_index=True, return_inverse=True)
        mu_u, sigma_u = self._trees(X[first])
        mu = mu_u[back]
        sigma = np.maximum(sigma_u[back] * self.sigma_scale, self.sigma_floor)
        _, radius = widest_match(stats)
        count = np.where(radius > 0, stats[np.arange(len(radius)), np.maximum(radius - 1, 0), 2], 0).astype(int)
        if eccentricity is not None:
            R = stats.shape[1]
            whole = (radius == R) & (np.asarray(eccentricity) <= R - 1)
            if whole.any():
                mu = np.where(whole, stats[:, R - 1, 0], mu)
                floor = EXACT_SIGMA[self.nucleus]
                spread = np.nan_to_num(stats[:, R - 1, 1], nan=floor)
                sigma = np.where(whole, np.maximum(spread, floor), sigma)
                radius = np.where(whole, R + 1, radius)  # R + 1 marks "whole molecule"
        return mu, sigma, radius, count

    def _trees(self, X: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Boosted estimate and raw error estimate of design rows ``X``."""
        # column-major input: the tree walk reads one feature across many rows, 2-3x faster than row-major
        Xu = np.asfortranarray(X, dtype=np.float64)
        mu = self.predict_mu(Xu)
        return mu, self.sigma_regressor.predict(np.asfortranarray(np.hstack([Xu, mu[:, None]])))

    def predict_env_arrays(self, envs: list[MolEnvironments]):
        """:meth:`predict_arrays` for the carbons of many molecules, in order, in one model call."""
        return self.env_arrays(envs)[:4]

    def env_arrays(self, envs: list[MolEnvironments]):
        """:meth:`predict_env_arrays` and the E/Z part of the shifts in it (None when none applies), so that a
        caller can say which atoms carry it."""
        keys = np.vstack([e.ring_keys for e in envs]) if self.ring_tables is not None else None
        mu, sigma, radius, count = self.predict_arrays(np.vstack([e.features for e in envs]), np.vstack([e.codes for e in envs]),
                                                       np.concatenate([e.eccentricity for e in envs]), keys)
        if any(e.offsets is not None for e in envs):   # isotope shifts of labelled carbons
            mu = mu + np.concatenate([e.offsets if e.offsets is not None else np.zeros(len(e.centres)) for e in envs])
        ez = self.configuration_shifts(envs, radius)
        if ez is not None:
            mu = mu + ez
        return mu, sigma, radius, count, ez

    def configuration_shifts(self, envs: list[MolEnvironments], radius: np.ndarray) -> np.ndarray | None:
        """ppm of E/Z increments for the centres of ``envs`` in order (None when none applies); not where the
        whole compound was matched (``radius`` beyond the widest sphere): its measured value is of whichever
        configuration the data hold, and the sphere codes cannot tell which."""
        inc = self.config_increments
        if inc is None or all(e.config is None for e in envs):
            return None
        roles = np.vstack([e.config if e.config is not None else np.zeros((len(e.centres), len(inc))) for e in envs])
        return np.where(radius > envs[0].codes.shape[1], 0.0, roles @ inc)

    def predict_envs(self, envs: list[MolEnvironments]) -> list[MolPrediction]:
        """Predict many molecules in one model call (fast path for batches)."""
        if not envs:
            return []
        mu, sigma, radius, count, ez = self.env_arrays(envs)
        R = envs[0].codes.shape[1]
        # (float32 arithmetic: 120.69999694824219 is 120.7 to the model's precision; four decimals are shown)
        rows = zip(np.concatenate([e.centres for e in envs]).tolist(), np.round(mu.astype(np.float64), 4).tolist(),
                   np.round(np.asarray(sigma, dtype=np.float64), 4).tolist(),
                   np.minimum(radius, R).tolist(), count.tolist(), (radius > R).tolist())
        atoms = [AtomPrediction(*row) for row in rows]
        if ez is not None:
            for i in np.flatnonzero(ez):
                atoms[i].configuration = round(float(ez[i]), 4)
        out, k = [], 0
        for e in envs:
            n = len(e.centres)
            out.append(MolPrediction(atoms[k:k + n], self.nucleus))
            k += n
        return out

    def predict_mol(self, mol: Chem.Mol, solvent: str | None = None) -> MolPrediction:
        """Predict every centre of an RDKit molecule (hydrogens implicit)."""
        # a copy: descriptors add atom properties
        return self.predict_envs([environments(Chem.Mol(mol), solvent, self.nucleus)])[0]
