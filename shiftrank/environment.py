"""Atom environments for 13C prediction.

Two descriptions of each carbon's surroundings, both computed per molecule
in one pass so that prediction stays fast:

* **sphere codes** in the spirit of HOSE codes (Bremser 1978, Anal. Chim. Acta
  103, 355): a canonical identifier of the atoms and bonds within 1, 2, … R bonds
  of the carbon (element, H count, charge, ring membership, bond order and
  aromaticity), computed by RDKit's circular-environment generator with
  redundant environments kept, so every carbon has one code per radius;
* **shell counts**: for distance d = 1 … D, how many atoms of each type lie d
  bonds away, plus a description of the carbon itself (H count, hybridisation,
  ring sizes, charge, neighbouring bond orders).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from rdkit import Chem
from rdkit.Chem import rdFingerprintGenerator, rdPartialCharges

MAX_RADIUS = 6
SHELLS = 6

_GEN = rdFingerprintGenerator.GetMorganGenerator(radius=MAX_RADIUS, includeRedundantEnvironments=True)

# Atom types counted in each shell.
_TYPES = [
    "C3", "C2", "Car", "C1", "C=O",          # carbon sp3, sp2 (non-aromatic), aromatic, sp, carbonyl carbon
    "N3", "N2", "Nar", "N1", "N+",           # nitrogen sp3/amide, sp2, aromatic, sp, positively charged
    "O3", "O2", "Oar", "O-",                 # oxygen sp3, sp2 (C=O), aromatic (furan), negative
    "S", "Sox", "P", "F", "Cl", "Br", "I", "Si", "B", "Se", "other",
    "H",                                     # hydrogens attached to atoms in the shell
]
_TIDX = {t: i for i, t in enumerate(_TYPES)}
_NT = len(_TYPES)
_HYB = {Chem.HybridizationType.SP: 1, Chem.HybridizationType.SP2: 2, Chem.HybridizationType.SP3: 3}
_SOLVENT_CODE = {"CDCl3": 1, "DMSO-d6": 2, "CD3OD": 3}


def _ring_sizes(mol: Chem.Mol) -> list[set[int]]:
    sizes: list[set[int]] = [set() for _ in range(mol.GetNumAtoms())]
    for ring in mol.GetRingInfo().AtomRings():
        for i in ring:
            sizes[i].add(len(ring))
    return sizes


#: Names of the shell/self descriptor columns, in order.
SELF_NAMES = ["nH", "hyb", "aromatic", "in_ring", "ring3", "ring4", "ring5", "ring6", "ring7p", "charge",
              "degree", "n_single", "n_double", "n_triple", "n_arom", "solvent", "n_rings",
              "q_self", "q_h", "q_nb_sum", "q_nb_min", "q_nb_max", "q_d2_sum", "q_d3_sum"]
CONJ_DEPTH = 5
_CONJ_EL = {7: 0, 8: 1, 6: 2, 16: 3, 9: 4, 17: 4, 35: 4, 53: 4}
#: Atoms reached through conjugated bonds only, by element, at conjugated distance 1..CONJ_DEPTH,
#: plus their summed Gasteiger charge: carries push-pull (donor/acceptor) effects along π systems.
CONJ_NAMES = [f"conj{d}_{e}" for d in range(1, CONJ_DEPTH + 1) for e in ("N", "O", "C", "S", "X", "other", "q")]
_BOND_KINDS = {Chem.BondType.SINGLE: 0, Chem.BondType.DOUBLE: 1, Chem.BondType.TRIPLE: 2, Chem.BondType.AROMATIC: 3}
_NB_ELEMENTS = {"C": 0, "N": 1, "O": 2, "S": 3, "F": 4, "Cl": 5, "Br": 6, "I": 7, "P": 8}
#: Bond-typed first neighbours: (single, double, triple, aromatic) x (C, N, O, S, F, Cl, Br, I, P, other)
NEIGHBOUR_NAMES = [f"nb_{b}_{e}" for b in ("single", "double", "triple", "arom") for e in list(_NB_ELEMENTS) + ["other"]]
SHELL_NAMES = [f"d{d}_{t}" for d in range(1, SHELLS + 1) for t in _TYPES]
FEATURE_NAMES = SELF_NAMES + NEIGHBOUR_NAMES + CONJ_NAMES + SHELL_NAMES


def _gasteiger(mol: Chem.Mol) -> tuple[np.ndarray, np.ndarray]:
    """Gasteiger partial charges of heavy atoms and of their implicit H (Gasteiger & Marsili 1980)."""
    m = Chem.Mol(mol)
    n = m.GetNumAtoms()
    try:
        rdPartialCharges.ComputeGasteigerCharges(m)
        pairs = [(a.GetDoubleProp("_GasteigerCharge"),
                  a.GetDoubleProp("_GasteigerHCharge") if a.HasProp("_GasteigerHCharge") else 0.0) for a in m.GetAtoms()]
        q, qh = (np.array(col) for col in zip(*pairs))
    except (RuntimeError, ValueError, KeyError):
        q, qh = np.zeros(n), np.zeros(n)
    q = np.clip(np.nan_to_num(q, nan=0.0, posinf=0.0, neginf=0.0), -2.0, 2.0)
    qh = np.clip(np.nan_to_num(qh, nan=0.0, posinf=0.0, neginf=0.0), -2.0, 2.0)
    return q, qh


def _bfs_depths(adj: np.ndarray, rows: np.ndarray, depth: int) -> np.ndarray:
    """Path lengths from atoms ``rows`` over the graph ``adj``, up to ``depth`` (0 beyond or unreached)."""
    n = adj.shape[0]
    dist = np.zeros((len(rows), n), dtype=np.int8)
    frontier = np.zeros((len(rows), n), dtype=np.float32)
    frontier[np.arange(len(rows)), rows] = 1.0
    reached = frontier > 0
    for d in range(1, depth + 1):
        frontier = ((frontier @ adj) > 0) & ~reached
        if not frontier.any():
            break
        dist[frontier] = d
        reached |= frontier
        frontier = frontier.astype(np.float32)
    return dist


@dataclass
class MolEnvironments:
    """Per-carbon environment data of one molecule."""

    carbons: np.ndarray     # heavy-atom indices of the carbons
    codes: np.ndarray       # (n_carbons, MAX_RADIUS) uint32 sphere codes for radius 1..MAX_RADIUS
    features: np.ndarray    # (n_carbons, len(FEATURE_NAMES)) float32


def _atom_types(Z, arom, hyb, chg, deg_tot, dbl_to_os, has_dbl) -> list[str]:
    """Shell atom types (see ``_TYPES``) from per-atom arrays: element, aromaticity, hybridisation,
    charge, total degree, a double bond to O/S, any double bond."""
    out = []
    for z, ar, hy, ch, dt, dos, hd in zip(Z, arom, hyb, chg, deg_tot, dbl_to_os, has_dbl):
        if z == 6:
            t = "Car" if ar else "C1" if hy == 1 else ("C=O" if dos else "C2") if hy == 2 else "C3"
        elif z == 7:
            t = "N+" if ch > 0 else "Nar" if ar else "N1" if hy == 1 else "N2" if hd else "N3"
        elif z == 8:
            t = "O-" if ch < 0 else "Oar" if ar else "O2" if hd else "O3"
        elif z == 16:
            t = "Sox" if dt > 2 or ch else "S"
        else:
            t = _Z_TYPE.get(z, "other")
        out.append(t)
    return out


_Z_TYPE = {1: "H", 9: "F", 17: "Cl", 35: "Br", 53: "I", 14: "Si", 5: "B", 34: "Se", 15: "P"}
_NB_Z = {6: 0, 7: 1, 8: 2, 16: 3, 9: 4, 17: 5, 35: 6, 53: 7, 15: 8}


def environments(mol: Chem.Mol, solvent: str | None = None) -> MolEnvironments:
    """Sphere codes and shell descriptors for every carbon of ``mol`` (hydrogens implicit).

    >>> env = environments(Chem.MolFromSmiles("CC#N"))
    >>> env.carbons.tolist(), env.codes.shape
    ([0, 1], (2, 6))
    """
    n = mol.GetNumAtoms()
    ao = rdFingerprintGenerator.AdditionalOutput()
    ao.AllocateAtomToBits()
    _GEN.GetSparseCountFingerprint(mol, additionalOutput=ao)
    atom_bits = ao.GetAtomToBits()

    # one pass over atoms and one over bonds; everything else is array arithmetic
    info = [(a.GetAtomicNum(), a.GetIsAromatic(), _HYB.get(a.GetHybridization(), 0), a.GetFormalCharge(),
             a.GetDegree(), a.GetTotalNumHs(), a.IsInRing()) for a in mol.GetAtoms()]
    Z, arom, hyb, chg, deg, nH, inring = (np.array(col) for col in zip(*info))
    bonds = [(b.GetBeginAtomIdx(), b.GetEndAtomIdx(), _BOND_KINDS.get(b.GetBondType(), 0),
              b.GetIsConjugated() or b.GetIsAromatic()) for b in mol.GetBonds()]
    bi, bj, bk, bc = (np.array(col, dtype=np.int64) for col in zip(*bonds)) if bonds else (np.zeros(0, np.int64),) * 4
    ends = np.concatenate([bi, bj])
    others = np.concatenate([bj, bi])
    kinds = np.concatenate([bk, bk])
    is_dbl = kinds == 1
    has_dbl = np.zeros(n, bool)
    has_dbl[ends[is_dbl]] = True
    dbl_to_os = np.zeros(n, bool)
    dbl_to_os[ends[is_dbl & np.isin(Z[others], (8, 16))]] = True

    carbons = np.flatnonzero(Z == 6).astype(np.int64)
    nc = len(carbons)
    onehot = np.zeros((n, _NT), dtype=np.float32)
    onehot[np.arange(n), [_TIDX[t] for t in _atom_types(Z, arom, hyb, chg, deg + nH, dbl_to_os, has_dbl)]] = 1.0
    onehot[:, _TIDX["H"]] = nH
    dist = Chem.GetDistanceMatrix(mol)[carbons]  # (nc, n)
    shells = [((dist == d).astype(np.float32) @ onehot) for d in range(1, SHELLS + 1)]
    q, qh = _gasteiger(mol)
    q_shell = [(dist == d).astype(np.float32) @ q for d in (1, 2, 3)]
    conj_onehot = np.zeros((n, 7), dtype=np.float32)
    conj_onehot[np.arange(n), [_CONJ_EL.get(int(z), 5) for z in Z]] = 1.0
    conj_onehot[:, 6] = q
    adj = np.zeros((n, n), dtype=np.float32)
    cb = bc.astype(bool)
    adj[bi[cb], bj[cb]] = adj[bj[cb], bi[cb]] = 1.0
    cdist = _bfs_depths(adj, carbons, CONJ_DEPTH)
    conj = [((cdist == d).astype(np.float32) @ conj_onehot) for d in range(1, CONJ_DEPTH + 1)]

    # per-atom bond counts by kind and bond-typed neighbour counts
    n_el = len(_NB_ELEMENTS) + 1
    bond_counts = np.zeros((n, 4), np.float32)
    np.add.at(bond_counts, (ends, kinds), 1.0)
    nb_all = np.zeros((n, 4 * n_el), np.float32)
    np.add.at(nb_all, (ends, kinds * n_el + np.array([_NB_Z.get(int(z), n_el - 1) for z in Z[others]], dtype=np.int64)), 1.0)
    q_nb_min = np.full(n, np.inf)
    q_nb_max = np.full(n, -np.inf)
    np.minimum.at(q_nb_min, ends, q[others])
    np.maximum.at(q_nb_max, ends, q[others])
    q_nb_min[~np.isfinite(q_nb_min)] = 0.0
    q_nb_max[~np.isfinite(q_nb_max)] = 0.0

    rings = _ring_sizes(mol)
    ring_flags = np.array([[3 in rings[i], 4 in rings[i], 5 in rings[i], 6 in rings[i], any(s >= 7 for s in rings[i]),
                            len(rings[i])] for i in carbons], dtype=np.float32).reshape(nc, 6)
    solvent_code = _SOLVENT_CODE.get(solvent or "", 0)
    c = carbons
    selfs = np.column_stack([
        nH[c], hyb[c], arom[c], inring[c], ring_flags[:, :5], chg[c], deg[c],
        bond_counts[c, 0], bond_counts[c, 1], bond_counts[c, 2], bond_counts[c, 3],
        np.full(nc, solvent_code), ring_flags[:, 5],
        q[c], qh[c], q_shell[0], q_nb_min[c], q_nb_max[c], q_shell[1], q_shell[2],
    ]).astype(np.float32) if nc else np.zeros((0, len(SELF_NAMES)), np.float32)
    nbs = nb_all[c]
    codes = np.zeros((nc, MAX_RADIUS), dtype=np.uint32)
    for row, idx in enumerate(carbons):
        bits = atom_bits[idx]
        codes[row, : len(bits) - 1] = bits[1 : MAX_RADIUS + 1]
    features = np.hstack([selfs, nbs] + conj + shells) if nc else np.zeros((0, len(FEATURE_NAMES)), np.float32)
    return MolEnvironments(carbons, codes, features)
