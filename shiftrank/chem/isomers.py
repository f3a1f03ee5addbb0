"""Alternatives a reaction could have given: positional isomers, ambident alternatives, tautomers,
and the products of a reaction SMARTS.

A chemist has the product they meant to make; the question is which of its alternatives the
spectrum supports.  :func:`isomers` generates them with a short relation label each:

* **positional**: every substituent of an aromatic or heteroaromatic ring (five- and six-membered
  rings and fused ring systems) moved to every other free position (a ring atom carrying H; a ring
  NH only for a group that is not a halogen) of its ring system, and every pair of substituents on
  one ring system swapped;
* **ambident**: N- against O-alkylation/acylation of amides, lactams and pyridones (both ways), and N- against
  S-alkylation of their sulfur analogues (heterocyclic thiones, alkylthio-azines); N- against
  O-acylation where a molecule has a free amine or hydroxy group besides its acyl group (aminophenols,
  amino alcohols, diols: which nucleophile took the acyl group);
  N1 against N2 (against N3 …) of azoles (pyrazole, imidazole, triazoles, tetrazole, indazole,
  benzimidazole); C- against N-alkylation or acylation of pyrroles, indoles and azaindoles (C2, C3 for N1);
  C- against O-alkylation of enolisable 1,3-dicarbonyls (both ways);
* **tautomer**: RDKit's tautomer enumerator, without forms that give up an aromatic ring;
* **stereo**: each double bond whose E/Z configuration the given structure states, drawn the other way (on
  request; kept apart from the given structure by its stereochemistry, unlike every other kind);
* a **reaction SMARTS** with its reactants: every product RDKit's reaction engine gives.

Valences and charges are checked by RDKit sanitisation; duplicates (:func:`structure_key`: the same
constitution whatever the stereochemistry or the Kekulé form; the given structure included) are removed; more alternatives than ``limit`` end
in a clear error.  A positional, ambident or reaction alternative that is only a prototropic tautomer of
the given structure or of an earlier alternative (:func:`compound_key`: the H moved between ring N atoms of
an NH-azole, or between N and O of a lactam; ethyl imidazole-4-carboxylate moved "to C5" is the same
compound) is not another product: it stays in the list, since its drawing is predicted differently, but its
relation says so and ``same_compound_as`` names the structure it duplicates.  Atom numbers in the relations are the 0-based indices of the given structure,
as in every assignment table and JSON output; positions of common heteroaromatic and fused parent rings are
also named by their conventional locants (:mod:`.locants`: 'moved from C2 to C3 of the pyridine').

>>> [a.relation for a in isomers("Cc1ccc(F)cc1", kinds=("positional",))]
['CH3 moved from ring atom 1 to ring atom 2 (now meta to F)', 'CH3 moved from ring atom 1 to ring atom 3 (now ortho to F)']
"""
from __future__ import annotations

import itertools
import re
from dataclasses import dataclass
from functools import lru_cache

from rdkit import Chem
from rdkit.Chem import AllChem
from rdkit.Chem.MolStandardize import rdMolStandardize

from ..errors import InputError
from ..inputs.molecules import to_mol
from .locants import ring_locants

KINDS = ("positional", "ambident", "tautomer", "stereo")
DEFAULT_KINDS = ("positional", "ambident")
LIMIT = 500


@dataclass(frozen=True)
class Alternative:
    """One generated alternative: its SMILES and how it relates to the given structure."""

    smiles: str
    relation: str
    kind: str
    #: the given structure's or an earlier alternative's SMILES when this one is the same compound drawn as
    #: another NH/OH tautomer (:func:`compound_key`); None for a different compound
    same_compound_as: str | None = None

    def to_dict(self) -> dict:
        d = {"smiles": self.smiles, "relation": self.relation, "kind": self.kind}
        if self.same_compound_as:
            d["same_compound_as"] = self.same_compound_as
        return d


def _single_bond_graph(mol: Chem.Mol, keep_h: bool) -> str:
    """Canonical SMILES of ``mol`` with every bond single, no aromaticity and no stereo; each atom keeps its
    element, and with ``keep_h`` its H count and charge as well (without: the heavy-atom graph alone)."""
    rw = Chem.RWMol(mol)
    for i in range(rw.GetNumAtoms()):
        a = rw.GetAtomWithIdx(i)
        a.SetNumExplicitHs(a.GetTotalNumHs() if keep_h else 0)
        a.SetNoImplicit(True)
        a.SetIsAromatic(False)
        if not keep_h:
            a.SetFormalCharge(0)
        a.SetChiralTag(Chem.ChiralType.CHI_UNSPECIFIED)
    for i in range(rw.GetNumBonds()):
        b = rw.GetBondWithIdx(i)
        b.SetBondType(Chem.BondType.SINGLE)
        b.SetIsAromatic(False)
        b.SetStereo(Chem.BondStereo.STEREONONE)
    m = rw.GetMol()
    m.UpdatePropertyCache(strict=False)
    return Chem.MolToSmiles(m, isomericSmiles=False, allHsExplicit=keep_h)


def structure_key(mol: Chem.Mol) -> str:
    """Identity of a constitution regardless of stereochemistry and of how its double bonds are drawn
    (Kekulé or resonance forms): canonical SMILES of the graph with every bond single, keeping
    each atom's element, charge and H count."""
    return _single_bond_graph(mol, keep_h=True)


_key = structure_key


def stereo_key(mol: Chem.Mol) -> str:
    """Canonical SMILES with stereochemistry: tells an E/Z alternative from the given structure."""
    return "stereo:" + Chem.MolToSmiles(mol)


def alternative_key(mol: Chem.Mol, kind: str) -> str:
    """The key duplicates are removed by: the constitution (:func:`structure_key`), or for an E/Z alternative
    (kind 'stereo') the structure with its configuration."""
    return stereo_key(mol) if kind == "stereo" else structure_key(mol)


def heavy_graph_key(mol: Chem.Mol) -> str:
    """The heavy atoms and their connections alone (no bond orders, H counts, charges or stereo): tautomers
    and resonance forms share it; a cheap first test before :func:`compound_key`.

    >>> heavy_graph_key(Chem.MolFromSmiles("O=c1cccc[nH]1")) == heavy_graph_key(Chem.MolFromSmiles("Oc1ccccn1"))
    True
    """
    return _single_bond_graph(mol, keep_h=False)


def has_mobile_h(mol: Chem.Mol) -> bool:
    """Whether any H sits on N, O or S: without one there is no prototropic tautomer to merge."""
    return any(a.GetAtomicNum() in (7, 8, 16) and a.GetTotalNumHs() for a in mol.GetAtoms())


def compound_key(mol: Chem.Mol) -> str:
    """Identity of a compound across its fast prototropic tautomers: the standard InChI, whose mobile-H
    layer makes the NH tautomers of an azole (4- and 5-substituted NH-imidazoles, 3- and 5-substituted
    NH-pyrazoles, the NH forms of triazoles, tetrazoles and benzimidazoles) and lactam / lactim forms one
    compound (InChI Trust, InChI technical manual: mobile H; keto / enol at carbon stays two).  Falls back
    to :func:`structure_key` where no InChI can be made, and takes it at once for a structure with no H on
    N, O or S (no H to move between heteroatoms; the InChI is the slow part of isomer generation).

    >>> compound_key(Chem.MolFromSmiles("CCOC(=O)c1cnc[nH]1")) == compound_key(Chem.MolFromSmiles("CCOC(=O)c1c[nH]cn1"))
    True
    >>> compound_key(Chem.MolFromSmiles("CC(=O)CC(C)=O")) == compound_key(Chem.MolFromSmiles("CC(O)=CC(C)=O"))
    False
    """
    if not has_mobile_h(mol):
        return "key:" + structure_key(mol)
    try:
        inchi = Chem.MolToInchi(mol)
    except Exception:  # noqa: BLE001 - an InChI failure only loses the tautomer check
        inchi = ""
    return inchi or "key:" + structure_key(mol)


def _finish(rw: Chem.RWMol) -> Chem.Mol | None:
    """Sanitised copy of an edited molecule (Kekulé form and aromaticity re-perceived), or None when
    RDKit refuses it."""
    try:
        m = rw.GetMol()
        m.UpdatePropertyCache(strict=False)
        Chem.SanitizeMol(m)
        return m
    except Exception:  # noqa: BLE001 - an impossible edit is simply not an alternative
        return None


def open_shell(mol: Chem.Mol) -> bool:
    """Whether a structure has an unpaired electron: what moving the group off a charged ring N (an
    N-oxide's O, a pyridinium's N-alkyl) leaves.  The one-substituent rule gives such structures (the
    development regio cases hold them), so :func:`isomers` lists them, labelled; rankings leave them out."""
    return any(a.GetNumRadicalElectrons() for a in mol.GetAtoms())


def _ring_systems(mol: Chem.Mol) -> list[set[int]]:
    """Aromatic ring systems: fused aromatic 5- and 6-membered rings merged."""
    rings = [set(r) for r in mol.GetRingInfo().AtomRings()
             if len(r) in (5, 6) and all(mol.GetAtomWithIdx(i).GetIsAromatic() for i in r)]
    systems: list[set[int]] = []
    for r in rings:
        merged = [s for s in systems if len(s & r) >= 2]
        for s in merged:
            systems.remove(s)
            r = r | s
        systems.append(r)
    return systems


def _side(mol: Chem.Mol, root: int, cut: int) -> list[int]:
    """Atoms reachable from ``root`` without passing through ``cut`` (the substituent's atoms)."""
    seen, stack = {root}, [root]
    while stack:
        a = stack.pop()
        for nb in mol.GetAtomWithIdx(a).GetNeighbors():
            j = nb.GetIdx()
            if j != cut and j not in seen:
                seen.add(j)
                stack.append(j)
    return sorted(seen)


# condensed formulas chemists write for common ring substituents (common practice); each group is
# drawn on a dummy atom '*' standing for the ring atom; any other group is named by its SMILES
GROUP_NAMES = {
    "*C": "CH3", "*CC": "C2H5", "*C(C)C": "iPr", "*C(C)(C)C": "tBu", "*C(F)(F)F": "CF3", "*C#N": "CN",
    "*C=O": "CHO", "*C(=O)O": "COOH", "*C(=O)OC": "CO2CH3", "*C(=O)OCC": "CO2C2H5", "*C(C)=O": "COCH3",
    "*C(N)=O": "CONH2", "*O": "OH", "*OC": "OCH3", "*OCC": "OC2H5", "*OC(F)(F)F": "OCF3", "*OC(C)=O": "OAc",
    "*N": "NH2", "*NC": "NHCH3", "*N(C)C": "N(CH3)2", "*NC(C)=O": "NHAc", "*[N+](=O)[O-]": "NO2",
    "*N=[N+]=[N-]": "N3", "*SC": "SCH3", "*S(C)(=O)=O": "SO2CH3", "*S(N)(=O)=O": "SO2NH2", "*c1ccccc1": "C6H5",
    "*c1ccccn1": "2-pyridyl", "*c1cccnc1": "3-pyridyl", "*c1ccncc1": "4-pyridyl", "*c1cccs1": "2-thienyl",
    "*c1ccsc1": "3-thienyl", "*c1ccco1": "2-furyl",
    "*CO": "CH2OH", "*CN": "CH2NH2", "*Cc1ccccc1": "CH2C6H5", "*Oc1ccccc1": "OC6H5", "*OCc1ccccc1": "OCH2C6H5",
    "*Nc1ccccc1": "NHC6H5", "*C#C": "C≡CH", "*C=C": "CH=CH2", "*B(O)O": "B(OH)2", "*[Si](C)(C)C": "Si(CH3)3",
    "*NC(=O)OC(C)(C)C": "NHBoc", "*C(=O)OC(C)(C)C": "CO2tBu", "*C(=O)c1ccccc1": "COC6H5", "*C(=O)NC": "CONHCH3",
    "*C(=O)N(C)C": "CON(CH3)2", "*C(=O)Nc1ccccc1": "CONHC6H5", "*NC(=O)c1ccccc1": "NHCOC6H5", "*NS(C)(=O)=O": "NHSO2CH3",
    "*C(F)F": "CHF2", "*OC(F)F": "OCHF2", "*SC(F)(F)F": "SCF3", "*COC": "CH2OCH3", "*CC#N": "CH2CN",
    # alkyl and protecting groups as chemists abbreviate them (the usual N- and O-alkylation reagents)
    "*CCC": "nPr", "*CCCC": "nBu", "*CC(C)C": "iBu", "*C1CC1": "cPr", "*CC1CC1": "CH2cPr", "*C1CCC1": "cBu",
    "*C1CCCC1": "cPent", "*C1CCCCC1": "cHex", "*CC=C": "allyl", "*CC#C": "propargyl", "*CCO": "CH2CH2OH",
    "*CCOC": "CH2CH2OCH3", "*CC(=O)OC": "CH2CO2CH3", "*CC(=O)OCC": "CH2CO2C2H5", "*Cc1ccc(OC)cc1": "PMB",
    "*C1CCCCO1": "THP", "*COCC[Si](C)(C)C": "SEM", "*S(=O)(=O)c1ccc(C)cc1": "Ts",
    # N-linked rings as chemists name them
    "*N1CCOCC1": "morpholin-4-yl", "*N1CCCCC1": "piperidin-1-yl", "*N1CCCC1": "pyrrolidin-1-yl",
    "*N1CCNCC1": "piperazin-1-yl", "*N1CCN(C)CC1": "4-methylpiperazin-1-yl", "*n1cccn1": "pyrazol-1-yl",
    "*N1CCN(C(=O)OC(C)(C)C)CC1": "4-Boc-piperazin-1-yl", "*N1CCN(C(C)=O)CC1": "4-acetylpiperazin-1-yl",
    "*N1CCN(CC)CC1": "4-ethylpiperazin-1-yl", "*N1CCN(c2ccccc2)CC1": "4-phenylpiperazin-1-yl",
    "*N1CCC(O)CC1": "4-hydroxypiperidin-1-yl", "*N1CCS(=O)(=O)CC1": "1,1-dioxothiomorpholin-4-yl",
    "*N1CCSCC1": "thiomorpholin-4-yl", "*N1CCCCCC1": "azepan-1-yl", "*N1CC1": "aziridin-1-yl", "*N1CCC1": "azetidin-1-yl",
    "*n1ccnc1": "imidazol-1-yl", "*n1ccnn1": "1,2,3-triazol-1-yl", "*n1cncn1": "1,2,4-triazol-1-yl",
    "*N1C(=O)C=CC1=O": "maleimido", "*N1C(=O)c2ccccc2C1=O": "phthalimido",
    # coupling handles and leaving or protecting groups on O and N
    "*B1OC(C)(C)C(C)(C)O1": "Bpin", "*[B-](F)(F)F": "BF3−", "*OS(=O)(=O)C(F)(F)F": "OTf", "*OS(C)(=O)=O": "OMs",
    "*OS(=O)(=O)c1ccc(C)cc1": "OTs", "*O[Si](C)(C)C(C)(C)C": "OTBS", "*OCOC": "OMOM", "*NC(=O)OCc1ccccc1": "NHCbz",
    "*N(C)C(=O)OC(C)(C)C": "N(CH3)Boc", "*Sc1ccccc1": "SC6H5", "*C(=O)N1CCOCC1": "CO-morpholin-4-yl",
    "*F": "F", "*Cl": "Cl", "*Br": "Br", "*I": "I",
    "*[O-]": "O−", "*S(=O)(=O)O": "SO3H", "*S(=O)(=O)[O-]": "SO3−", "*C(=O)[O-]": "CO2−", "*S(=O)(=O)Cl": "SO2Cl",
}


def _rooted_smiles(mol: Chem.Mol, root: int, ring_atom: int, atoms: list[int] | None = None) -> str:
    """The substituent on ``ring_atom`` whose first atom is ``root``, as canonical SMILES rooted there;
    '' when the group closes back onto the ring (not a simple substituent).  ``atoms``: its side, when known."""
    atoms = _side(mol, root, ring_atom) if atoms is None else atoms
    if ring_atom in atoms:
        return ""
    if any(mol.GetAtomWithIdx(i).GetAtomicNum() == 1 and mol.GetAtomWithIdx(i).GetIsotope() > 1 for i in atoms):
        # a labelled group keeps its labels, written D and T as chemists do ('OC(D)(D)D', not 'OC([H])([H])[H]')
        text = Chem.MolFragmentToSmiles(mol, atoms, rootedAtAtom=root, canonical=True, isomericSmiles=True)
        return text.replace("[2H]", "D").replace("[3H]", "T")
    return Chem.MolFragmentToSmiles(mol, atoms, rootedAtAtom=root, canonical=True, isomericSmiles=False)


@lru_cache(maxsize=1)
def _group_table() -> dict[str, str]:
    """:data:`GROUP_NAMES` keyed by the rooted SMILES :func:`_rooted_smiles` gives for each group."""
    table = {}
    for smi, name in GROUP_NAMES.items():
        m = Chem.MolFromSmiles(smi)
        dummy = next(a for a in m.GetAtoms() if a.GetAtomicNum() == 0)
        table[_rooted_smiles(m, dummy.GetNeighbors()[0].GetIdx(), dummy.GetIdx())] = name
    return table


def _hanging(mol: Chem.Mol, ring, root: int, ring_atom: int) -> list[tuple[int, int]]:
    """(ring atom, first atom) of each group on ``ring`` besides the bond from ``root`` to ``ring_atom``, the one it
    hangs on."""
    return [(i, n.GetIdx()) for i in ring for n in mol.GetAtomWithIdx(i).GetNeighbors()
            if n.GetIdx() not in ring and not (i == root and n.GetIdx() == ring_atom)]


def _aryl_name(mol: Chem.Mol, root: int, ring_atom: int) -> str | None:
    """'4-F-C6H4' for a benzene ring carrying one to three named groups besides the bond to the ring it hangs
    on ('3-Cl-4-CH3-C6H3', numbered from that bond for the lowest locants), or one such ring
    ('4-(4-F-C6H4)-C6H4'); None for anything else."""
    a = mol.GetAtomWithIdx(root)
    if a.GetAtomicNum() != 6 or not a.GetIsAromatic():
        return None
    rings = [r for r in mol.GetRingInfo().AtomRings() if root in r]
    if len(rings) != 1 or len(rings[0]) != 6 or any(mol.GetAtomWithIdx(i).GetAtomicNum() != 6 for i in rings[0]):
        return None
    ring = rings[0]
    if any(mol.GetRingInfo().NumAtomRings(i) > 1 for i in ring):
        return None   # fused
    subs = _hanging(mol, ring, root, ring_atom)
    if not 1 <= len(subs) <= 3:
        return None
    named = []
    for at, x in subs:
        name = _table_name(mol, x, at)
        if name is None and len(subs) == 1:
            inner = _aryl_name(mol, x, at)          # a biphenylyl: 4-(4-CH3-C6H4)-C6H4
            name = f"({inner})" if inner else None
        if name is None:
            return None
        named.append((at, _bracketed(name)))
    k = ring.index(root)
    numbered = min(([(1 + ((ring.index(at) - k) * d) % 6, name) for at, name in named] for d in (1, -1)),
                   key=lambda pairs: sorted(p for p, _ in pairs))
    return "".join(f"{p}-{name}-" for p, name in sorted(numbered)) + f"C6H{5 - len(subs)}"


def _bracketed(name: str) -> str:
    """A group's name as a prefix inside another name: 4-(morpholin-4-yl)-C6H4, not 4-morpholin-4-yl-C6H4."""
    return f"({name})" if "-" in name and not name.startswith("(") else name


def _linked_name(mol: Chem.Mol, root: int, ring_atom: int) -> str | None:
    """A CH2, O, NH, S, CO or SO2 link (one or two of them) to a named benzene ring or to a parent ring with
    locants: 'CH2(2-F-C6H4)', 'O(4-CH3-C6H4)', 'CH2(indazol-1-yl)', 'NHCO(4-OCH3-C6H4)', 'SO2NH(pyridin-2-yl)';
    None for anything else."""
    links = {(6, 2): "CH2", (8, 0): "O", (7, 1): "NH", (16, 0): "S"}
    prefix, prev, cur = "", ring_atom, root
    for _ in range(2):   # a link of one or two atoms: CH2, O, CH2O, OCH2, CH2CH2, NHCO, CONH, SO2NH …
        a = mol.GetAtomWithIdx(cur)
        oxo = [n.GetIdx() for n in a.GetNeighbors() if n.GetAtomicNum() == 8 and n.GetDegree() == 1
               and mol.GetBondBetweenAtoms(cur, n.GetIdx()).GetBondTypeAsDouble() == 2.0]
        label = links.get((a.GetAtomicNum(), a.GetTotalNumHs()))
        if oxo:   # a carbonyl or sulfonyl link: its =O atoms are part of it
            label = {(6, 1): "CO", (16, 2): "SO2"}.get((a.GetAtomicNum(), len(oxo)))
        if a.GetIsAromatic() or a.IsInRing() or a.GetDegree() - len(oxo) != 2 or a.GetFormalCharge() or label is None:
            return None
        prefix += label
        nxt = next(n.GetIdx() for n in a.GetNeighbors() if n.GetIdx() != prev and n.GetIdx() not in oxo)
        if mol.GetAtomWithIdx(nxt).IsInRing():
            break
        prev, cur = cur, nxt
    else:
        return None
    root = cur
    if _table_name(mol, nxt, root) == "C6H5":
        return f"{prefix}C6H5"   # CH2CH2C6H5, CH2OC6H5
    ring = _aryl_name(mol, nxt, root) or _ring_group_name(mol, nxt, root)
    return f"{prefix}({ring})" if ring else None


def _ring_group_name(mol: Chem.Mol, root: int, ring_atom: int) -> str | None:
    """A parent ring system (:data:`.locants.PARENTS`) bound through ``root``, named with its locants and
    its other substituents when each of those has a short name: 'pyridin-2-yl', '5-F-1-PMB-benzimidazol-2-yl',
    '1-CH3-pyrazol-4-yl'; None for anything else (a ring that closes back, an unnamed substituent)."""
    system = next((s for s in _ring_systems(mol) if root in s), None)
    if system is None or ring_atom in system:
        return None
    subs = _hanging(mol, system, root, ring_atom)
    if len(subs) > 3:
        return None
    loc = ring_locants(mol, system)
    if not loc or root not in loc[1]:
        return None
    parts = []
    for i, x in subs:
        if mol.GetBondBetweenAtoms(i, x).GetBondTypeAsDouble() != 1.0:
            return None   # (an oxo or imino group: the parent's name would change)
        name = _table_name(mol, x, i) or _aryl_name(mol, x, i)
        if name is None:
            return None
        parts.append((loc[1][i], _bracketed(name)))
    stem = loc[0][:-1] if loc[0].endswith("e") else loc[0]   # pyridine -> pyridin-2-yl, furan -> furan-2-yl
    prefix = "".join(f"{where[1:]}-{name}-" for where, name in sorted(parts, key=lambda p: _locant_key(p[0])))
    return f"{prefix}{stem}-{loc[1][root][1:]}-yl"


def _locant_key(label: str) -> tuple:
    """'N1' < 'C2' < 'C3a' < 'C4' … by number, then letter."""
    m = re.match(r"[A-Z][a-z]?(\d+)([a-z]?)", label)
    return (int(m.group(1)), m.group(2)) if m else (99, label)


def _fragment_name(mol: Chem.Mol, root: int, ring_atom: int) -> str:
    atoms = _side(mol, root, ring_atom)
    if ring_atom in atoms:
        return ""   # (the group closes back onto the ring: not a simple substituent)
    # (a side longer than a SMILES shown in full is never written out: most of a big group's cost)
    smi = _rooted_smiles(mol, root, ring_atom, atoms) if len(atoms) <= MAX_SHOWN_SMILES else None
    if smi in _group_table():
        return _group_table()[smi]
    aryl = _aryl_name(mol, root, ring_atom) or _linked_name(mol, root, ring_atom) or _ring_group_name(mol, root, ring_atom)
    if aryl:
        return aryl
    if smi is not None and len(smi) <= MAX_SHOWN_SMILES:
        return smi
    # a large group: its formula and the atom it is bound through, not a cut-off SMILES
    from .formula import hill
    from .structure import element_counts

    return f"{hill(element_counts(mol, atoms))} group (bound through atom {root})"


#: longest substituent SMILES a label shows as it is (a larger group is named by its formula)
MAX_SHOWN_SMILES = 24


def _table_name(mol: Chem.Mol, root: int, ring_atom: int) -> str | None:
    """The :data:`GROUP_NAMES` name of the group on ``ring_atom`` through ``root``, or None; a side with more
    atoms than the table's largest group is not written out to look it up."""
    atoms = _side(mol, root, ring_atom)
    if len(atoms) > _group_table_size():
        return None
    return _group_table().get(_rooted_smiles(mol, root, ring_atom, atoms))


@lru_cache(maxsize=1)
def _group_table_size() -> int:
    return max(Chem.MolFromSmiles(smi).GetNumAtoms() - 1 for smi in GROUP_NAMES)


def _ring_relation(mol: Chem.Mol, i: int) -> str:
    """'; ortho to CH3, meta to CO2H' for a six-membered aromatic ring atom of a reactant, against that ring's
    substituents (not counting one on ``i`` itself); '' otherwise."""
    for system in _ring_systems(mol):
        if i in system:
            rel = _relative(mol, system, i, [(r, name) for r, _, name in _substituents(mol, system) if r != i])
            return f"; {rel[4:]}" if rel.startswith("now ") else ""
    return ""


def _locant(mol: Chem.Mol, i: int) -> str | None:
    """'C4 of the pyrimidine': atom ``i``'s locant in its parent ring (:mod:`.locants`), or None."""
    for system in _ring_systems(mol):
        if i in system:
            loc = ring_locants(mol, system)
            return f"{loc[1][i]} of the {loc[0]}" if loc and i in loc[1] else None
    return None


def _substituents(mol: Chem.Mol, system: set[int]) -> list[tuple[int, int, str]]:
    """(ring atom, substituent root atom, name) of every single-bonded, non-ring substituent of a ring system."""
    out = []
    for r in sorted(system):
        for b in mol.GetAtomWithIdx(r).GetBonds():
            x = b.GetOtherAtomIdx(r)
            if x in system or b.IsInRing() or b.GetBondType() != Chem.BondType.SINGLE:
                continue
            name = _fragment_name(mol, x, r)
            if name:
                out.append((r, x, name))
    return out


def _free(mol: Chem.Mol, i: int) -> bool:
    a = mol.GetAtomWithIdx(i)
    return a.GetTotalNumHs() > 0 and a.GetAtomicNum() in (6, 7)


def _rebond(rw: Chem.RWMol, root: int, old: int, new: int, bond=Chem.BondType.SINGLE) -> None:
    """Move ``root``'s bond from atom ``old`` to atom ``new``, keeping a stereocentre at ``root`` as it was:
    RDKit reads a chiral tag against the order of the atom's bonds, and the new bond comes last."""
    before = [b.GetOtherAtomIdx(root) for b in rw.GetAtomWithIdx(root).GetBonds()]
    rw.RemoveBond(old, root)
    rw.AddBond(new, root, bond)
    a = rw.GetAtomWithIdx(root)
    if a.GetChiralTag() not in (Chem.ChiralType.CHI_TETRAHEDRAL_CW, Chem.ChiralType.CHI_TETRAHEDRAL_CCW):
        return
    want = [new if i == old else i for i in before]
    now = [b.GetOtherAtomIdx(root) for b in a.GetBonds()]
    if sorted(want) != sorted(now):
        return
    perm = [now.index(i) for i in want]
    swaps = sum(1 for i in range(len(perm)) for j in range(i + 1, len(perm)) if perm[i] > perm[j])
    if swaps % 2:
        a.InvertChirality()


def _reattach(mol: Chem.Mol, moves: list[tuple[int, int, int]], keep_h_off: bool = False) -> Chem.Mol | None:
    """Move substituent roots: each (old ring atom, root, new ring atom).  A ring N that loses its
    substituent takes an H ([nH]) unless ``keep_h_off`` (an azole N1 → N2 move: it becomes pyridine-like)."""
    rw = Chem.RWMol(mol)
    for old, root, new in moves:
        _rebond(rw, root, old, new)
    touched = {old for old, _, _ in moves} | {new for _, _, new in moves}
    for i in touched:
        a = rw.GetAtomWithIdx(i)
        a.SetNoImplicit(False)
        a.SetNumExplicitHs(0)
    for i in touched:  # ring N: [nH] when it lost its substituent and needs the H, plain n when it gained one
        a = rw.GetAtomWithIdx(i)
        if a.GetAtomicNum() == 7 and a.GetIsAromatic():
            heavy = a.GetDegree()
            a.SetNoImplicit(True)
            a.SetNumExplicitHs(1 if heavy == 2 and not keep_h_off and not a.GetFormalCharge()
                               and mol.GetAtomWithIdx(i).GetTotalNumHs() == 0 and any(o == i for o, _, _ in moves) else 0)
    return _finish(rw)


def _relative(mol: Chem.Mol, system: set[int], target: int, others: list[tuple[int, str]]) -> str:
    """'now ortho to X' for a six-membered ring, naming where the moved group stands against the other
    substituents of that ring (up to three: 'now para to OCH3, meta to NH2'); '' when it shares its ring
    with none of them."""
    rings = [r for r in mol.GetRingInfo().AtomRings() if target in r and len(r) == 6 and set(r) <= system]
    if not rings or not others or len(others) > 3:
        return ""
    ring = rings[0]
    where = []
    for r_other, name in others:
        if r_other not in ring:
            continue
        d = abs(ring.index(target) - ring.index(r_other))
        d = min(d, 6 - d)
        if d:
            where.append(f"{['ipso', 'ortho', 'meta', 'para'][d]} to {name}")
    return f"now {', '.join(where)}" if where else ""


def _positional(mol: Chem.Mol) -> list[tuple[Chem.Mol, str]]:
    out = []
    for system in _ring_systems(mol):
        loc = ring_locants(mol, system)
        # a group on a neutral five-ring nitrogen is an N-substituent: its alternatives are the other ring
        # N (ambident); groups on carbons and on charged six-ring N (pyridinium, N-oxide) move around
        subs = [s for s in _substituents(mol, system) if mol.GetAtomWithIdx(s[0]).GetAtomicNum() == 6
                or (mol.GetAtomWithIdx(s[0]).GetFormalCharge() > 0 and mol.GetAtomWithIdx(s[0]).IsInRingSize(6))]
        free = [i for i in sorted(system) if _free(mol, i)]
        # a ring NH takes a carbon, N, O or S group (N- against C-alkylation or arylation); a halogen on a
        # ring N (an N-haloazole) is a reagent, not a substitution product, and is not generated
        x_is_halogen = {x: mol.GetAtomWithIdx(x).GetAtomicNum() in (9, 17, 35, 53) for _, x, _ in subs}
        # the smaller group moves first: when moving either of two groups gives one compound (a disubstituted
        # ring), the label names the methyl that moved, not the rest of the molecule
        for r, x, name in sorted(subs, key=lambda s: len(_side(mol, s[1], s[0]))):
            others = [(r2, n2) for r2, x2, n2 in subs if (r2, x2) != (r, x)]
            for t in free:
                if t == r or (mol.GetAtomWithIdx(t).GetAtomicNum() == 7 and x_is_halogen[x]):
                    continue
                m = _reattach(mol, [(r, x, t)])
                if m is not None:
                    rel = _relative(mol, system, t, others)
                    if loc:   # 'moved from C2 to C3 of the pyridine (atom 4 to atom 5; now ortho to CF3)'
                        out.append((m, f"{name} moved from {loc[1][r]} to {loc[1][t]} of the {loc[0]} "
                                       f"(atom {r} to atom {t}{'; ' + rel if rel else ''})"))
                    else:
                        out.append((m, f"{name} moved from ring atom {r} to ring atom {t}{f' ({rel})' if rel else ''}"))
        for k, (r1, x1, n1) in enumerate(subs):
            for r2, x2, n2 in subs[k + 1:]:
                if r1 == r2 or n1 == n2:
                    continue
                if (mol.GetAtomWithIdx(r2).GetAtomicNum() == 7 and x_is_halogen[x1]
                        or mol.GetAtomWithIdx(r1).GetAtomicNum() == 7 and x_is_halogen[x2]):
                    # a halogen traded onto a ring N (an N-oxide's O for a ring Cl: '[O-]c1cc[n+](Cl)cc1') is a
                    # reagent, not a product, as in the moves above; an alkyl may (2-picoline N-oxide against
                    # 1-methyl-2-pyridone)
                    continue
                m = _reattach(mol, [(r1, x1, r2), (r2, x2, r1)])
                if m is not None:
                    where = f"{loc[1][r1]} and {loc[1][r2]} of the {loc[0]}; " if loc else ""
                    out.append((m, f"{n1} and {n2} swapped ({where}ring atoms {r1} and {r2})"))
    return out


def _n_site(mol: Chem.Mol, n: int, system: set[int], moving: int, parent: bool = True) -> str:
    """Where ring N ``n`` stands: its locant in a parent ring of :mod:`.locants` ('N2 of the indazole', the
    parent named when ``parent``) and its two ring neighbours ('(atom 3, between CH and N)'); without a
    locant 'ring N (atom 1, between N and C-CH3)', so that N1 and N2 of an azole are told apart all the same.
    ``moving`` is the root of the group that moves (not counted as a neighbour's substituent)."""
    ring = next((r for r in mol.GetRingInfo().AtomRings() if n in r and set(r) <= system), ())
    words = []
    for b in mol.GetAtomWithIdx(n).GetBonds():
        j = b.GetOtherAtomIdx(n)
        if j not in ring:
            continue
        a = mol.GetAtomWithIdx(j)
        if sum(1 for r in mol.GetRingInfo().AtomRings() if j in r and set(r) <= system) > 1:
            # beside a substituted carbon of the other ring (a benzimidazole's 4- against 7-position)
            near = [_fragment_name(mol, c.GetOtherAtomIdx(k.GetIdx()), k.GetIdx())
                    for k in a.GetNeighbors() if k.GetIdx() not in ring and k.GetIdx() in system
                    and k.GetAtomicNum() == 6 for c in k.GetBonds()
                    if c.GetOtherAtomIdx(k.GetIdx()) not in system and c.GetBondType() == Chem.BondType.SINGLE]
            words.append("the ring fusion" + (f" next to C-{near[0]}" if near and near[0] else ""))
            continue
        if a.GetAtomicNum() != 6:
            words.append(a.GetSymbol())
            continue
        outside = [c for c in a.GetBonds() if c.GetOtherAtomIdx(j) not in system and c.GetOtherAtomIdx(j) != moving]
        if not outside:
            words.append("CH" if a.GetTotalNumHs() else "C")
            continue
        c = outside[0]
        x = c.GetOtherAtomIdx(j)
        if c.GetBondType() == Chem.BondType.DOUBLE:
            words.append(f"C={mol.GetAtomWithIdx(x).GetSymbol()}")
        else:
            words.append(f"C-{_fragment_name(mol, x, j) or mol.GetAtomWithIdx(x).GetSymbol()}")
    words.sort(key=lambda w: (w.startswith("the ring fusion"), w))
    where = f"atom {n}, between {' and '.join(words)}" if len(words) == 2 else f"atom {n}"
    loc = ring_locants(mol, system)
    if loc and n in loc[1]:
        return f"{loc[1][n]}{f' of the {loc[0]}' if parent else ''} ({where})"
    return f"ring N ({where})"


def _azole_moves(mol: Chem.Mol) -> list[tuple[Chem.Mol, str]]:
    """N1 ↔ N2 (↔ N3 …) of an N-substituted azole: the substituent moved to every other ring nitrogen
    of the same five-membered aromatic ring (or its fused system) that carries neither H nor substituent."""
    out = []
    for system in _ring_systems(mol):
        five = [set(r) for r in mol.GetRingInfo().AtomRings() if len(r) == 5 and set(r) <= system]
        if not five:
            continue
        ring_n = [i for i in sorted(system) if mol.GetAtomWithIdx(i).GetAtomicNum() == 7]
        for r, x, name in _substituents(mol, system):
            if r not in ring_n or not any(r in f for f in five):
                continue
            for t in ring_n:
                a = mol.GetAtomWithIdx(t)
                if t == r or a.GetDegree() != 2 or a.GetTotalNumHs() or a.GetFormalCharge():
                    continue
                if not any(t in f for f in five):
                    continue  # a pyridine-type N of a fused six-membered ring does not take the group
                m = _reattach(mol, [(r, x, t)], keep_h_off=True)
                if m is not None:
                    out.append((m, f"{name} on {_n_site(mol, t, system, x)} instead of {_n_site(mol, r, system, x, parent=False)}"))
    return out


def _pyrrole_c_moves(mol: Chem.Mol) -> list[tuple[Chem.Mol, str]]:
    """C- against N-alkylation or acylation of a pyrrole-type ring (pyrrole, indole, azaindoles: a five-membered
    aromatic ring whose only heteroatom is that N): the alkyl or acyl group on the ring N moved to each ring CH of
    the same five-membered ring, the N taking the H back (an indole alkylated or acylated at C3, or C2, instead of
    N1; common practice).  Azoles with a second ring N have their N1/N2 alternatives (:func:`_azole_moves`) instead,
    and aryl and sulfonyl groups, which do not go onto ring carbons under those conditions, are not moved."""
    out = []
    for system in _ring_systems(mol):
        for r, x, name in _substituents(mol, system):
            a = mol.GetAtomWithIdx(r)
            if a.GetAtomicNum() != 7 or not a.GetIsAromatic() or a.GetFormalCharge():
                continue
            kind = _group_kind(mol, x)
            if kind not in ("alkyl", "acyl"):
                continue
            for ring in mol.GetRingInfo().AtomRings():
                if len(ring) != 5 or r not in ring or not set(ring) <= system:
                    continue
                if any(mol.GetAtomWithIdx(i).GetAtomicNum() != 6 for i in ring if i != r):
                    continue
                for t in ring:
                    if t == r or not _free(mol, t):
                        continue
                    m = _reattach(mol, [(r, x, t)])
                    if _neutral_closed_shell(m) and m.GetAtomWithIdx(r).GetTotalNumHs() == 1:
                        site = _locant(mol, t) or f"ring atom {t}"
                        frm = (_locant(mol, r) or "ring N").split(" of the ")[0]
                        out.append((m, f"{name} on {site} (atom {t}) instead of {frm} (atom {r}): C- rather than "
                                       f"N-{'alkylation' if kind == 'alkyl' else 'acylation'}"))
    return out


def _lactam_n_moves(mol: Chem.Mol) -> list[tuple[Chem.Mol, str]]:
    """N1 against N3 of a ring lactam (a pyrimidinone, uracil, quinazolinone, xanthine-type ring): the group
    on one ring N moved to another ring N of the same aromatic system that carries a ring C=O; to an N-H the
    H changes places with it (uracil N1 ↔ N3), to a pyridine-type N the double bonds shift (quinazolin-4-one
    N3 ↔ N1), kept only when RDKit finds a neutral closed-shell form for the result."""
    out = []
    for system in _ring_systems(mol):
        carbonyl = any(b.GetBondType() == Chem.BondType.DOUBLE and b.GetOtherAtom(a).GetAtomicNum() in (8, 16)
                       and b.GetOtherAtomIdx(a.GetIdx()) not in system
                       for a in (mol.GetAtomWithIdx(i) for i in system) for b in a.GetBonds())
        if not carbonyl:
            continue
        ring_n = [i for i in sorted(system) if mol.GetAtomWithIdx(i).GetAtomicNum() == 7]
        for r, x, name in _substituents(mol, system):
            if r not in ring_n or mol.GetAtomWithIdx(r).GetFormalCharge():
                continue
            for t in ring_n:
                a = mol.GetAtomWithIdx(t)
                if t == r or a.GetDegree() != 2 or a.GetFormalCharge() or a.GetTotalNumHs() > 1:
                    continue
                m = _reattach(mol, [(r, x, t)], keep_h_off=not a.GetTotalNumHs())
                if _neutral_closed_shell(m):
                    out.append((m, f"{name} on {_n_site(mol, t, system, x)} instead of {_n_site(mol, r, system, x, parent=False)}"))
            kind = _group_kind(mol, x)
            if kind is None:
                continue
            # O-alkylation at a ring C=O further round the ring (a uracil's O4 for its N1 group; the C=O next to
            # the N is the N- against O-alkylation of the amide, below)
            for c in system:
                for b in mol.GetAtomWithIdx(c).GetBonds():
                    o = b.GetOtherAtomIdx(c)
                    if (b.GetBondType() != Chem.BondType.DOUBLE or mol.GetAtomWithIdx(o).GetAtomicNum() not in (8, 16)
                            or o in system or mol.GetBondBetweenAtoms(c, r) is not None):
                        continue
                    m = _ring_n_o_move(mol, x, r, o, c, o, r, Chem.BondType.SINGLE)
                    if m is not None:
                        ch = mol.GetAtomWithIdx(o).GetSymbol()
                        out.append((m, f"{ch}-{kind} instead of N-{kind} (group moved from N atom {r} to {ch} atom {o})"))
    return out


def _alkoxy_azine_moves(mol: Chem.Mol) -> list[tuple[Chem.Mol, str]]:
    """The reverse of the O-alkylation above: the group of an alkoxy- or acyloxy-azine moved from its O to a ring
    N of the same six-membered ring further round (4-methoxypyridine -> 1-methylpyridin-4-one; the N next to
    the carbon is the amide case of :func:`_n_o_moves`)."""
    out = []
    rings6 = [set(r) for r in mol.GetRingInfo().AtomRings() if len(r) == 6]
    for system in _ring_systems(mol):
        for c in system:
            for b in mol.GetAtomWithIdx(c).GetBonds():
                o = b.GetOtherAtom(mol.GetAtomWithIdx(c))
                if o.GetAtomicNum() not in (8, 16) or o.GetIdx() in system or o.GetDegree() != 2 or b.GetBondType() != Chem.BondType.SINGLE:
                    continue
                x = next(n.GetIdx() for n in o.GetNeighbors() if n.GetIdx() != c)
                kind = _group_kind(mol, x)
                if kind is None:
                    continue
                for t in system:
                    a = mol.GetAtomWithIdx(t)
                    if (a.GetAtomicNum() != 7 or a.GetDegree() != 2 or a.GetTotalNumHs() or a.GetFormalCharge()
                            or mol.GetBondBetweenAtoms(c, t) is not None or not any({c, t} <= r for r in rings6)):
                        continue
                    m = _ring_n_o_move(mol, x, o.GetIdx(), t, c, o.GetIdx(), t, Chem.BondType.DOUBLE)
                    if m is not None:
                        out.append((m, f"N-{kind} instead of {o.GetSymbol()}-{kind} (group moved from {o.GetSymbol()} atom {o.GetIdx()} to N atom {t})"))
    return out


def _ring_n_o_move(mol: Chem.Mol, x: int, old: int, new: int, c: int, o: int, n: int, co: Chem.BondType) -> Chem.Mol | None:
    """Group root ``x`` moved from atom ``old`` to atom ``new`` between a ring N ``n`` and the oxygen ``o`` on ring
    carbon ``c``: the C–O bond becomes ``co`` (single when the group goes onto O, double when it leaves it), the
    ring N keeps no H, and RDKit's kekulization places the ring's double bonds.  None when it cannot, or when
    the result is charged or open-shell."""
    rw = Chem.RWMol(mol)
    _rebond(rw, x, old, new)
    bond = rw.GetBondBetweenAtoms(c, o)
    bond.SetBondType(co)
    bond.SetIsAromatic(False)
    ring_n = rw.GetAtomWithIdx(n)
    ring_n.SetNoImplicit(True)
    ring_n.SetNumExplicitHs(0)
    m = _finish(rw)
    return m if _neutral_closed_shell(m) else None


def _neutral_closed_shell(m: Chem.Mol | None) -> bool:
    """Whether an edited structure is one an alkylation gives: read by RDKit, uncharged, no unpaired electron."""
    return m is not None and not open_shell(m) and not any(a.GetFormalCharge() for a in m.GetAtoms())


# C- against O-alkylation of 1,3-dicarbonyls, on the Kekulé form: (reaction SMARTS, relation)
_DICARBONYL = [
    # (the alkyl group's bond is a chain bond: a ring carbon is not an alkylating agent's carbon)
    ("[C;!$(C=*):1](!@[CX4:6])(-[C:2]=[O:3])-[C:4]=[O:5]>>[C:1](=[C:2]-[O:3]-[C:6])-[C:4]=[O:5]",
     "O-alkyl enol ether instead of C-alkyl (1,3-dicarbonyl)"),
    ("[C:1](=[C:2]-[O:3]!@[CX4:6])-[C:4]=[O:5]>>[C:1](-[C:6])(-[C:2]=[O:3])-[C:4]=[O:5]",
     "C-alkyl instead of O-alkyl enol ether (1,3-dicarbonyl)"),
]
_DICARBONYL_RXNS = None


def _group_kind(mol: Chem.Mol, root: int) -> str | None:
    """'alkyl' (sp3 carbon), 'acyl' (C=O carbon), 'sulfonyl' (an S with two =O: Ts, Ms, Tf) or None for a group
    that does not migrate between N and O."""
    a = mol.GetAtomWithIdx(root)
    if a.GetAtomicNum() == 16 and not a.GetIsAromatic() and sum(
            1 for b in a.GetBonds() if b.GetBondType() == Chem.BondType.DOUBLE and b.GetOtherAtom(a).GetAtomicNum() == 8) == 2:
        return "sulfonyl"
    if a.GetAtomicNum() != 6 or a.GetIsAromatic():
        return None
    if any(b.GetBondType() == Chem.BondType.DOUBLE and b.GetOtherAtom(a).GetAtomicNum() == 8 for b in a.GetBonds()):
        return "acyl"
    return "alkyl" if a.GetHybridization() == Chem.HybridizationType.SP3 else None


def _n_o_moves(mol: Chem.Mol) -> list[tuple[Chem.Mol, str]]:
    """N- against O-alkylation/acylation of amides, lactams and pyridones, both ways (manual edit, so
    that aromatic pyridones and alkoxy-azines keep their aromatic form)."""
    out = []
    for c in mol.GetAtoms():
        if c.GetAtomicNum() != 6:
            continue
        for bo in c.GetBonds():
            o = bo.GetOtherAtom(c)
            if o.GetAtomicNum() not in (8, 16):   # O, or S of a thioamide, thione or alkylthio-azine
                continue
            ch = o.GetSymbol()
            for bn in c.GetBonds():
                n = bn.GetOtherAtom(c)
                if n.GetAtomicNum() != 7 or n.GetFormalCharge() or o.GetFormalCharge():
                    continue
                # N-R amide / lactam / pyridone  ->  O-R imidate / alkoxy-azine
                if bo.GetBondType() == Chem.BondType.DOUBLE and not n.GetTotalNumHs():
                    for bx in n.GetBonds():
                        x = bx.GetOtherAtom(n)
                        if x.GetIdx() == c.GetIdx() or bx.IsInRing() or bx.GetBondType() != Chem.BondType.SINGLE:
                            continue
                        kind = _group_kind(mol, x.GetIdx())
                        if kind is None or n.GetDegree() > 3:
                            continue
                        m = _move_between_n_and_o(mol, c, o, n, x, to_oxygen=True, aromatic_cn=bn.GetIsAromatic())
                        if m is not None:
                            out.append((m, f"{ch}-{kind} instead of N-{kind} (group moved from N atom {n.GetIdx()} to {ch} atom {o.GetIdx()})"))
                # O-R imidate / alkoxy-azine  ->  N-R amide / pyridone
                if bo.GetBondType() == Chem.BondType.SINGLE and not bo.GetIsAromatic() and o.GetDegree() == 2 \
                        and not n.GetTotalNumHs() and n.GetDegree() == 2 and \
                        (bn.GetBondType() == Chem.BondType.DOUBLE or bn.GetIsAromatic()):
                    x = next(b.GetOtherAtom(o) for b in o.GetBonds() if b.GetOtherAtom(o).GetIdx() != c.GetIdx())
                    kind = _group_kind(mol, x.GetIdx())
                    if kind is None:
                        continue
                    m = _move_between_n_and_o(mol, c, o, n, x, to_oxygen=False, aromatic_cn=bn.GetIsAromatic())
                    if m is not None:
                        out.append((m, f"N-{kind} instead of {ch}-{kind} (group moved from {ch} atom {o.GetIdx()} to N atom {n.GetIdx()})"))
    return out


def _move_between_n_and_o(mol: Chem.Mol, c, o, n, x, to_oxygen: bool, aromatic_cn: bool) -> Chem.Mol | None:
    """Move group atom ``x`` between the N and the O of an N-C=O / N=C-O unit and swap the
    C-O / C-N bond orders to match (amide/lactam <-> imidate/alkoxy-azine)."""
    single, double = Chem.BondType.SINGLE, Chem.BondType.DOUBLE
    frm, to = (n, o) if to_oxygen else (o, n)
    rw = Chem.RWMol(mol)
    _rebond(rw, x.GetIdx(), frm.GetIdx(), to.GetIdx())
    rw.GetBondBetweenAtoms(c.GetIdx(), o.GetIdx()).SetBondType(single if to_oxygen else double)
    if not aromatic_cn:
        rw.GetBondBetweenAtoms(c.GetIdx(), n.GetIdx()).SetBondType(double if to_oxygen else single)
    rn = rw.GetAtomWithIdx(n.GetIdx())
    rn.SetNoImplicit(True)
    rn.SetNumExplicitHs(0)
    return _finish(rw)


def _free_nucleophile(a: Chem.Atom) -> str | None:
    """'N' for an amine N-H, 'O' for an alcohol or phenol O-H that an acyl group could have taken instead;
    None for anything else (amide or sulfonamide N-H, aromatic N-H, carboxylic acid O-H, charged atoms)."""
    if a.GetFormalCharge() or a.GetIsAromatic() or not a.GetTotalNumHs():
        return None
    for nb in a.GetNeighbors():
        if nb.GetAtomicNum() in (6, 15, 16) and any(b.GetBondType() == Chem.BondType.DOUBLE and b.GetOtherAtom(nb).GetAtomicNum() in (8, 16)
                                                    for b in nb.GetBonds()):
            return None   # already acylated or sulfonylated (amide, carbamate, acid, sulfonamide)
    return {7: "N", 8: "O"}.get(a.GetAtomicNum())


def _ring_nh(a: Chem.Atom) -> bool:
    """A pyrrole-type N-H of a five-membered aromatic ring (an azole's NH), which can take an acyl group."""
    return (a.GetAtomicNum() == 7 and a.GetIsAromatic() and a.GetTotalNumHs() == 1 and not a.GetFormalCharge()
            and a.IsInRingSize(5))


def _acyl_moves(mol: Chem.Mol) -> list[tuple[Chem.Mol, str]]:
    """N- against O-acylation of a molecule with both an amine and a hydroxy group (an aminophenol, an amino
    alcohol): an acyl group on one heteroatom moved to every free N-H or O-H of the other kind or the same kind
    elsewhere (chemoselectivity of the acylation; common practice).  The acyl group is a C=O carbon bound by a
    chain bond (not a ring bond) to a non-aromatic N or O, with all it carries (Boc as CO2tBu: N-Boc against
    the O-Boc carbonate).  An azole's ring NH is a nucleophile too: an aminopyrazole's acetamide against the
    1-acetylpyrazole amine, both ways (a group moving between the azole's own ring N is an azole move)."""
    out = []
    targets = [(a.GetIdx(), k) for a in mol.GetAtoms() for k in [_free_nucleophile(a) or ("ring N" if _ring_nh(a) else None)] if k]
    # the other ring N of an NH-azole too (its H moves off the NH): 1-acyl-3-amino and 1-acyl-5-aminopyrazole
    ring_h = {}
    for t, k in list(targets):
        if k != "ring N":
            continue
        for ring in mol.GetRingInfo().AtomRings():
            if t in ring and len(ring) == 5:
                for i in ring:
                    a = mol.GetAtomWithIdx(i)
                    if (a.GetAtomicNum() == 7 and a.GetIsAromatic() and a.GetDegree() == 2 and not a.GetTotalNumHs()
                            and not a.GetFormalCharge() and i not in ring_h):
                        ring_h[i] = t
                        targets.append((i, "ring N"))
    if not targets:
        return out
    for b in mol.GetBonds():
        if b.IsInRing() or b.GetBondType() != Chem.BondType.SINGLE:
            continue
        for h, c in ((b.GetBeginAtom(), b.GetEndAtom()), (b.GetEndAtom(), b.GetBeginAtom())):
            ring_source = h.GetIsAromatic() and h.GetAtomicNum() == 7 and h.IsInRingSize(5) and h.GetDegree() == 3
            if (h.GetAtomicNum() not in (7, 8) or h.GetIsAromatic() and not ring_source or h.GetFormalCharge()
                    or _group_kind(mol, c.GetIdx()) not in ("acyl", "sulfonyl")):
                continue
            kind = _group_kind(mol, c.GetIdx())
            frm = "N" if h.GetAtomicNum() == 7 else "O"
            name = _fragment_name(mol, c.GetIdx(), h.GetIdx())
            group = set(_side(mol, c.GetIdx(), h.GetIdx()))
            for t, to in targets:
                if t == h.GetIdx() or t in group or ring_source and to == "ring N":
                    continue
                if ring_source or to == "ring N":   # an azole N gains or loses the group: its H goes or comes
                    src = mol
                    if t in ring_h:   # onto the pyridine-type N: the ring's NH gives up its H
                        rw = Chem.RWMol(mol)
                        nh = rw.GetAtomWithIdx(ring_h[t])
                        nh.SetNoImplicit(True)
                        nh.SetNumExplicitHs(0)
                        src = rw.GetMol()
                    m = _reattach(src, [(h.GetIdx(), c.GetIdx(), t)])
                else:
                    rw = Chem.RWMol(mol)
                    _rebond(rw, c.GetIdx(), h.GetIdx(), t)
                    for i in (h.GetIdx(), t):
                        a = rw.GetAtomWithIdx(i)
                        a.SetNoImplicit(False)
                        a.SetNumExplicitHs(0)
                    m = _finish(rw)
                if m is None:
                    continue
                if to == "ring N":
                    what = f"{kind} on ring {_locant(mol, t) or 'N'} instead of the exocyclic {frm}"
                    to_word = "N"
                elif ring_source:
                    what = f"{to}-{kind} instead of {kind} on ring {_locant(mol, h.GetIdx()) or 'N'}"
                    to_word = to
                else:
                    what = (f"{to}-{kind} instead of {frm}-{kind}" if to != frm else
                            f"{kind} on another {to}")   # (a diol's other OH: which hydroxy took the group)
                    to_word = to
                out.append((m, f"{what} ({name or kind} moved from {frm} atom {h.GetIdx()} to {to_word} atom {t})"))
    return out


def _ambident(mol: Chem.Mol) -> list[tuple[Chem.Mol, str]]:
    global _DICARBONYL_RXNS
    if _DICARBONYL_RXNS is None:
        _DICARBONYL_RXNS = [(AllChem.ReactionFromSmarts(s), lab) for s, lab in _DICARBONYL]
    out = _azole_moves(mol) + _pyrrole_c_moves(mol) + _lactam_n_moves(mol) + _n_o_moves(mol) + _alkoxy_azine_moves(mol) + _acyl_moves(mol)
    kek = Chem.Mol(mol)
    try:
        Chem.Kekulize(kek, clearAromaticFlags=True)
    except Exception:  # noqa: BLE001
        return out
    for rxn, label in _DICARBONYL_RXNS:
        for prods in rxn.RunReactants((kek,)):
            m = _finish(Chem.RWMol(prods[0]))
            if m is not None:
                out.append((m, label))
    return out


_FLIP = {Chem.BondStereo.STEREOE: Chem.BondStereo.STEREOZ, Chem.BondStereo.STEREOZ: Chem.BondStereo.STEREOE,
         Chem.BondStereo.STEREOCIS: Chem.BondStereo.STEREOTRANS, Chem.BondStereo.STEREOTRANS: Chem.BondStereo.STEREOCIS}


def _stereo_flips(mol: Chem.Mol) -> list[tuple[Chem.Mol, str]]:
    """E against Z: each double bond whose configuration the given structure states (C=C, C=N of an oxime,
    hydrazone or imine), drawn the other way, one bond at a time (a Wittig, Horner–Wadsworth–Emmons, Heck or
    condensation product; common practice).  Labelled by the CIP descriptors (RDKit's new CIP labeller).  A
    bond the drawing leaves open is not enumerated: the given structure then makes no claim to test."""
    from rdkit.Chem import rdCIPLabeler

    given = Chem.Mol(mol)
    rdCIPLabeler.AssignCIPLabels(given)
    # cis/trans against each bond's stereo atoms (not CIP E/Z), so that flipping the flag flips the geometry; the
    # single bonds' '/' '\\' directions are cleared, or they would restore the given configuration
    rel = Chem.Mol(mol)
    Chem.SetBondStereoFromDirections(rel)
    out = []
    for b in given.GetBonds():
        if b.GetBondType() != Chem.BondType.DOUBLE or rel.GetBondWithIdx(b.GetIdx()).GetStereo() not in _FLIP:
            continue
        rw = Chem.RWMol(rel)
        for other in rw.GetBonds():
            other.SetBondDir(Chem.BondDir.NONE)
        nb = rw.GetBondWithIdx(b.GetIdx())
        nb.SetStereo(_FLIP[nb.GetStereo()])
        edited = rw.GetMol()
        # the directions written back from the flags, so that the SMILES keeps every configuration (a salt's
        # organic fragment carries no perception flag, and its SMILES would otherwise lose them)
        Chem.SetDoubleBondNeighborDirections(edited)
        m = Chem.MolFromSmiles(Chem.MolToSmiles(edited))   # only the configuration changed: no sanitising edit
        if m is None:
            continue
        was = b.GetProp("_CIPCode") if b.HasProp("_CIPCode") else None
        flipped = Chem.Mol(edited)
        rdCIPLabeler.AssignCIPLabels(flipped)
        # the edited molecule keeps the given atom order, so the same bond index is the same bond
        fb = flipped.GetBondWithIdx(b.GetIdx())
        now = fb.GetProp("_CIPCode") if fb.HasProp("_CIPCode") else None
        i, j = b.GetBeginAtomIdx(), b.GetEndAtomIdx()
        what = f"{given.GetAtomWithIdx(i).GetSymbol()}={given.GetAtomWithIdx(j).GetSymbol()} (atoms {i} and {j})"
        out.append((m, f"{what} {now} instead of {was}" if now and was and now != was
                    else f"{what} drawn the other way round"))
    return out


def _tautomers(mol: Chem.Mol) -> list[tuple[Chem.Mol, str]]:
    """RDKit's tautomers of ``mol`` that keep at least its aromatic atoms (one that gives up an aromatic ring,
    a cyclohexadienone for a phenol or a 3H-indole for an indole, is not what a chemist proposes; common
    practice), each labelled with the H it moves when it moves one (the enumerator keeps the atom order)."""
    enum = rdMolStandardize.TautomerEnumerator()
    enum.SetMaxTautomers(50)
    base_h = [a.GetTotalNumHs() for a in mol.GetAtoms()]
    base_aromatic = sum(a.GetIsAromatic() for a in mol.GetAtoms())
    out = []
    for m in enum.Enumerate(mol):
        if sum(a.GetIsAromatic() for a in m.GetAtoms()) < base_aromatic:
            continue
        h = [a.GetTotalNumHs() for a in m.GetAtoms()]
        if len(h) == len(base_h) and any(x != y and mol.GetAtomWithIdx(i).GetAtomicNum() == 6 and not _dicarbonyl_carbon(mol, i)
                                         for i, (x, y) in enumerate(zip(base_h, h))):
            continue
        lost = [i for i, (x, y) in enumerate(zip(base_h, h)) if y < x]
        gained = [i for i, (x, y) in enumerate(zip(base_h, h)) if y > x]
        def name(i):   # 'N3 of the pyrimidine (atom 11)', 'O (atom 10)'
            return f"{_locant(mol, i) or mol.GetAtomWithIdx(i).GetSymbol()} (atom {i})"
        label = (f"tautomer: H moved from {name(lost[0])} to {name(gained[0])}"
                 if len(lost) == 1 and len(gained) == 1 and len(h) == len(base_h) else "tautomer")
        out.append((m, label))
    return out


def _main_fragment(mol: Chem.Mol) -> tuple[Chem.Mol, str, list[int] | None]:
    """A salt or solvate's organic part, whose alternatives are generated: (that fragment, '.' + the other
    fragments' SMILES to put back on each alternative, the fragment's atom numbers in the given structure);
    the molecule itself, '' and None when it is one fragment."""
    frags = Chem.GetMolFrags(mol)
    if len(frags) == 1:
        return mol, "", None
    parts = Chem.GetMolFrags(mol, asMols=True, sanitizeFrags=True)
    def size(k):
        return (any(mol.GetAtomWithIdx(i).GetAtomicNum() == 6 for i in frags[k]), len(frags[k]))
    main = max(range(len(frags)), key=size)
    rest = "".join("." + Chem.MolToSmiles(parts[k]) for k in range(len(frags)) if k != main)
    return parts[main], rest, sorted(frags[main])


def _renumber(label: str, numbering: list[int]) -> str:
    """``label`` with its atom numbers (of the main fragment) turned into the given structure's."""
    def one(m):
        nums = [m.group(2)] + ([m.group(3)] if m.group(3) else [])
        new = [str(numbering[int(x)]) if int(x) < len(numbering) else x for x in nums]
        return f"{m.group(1)} {' and '.join(new)}"
    return re.sub(r"\b(atoms?) (\d+)(?: and (\d+))?", one, label)


def _dicarbonyl_carbon(mol: Chem.Mol, i: int) -> bool:
    """Whether carbon ``i`` lies between two carbonyl or imine carbons (a 1,3-dicarbonyl's CH or CH2, whose
    enol is seen beside the keto form), or is such a carbonyl carbon; the only carbon whose H count a
    listed tautomer may change.  The keto/enol and enamine/imine forms of plain ketones, esters, amides and
    amino acids are RDKit's formal tautomers, not products a chemist proposes (common practice)."""
    def acyl(a: Chem.Atom) -> bool:
        return a.GetAtomicNum() == 6 and any(b.GetBondType() == Chem.BondType.DOUBLE and b.GetOtherAtom(a).GetAtomicNum() in (7, 8)
                                             for b in a.GetBonds())
    a = mol.GetAtomWithIdx(i)
    if sum(acyl(n) for n in a.GetNeighbors()) >= 2:
        return True
    return acyl(a) and any(sum(acyl(m) for m in n.GetNeighbors()) >= 2 for n in a.GetNeighbors())


def _reaction(smarts: str, reactants: str) -> list[tuple[Chem.Mol, str]]:
    """Every product of a reaction SMARTS, or of a named template (:mod:`.reactions`: 'snar', 'suzuki',
    'alkylation' …; run on the reactants' NH/OH tautomers too), on the '.'-separated reactants."""
    from .reactions import named_reaction, reaction_names

    named = named_reaction(smarts) if not any(ch in smarts for ch in ">[") else None
    if named is None and not any(ch in smarts for ch in ">["):
        raise InputError(f"reaction '{smarts}': neither a reaction SMARTS nor a named reaction ({reaction_names()})")
    name = (named.label or smarts.strip().lower()) if named is not None else None
    try:
        rxn = AllChem.ReactionFromSmarts(named.smarts if named is not None else smarts)
    except Exception as exc:  # noqa: BLE001 - RDKit's parse error, reported to the user
        raise InputError(f"reaction SMARTS '{smarts}': RDKit cannot read it ({exc})") from None
    if rxn is None or rxn.GetNumReactantTemplates() == 0:
        raise InputError(f"reaction SMARTS '{smarts}': no reactant templates")
    mols = [to_mol(s) for s in reactants.split(".")] if reactants else []
    n = rxn.GetNumReactantTemplates()
    if len(mols) != n:
        salts = [s for s, m in zip(reactants.split("."), mols) if not any(a.GetAtomicNum() == 6 for a in m.GetAtoms())]
        hint = (f"; {', '.join(repr(x) for x in salts)} has no carbon: a counter-ion or salt part? give each reactant "
                "without it") if salts and len(mols) > n else ""
        raise InputError(f"reaction {'template' if named else 'SMARTS'} '{smarts}' takes {n} reactant(s); --reactants "
                         f"gave {len(mols)} (separate them with '.'){hint}")
    # a named template also runs on each reactant's NH/OH tautomers (an NH-azole reacts at N1 or N2, a
    # 2-pyridone at N or O); the enumerator keeps the atom order, so the sites name the given reactants' atoms
    variants = [[(m, False)] + ([(t, True) for t, _ in _tautomers(m)][:MAX_REACTANT_TAUTOMERS]
                                if named is not None and named.tautomers else []) for m in mols]
    found = []   # (product, where the template acted, from a tautomer, outcome number, product number)
    k = 0
    for combo in itertools.islice(itertools.product(*variants), MAX_REACTANT_COMBINATIONS):
        for prods in rxn.RunReactants(tuple(m for m, _ in combo)):
            k += 1   # (outcomes counted over the reactants as given first, then their tautomers)
            for j, p in enumerate(prods):
                # where the template acted: its mapped atoms, by reactant and atom number, which is what tells
                # regioisomeric outcomes apart
                sites = sorted({(a.GetIntProp("react_idx"), a.GetIntProp("react_atom_idx"), a.GetSymbol())
                                for a in p.GetAtoms() if a.HasProp("old_mapno") and a.HasProp("react_atom_idx")})
                m = _finish(Chem.RWMol(p))
                if m is not None:
                    found.append((m, sites, any(t for _, t in combo), k, j + 1))
    # a site every outcome shares (morpholine's N in an SNAr on a dichloropyrimidine) tells none apart: the
    # labels name the sites that differ, and all of them when that would leave an outcome without one
    common = set.intersection(*(set(f[1]) for f in found)) if len(found) > 1 else set()
    if any(not set(f[1]) - common for f in found):
        common = set()
    out = []
    for m, sites, from_tautomer, k, j in found:
        # 'C4 of the pyrimidine (reactant 1 atom 1)', 'reactant 1 atom 2 (C; ortho to CH3, meta to CO2H)'
        at = ", ".join(f"{_locant(mols[r], i)} (reactant {r + 1} atom {i})" if _locant(mols[r], i) else
                       f"reactant {r + 1} atom {i} ({sym}{_ring_relation(mols[r], i)})"
                       for r, i, sym in sites if (r, i, sym) not in common)
        taut = "; from a reactant's NH/OH tautomer" if from_tautomer else ""
        if name:   # 'SNAr product at C4 of the pyrimidine (reactant 1 atom 1)'
            out.append((m, f"{name} product at {at or 'the template'}{taut}"))
        else:
            out.append((m, f"reaction product (outcome {k}, product {j}{'; at ' + at if at else ''}{taut})"))
    return out


def _heteroatom_tautomer_key(mol: Chem.Mol) -> str | None:
    """RDKit's canonical tautomer with the number of H on each carbon of ``mol`` beside it: two structures
    with the same key differ only in where H sits among N, O and S (the H on carbon are the same), so they
    are one compound even where the standard InChI's mobile-H layer does not join them (a 5-amino-1-aryl-
    pyrazole and its 5-imino-2H form, made by a template acting on a reactant's imino tautomer).  Keto/enol
    pairs move an H onto or off a carbon and stay two, as in :func:`compound_key`."""
    if not has_mobile_h(mol):
        return None
    try:
        canon = _TAUTOMERS.Canonicalize(mol)
    except Exception:  # noqa: BLE001 - no canonical tautomer: only this check is lost
        return None
    on_carbon = sorted(a.GetTotalNumHs() for a in mol.GetAtoms() if a.GetAtomicNum() == 6)
    return f"taut:{Chem.MolToSmiles(canon, isomericSmiles=False)}|{on_carbon}"


_TAUTOMERS = rdMolStandardize.TautomerEnumerator()


def _is_canonical_tautomer(mol: Chem.Mol | None) -> bool:
    """Whether ``mol`` is drawn as RDKit's canonical tautomer (the amino form of an aminoazole, the oxo form
    of a pyridone: the forms chemists draw)."""
    if mol is None:
        return False
    try:
        return Chem.MolToSmiles(_TAUTOMERS.Canonicalize(mol), isomericSmiles=False) == Chem.MolToSmiles(mol, isomericSmiles=False)
    except Exception:  # noqa: BLE001
        return False


#: a named template runs on at most this many NH/OH tautomers of each reactant, and this many combinations
MAX_REACTANT_TAUTOMERS = 6
MAX_REACTANT_COMBINATIONS = 64


def isomers(smiles: str | None, kinds=DEFAULT_KINDS, reaction: str | None = None, reactants: str | None = None,
            limit: int = LIMIT) -> list[Alternative]:
    """Alternatives to ``smiles`` of the given ``kinds`` (any of :data:`KINDS`) and/or the products of
    ``reaction`` (a reaction SMARTS) applied to ``reactants`` ('.'-separated SMILES).

    The given structure itself is never returned; duplicates are removed by canonical SMILES without
    stereochemistry; a positional, ambident or reaction alternative that is a prototropic tautomer of the
    given structure or of an earlier alternative (:func:`compound_key`) is labelled as the same compound, with
    ``same_compound_as`` set.  Raises :class:`InputError` for a bad SMILES, an unknown kind, or more than
    ``limit`` alternatives.
    """
    if isinstance(kinds, str):
        kinds = tuple(k.strip() for k in kinds.split(",") if k.strip())
    bad = [k for k in kinds if k not in KINDS]
    if bad:
        raise InputError(f"kind '{bad[0]}': use {', '.join(KINDS)}")
    if smiles is None and not reaction:
        raise InputError("isomers: give a SMILES, or a reaction SMARTS with its reactants")
    mol = to_mol(smiles) if smiles is not None else None
    rest, numbering = "", None
    if mol is not None:
        mol, rest, numbering = _main_fragment(mol)
    if mol is not None and mol.GetNumHeavyAtoms() > 200:
        raise InputError(f"SMILES '{smiles[:40]}…': {mol.GetNumHeavyAtoms()} heavy atoms; isomer generation is "
                         "limited to 200")
    found: list[tuple[Chem.Mol, str, str]] = []
    if mol is not None:
        if "positional" in kinds:
            found += [(m, lab, "positional") for m, lab in _positional(mol)]
        if "ambident" in kinds:
            found += [(m, lab, "ambident") for m, lab in _ambident(mol)]
        if "tautomer" in kinds:
            found += [(m, lab, "tautomer") for m, lab in _tautomers(mol)]
        if "stereo" in kinds:
            found += [(m, lab, "stereo") for m, lab in _stereo_flips(mol)]
    if numbering is not None:   # labels in the given SMILES's atom numbers, counter-ions put back
        found = [(m, _renumber(lab, numbering), kind) for m, lab, kind in found]
    if reaction:
        found += [(m, lab, "reaction") for m, lab in _reaction(reaction, reactants or "")]
    # structure -> its index in ``out``; an E/Z alternative is the same structure but for its configuration,
    # so it is keyed with its stereochemistry
    seen = {_key(mol): None, stereo_key(mol): None} if mol is not None else {}
    # compound -> (SMILES, relation) it was first met as; the given structure first
    compounds = {compound_key(mol): (smiles, None)} if mol is not None else {}
    filed: dict[str, int] = {}   # heteroatom-tautomer key of a reaction outcome -> its index in ``out``
    out: list[Alternative] = []
    for m, lab, kind in found:
        k = alternative_key(m, kind)
        if k in seen:
            i = seen[k]
            if i is not None and kind == "ambident" and out[i].kind == "positional" and out[i].same_compound_as is None:
                # a swap of two ring substituents that is also the group on the other ring N: the N-alkylation
                # reading is the one a chemist asks about, the swap is kept beside it
                out[i] = Alternative(out[i].smiles, f"{lab} (the same as: {out[i].relation})", kind, None)
            continue
        seen[k] = len(out)
        smi, twin = Chem.MolToSmiles(m) + (rest if kind != "reaction" else ""), None
        if open_shell(m):
            lab += " (leaves an unpaired electron: not a closed-shell product, listed because the rule gives it)"
        if kind not in ("tautomer", "stereo"):
            ck = compound_key(m)
            # a reaction outcome is also filed by its heteroatom tautomer (a template acting on a reactant's
            # imino form gives another drawing of an outcome already made)
            tk = _heteroatom_tautomer_key(m) if kind == "reaction" else None
            if ck not in compounds and tk in compounds:
                i, earlier = filed[tk], compounds[tk][0]
                if _is_canonical_tautomer(m) and not _is_canonical_tautomer(Chem.MolFromSmiles(earlier)):
                    # the earlier outcome is the unusual drawing: this one leads, that one becomes its twin
                    out[i] = Alternative(earlier, f"'{lab}' drawn as another NH/OH tautomer (the same compound)", kind, smi)
                    for key in (tk, ck, compound_key(Chem.MolFromSmiles(earlier))):
                        compounds[key] = (smi, lab)
                    filed[tk] = len(out)
                    ck = None
                else:
                    ck = tk
            if ck in compounds:
                twin, twin_relation = compounds[ck]
                lab = ("the given structure drawn as another NH/OH tautomer (the same compound)" if twin_relation is None
                       else f"'{twin_relation}' drawn as another NH/OH tautomer (the same compound)")
            elif ck is not None:
                compounds[ck] = (smi, lab)
                if tk is not None and tk not in compounds:
                    compounds[tk], filed[tk] = (smi, lab), len(out)
        out.append(Alternative(smi, lab, kind, twin))
        if len(out) > limit:
            raise InputError(f"more than {limit} alternatives for '{smiles or reaction}'; narrow the kinds "
                             "(--kind positional) or raise the limit (--limit)")
    return out
