"""Where an atom sits in its ring system, as lookup keys (used by the 13C model).

A sphere code (:mod:`.environment`) describes a carbon together with everything around it, so a ring
carbon of a substitution pattern never seen in training finds a match only one or two bonds out.
Ring carbons are predicted by hand the other way round: start from the parent ring system's shift at
that position and add the substituents' increments (common practice; the increments are the
ring-position block of the descriptors).  These keys give the lookup tables the first half:

* **parent**: the ring system (fused rings together) with every substituent removed — an exocyclic
  ``=O``, ``=S`` or ``=N`` on a ring atom stays, it changes the ring itself (2-pyridone is not a
  pyridine) — and the atom's symmetry class in it.  4-Chloroquinoline's C2 has the key of
  quinoline's C2; 1,2- and 1,4-dimethylbenzene's ring CH carbons share benzene's key;
* **pattern**: the same with the substituted positions marked (which positions carry something, not
  what they carry);
* **exo**: an atom bonded to a ring atom but outside every ring (ArCH3, ArC=O, ArCF3): the parent key
  of that ring atom plus the atom's own element, H count and hybridisation.

Key 0 means "none" (an atom outside rings and not bonded to one).  The keys are 32-bit hashes of
canonical descriptions, so they can be looked up in :class:`~.sphere_tables.SphereTables` like sphere
codes.

>>> from rdkit import Chem
>>> q = Chem.MolFromSmiles("c1ccc2ncccc2c1")            # quinoline
>>> cq = Chem.MolFromSmiles("Clc1ccnc2ccccc12")         # 4-chloroquinoline
>>> kq = ring_keys(q, [5])[0]          # quinoline C2 (the carbon after the N)
>>> kcq = ring_keys(cq, [3])[0]        # 4-chloroquinoline C2
>>> bool(kq[0] == kcq[0]), bool(kq[1] == kcq[1])
(True, False)
"""
from __future__ import annotations

import zlib

import numpy as np
from rdkit import Chem

from .sphere_tables import SphereTables

#: Columns of :func:`ring_keys`.
KEY_NAMES = ("parent", "pattern", "exo")


def _hash(text: str) -> int:
    return zlib.crc32(text.encode()) or 1


def ring_systems(mol: Chem.Mol, rings=None) -> list[set[int]]:
    """Atom sets of the ring systems: rings sharing a bond (two atoms) are merged; spiro rings stay apart.
    ``rings``: the molecule's atom rings when already known."""
    systems: list[set[int]] = []
    for ring in (mol.GetRingInfo().AtomRings() if rings is None else rings):
        merged = set(ring)
        for s in [s for s in systems if len(s & merged) >= 2]:
            systems.remove(s)
            merged |= s
        systems.append(merged)
    return systems


_PT = Chem.GetPeriodicTable()


def _symbol(z: int, aromatic: bool, charge: int, n_h: int) -> str:
    sym = _PT.GetElementSymbol(int(z))
    if aromatic:
        sym = sym.lower()
    if z != 6 and n_h:
        sym += "H"   # pyrrole-type NH against pyridine-type N
    return sym + ("+" if charge > 0 else "-" if charge < 0 else "")


def _describe(mol: Chem.Mol, atoms: list[int], bonds: list[tuple], symbols: list[str]) -> tuple[str, dict[int, int]]:
    """A canonical description of the fragment and each atom's symmetry class in it (0, 1, … by rank).
    ``bonds``: (index, begin, end, bond type) of the fragment's bonds."""
    ranks = Chem.CanonicalRankAtomsInFragment(mol, atoms, [b[0] for b in bonds], atomSymbols=symbols, breakTies=False)
    order = {r: k for k, r in enumerate(sorted({ranks[i] for i in atoms}))}
    cls = {i: order[ranks[i]] for i in atoms}
    nodes = sorted((cls[i], symbols[i]) for i in atoms)
    edges = sorted((min(cls[i], cls[j]), max(cls[i], cls[j]), t) for _, i, j, t in bonds)
    return f"{nodes}{edges}", cls


#: canonical descriptions by the fragment's labelled graph in its own atom order, for fragments without
#: stereo marks or isotopes (the canonical ranking also reads those, so such a fragment is described
#: afresh each time): then the graph fixes the answer and a hit is exact.  Positional isomers and common
#: rings (benzene) hit it often.
_SEEN: dict = {}
_SEEN_MAX = 10_000   # about 1.8 kB each: at most ~18 MB


def _plain(mol: Chem.Mol, atoms: list[int], bonds: list[tuple]) -> bool:
    """True when no atom of the fragment carries a chiral tag or an isotope and no bond a stereo mark."""
    for i in atoms:
        a = mol.GetAtomWithIdx(i)
        if a.GetChiralTag() != Chem.ChiralType.CHI_UNSPECIFIED or a.GetIsotope():
            return False
    return all(mol.GetBondWithIdx(b[0]).GetStereo() == Chem.BondStereo.STEREONONE for b in bonds)


def _describe_cached(mol: Chem.Mol, atoms: list[int], bonds: list[tuple], symbols: list[str],
                     plain: bool) -> tuple[str, list[int]]:
    """:func:`_describe` with each atom's class listed in the order of ``atoms``; remembered when ``plain``."""
    if not plain:
        text, cls = _describe(mol, atoms, bonds, symbols)
        return text, [cls[a] for a in atoms]
    local = {a: k for k, a in enumerate(atoms)}
    key = (tuple(symbols[a] for a in atoms), tuple(sorted((local[i], local[j], t) for _, i, j, t in bonds)))
    hit = _SEEN.get(key)
    if hit is None:
        text, cls = _describe(mol, atoms, bonds, symbols)
        hit = (text, [cls[a] for a in atoms])
        if len(_SEEN) >= _SEEN_MAX:
            _SEEN.clear()
        _SEEN[key] = hit
    return hit


def ring_keys(mol: Chem.Mol, centres, facts: tuple | None = None) -> np.ndarray:
    """(len(centres), 3) uint32 keys (:data:`KEY_NAMES`) of the atoms ``centres`` of ``mol``.

    ``facts``: what :func:`~.environment.mol_parts` already read from RDKit - per atom (atomic number,
    aromatic, hybridisation, formal charge, heavy degree, H count, …), per bond (begin, end, RDKit bond
    type as int), and the atom rings - so the molecule is not walked twice."""
    n = mol.GetNumAtoms()
    parent = np.zeros(n, np.uint32)
    pattern = np.zeros(n, np.uint32)
    if facts is None:
        info = [(a.GetAtomicNum(), a.GetIsAromatic(), 0, a.GetFormalCharge(), a.GetDegree(), a.GetTotalNumHs())
                for a in mol.GetAtoms()]
        bond_list = [(b.GetBeginAtomIdx(), b.GetEndAtomIdx(), int(b.GetBondType())) for b in mol.GetBonds()]
        rings = None
    else:
        info, bond_list, rings = facts
    systems = ring_systems(mol, rings)
    if systems:
        symbols = [_symbol(row[0], row[1], row[3], row[5]) for row in info]
        degree = [row[4] for row in info]
        all_bonds = [(k, i, j, t) for k, (i, j, t) in enumerate(bond_list)]
        nbrs: list[list[tuple[int, int]]] = [[] for _ in range(n)]
        for _, i, j, t in all_bonds:
            nbrs[i].append((j, t))
            nbrs[j].append((i, t))
        for system in systems:
            atoms = set(system)
            for i in system:   # exocyclic =O, =S, =N (a terminal atom) belong to the ring
                atoms.update(j for j, t in nbrs[i] if t == 2 and degree[j] == 1)
            atoms_l = sorted(atoms)
            bonds = [b for b in all_bonds if b[1] in atoms and b[2] in atoms]
            plain = _plain(mol, atoms_l, bonds)
            text, cls = _describe_cached(mol, atoms_l, bonds, symbols, plain)
            marked = list(symbols)
            for i in atoms_l:
                if any(j not in atoms for j, _ in nbrs[i]):
                    marked[i] = symbols[i] + "^"
            text2, cls2 = _describe_cached(mol, atoms_l, bonds, marked, plain)
            for i, c, c2 in zip(atoms_l, cls, cls2):
                parent[i] = _hash(f"{text}|{c}")
                pattern[i] = _hash(f"{text2}|{c2}")
    out = np.zeros((len(centres), len(KEY_NAMES)), np.uint32)
    for row, c in enumerate(centres):
        c = int(c)
        if parent[c]:
            out[row, 0], out[row, 1] = parent[c], pattern[c]
            continue
        a = mol.GetAtomWithIdx(c)
        for nb in a.GetNeighbors():
            if parent[nb.GetIdx()]:
                out[row, 2] = _hash(f"{parent[nb.GetIdx()]}|{a.GetAtomicNum()}|{a.GetTotalNumHs()}|{int(a.GetHybridization())}")
                break
    return out


class RingTables:
    """Shift statistics per ring-system key (:func:`ring_keys`), the table half of a member that reads them.

    Four lookups per atom, each giving median, spread and log(1 + count) (NaN, NaN, 0 where unseen or
    the key is 0): the ``parent``, ``pattern`` and ``exo`` keys, and the parent key once more in a
    table built from unsubstituted ring CH carbons only — the parent system's own shift at that
    position, to which the substituent increments add.

    >>> import numpy as np
    >>> keys = np.array([[5, 6, 0], [5, 7, 0], [0, 0, 9]], np.uint32)
    >>> t = RingTables().fit(keys, np.array([120.0, 130.0, 20.0]), n_h=np.array([1, 0, 3]))
    >>> f = t.features(np.array([[5, 8, 0]], np.uint32))
    >>> f.shape, float(f[0, 0]), float(f[0, 9])    # parent median, parent-from-CH median
    ((1, 12), 125.0, 120.0)
    """

    WIDTH = 12   # columns of :meth:`features`

    def fit(self, keys: np.ndarray, shifts: np.ndarray, n_h: np.ndarray) -> "RingTables":
        keys = np.asarray(keys, np.uint32)
        ch = np.where(np.asarray(n_h) > 0, keys[:, 0], 0).astype(np.uint32)
        self.tables = SphereTables().fit(np.column_stack([keys, ch]), shifts)
        return self

    def stats(self, keys: np.ndarray) -> np.ndarray:
        """(n, 4, 3) median, spread, count of the four lookups."""
        keys = np.asarray(keys, np.uint32)
        look = np.column_stack([keys, keys[:, 0]])
        st = self.tables.lookup(look)
        none = look == 0
        st[:, :, :2][none] = np.nan
        st[:, :, 2][none] = 0.0
        return st

    def features(self, keys: np.ndarray) -> np.ndarray:
        """(n, :attr:`WIDTH`) model columns: per lookup median, spread, log(1 + count)."""
        return stats_features(self.stats(keys))

    def to_arrays(self, prefix: str = "ring_") -> dict:
        return {prefix + k: v for k, v in self.tables.to_arrays().items()}

    @classmethod
    def from_arrays(cls, d, prefix: str = "ring_") -> "RingTables | None":
        sub = {k[len(prefix):]: d[k] for k in d if str(k).startswith(prefix)}
        if not sub:
            return None
        t = cls()
        t.tables = SphereTables.from_arrays(sub)
        return t


def stats_features(stats: np.ndarray) -> np.ndarray:
    """Flatten (n, 4, 3) ring-table statistics into model columns (log count)."""
    f = stats.copy()
    f[:, :, 2] = np.log1p(f[:, :, 2])
    return f.reshape(len(f), -1)
