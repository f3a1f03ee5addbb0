"""E/Z configuration increments: what the stereo-blind models cannot see across a double bond.

The sphere codes and descriptors describe constitution only, so an E and a Z alkene (or oxime) get the
same prediction: a blend of both configurations, weighted as the training data happen to hold them.
The best-known configuration effect is on an sp3 carbon beside the double bond: a heavy group cis to it
across the bond shields it by several ppm (the steric γ effect; common practice, e.g. the α-methyl of
an angelate against a tiglate ester).

Each centre gets counts of the *roles* it plays at double bonds whose configuration the structure
states (:func:`configuration_roles`); the model adds one increment per role and nucleus
(``configuration_increments`` of the nucleus's manifest entry, fitted by
``training/configuration_increments.py`` on residuals of the validation and test splits, where the
sphere tables have not seen the molecules; a role without a replicated effect gets none, and so far
only the sp3 carbon with a heavy group cis has one among these, for 13C).  A structure drawn without configuration
gets no increment.

Two alike groups on one atom of a double bond (a prenyl group's methyls) are the same case with the
configuration unstated: the sphere codes cannot tell them apart, so the tables hold both values and predict
their average.  One is cis to the other atom's group and one trans (:data:`TWIN_ROLES`, :func:`twin_pairs`);
the same fit gives those roles their increments (model set 1.11.0).
"""
from __future__ import annotations

import numpy as np
from rdkit import Chem
from rdkit.Chem import rdMolTransforms

#: role names, in column order.  "cis"/"trans" say where heavy groups of the double bond's other atom
#: lie relative to the centre (sp3 or sp2 neighbour of the bond) or to the H of a vinyl CH.
EZ_ROLES = (
    "sp3 beside the bond, heavy group cis only",
    "sp3 beside the bond, heavy group trans only",
    "sp3 beside the bond, heavy groups cis and trans",
    "sp2 beside the bond, heavy group cis only",
    "sp2 beside the bond, heavy group trans only",
    "sp2 beside the bond, heavy groups cis and trans",
    "vinyl CH, its H cis to a heavy group only",
    "vinyl CH, its H trans to a heavy group only",
    "vinyl CH, its H between heavy groups cis and trans",
)
#: the two alike groups on one atom of a double bond (:func:`shiftrank.chem.structure.alkene_twin_sites`) whose
#: other atom is a CH with one heavy group, or an N with one group and its lone pair: one twin is cis to that
#: group, the other trans, though no drawing without coordinates says which (see :func:`twin_pairs`)
TWIN_ROLES = (
    "twin beside a double bond to a CH, cis to its heavy group",
    "twin beside a double bond to a CH, trans to its heavy group",
    "twin beside a C=N, cis to the N's group",
    "twin beside a C=N, trans to the N's group",
)
ROLES = EZ_ROLES + TWIN_ROLES
_CIS = (Chem.BondStereo.STEREOZ, Chem.BondStereo.STEREOCIS)
_TRANS = (Chem.BondStereo.STEREOE, Chem.BondStereo.STEREOTRANS)
#: the bond stereo values that state a configuration
CONFIGURED = _CIS + _TRANS
#: double bonds in rings smaller than this have a fixed geometry that the sphere codes already see
MIN_RING = 8


def _pattern(cis: int, trans: int) -> int | None:
    """0: heavy cis only, 1: trans only, 2: both; None when the other atom carries no heavy group."""
    if cis and trans:
        return 2
    return 0 if cis else 1 if trans else None


def configuration_roles(mol: Chem.Mol, centres, bonds=None, twins=None) -> np.ndarray | None:
    r"""(len(centres), len(ROLES)) counts of each centre's roles at the configured double bonds of ``mol``
    (hydrogens implicit; the configuration as RDKit perceives it from the SMILES or the 2D drawing), or
    None when no double bond has a stated configuration (and no twin pair is given).  ``bonds``: the double bonds to look at, when the
    caller has already picked those with a stated configuration (default: every bond of ``mol``).
    ``twins``: also the roles of alike groups across a double bond, as :func:`twin_pairs` gives them.

    >>> from rdkit import Chem
    >>> m = Chem.MolFromSmiles("C/C=C(\\C)C(=O)OC")   # the α-methyl (atom 3) cis to the β-methyl
    >>> r = configuration_roles(m, range(m.GetNumAtoms()))
    >>> [ROLES[k] for k in np.flatnonzero(r[3])]
    ['sp3 beside the bond, heavy group cis only']
    >>> configuration_roles(Chem.MolFromSmiles("CC=C(C)C(=O)OC"), range(8)) is None
    True
    """
    found: dict[int, list[int]] = {}
    ring = mol.GetRingInfo()
    for b in (mol.GetBonds() if bonds is None else bonds):
        st = b.GetStereo()
        if b.GetBondType() != Chem.BondType.DOUBLE or st not in CONFIGURED:
            continue
        if b.IsInRing() and ring.MinBondRingSize(b.GetIdx()) < MIN_RING:
            continue
        s1, s2 = list(b.GetStereoAtoms())
        same = st in _CIS              # are the two stereo atoms on one side?
        a, c = b.GetBeginAtom(), b.GetEndAtom()
        if s1 not in [n.GetIdx() for n in a.GetNeighbors()]:
            s1, s2 = s2, s1
        # each neighbour's side: True for the stereo atom's side of its own end
        side_a = {n.GetIdx(): n.GetIdx() == s1 for n in a.GetNeighbors() if n.GetIdx() != c.GetIdx()}
        side_c = {n.GetIdx(): n.GetIdx() == s2 for n in c.GetNeighbors() if n.GetIdx() != a.GetIdx()}
        for mine, other, atom in ((side_a, side_c, a), (side_c, side_a, c)):
            for x, xs in mine.items():
                cis = sum((xs == ys) == same for ys in other.values())
                k = _pattern(cis, len(other) - cis)
                if k is None:
                    continue
                hyb = mol.GetAtomWithIdx(x).GetHybridization()
                if hyb == Chem.HybridizationType.SP3:
                    found.setdefault(x, []).append(k)
                elif hyb == Chem.HybridizationType.SP2:
                    found.setdefault(x, []).append(3 + k)
            # a vinyl CH: its H sits opposite its one heavy neighbour
            if atom.GetTotalNumHs() == 1 and len(mine) == 1:
                (x, xs), = mine.items()
                cis = sum(((not xs) == ys) == same for ys in other.values())
                k = _pattern(cis, len(other) - cis)
                if k is not None:
                    found.setdefault(atom.GetIdx(), []).append(6 + k)
    for cis, trans, k, _ in twins or ():
        found.setdefault(cis, []).append(k)
        found.setdefault(trans, []).append(k + 1)
    if not found:
        return None
    row = {int(c): i for i, c in enumerate(centres)}
    out = np.zeros((len(row), len(ROLES)), dtype=np.float64)
    for atom, roles in found.items():
        if atom in row:
            for k in roles:
                out[row[atom], k] += 1
    return out if out.any() else None


def twin_pairs(mol: Chem.Mol) -> list[tuple[int, int, int, bool]]:
    r"""(cis atom, trans atom, role index of the cis one, oriented) of each pair of alike groups across a double
    bond (:data:`TWIN_ROLES`: their first atoms; the trans one has the next role).

    Which twin is cis to the other atom's group is read from the molecule's coordinates when it has them
    (a molfile's drawing: ``oriented``); a SMILES cannot say, since swapping the two gives the same
    structure, and the first twin is then taken as cis: the two predictions are right as a pair, not atom
    by atom (:func:`shiftrank.prediction.api.predict` gives both their mean then).

    >>> from rdkit import Chem
    >>> twin_pairs(Chem.MolFromSmiles("CC(C)=CCO"))   # prenyl alcohol: methyl 0 taken as cis to the CH2OH
    [(0, 2, 9, False)]
    >>> twin_pairs(Chem.MolFromSmiles("CC(C)=C(C)C")), twin_pairs(Chem.MolFromSmiles("CC(C)=NO"))
    ([], [(0, 2, 11, False)])
    """
    from ..chem.structure import alkene_twin_sites, symmetry_ranks   # (chem does not import prediction)

    out = []
    conf = mol.GetConformer() if mol.GetNumConformers() else None
    for x, a, b, _ in alkene_twin_sites(mol, symmetry_ranks(mol)):
        y = next(n for n in mol.GetAtomWithIdx(x).GetNeighbors() if n.GetIdx() not in (a, b))
        others = [n.GetIdx() for n in y.GetNeighbors() if n.GetIdx() != x]
        if len(others) != 1:
            continue
        if y.GetAtomicNum() == 6 and y.GetTotalNumHs() == 1:
            base = len(EZ_ROLES)
        elif y.GetAtomicNum() == 7 and y.GetTotalNumHs() == 0 and y.GetFormalCharge() == 0:
            base = len(EZ_ROLES) + 2
        else:
            continue
        same = _same_side(conf, x, y.GetIdx(), a, others[0]) if conf is not None else None
        out.append((a, b, base, True) if same is True else (b, a, base, True) if same is False else (a, b, base, False))
    return out


def _same_side(conf, x: int, y: int, t: int, p: int) -> bool | None:
    """Whether ``t`` (on ``x``) and ``p`` (on ``y``) lie on one side of the bond x=y in the drawing or the 3D
    coordinates: the dihedral t–x–y–p under 90° (None: atoms drawn on one line, or all at one point)."""
    try:
        angle = rdMolTransforms.GetDihedralDeg(conf, t, x, y, p)
    except (ValueError, RuntimeError):   # two of the atoms at one point (a molfile without coordinates)
        return None
    if not np.isfinite(angle) or abs(abs(angle) - 90.0) < 1.0:
        return None
    return abs(angle) < 90.0


def increments_from_entry(entry: dict) -> np.ndarray | None:
    """The per-role increments (ppm) of a nucleus's manifest entry, in :data:`ROLES` order (0 for a role
    the fit left out), or None when the entry has none."""
    values = (entry.get("configuration_increments") or {}).get("ppm") or {}
    if not values:
        return None
    unknown = set(values) - set(ROLES)
    if unknown:
        raise ValueError(f"unknown configuration roles in the manifest: {sorted(unknown)}")
    return np.array([float(values.get(r, 0.0)) for r in ROLES])


def increment_note(ppm: float, digits: int = 1) -> str:
    """How the tables say an atom's E/Z increment: ``'E/Z -2.2 (a group cis across the double bond)'``.

    >>> increment_note(-2.24)
    'E/Z -2.2 (a group cis across the double bond)'
    """
    why = "a group cis across the double bond" if ppm < 0 else "the configuration of a double bond beside it"
    return f"E/Z {ppm:+.{digits}f} ({why})"
