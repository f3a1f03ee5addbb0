"""Atom environments for shift prediction, for either nucleus.

The *centres* are the atoms whose shift is predicted: every carbon for 13C, every heavy atom that
carries hydrogen for 1H (its protons' mean shift).  Two descriptions of each centre's surroundings:

* **sphere codes** in the spirit of HOSE codes (Bremser 1978, Anal. Chim. Acta
  103, 355): a canonical identifier of the atoms and bonds within 1, 2, … R bonds
  of the carbon, computed by RDKit's circular-environment generator with
  redundant environments kept (so every carbon has one code per radius) and our
  own atom description (element, heavy degree, H count, charge, aromaticity,
  smallest ring size; bond orders come from the generator);
* **descriptors**: for distance d = 1 … D, how many atoms of each type lie d
  bonds away; the carbon itself (H count, hybridisation, ring sizes, charge,
  bond orders, Gasteiger charges); bond-typed neighbours; atoms reached along
  conjugated bonds; the partner across a double bond with its substituents; the
  substituents of its aromatic ring by position; and Hückel π charges
  (:mod:`.pi_system`) of the centre and of the atoms one and two bonds out;
* for 13C, **ring-system keys** (:mod:`.ring_systems`): the carbon's position in its parent ring
  system with the substituents stripped, for tables of the parent system's shifts.

:func:`mol_parts` does the RDKit work of one molecule; :func:`environments_of`
turns a whole batch of those into arrays at once, which keeps prediction fast.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from rdkit import Chem
from rdkit.Chem import rdFingerprintGenerator, rdPartialCharges

from ..chem.labels import labelled_hydrogens
from .configuration import CONFIGURED, configuration_roles, twin_pairs
from .pi_system import pi_from_tables
from .ring_systems import KEY_NAMES, ring_keys

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
NUCLEI = ("13C", "1H")
#: ppm per 2H (or 3H) on a carbon: the one-bond deuterium isotope shift of 13C, about −0.2 to −0.4 ppm per
#: deuteron (from memory; compare CDCl3 at 77.16 with CHCl3 at 77.36 ppm in CDCl3, Fulmer et al. 2010)
ISOTOPE_SHIFT_13C = -0.3


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
#: The atom at the other end of a carbon's (non-aromatic) double bond and what hangs on it: the
#: substituents across a C=C or C=N set the polarisation of the carbon (enones, enol ethers, enamines).
PARTNER_NAMES = (["dbl_partner", "dbl_partner_C", "dbl_partner_N", "dbl_partner_O", "dbl_partner_S",
                  "dbl_partner_nH", "dbl_partner_degree", "dbl_partner_q"]
                 + [f"dbl_partner_single_{e}" for e in list(_NB_ELEMENTS) + ["other"]]
                 + ["dbl_partner_nb_aryl", "dbl_partner_nb_acyl", "dbl_partner_nb_triple", "dbl_partner_nb_alkenyl"])
#: Substituent classes on aromatic ring atoms, for the ring-position (substituent-increment) block.
SUBST_CLASSES = ["alkyl", "CX3", "aryl", "vinyl", "acyl", "sp", "amine", "amide", "nitro", "N-aryl", "OH", "ether",
                 "O-acyl", "O-", "S", "SO2", "F", "Cl", "Br", "I", "fused", "other"]
_SC = {c: i for i, c in enumerate(SUBST_CLASSES)}
RING_POSITIONS = ("ipso", "ortho", "meta", "para")
#: The substituents of the aromatic ring around a centre by position (ipso/ortho/meta/para), ring
#: heteroatoms by position, ring size, and whether the ring is the centre's own or that of its
#: neighbour (a benzylic CH2, an ArCH3): additive substituent increments in the form a tree model
#: can use (the classic benzene increment tables are built on the same positions, common practice).
RING_NAMES = ([f"ring_{pos}_{c}" for pos in RING_POSITIONS for c in SUBST_CLASSES]
              + ["ring_ortho_N", "ring_meta_N", "ring_para_N", "ring_ortho_OS", "ring_meta_OS",
                 "ring_size5", "ring_size6", "ring_of_neighbour"])
#: Hückel π descriptors (:mod:`.pi_system`): the centre's π charge, π-system membership and π bond-order
#: sum; the summed π charges of the atoms one and two bonds away and how many neighbours are π atoms.
PI_NAMES = ["pi_q", "pi_member", "pi_bond_order", "pi_q_d1", "pi_q_d2", "pi_members_d1"]
FEATURE_NAMES = SELF_NAMES + NEIGHBOUR_NAMES + CONJ_NAMES + SHELL_NAMES + PARTNER_NAMES + RING_NAMES + PI_NAMES
#: 1H only: the element carrying the protons (the sphere codes know it too; the boosted model needs it
#: as a column) and whether they are exchangeable (on N, O or S).
H_EXTRA_NAMES = ["centre_C", "centre_N", "centre_O", "centre_S", "centre_other", "exchangeable"]


def feature_names(nucleus: str = "13C") -> list[str]:
    """Descriptor column names of ``nucleus`` (13C: :data:`FEATURE_NAMES`; 1H adds :data:`H_EXTRA_NAMES`)."""
    return FEATURE_NAMES + H_EXTRA_NAMES if nucleus == "1H" else list(FEATURE_NAMES)


@dataclass
class MolEnvironments:
    """Per-centre environment data of one molecule."""

    centres: np.ndarray     # heavy-atom indices of the centres (carbons for 13C, H-bearing atoms for 1H)
    codes: np.ndarray       # (n_centres, MAX_RADIUS) uint32 sphere codes for radius 1..MAX_RADIUS
    features: np.ndarray    # (n_centres, len(feature_names(nucleus))) float32
    eccentricity: np.ndarray  # bonds from each centre to the farthest atom (large if fragments)
    nucleus: str = "13C"
    ring_keys: np.ndarray | None = None  # (n_centres, 3) uint32 ring-system keys (:mod:`.ring_systems`; 13C)
    offsets: np.ndarray | None = None    # (n_centres,) ppm added to the prediction (isotope shift; see mol_parts)
    config: np.ndarray | None = None     # (n_centres, len(ROLES)) E/Z roles (:mod:`.configuration`), None: none



@dataclass
class MolParts:
    """What RDKit tells about one molecule, gathered once; :func:`environments_of` turns many of these
    into descriptors with array arithmetic over the whole batch."""

    atoms: np.ndarray       # (n, 9) float64: Z, aromatic, hybridisation, charge, degree, H count, in ring, q, q_H
    bonds: np.ndarray       # (n_bonds, 4) int64: begin, end, kind (see _BOND_KINDS), conjugated
    centres: np.ndarray     # heavy-atom indices of the centres
    dist: np.ndarray        # (n_centres, n) topological distances from each centre
    codes: np.ndarray       # (n_centres, MAX_RADIUS) uint32 sphere codes
    rings: list             # atom index tuples of the smallest set of rings
    solvent_code: int
    nucleus: str = "13C"
    ringpos: np.ndarray | None = None  # (n_centres, len(RING_NAMES)) ring-position substituent block
    atom_map: list | None = None       # atom index in the caller's input for each atom here (None: the same)
    notes: list = field(default_factory=list)  # what standardisation did to the caller's input
    preds: tuple | None = None         # (shifts, sigmas) once predicted, for a caller that caches these parts
    pi: np.ndarray | None = None       # (n, 3) Hückel π charge, π membership, π bond-order sum per atom
    ring_keys: np.ndarray | None = None  # (n_centres, 3) ring-system keys of the centres (13C only)
    offsets: np.ndarray | None = None    # (n_centres,) ppm added to the prediction: the 13C isotope shift of 2H/3H
    config: np.ndarray | None = None     # (n_centres, len(ROLES)) roles at configured double bonds, or None
    guessed_twins: list = field(default_factory=list)   # (cis, trans) twin pairs oriented by convention (no coordinates)


def mol_parts(mol: Chem.Mol, solvent: str | None = None, nucleus: str = "13C", pi: np.ndarray | None = None) -> MolParts:
    """Per-molecule RDKit work: atom and bond properties, Gasteiger charges (Gasteiger & Marsili
    1980), distances and sphere codes of the centres of ``nucleus`` (13C: carbons; 1H: atoms with H).
    ``pi``: the molecule's Hückel columns when already known (the same for both nuclei)."""
    if nucleus not in NUCLEI:
        raise ValueError(f"nucleus {nucleus!r}: use 13C or 1H")
    n = mol.GetNumAtoms()
    # charges are written as private atom properties of ``mol``; every caller in the package passes a
    # molecule of its own making (parsed, or with hydrogens removed), never the user's object
    try:
        rdPartialCharges.ComputeGasteigerCharges(mol)
        charged = True
    except (RuntimeError, ValueError):
        charged = False
    atoms = list(map(mol.GetAtomWithIdx, range(n)))
    info = [(a.GetAtomicNum(), a.GetIsAromatic(), _HYB.get(a.GetHybridization(), 0), a.GetFormalCharge(),
             a.GetDegree(), a.GetTotalNumHs(), a.IsInRing()) for a in atoms]
    rows = None
    if charged:
        try:  # the charge of implicit H is a descriptor of centres only; NaN and extremes are cleaned batch-wide
            h_centre = nucleus == "1H"
            rows = [row + (a.GetDoubleProp("_GasteigerCharge"),
                           a.GetDoubleProp("_GasteigerHCharge")
                           if (row[5] > 0 if h_centre else row[0] == 6) and a.HasProp("_GasteigerHCharge") else 0.0)
                    for a, row in zip(atoms, info)]
        except (RuntimeError, ValueError, KeyError):
            rows = None
    if rows is None:
        rows = [row + (0.0, 0.0) for row in info]
    table = np.array(rows, dtype=np.float64).reshape(n, 9)
    bond_objs = list(map(mol.GetBondWithIdx, range(mol.GetNumBonds())))
    bond_list = [(b.GetBeginAtomIdx(), b.GetEndAtomIdx(), b.GetBondType(), b.GetIsConjugated() or b.GetIsAromatic())
                 for b in bond_objs]
    # double bonds with a stated configuration, found in the same pass (most molecules have none), and whether
    # alike groups sit across a double bond (a prenyl's methyls: configuration.twin_pairs)
    configured = [b for b, (_, _, t, _) in zip(bond_objs, bond_list)
                  if t == Chem.BondType.DOUBLE and b.GetStereo() in CONFIGURED]
    twins = twin_pairs(mol) if _may_have_twins(info, bond_list) else []
    bonds = np.array([(i, j, _BOND_KINDS.get(t, 0), c) for i, j, t, c in bond_list], dtype=np.int64).reshape(-1, 4)
    labels = labelled_hydrogens(mol)   # 2H/3H (chem/labels.py): no 1H shift, a 13C isotope shift
    if nucleus == "13C":
        centres = np.array([i for i, row in enumerate(info) if row[0] == 6], dtype=np.int64)
    else:   # an atom whose H are all 2H/3H has no 1H shift to predict
        centres = np.array([i for i, row in enumerate(info) if row[5] - labels.get(i, 0) > 0], dtype=np.int64)
    rings = list(mol.GetRingInfo().AtomRings())
    smallest = [0] * n
    for ring in rings:
        size = len(ring)
        for i in ring:
            if not smallest[i] or size < smallest[i]:
                smallest[i] = size
    ao = rdFingerprintGenerator.AdditionalOutput()
    ao.AllocateAtomToBits()
    _GEN.GetSparseCountFingerprint(mol, fromAtoms=centres.tolist(), additionalOutput=ao,
                                   customAtomInvariants=[_sphere_invariant(row, r) for row, r in zip(info, smallest)])
    atom_bits = ao.GetAtomToBits()
    codes = np.zeros((len(centres), MAX_RADIUS), dtype=np.uint32)
    for row, idx in enumerate(centres):
        bits = atom_bits[idx][1: MAX_RADIUS + 1]
        codes[row, : len(bits)] = bits
    dist = Chem.GetDistanceMatrix(mol)[centres] if len(centres) else np.zeros((0, n))
    ringpos = _ring_positions(mol, atoms, rings, centres)
    if pi is None:
        pi = pi_columns(info, bonds)
    # where each carbon sits in its ring system (measured no help for 1H, so not computed there)
    keys = (ring_keys(mol, centres, (info, [(i, j, int(t)) for i, j, t, _ in bond_list], rings))
            if nucleus == "13C" else None)
    offsets = None
    if nucleus == "13C" and labels:
        # the models know unlabelled molecules: a carbon carrying n 2H/3H is predicted ISOTOPE_SHIFT_13C × n lower
        offsets = np.array([ISOTOPE_SHIFT_13C * labels.get(int(c), 0) for c in centres], dtype=np.float64)
    return MolParts(table, bonds, centres, dist, codes, rings, _SOLVENT_CODE.get(solvent or "", 0), nucleus, ringpos,
                    pi=pi, ring_keys=keys, offsets=offsets,
                    config=configuration_roles(mol, centres, configured, twins) if configured or twins else None,
                    guessed_twins=[(a, b) for a, b, _, oriented in twins if not oriented])


def _may_have_twins(info, bond_list) -> bool:
    """Cheap test before :func:`~.configuration.twin_pairs` ranks the atoms: a non-aromatic double bond with one
    atom bearing two carbons alike in their own properties and the other a CH or an N with one further group."""
    adjacency = None
    for i, j, t, _ in bond_list:
        if t != Chem.BondType.DOUBLE:
            continue
        for x, y in ((i, j), (j, i)):
            if info[x][4] != 3 or info[x][1] or info[y][1] or info[y][4] != 2:
                continue
            if not ((info[y][0] == 6 and info[y][5] == 1) or (info[y][0] == 7 and info[y][5] == 0 and info[y][3] == 0)):
                continue
            if adjacency is None:
                adjacency = {}
                for u, v, _, _ in bond_list:
                    adjacency.setdefault(u, []).append(v)
                    adjacency.setdefault(v, []).append(u)
            pair = [k for k in adjacency[x] if k != y]
            if len(pair) == 2 and info[pair[0]][0] == 6 and info[pair[0]] == info[pair[1]]:
                return True
    return False


def pi_columns(info, bonds: np.ndarray) -> np.ndarray:
    """(n, 3) Hückel π charge, π membership and π bond-order sum from :func:`mol_parts`' atom and bond tables."""
    return np.column_stack(pi_from_tables([(r[0], r[1], r[3], r[4], r[5]) for r in info], bonds[:, :3].tolist()))


def _subst_class(x: Chem.Atom, b: Chem.Atom) -> int:
    """Class (index into SUBST_CLASSES) of the substituent atom ``x`` on ring atom ``b``."""
    z = x.GetAtomicNum()
    bonds = x.GetBonds()
    if z == 6:
        if x.GetIsAromatic():
            return _SC["aryl"]
        dbl_os = any(bd.GetBondType() == Chem.BondType.DOUBLE and bd.GetOtherAtom(x).GetAtomicNum() in (7, 8, 16) for bd in bonds)
        if dbl_os:
            return _SC["acyl"]
        hyb = x.GetHybridization()
        if hyb == Chem.HybridizationType.SP:
            return _SC["sp"]
        if hyb == Chem.HybridizationType.SP2:
            return _SC["vinyl"]
        halo = sum(1 for nb in x.GetNeighbors() if nb.GetAtomicNum() in (9, 17))
        return _SC["CX3"] if halo >= 2 else _SC["alkyl"]
    if z == 7:
        if x.GetFormalCharge() > 0 or sum(1 for nb in x.GetNeighbors() if nb.GetAtomicNum() == 8) >= 2:
            return _SC["nitro"]
        if x.GetIsAromatic():
            return _SC["N-aryl"]
        for nb in x.GetNeighbors():
            if nb.GetIdx() != b.GetIdx() and any(bd.GetBondType() == Chem.BondType.DOUBLE and
                                                 bd.GetOtherAtom(nb).GetAtomicNum() in (8, 16) for bd in nb.GetBonds()):
                return _SC["amide"]
        return _SC["amine"]
    if z == 8:
        if x.GetFormalCharge() < 0:
            return _SC["O-"]
        for nb in x.GetNeighbors():
            if nb.GetIdx() != b.GetIdx() and (nb.GetAtomicNum() in (15, 16) or any(
                    bd.GetBondType() == Chem.BondType.DOUBLE and bd.GetOtherAtom(nb).GetAtomicNum() == 8 for bd in nb.GetBonds())):
                return _SC["O-acyl"]
        return _SC["OH"] if x.GetTotalNumHs() else _SC["ether"]
    if z == 16:
        return _SC["SO2"] if sum(1 for nb in x.GetNeighbors() if nb.GetAtomicNum() == 8) >= 1 else _SC["S"]
    return _SC.get({9: "F", 17: "Cl", 35: "Br", 53: "I"}.get(z, "other"), _SC["other"])


_N_SC = len(SUBST_CLASSES)


def _position_matrices(size: int) -> list[np.ndarray]:
    """For a ring of ``size`` atoms: 0/1 matrices selecting, for each ring position, the atoms one, two
    (and three) steps away around the ring (ortho, meta, para)."""
    out = []
    for step in range(1, size // 2 + 1):
        P = np.zeros((size, size), dtype=np.float32)
        for k in range(size):
            P[k, (k + step) % size] = 1.0
            P[k, (k - step) % size] = 1.0
        out.append(P)
    return out


_POSITION_MATRICES = {5: _position_matrices(5), 6: _position_matrices(6)}


def _ring_positions(mol: Chem.Mol, atoms, rings, centres) -> np.ndarray:
    """The :data:`RING_NAMES` block of every centre: substituents of its aromatic ring by position.

    Per aromatic ring (six-membered rings first), the substituent classes on each ring atom form a
    (ring size × classes) count matrix; the ortho/meta/para blocks of a ring position are sums of its
    rolled rows, so every centre of the ring is filled with array arithmetic."""
    out = np.zeros((len(centres), len(RING_NAMES)), dtype=np.float32)
    arom = [r for r in rings if len(r) in (5, 6) and all(atoms[i].GetIsAromatic() for i in r)]
    if not arom:
        return out
    arom.sort(key=lambda r: -len(r))
    ring_of: dict[int, int] = {}
    for k, r in enumerate(arom):
        for i in r:
            ring_of.setdefault(i, k)
    ring_sets = [set(r) for r in rings]
    het_col = len(RING_POSITIONS) * _N_SC
    blocks = []  # per aromatic ring: (size, RING_NAMES) rows for an anchor at each ring position
    for r in arom:
        size = len(r)
        rset = set(r)
        sub = np.zeros((size, _N_SC), dtype=np.float32)
        n_het = np.zeros(size, dtype=np.float32)
        os_het = np.zeros(size, dtype=np.float32)
        for k, bi in enumerate(r):
            b = atoms[bi]
            z = b.GetAtomicNum()
            n_het[k] = z == 7
            os_het[k] = z in (8, 16)
            for x in b.GetNeighbors():
                xi = x.GetIdx()
                if xi in rset:
                    continue
                fused = any(xi in rr and bi in rr for rr in ring_sets)
                sub[k, _SC["fused"] if fused else _subst_class(x, b)] += 1.0
        block = np.zeros((size, len(RING_NAMES)), dtype=np.float32)
        block[:, :_N_SC] = sub
        for pos, P in enumerate(_POSITION_MATRICES[size], start=1):   # ortho, meta (, para)
            block[:, pos * _N_SC:(pos + 1) * _N_SC] = P @ sub
            block[:, het_col + pos - 1] = P @ n_het
            if pos <= 2:
                block[:, het_col + 3 + pos - 1] = P @ os_het
        block[:, het_col + 5] = size == 5
        block[:, het_col + 6] = size == 6
        blocks.append(block)
    for row, c in enumerate(centres.tolist()):
        if c in ring_of:
            k = ring_of[c]
            out[row] = blocks[k][arom[k].index(c)]
            continue
        nbs = [x for x in atoms[c].GetNeighbors() if x.GetIdx() in ring_of]
        if not nbs:
            continue
        anchor = nbs[0].GetIdx()
        k = ring_of[anchor]
        out[row] = blocks[k][arom[k].index(anchor)]
        out[row, _subst_class(atoms[c], atoms[anchor])] -= 1.0   # the centre itself is not its own 'ipso' group
        out[row, het_col + 7] = 1.0
    return out


def _sphere_invariant(info_row: tuple, smallest_ring: int) -> int:
    """Atom description inside sphere codes: element, heavy degree, H count, charge, aromaticity and
    the size of the smallest ring (HOSE codes mark ring closures; without ring sizes a circular code
    cannot tell a cyclopropane CH2 from a cyclohexane CH2)."""
    z, aromatic, _hyb, charge, degree, n_h, _ring = info_row
    return ((((min(z, 127) * 8 + min(degree, 7)) * 8 + min(n_h, 7)) * 8 + min(max(charge + 4, 0), 7)) * 2
            + int(aromatic)) * 16 + min(smallest_ring, 15)


_T_LOOKUP = np.full(128, _TIDX["other"], dtype=np.int64)
for _z, _t in {1: "H", 9: "F", 17: "Cl", 35: "Br", 53: "I", 14: "Si", 5: "B", 34: "Se", 15: "P"}.items():
    _T_LOOKUP[_z] = _TIDX[_t]
_NB_LOOKUP = np.full(128, len(_NB_ELEMENTS), dtype=np.int64)
for _z, _k in {6: 0, 7: 1, 8: 2, 16: 3, 9: 4, 17: 5, 35: 6, 53: 7, 15: 8}.items():
    _NB_LOOKUP[_z] = _k
_CONJ_LOOKUP = np.full(128, 5, dtype=np.int64)
for _z, _k in _CONJ_EL.items():
    _CONJ_LOOKUP[_z] = _k


def _atom_types(Z, arom, hyb, chg, deg_tot, dbl_to_os, has_dbl) -> np.ndarray:
    """Shell atom type index (see ``_TYPES``) of every atom."""
    T = _TIDX
    out = _T_LOOKUP[np.minimum(Z, 127)]
    carbon = np.where(arom, T["Car"], np.where(hyb == 1, T["C1"], np.where(hyb == 2, np.where(dbl_to_os, T["C=O"], T["C2"]), T["C3"])))
    nitrogen = np.where(chg > 0, T["N+"], np.where(arom, T["Nar"], np.where(hyb == 1, T["N1"], np.where(has_dbl, T["N2"], T["N3"]))))
    oxygen = np.where(chg < 0, T["O-"], np.where(arom, T["Oar"], np.where(has_dbl, T["O2"], T["O3"])))
    sulfur = np.where((deg_tot > 2) | (chg != 0), T["Sox"], T["S"])
    out = np.where(Z == 6, carbon, out)
    out = np.where(Z == 7, nitrogen, out)
    out = np.where(Z == 8, oxygen, out)
    return np.where(Z == 16, sulfur, out)


def _sum_rows(rows: np.ndarray, cols: np.ndarray, weights: np.ndarray, shape: tuple[int, int]) -> np.ndarray:
    """Dense (rows x cols) array of summed weights (a scatter-add through ``bincount``)."""
    flat = np.bincount(rows * shape[1] + cols, weights=weights, minlength=shape[0] * shape[1])
    return flat.reshape(shape)


def environments_of(parts: list[MolParts]) -> list[MolEnvironments]:
    """Sphere codes and descriptors of every centre of many molecules (all of one nucleus), computed batch-wide."""
    if not parts:
        return []
    nucleus = parts[0].nucleus
    if any(p.nucleus != nucleus for p in parts):
        raise ValueError("environments_of: molecules described for different nuclei in one batch")
    sizes = np.array([p.atoms.shape[0] for p in parts], dtype=np.int64)
    a_off = np.concatenate([[0], np.cumsum(sizes)])
    ncs = np.array([len(p.centres) for p in parts], dtype=np.int64)
    c_off = np.concatenate([[0], np.cumsum(ncs)])
    N, NC = int(a_off[-1]), int(c_off[-1])
    A = np.vstack([p.atoms for p in parts]) if N else np.zeros((0, 9))
    A[:, 7:] = np.clip(np.nan_to_num(A[:, 7:], nan=0.0, posinf=0.0, neginf=0.0), -2.0, 2.0)
    Z = A[:, 0].astype(np.int64)
    arom, hyb, chg, deg, nH, inring, q, qh = (A[:, k] for k in range(1, 9))
    arom = arom > 0
    nbond = np.array([len(p.bonds) for p in parts], dtype=np.int64)
    B = np.vstack([p.bonds for p in parts]) if nbond.sum() else np.zeros((0, 4), np.int64)
    shift = np.repeat(a_off[:-1], nbond)
    bi, bj, bk, bc = B[:, 0] + shift, B[:, 1] + shift, B[:, 2], B[:, 3].astype(bool)
    centres = np.concatenate([p.centres + a_off[i] for i, p in enumerate(parts)]) if NC else np.zeros(0, np.int64)

    # per-atom bond facts
    ends, others, kinds = np.concatenate([bi, bj]), np.concatenate([bj, bi]), np.concatenate([bk, bk])
    is_dbl = kinds == 1
    has_dbl = np.zeros(N, bool)
    has_dbl[ends[is_dbl]] = True
    dbl_to_os = np.zeros(N, bool)
    dbl_to_os[ends[is_dbl & np.isin(Z[others], (8, 16))]] = True
    bond_counts = _sum_rows(ends, kinds, np.ones(len(ends)), (N, 4))
    n_el = len(_NB_ELEMENTS) + 1
    nb_all = _sum_rows(ends, kinds * n_el + _NB_LOOKUP[np.minimum(Z[others], 127)], np.ones(len(ends)), (N, 4 * n_el))
    q_nb_min = np.full(N, np.inf)
    q_nb_max = np.full(N, -np.inf)
    np.minimum.at(q_nb_min, ends, q[others])
    np.maximum.at(q_nb_max, ends, q[others])
    q_nb_min[~np.isfinite(q_nb_min)] = 0.0
    q_nb_max[~np.isfinite(q_nb_max)] = 0.0

    # shells: (carbon row, atom, distance) for every pair up to SHELLS bonds apart
    flat = np.concatenate([p.dist.ravel() for p in parts]) if NC else np.zeros(0)
    block = ncs * sizes
    b_off = np.concatenate([[0], np.cumsum(block)])
    pos = np.flatnonzero((flat >= 1) & (flat <= SHELLS))
    mol_of = np.searchsorted(b_off, pos, side="right") - 1
    local = pos - b_off[mol_of]
    crow = local // sizes[mol_of] + c_off[mol_of]
    atom = local % sizes[mol_of] + a_off[mol_of]
    d = flat[pos].astype(np.int64)
    types = _atom_types(Z, arom, hyb, chg, deg + nH, dbl_to_os, has_dbl)
    h_col = _TIDX["H"]
    t = types[atom]
    shell_rows = crow * SHELLS + (d - 1)
    shells = _sum_rows(shell_rows, t, (t != h_col).astype(np.float64), (NC * SHELLS, _NT))
    shells[:, h_col] += np.bincount(shell_rows, weights=nH[atom], minlength=NC * SHELLS)
    shells = shells.reshape(NC, SHELLS * _NT)
    q_shell = _sum_rows(crow, d - 1, q[atom], (NC, SHELLS))
    P = np.vstack([p.pi for p in parts]) if N else np.zeros((0, 3))
    near = d <= 2
    pi_shell = _sum_rows(crow[near], d[near] - 1, P[atom[near], 0], (NC, 2))
    pi_members_d1 = np.bincount(crow[d == 1], weights=P[atom[d == 1], 1], minlength=NC)

    # conjugated-path distances: breadth-first search over conjugated bonds from every carbon
    conj_rows, conj_atoms, conj_d = _conjugated_bfs(N, bi[bc], bj[bc], centres)
    cw = np.zeros((len(conj_atoms), 7))
    cw[np.arange(len(conj_atoms)), _CONJ_LOOKUP[np.minimum(Z[conj_atoms], 127)]] = 1.0
    cw[:, 6] = q[conj_atoms]
    conj = np.zeros((NC * CONJ_DEPTH, 7))
    np.add.at(conj, conj_rows * CONJ_DEPTH + conj_d - 1, cw)
    conj = conj.reshape(NC, CONJ_DEPTH * 7)

    # ring sizes of each atom (smallest set of rings)
    ring_atoms = np.array([a + a_off[i] for i, p in enumerate(parts) for r in p.rings for a in r], dtype=np.int64)
    ring_size = np.array([len(r) for p in parts for r in p.rings for _ in r], dtype=np.int64)
    uniq = np.sort(ring_atoms * 4096 + np.minimum(ring_size, 4095))
    uniq = uniq[np.concatenate([[True], uniq[1:] != uniq[:-1]])] if len(uniq) else uniq
    ua, us = uniq // 4096, uniq % 4096
    flags = np.zeros((N, 6))
    for k, size in enumerate((3, 4, 5, 6)):
        flags[ua[us == size], k] = 1.0
    flags[ua[us >= 7], 4] = 1.0
    flags[:, 5] = np.bincount(ua, minlength=N)

    c = centres
    solvent = np.repeat([p.solvent_code for p in parts], ncs)
    selfs = np.column_stack([
        nH[c], hyb[c], arom[c], inring[c], flags[c, :5], chg[c], deg[c],
        bond_counts[c], solvent, flags[c, 5],
        q[c], qh[c], q_shell[:, 0], q_nb_min[c], q_nb_max[c], q_shell[:, 1], q_shell[:, 2],
    ])
    partner = _partner_block(N, Z, arom, nH, deg, q, nb_all, ends, others, kinds, dbl_to_os)[c]
    ringpos = np.vstack([p.ringpos for p in parts]) if NC else np.zeros((0, len(RING_NAMES)), np.float32)
    pi_block = np.column_stack([P[c], pi_shell, pi_members_d1])
    blocks = [selfs, nb_all[c], conj, shells, partner, ringpos, pi_block]
    if nucleus == "1H":
        zc = Z[c]
        el = np.column_stack([zc == 6, zc == 7, zc == 8, zc == 16, ~np.isin(zc, (6, 7, 8, 16)), np.isin(zc, (7, 8, 16))])
        blocks.append(el.astype(np.float64))
    features = np.hstack(blocks).astype(np.float32)
    codes = np.vstack([p.codes for p in parts]) if NC else np.zeros((0, MAX_RADIUS), np.uint32)
    keys = np.vstack([p.ring_keys if p.ring_keys is not None else np.zeros((len(p.centres), len(KEY_NAMES)), np.uint32)
                      for p in parts]) if NC else np.zeros((0, len(KEY_NAMES)), np.uint32)
    return [MolEnvironments(p.centres, codes[c_off[i]:c_off[i + 1]], features[c_off[i]:c_off[i + 1]],
                            p.dist.max(axis=1) if p.dist.size else np.zeros(len(p.centres)), nucleus,
                            keys[c_off[i]:c_off[i + 1]], p.offsets, p.config)
            for i, p in enumerate(parts)]


def _partner_block(N, Z, arom, nH, deg, q, nb_all, ends, others, kinds, dbl_to_os) -> np.ndarray:
    """Per atom: :data:`PARTNER_NAMES` for the first non-aromatic double bond it carries (zeros if none)."""
    out = np.zeros((N, len(PARTNER_NAMES)))
    dbl = np.flatnonzero(kinds == 1)
    if len(dbl) == 0:
        return out
    # bond rows are ordered by bond index within each molecule: keep each atom's first double bond
    first = np.full(N, -1, np.int64)
    first[ends[dbl[::-1]]] = others[dbl[::-1]]
    has = first >= 0
    p = first[has]
    out[has, 0] = 1.0
    for k, z in enumerate((6, 7, 8, 16)):
        out[has, 1 + k] = Z[p] == z
    out[has, 5], out[has, 6], out[has, 7] = nH[p], deg[p], q[p]
    n_el = len(_NB_ELEMENTS) + 1
    out[has, 8:8 + n_el] = nb_all[p, :n_el]          # single-bonded neighbours of the partner, by element
    # what those single-bonded neighbours are: aryl, acyl (C=O/C=S carbon), triple-bond bearing, alkenyl
    single = kinds == 0
    e, o = ends[single], others[single]
    has_triple = np.zeros(N, bool)
    has_triple[ends[kinds == 2]] = True
    cdbl = np.zeros(N, bool)
    cdbl[ends[(kinds == 1) & (Z[others] == 6)]] = True
    prof = np.zeros((N, 4))
    carbon = Z[o] == 6
    np.add.at(prof, (e, 0), (carbon & arom[o]).astype(float))
    np.add.at(prof, (e, 1), (carbon & dbl_to_os[o]).astype(float))
    np.add.at(prof, (e, 2), has_triple[o].astype(float))
    np.add.at(prof, (e, 3), (carbon & ~arom[o] & cdbl[o]).astype(float))
    out[has, 8 + n_el:] = prof[p]
    return out


def _conjugated_bfs(n_atoms: int, bi: np.ndarray, bj: np.ndarray, sources: np.ndarray):
    """(source row, atom, path length) for atoms 1..CONJ_DEPTH conjugated bonds from each source."""
    ends, others = np.concatenate([bi, bj]), np.concatenate([bj, bi])
    order = np.argsort(ends, kind="stable")
    nbr = others[order]
    start = np.concatenate([[0], np.cumsum(np.bincount(ends, minlength=n_atoms))])
    rows = np.arange(len(sources), dtype=np.int64)
    f_rows, f_atoms = rows, sources.astype(np.int64)
    reached = np.sort(rows * n_atoms + f_atoms)
    out_r, out_a, out_d = [], [], []
    for depth in range(1, CONJ_DEPTH + 1):
        deg = start[f_atoms + 1] - start[f_atoms]
        if not deg.sum():
            break
        r = np.repeat(f_rows, deg)
        first = np.repeat(start[f_atoms], deg)
        within = np.arange(len(r)) - np.repeat(np.cumsum(deg) - deg, deg)
        keys = np.sort(r * n_atoms + nbr[first + within])
        keys = keys[np.concatenate([[True], keys[1:] != keys[:-1]])] if len(keys) else keys
        at = np.minimum(np.searchsorted(reached, keys), len(reached) - 1)
        keys = keys[reached[at] != keys]
        if not len(keys):
            break
        f_rows, f_atoms = keys // n_atoms, keys % n_atoms
        out_r.append(f_rows)
        out_a.append(f_atoms)
        out_d.append(np.full(len(keys), depth, np.int64))
        reached = np.sort(np.concatenate([reached, keys]))
    if not out_r:
        z = np.zeros(0, np.int64)
        return z, z, z
    return np.concatenate(out_r), np.concatenate(out_a), np.concatenate(out_d)


def environments(mol: Chem.Mol, solvent: str | None = None, nucleus: str = "13C") -> MolEnvironments:
    """Sphere codes and shell descriptors for every centre of ``mol`` (hydrogens implicit).

    >>> env = environments(Chem.MolFromSmiles("CC#N"))
    >>> env.centres.tolist(), env.codes.shape
    ([0, 1], (2, 6))
    >>> environments(Chem.MolFromSmiles("OCC#N"), nucleus="1H").centres.tolist()
    [0, 1]
    """
    return environments_of([mol_parts(mol, solvent, nucleus)])[0]
