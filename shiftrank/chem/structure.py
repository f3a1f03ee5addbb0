"""Structure facts for a candidate: formula, masses, DBE, symmetry classes, CHn.

>>> f = structure_facts("CC(C)Oc1ccc(OC(C)C)cc1")
>>> f.formula, f.expected_13c_signals
('C12H18O2', 4)
"""
from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field

from rdkit import Chem

from .labels import isotope_totals, labelled_hydrogens, proton_counts, split_by_labels, strip_labelled_hydrogens
from .formula import average_weight, dbe, dbe_note, hill, monoisotopic_weight
from ..inputs.molecules import to_mol

MULTIPLICITY = {0: "C", 1: "CH", 2: "CH2", 3: "CH3", 4: "CH4"}


@dataclass
class CarbonClass:
    """Carbons that are equivalent by symmetry: one expected 13C signal."""

    atoms: list[int]          # 0-based heavy-atom indices
    multiplicity: str         # C, CH, CH2, CH3 (CH4 for methane)
    twin: tuple[list[int], str] | None = None   # (atoms, TWIN_WHY key) of the class alike in constitution
                                                # that gives a separate signal

    @property
    def size(self) -> int:
        return len(self.atoms)


@dataclass
class StructureFacts:
    """Everything the ranking needs to know about a candidate before any prediction."""

    smiles: str
    formula: str
    counts: dict
    average_mass: float
    monoisotopic_mass: float
    dbe: float
    dbe_note: str | None
    carbon_classes: list[CarbonClass]
    hydrogen_classes: list[list[int]] = field(default_factory=list)  # heavy-atom indices carrying each H class
    proton_multiplets: list | None = None   # expected 1H multiplets, filled in by the scoring when needed
    proton_distances: object = None         # NOESY: H–H distances in 3D (score.correlations), filled in when needed

    @property
    def n_carbons(self) -> int:
        return sum(c.size for c in self.carbon_classes)

    @property
    def expected_13c_signals(self) -> int:
        return len(self.carbon_classes)

    @property
    def expected_1h_signals(self) -> int:
        return len(self.hydrogen_classes)

    def multiplicity_counts(self) -> dict:
        """Signals per CHn type, e.g. ``{'CH3': 1, 'CH': 2, 'C': 1}``."""
        return dict(Counter(c.multiplicity for c in self.carbon_classes))


def _atoms(mol: Chem.Mol):
    """The atoms of ``mol`` (direct indexing: several times faster than RDKit's Python atom sequence)."""
    return map(mol.GetAtomWithIdx, range(mol.GetNumAtoms()))


def element_counts(mol: Chem.Mol, atoms=None) -> Counter:
    """Element counts including implicit hydrogens, of the whole molecule or of the atoms with the given
    indices (a group of it)."""
    c: Counter = Counter()
    for a in (_atoms(mol) if atoms is None else map(mol.GetAtomWithIdx, atoms)):
        c[a.GetSymbol()] += 1
        c["H"] += a.GetTotalNumHs()
    if c["H"] == 0:
        del c["H"]
    return c


_TETRAHEDRAL = {Chem.ChiralType.CHI_TETRAHEDRAL_CW: Chem.ChiralType.CHI_TETRAHEDRAL_CCW,
                Chem.ChiralType.CHI_TETRAHEDRAL_CCW: Chem.ChiralType.CHI_TETRAHEDRAL_CW}


def symmetry_ranks(mol: Chem.Mol) -> list[int]:
    """Symmetry classes of the atoms (one expected signal per class): RDKit canonical ranks without
    tie-breaking.

    Where the structure gives stereocentres, atoms that are alike in constitution but differ in
    configuration are told apart (the two halves of a tetrasubstituted ring whose stereocentres
    do not repeat by symmetry show two sets of signals); atoms exchanged by a mirror plane of an
    achiral (meso) molecule stay together, since enantiotopic nuclei are isochronous in an achiral
    solvent (common practice).  Atoms with no configuration of their own are never split here, so
    the two methyls of an isopropyl group next to a stereocentre share a rank (one 1H class);
    :func:`carbon_classes` separates such diastereotopic carbons (:func:`twin_sides`).
    """
    plain = list(Chem.CanonicalRankAtoms(mol, breakTies=False, includeChirality=False))
    tagged = [a.GetIdx() for a in mol.GetAtoms() if a.GetChiralTag() in _TETRAHEDRAL]
    if not tagged or len(set(plain)) == len(plain):
        return plain
    chiral = list(Chem.CanonicalRankAtoms(mol, breakTies=False, includeChirality=True))
    if len(set(chiral)) == len(set(plain)):
        return plain
    mirror = Chem.Mol(mol)
    for i in tagged:
        a = mirror.GetAtomWithIdx(i)
        a.SetChiralTag(_TETRAHEDRAL[a.GetChiralTag()])
    if Chem.MolToSmiles(mirror) == Chem.MolToSmiles(mol):
        # achiral: atom i of the mirror image is atom i's mirror partner in the molecule itself
        mirrored = list(Chem.CanonicalRankAtoms(mirror, breakTies=False, includeChirality=True))
        parent = {r: r for r in chiral}

        def find(r: int) -> int:
            while parent[r] != r:
                parent[r] = parent[parent[r]]
                r = parent[r]
            return r

        for r, m in zip(chiral, mirrored):
            if m in parent:
                a, b = find(r), find(m)
                if a != b:
                    parent[max(a, b)] = min(a, b)
        chiral = [find(r) for r in chiral]
    # never merge what the constitution separates
    return [p * (len(plain) + 1) + c for p, c in zip(plain, chiral)]


def carbon_classes(mol: Chem.Mol, ranks: list[int] | None = None) -> list[CarbonClass]:
    """Group the carbons of ``mol`` into symmetry classes ordered by first atom index; the two
    carbons of a pair that NMR tells apart although they are alike in constitution
    (:func:`twin_sides`: diastereotopic, or cis and trans to an amide C=O) are separate classes.

    >>> [c.atoms for c in carbon_classes(Chem.MolFromSmiles("CC(C)C(N)C(=O)O"))]   # valine: two methyl signals
    [[0], [1], [2], [3], [5]]
    >>> [c.atoms for c in carbon_classes(Chem.MolFromSmiles("CN(C)C(=O)c1ccccc1"))]   # N,N-dimethylbenzamide
    [[0], [2], [3], [5], [6, 10], [7, 9], [8]]
    """
    ranks = symmetry_ranks(mol) if ranks is None else ranks
    twins = twin_sides(mol, ranks)
    groups: dict[tuple, list[int]] = {}
    for a in _atoms(mol):
        if a.GetAtomicNum() == 6:
            i = a.GetIdx()
            groups.setdefault(signal_key(i, ranks, twins), []).append(i)
    out = []
    labels = labelled_hydrogens(mol)
    protons = proton_counts(mol) if labels else None   # DEPT counts attached protons: a CD3 carbon shows as C
    for (rank, sd), atoms in sorted(groups.items(), key=lambda kv: kv[1][0]):
        partner = groups.get((rank, 1 - sd)) if sd is not None else None
        for part in split_by_labels(atoms, labels):
            nh = protons[part[0]] if protons else mol.GetAtomWithIdx(part[0]).GetTotalNumHs()
            out.append(CarbonClass(part, MULTIPLICITY.get(nh, f"CH{nh}"), (partner, twins[part[0]][1]) if partner else None))
    return sorted(out, key=lambda c: c.atoms[0]) if labels else out


#: why two carbons alike in constitution give two 13C signals (see :func:`twin_sides`)
TWIN_WHY = {"stereo": "diastereotopic: alike groups beside a stereocentre",
            "amide": "cis and trans to an amide C=O or C=S, slow C–N rotation",
            "ring": "cis and trans to a substituent elsewhere on the ring",
            "slow N": "cis and trans across an N–C or N–N bond with double-bond character (a dithiocarbamate, "
                      "nitrosamine, amidine or enaminone), slow rotation",
            "alkene": "cis and trans across a double bond whose other atom carries two different groups"}
#: a tertiary carboxamide or thioamide N: its two other substituents sit cis and trans to the C=O (C=S)
_AMIDE_N = Chem.MolFromSmarts("[NX3;H0;!a](-[#6])(-[#6])-[CX3;$(C(=[O,S])-[#6]),$([CH1]=[O,S])]")
#: other N–X bonds with double-bond character that rotate slowly at room temperature: (di)thiocarbamates,
#: nitrosamines, amidines (a formamidine's NMe2) and enaminones / push-pull enamines
_SLOW_N = [Chem.MolFromSmarts(s) for s in (
    "[NX3;H0;!a](-[#6])(-[#6])-C(=S)-[O,S]",
    "[NX3;H0;!a](-[#6])(-[#6])-N=O",
    "[NX3;H0;!a](-[#6;!a])(-[#6;!a])-[CX3;!a]=[NX2]",
    "[NX3;H0;!a](-[#6;!a])(-[#6;!a])-[#6;!a]=[#6;!a]-[$(C=O),$(C#N),$([N+](=O)[O-]),$(S(=O)=O)]")]


def twin_sides(mol: Chem.Mol, ranks: list[int] | None = None, near: int | None = None) -> dict[int, tuple[int, str]]:
    """Side (0 or 1) and reason (a key of :data:`TWIN_WHY`) of each atom of a pair of constitutionally
    alike groups that give separate signals, with the matching atoms further along the two groups:

    * ``'stereo'``: two alike sp3 groups on a prochiral sp3 carbon (Caabc, H counting once: the
      methyls of an isopropyl, a gem-dimethyl, C2/C6 and C3/C5 of a cyclohexyl) or on a phosphorus with
      four groups (the two OEt of an α-aminophosphonate) in a molecule with a stereocentre elsewhere are
      diastereotopic; they differ in shift, usually by 0.3–3 ppm
      (valine's methyls 19.0 and 17.6 ppm; common practice, values from memory).  Without a
      stereocentre the two groups are enantiotopic and give one signal.
    * ``'amide'``: the two alike N-substituents of a tertiary amide or thioamide are cis and trans to
      the C=O, and rotation about the C–N bond is slow at room temperature (N,N-dimethylformamide
      36.5 and 31.4 ppm; an N-acylpiperidine's C2/C6 about 47 and 42 ppm; common practice, values from
      memory).  Ureas, carbamates and thioureas rotate faster and are left together.
    * ``'ring'``: two alike exocyclic groups on an sp3 atom of a non-aromatic ring of up to seven atoms, when
      another sp3 carbon of that ring carries two different groups (H counting): one lies on that carbon's
      substituent's face, the other on the opposite face (the two methyls of 4,4-dimethylcyclohexanol, of a
      2,2,6,6-tetramethylpiperidin-4-yl group, of an acetonide of a 2-substituted 1,3-diol or of a 5-substituted
      Meldrum's acid; common practice).  Such a carbon is often no stereocentre, so the ``'stereo'`` rule misses them.
    * ``'slow N'``: the same for other N–C and N–N bonds with double-bond character: dithiocarbamates and
      thiocarbamates, nitrosamines (N-nitrosodiethylamine's two CH2 and two CH3), amidines (a formamidine's
      NMe2) and enaminones or enamines of a nitrile, nitro or sulfonyl group.  In the assigned NMRShiftDB2
      shifts such pairs differ by 1 ppm or more in 5 of 5 (thio)carbamate pairs, 2 of 2 nitrosamines, 5 of 9
      amidines and 10 of 34 enamines, against 0 of 9 carbamates and 0 of 5 ureas and thioureas (a pair printed at
      one value costs little; a second line no class explains costs more).
    * ``'alkene'``: two alike carbon groups on one atom of a double bond outside aromatic rings, when the
      other atom of the bond carries two different groups (H, a lone pair and a substituent count as
      groups): one of them is cis to each, so they differ (the two methyls of a prenyl group about 17.9
      and 25.8 ppm, 1H 1.68 and 1.75; the methyls of acetone oxime about 15 and 22 ppm; a cyclohexylidene's
      C2 and C6; common practice, values from memory).  A C(CH3)2=C(CH3)2 or =CH2 end leaves them alike.

    Two separate groups (not joined in a ring through the centre) are split whole, so the two phenyls of a
    benzhydryl group or of a benzophenone imine differ while each keeps its ortho and meta pairs (a ring flip
    exchanges them); groups joined in a ring are followed in step, and there aromatic atoms are left out.  ``near``
    keeps only the diastereotopic pairs whose prochiral carbon lies within that many bonds of a
    stereocentre (1H: a remote stereocentre leaves the two groups' protons unresolved, as the two
    isopropyl doublets of a cholesterol side chain, 0.87 and 0.86 ppm; from memory).

    >>> sorted(twin_sides(Chem.MolFromSmiles("CC1(C)CC(O)c2ccccc2O1")).items())   # a 4-chromanol
    [(0, (0, 'stereo')), (2, (1, 'stereo'))]
    >>> twin_sides(Chem.MolFromSmiles("CC1(C)CCc2ccccc2O1"))   # no stereocentre: one signal
    {}
    >>> sorted(twin_sides(Chem.MolFromSmiles("O=C(c1ccccc1)N1CCOCC1")))   # N-benzoylmorpholine
    [9, 10, 12, 13]
    """
    ranks = symmetry_ranks(mol) if ranks is None else ranks
    sites = []   # (centre, its two alike neighbours, reason)
    for x in _atoms(mol):
        nh = x.GetTotalNumHs()
        # (a phosphorus with four groups counts too: the two OR of a phosphonate beside a stereocentre differ)
        if (x.GetAtomicNum() not in (6, 15) or x.GetIsAromatic() or x.GetDegree() + nh != 4 or x.GetDegree() < 3
                or (x.GetAtomicNum() == 6 and x.GetHybridization() != Chem.HybridizationType.SP3)):
            continue
        by_rank = _neighbours_by_rank(x, ranks)
        pairs = [g for g in by_rank.values() if len(g) == 2]
        if len(pairs) == 1 and len(by_rank) + (1 if nh else 0) == 3:
            sites.append((x.GetIdx(), *pairs[0], "stereo"))
    if sites:
        # a prochiral carbon that is itself a possible stereocentre (a ring atom whose two ring branches are
        # alike, as C7 of a bicyclo[4.1.0]heptan-7-ol or C1 of a norbornane) lies on a mirror plane of
        # its ring: its two groups are enantiotopic there, and it is left alone
        centres = {i for i, _ in Chem.FindMolChiralCenters(mol, includeUnassigned=True, useLegacyImplementation=False)}
        sites = [t for t in sites if t[0] not in centres] if centres else []
        if near is not None and sites:
            dist = Chem.GetDistanceMatrix(mol)
            sites = [t for t in sites if any(dist[t[0], c] <= near for c in centres)]
    for n, a, b, _ in mol.GetSubstructMatches(_AMIDE_N):
        if ranks[a] == ranks[b]:
            sites.append((n, a, b, "amide"))
    for patt in _SLOW_N:
        for n, a, b, *_ in mol.GetSubstructMatches(patt):
            if ranks[a] == ranks[b]:
                sites.append((n, a, b, "slow N"))
    sites.extend(alkene_twin_sites(mol, ranks))
    sites.extend(ring_twin_sites(mol, ranks))
    side: dict[int, tuple[int, str]] = {}
    for x, a, b, why in sites:
        ga, gb = _branch(mol, a, x), _branch(mol, b, x)
        if ga is not None and gb is not None and not ga & gb and not (ga | gb) & side.keys():
            # two separate groups (a benzyl, a phenyl): each whole group on its side, so a ring keeps its
            # symmetric pairs together (a ring flip exchanges them) while the two rings differ
            side.update({i: (0, why) for i in ga})
            side.update({i: (1, why) for i in gb})
            continue
        todo = [(a, b, x, x)]
        while todo:
            u, v, pu, pv = todo.pop()
            au, av = mol.GetAtomWithIdx(u), mol.GetAtomWithIdx(v)
            if u == v or u in side or v in side or au.GetIsAromatic() or av.GetIsAromatic():
                continue
            side[u], side[v] = (0, why), (1, why)
            nu, nv = _neighbours_by_rank(au, ranks, pu), _neighbours_by_rank(av, ranks, pv)
            for r, us in nu.items():   # follow the two groups in step where the match is unambiguous
                if len(us) == 1 and len(nv.get(r, ())) == 1:
                    todo.append((us[0], nv[r][0], u, v))
    return side


def _branch(mol: Chem.Mol, start: int, block: int, limit: int = 40) -> set[int] | None:
    """The atoms reachable from ``start`` without passing ``block`` (None when that reaches ``block`` again, i.e.
    the group is part of a ring through it, or has more than ``limit`` atoms)."""
    seen, todo = {start}, [start]
    while todo:
        u = todo.pop()
        for n in mol.GetAtomWithIdx(u).GetNeighbors():
            j = n.GetIdx()
            if j == block:
                if u != start:
                    return None
                continue
            if j not in seen:
                seen.add(j)
                if len(seen) > limit:
                    return None
                todo.append(j)
    return seen


def alkene_twin_sites(mol: Chem.Mol, ranks) -> list[tuple[int, int, int, str]]:
    """(atom, its two alike carbon groups, 'alkene') for each end of a non-aromatic double bond that carries two
    rank-equal carbon substituents while the other end carries two different groups (see :func:`twin_sides`)."""
    out = []
    for bond in mol.GetBonds():
        if bond.GetBondType() != Chem.BondType.DOUBLE or bond.GetIsAromatic():
            continue
        for x, y in ((bond.GetBeginAtom(), bond.GetEndAtom()), (bond.GetEndAtom(), bond.GetBeginAtom())):
            if x.GetIsAromatic() or y.GetIsAromatic() or x.GetDegree() != 3:
                continue
            pair = [n.GetIdx() for n in x.GetNeighbors() if n.GetIdx() != y.GetIdx()]
            if ranks[pair[0]] != ranks[pair[1]] or any(mol.GetAtomWithIdx(i).GetAtomicNum() != 6 for i in pair):
                continue
            other = [ranks[n.GetIdx()] for n in y.GetNeighbors() if n.GetIdx() != x.GetIdx()]
            # the other end's second group: a further substituent, an H, or the lone pair of a two-connected N
            lone = y.GetAtomicNum() == 7 and y.GetFormalCharge() == 0 and y.GetDegree() + y.GetTotalNumHs() == 2
            if (len(other) == 2 and other[0] != other[1]) or (len(other) == 1 and (y.GetTotalNumHs() == 1 or lone)):
                out.append((x.GetIdx(), pair[0], pair[1], "alkene"))
    return out


#: rings up to this size are rigid enough that a geminal pair's faces are told apart (common practice)
RING_TWIN_MAX = 7


def ring_twin_sites(mol: Chem.Mol, ranks) -> list[tuple[int, int, int, str]]:
    """(atom, its two alike exocyclic groups, 'ring') for each sp3 ring atom of a non-aromatic ring of up to
    :data:`RING_TWIN_MAX` atoms whose two exocyclic groups are alike while another sp3 carbon of that ring carries
    two different ones (H counting): one group of the pair lies on that carbon's substituent's face, the other
    on the opposite face (see :func:`twin_sides`)."""
    out = []
    for ring in mol.GetRingInfo().AtomRings():
        if len(ring) > RING_TWIN_MAX:
            continue
        members = set(ring)
        atoms = [mol.GetAtomWithIdx(i) for i in ring]
        if any(a.GetIsAromatic() for a in atoms):
            continue
        exo = {a.GetIdx(): [n.GetIdx() for n in a.GetNeighbors() if n.GetIdx() not in members] for a in atoms}

        def tetrahedral(a) -> bool:
            return a.GetHybridization() == Chem.HybridizationType.SP3 and a.GetDegree() + a.GetTotalNumHs() == 4

        faced = [a for a in atoms if a.GetAtomicNum() == 6 and tetrahedral(a) and len(exo[a.GetIdx()]) + a.GetTotalNumHs() == 2
                 and (len(exo[a.GetIdx()]) == 1
                      or (len(exo[a.GetIdx()]) == 2 and ranks[exo[a.GetIdx()][0]] != ranks[exo[a.GetIdx()][1]]))]
        if not faced:
            continue
        for a in atoms:
            pair = exo[a.GetIdx()]
            if (tetrahedral(a) and len(pair) == 2 and ranks[pair[0]] == ranks[pair[1]]
                    and any(f.GetIdx() != a.GetIdx() for f in faced)):
                out.append((a.GetIdx(), pair[0], pair[1], "ring"))
    return out


def signal_key(atom: int, ranks, twins: dict) -> tuple[int, int | None]:
    """What puts an atom in an expected signal: its symmetry rank and, for one of a pair of alike groups
    that NMR tells apart, its side (``twins`` from :func:`twin_sides`)."""
    return ranks[atom], (twins[atom][0] if atom in twins else None)


def _neighbours_by_rank(atom: Chem.Atom, ranks, skip: int = -1) -> dict[int, list[int]]:
    """The neighbours of ``atom`` (but ``skip``) grouped by symmetry rank."""
    out: dict[int, list[int]] = {}
    for n in atom.GetNeighbors():
        if n.GetIdx() != skip:
            out.setdefault(ranks[n.GetIdx()], []).append(n.GetIdx())
    return out


#: 1H: bonds from a prochiral carbon to the nearest stereocentre within which its two alike groups'
#: protons are two classes (farther, they are seldom resolved); amide rotamer sites always are
TWIN_NEAR_1H = 2


def hydrogen_classes(mol: Chem.Mol, ranks: list[int] | None = None) -> list[list[int]]:
    """Heavy atoms carrying H, grouped by symmetry (one expected 1H signal per group), alike groups that
    NMR tells apart (:func:`twin_sides` with ``near`` = :data:`TWIN_NEAR_1H`) in separate groups."""
    ranks = symmetry_ranks(mol) if ranks is None else ranks
    twins = twin_sides(mol, ranks, near=TWIN_NEAR_1H)
    groups: dict[tuple, list[int]] = {}
    labels = labelled_hydrogens(mol)
    for i, nh in enumerate(proton_counts(mol)):   # 2H/3H give no 1H signal
        if nh > 0:
            groups.setdefault(signal_key(i, ranks, twins), []).append(i)
    return sorted((part for g in groups.values() for part in split_by_labels(g, labels)), key=lambda g: g[0])


#: OH or SH on an aromatic carbon of a six-membered ring beside or opposite a pyridine-type ring N
#: (2-/4-hydroxypyridines, hydroxypyrimidines, 2-quinolinols), or of a five-membered ring between a
#: pyridine-type N and another ring heteroatom (azole-2-thiols, benzoxazol-2-ol, 1,2,4-triazole-3-thiols).
#: Hydroxy groups elsewhere on five-membered rings (pyrazol-3-ols, 4-hydroxythiazoles) are left alone:
#: which form they take depends on the compound.
_LACTIM = [Chem.MolFromSmarts(s) for s in ("[OX2H1,SX2H1]-[c;r6]:[nX2H0]",
                                           "[OX2H1,SX2H1]-[c;r6]1:c:c:[nX2H0]:c:c:1",
                                           "[OX2H1,SX2H1]-[c;r5](:[n,o,s]):[nX2H0]")]


def lactim_sites(mol: Chem.Mol) -> list[tuple[int, int]]:
    """(O or S, carbon) of each OH/SH drawn where it makes the hydroxy/mercapto tautomer of a lactam or
    thiolactam (see ``_LACTIM``).  In solution such compounds are mostly the oxo/thioxo form with N–H
    (2-pyridone rather than 2-hydroxypyridine, benzimidazole-2-thione rather than -2-thiol; common
    practice), which is what their spectra show.

    >>> lactim_sites(Chem.MolFromSmiles("Oc1ccccn1")), lactim_sites(Chem.MolFromSmiles("O=c1cccc[nH]1"))
    ([(0, 1)], [])
    """
    seen: dict[int, int] = {}
    for patt in _LACTIM:
        for match in mol.GetSubstructMatches(patt):
            seen.setdefault(match[0], match[1])
    return sorted(seen.items())


def facts_from_mol(mol: Chem.Mol, smiles: str | None = None, hydrogens: bool = True,
                   ranks: list[int] | None = None) -> StructureFacts:
    """Structure facts of an RDKit molecule (hydrogens implicit or explicit).

    ``hydrogens=False`` skips the hydrogen symmetry classes (the ranking does not need them);
    ``ranks`` are the symmetry ranks when the caller has them already.
    """
    back = None
    if mol.GetNumAtoms() != mol.GetNumHeavyAtoms():
        mol, back = strip_labelled_hydrogens(mol)   # explicit H removed, 2H/3H remembered (:mod:`.labels`)
        ranks = None
        if back == list(range(len(back))):
            back = None
    ranks = symmetry_ranks(mol) if ranks is None else list(ranks)
    counts: Counter = Counter()
    for a in _atoms(mol):
        counts[a.GetSymbol()] += 1
        counts["H"] += a.GetTotalNumHs()
    for sym, n in isotope_totals(mol).items():   # 2H and 3H as D and T (formula and masses)
        counts["H"] -= n
        counts[sym] += n
    if counts["H"] == 0:
        del counts["H"]
    classes = carbon_classes(mol, ranks)
    h_classes = hydrogen_classes(mol, ranks) if hydrogens else []
    if back is not None:   # atom indices in the caller's own order (explicit H atoms counted there)
        classes = [CarbonClass([back[i] for i in c.atoms], c.multiplicity,
                               ([back[i] for i in c.twin[0]], c.twin[1]) if c.twin else None) for c in classes]
        h_classes = [[back[i] for i in g] for g in h_classes]
    d = dbe(counts)
    return StructureFacts(
        smiles=smiles if smiles is not None else Chem.MolToSmiles(mol),
        formula=hill(counts),
        counts=dict(counts),
        average_mass=average_weight(counts),
        monoisotopic_mass=monoisotopic_weight(counts),
        dbe=d,
        dbe_note=dbe_note(d),
        carbon_classes=classes,
        hydrogen_classes=h_classes,
    )


def structure_facts(smiles: str) -> StructureFacts:
    """Structure facts of a SMILES string; raises :class:`InputError` when it cannot be parsed."""
    return facts_from_mol(to_mol(smiles), smiles)
