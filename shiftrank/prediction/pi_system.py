"""π-electron charges from a Hückel calculation on each conjugated system of a molecule.

The π charge of an atom is the classic electronic descriptor of aromatic and olefinic shifts:
13C shifts of benzene ring carbons follow the π density at about 160 ppm per electron
(Spiesecke & Schneider 1961, Tetrahedron Lett. 2, 468), and ring protons follow it too. A tree
model on topological descriptors sees *which* substituent sits *where*; the Hückel charge adds
how the whole π system redistributes its electrons (a donor's ortho/para pattern through a fused
ring, a ring nitrogen's effect at C4 of a quinoline, the β carbon of an enone).

Model: simple Hückel theory (Hückel 1931) with heteroatom Coulomb and resonance parameters in the
form α_X = α + h_X β, β_CX = k_CX β, and the auxiliary inductive parameter h_C = 0.1 h_X on a carbon
bonded to a pyridine-type N or a carbonyl-type O (Streitwieser 1961, *Molecular Orbital Theory
for Organic Chemists*, ch. 5; the values in :data:`_PARAMS` are from memory of that table and
rounded; they are descriptors for the learned model, not a quantum-chemical result).

Each connected π system is solved on its own and filled with its own electrons (aufbau; a
partly filled degenerate level is shared evenly, so symmetry-equivalent atoms get equal charges).
Known simplifications: one p orbital per atom (a triple bond's second π system is left out), no
hyperconjugation (a methyl group is invisible), a cationic ring oxygen (pyrylium) is read as an
ether oxygen and an azolide anion's N⁻ as a pyridine-type N; the models were trained that way.

>>> from rdkit import Chem
>>> q, member, order = pi_descriptors(Chem.MolFromSmiles("O=[N+]([O-])c1ccccc1"))
>>> [round(float(q[i]), 2) for i in (4, 5, 6)]        # ortho, meta, para carbons of nitrobenzene
[0.07, -0.0, 0.07]
>>> q, member, order = pi_descriptors(Chem.MolFromSmiles("CC"))
>>> member.tolist()
[0.0, 0.0]
"""
from __future__ import annotations

import numpy as np
from rdkit import Chem

#: kind -> (h, k, π electrons).  The N, O, S and halogen values follow Streitwieser (1961), from memory.
_PARAMS = {
    "C": (0.0, 1.0, 1), "C+": (0.0, 1.0, 0), "C-": (0.0, 1.0, 2),
    "N1": (0.5, 1.0, 1),   # pyridine-type / imine / nitrile N (one electron)
    "N2": (1.5, 0.8, 2),   # pyrrole-type / amine / amide N (lone pair)
    "N+": (2.0, 1.0, 1),   # pyridinium, nitro, iminium N
    "O1": (1.0, 1.0, 1),   # carbonyl O
    "O2": (2.0, 0.8, 2),   # ether, hydroxyl, furan O
    "O-": (1.0, 0.8, 2),
    "S1": (0.5, 0.6, 1),   # thiocarbonyl S
    "S2": (1.0, 0.6, 2),   # thioether, thiophene S
    "F": (3.0, 0.7, 2), "Cl": (2.0, 0.4, 2), "Br": (1.5, 0.3, 2), "I": (1.2, 0.2, 2),
    "B": (-1.0, 0.7, 0),   # empty p orbital
}
#: Atoms that join a π system only through a bond to one of its atoms (lone pairs, an empty p orbital),
#: unless they are aromatic.
_DONORS = {"N2", "O2", "O-", "S2", "F", "Cl", "Br", "I", "B", "C-", "C+"}
#: Kinds whose electronegativity is also felt by the carbon they are bonded to (auxiliary inductive term).
_INDUCTORS = {"N1", "N+", "O1", "S1"}
_INDUCTIVE = 0.1
_CARBON = ("C", "C+", "C-")
_HALOGEN = {9: "F", 17: "Cl", 35: "Br", 53: "I"}


def _kind(z: int, aromatic: bool, charge: int, degree: int, n_h: int, multiple: bool) -> str | None:
    """The π kind of one atom (a key of :data:`_PARAMS`), or None when it has no part in any π system."""
    if z == 6:
        if aromatic or multiple:
            return "C" if charge == 0 else ("C+" if charge > 0 else "C-")
        return "C-" if charge < 0 else ("C+" if charge > 0 else None)
    if z == 7:
        if charge > 0:
            return "N+" if aromatic or multiple else None
        if aromatic:
            return "N2" if degree + n_h == 3 else "N1"
        return "N1" if multiple else "N2"
    if z == 8:
        if charge < 0:
            return "O-"
        return "O1" if multiple and not aromatic else "O2"
    if z == 16:
        if aromatic:
            return "S2"
        if multiple:
            return "S1" if degree == 1 else None      # C=S; a sulfoxide or sulfone S is left out
        return "S2" if degree <= 2 else None
    if z == 5:
        return "B"
    return _HALOGEN.get(z)


def pi_descriptors(mol: Chem.Mol) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per atom: π charge (electrons given minus π density; positive = π-deficient), membership of a
    π system (1/0) and the sum of its π bond orders to its π neighbours."""
    atoms = [(a.GetAtomicNum(), a.GetIsAromatic(), a.GetFormalCharge(), a.GetDegree(), a.GetTotalNumHs())
             for a in mol.GetAtoms()]
    kind = {Chem.BondType.DOUBLE: 1, Chem.BondType.TRIPLE: 2, Chem.BondType.AROMATIC: 3}
    bonds = [(b.GetBeginAtomIdx(), b.GetEndAtomIdx(), kind.get(b.GetBondType(), 0)) for b in mol.GetBonds()]
    return pi_from_tables(atoms, bonds)


def pi_from_tables(atoms, bonds) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """:func:`pi_descriptors` from plain tables: ``atoms`` rows (Z, aromatic, formal charge, heavy degree,
    H count), ``bonds`` rows (begin, end, kind) with kind 0 single, 1 double, 2 triple, 3 aromatic."""
    n = len(atoms)
    q, member, order = np.zeros(n), np.zeros(n), np.zeros(n)
    multiple = [False] * n
    for i, j, k in bonds:
        if k in (1, 2):
            multiple[i] = multiple[j] = True
    kinds = [_kind(int(z), bool(ar), int(ch), int(dg), int(nh), multiple[i])
             for i, (z, ar, ch, dg, nh) in enumerate(atoms)]
    core = [k is not None and (k not in _DONORS or bool(atoms[i][1])) for i, k in enumerate(kinds)]
    edges = [(int(i), int(j)) for i, j, _ in bonds
             if kinds[i] is not None and kinds[j] is not None and (core[i] or core[j])]
    if not edges:
        return q, member, order
    # connected π systems (union-find over the π bonds)
    parent = list(range(n))

    def root(a: int) -> int:
        while parent[a] != a:
            parent[a] = parent[parent[a]]
            a = parent[a]
        return a

    for i, j in edges:
        parent[root(i)] = root(j)
    systems: dict[int, list[int]] = {}
    for a in sorted({a for e in edges for a in e}):
        systems.setdefault(root(a), []).append(a)
    for sel in systems.values():
        pos = {a: k for k, a in enumerate(sel)}
        m = len(sel)
        H = np.zeros((m, m))
        adjacency = np.zeros((m, m))
        for a in sel:
            H[pos[a], pos[a]] = _PARAMS[kinds[a]][0]
        for i, j in edges:
            if i not in pos:
                continue
            ki, kj = kinds[i], kinds[j]
            hetero = kj if ki in _CARBON else ki
            pi, pj = pos[i], pos[j]
            H[pi, pj] = H[pj, pi] = 1.0 if hetero in _CARBON else _PARAMS[hetero][1]
            adjacency[pi, pj] = adjacency[pj, pi] = 1.0
            if ki == "C" and kj in _INDUCTORS:
                H[pi, pi] += _INDUCTIVE * _PARAMS[kj][0]
            if kj == "C" and ki in _INDUCTORS:
                H[pj, pj] += _INDUCTIVE * _PARAMS[ki][0]
        electrons = np.array([_PARAMS[kinds[a]][2] for a in sel], float)
        x, vec = np.linalg.eigh(H)
        x, vec = x[::-1], vec[:, ::-1]          # most bonding first (energies α + xβ, β < 0)
        density = (vec * _aufbau(x, electrons.sum())) @ vec.T
        q[sel] = electrons - np.diag(density)
        member[sel] = 1.0
        order[sel] = (density * adjacency).sum(axis=1)
    return q, member, order


def _aufbau(x: np.ndarray, electrons: float) -> np.ndarray:
    """Occupation numbers of orbitals ``x`` (sorted, most bonding first); a degenerate level that is only
    partly filled shares its electrons evenly.

    >>> _aufbau(np.array([2.0, 1.0, 1.0, -1.0]), 4).tolist()     # two electrons over a degenerate pair
    [2.0, 1.0, 1.0, 0.0]
    """
    occupation = np.clip(electrons - 2.0 * np.arange(len(x)), 0.0, 2.0)
    last = int(np.ceil(electrons / 2.0)) - 1                 # the highest orbital that holds electrons
    if 0 <= last < len(x):
        level = np.flatnonzero(np.abs(x - x[last]) < 1e-6)
        occupation[level] = occupation[level].sum() / len(level)
    return occupation
