"""Expected first-order 1H multiplets of a structure, and how well a printed multiplet fits one.

For every class of symmetry-equivalent protons (the protons on one class of heavy atoms) the
coupling partners are read from the structure: vicinal protons through sp3 and sp2 bonds, aromatic
ortho and meta protons, alkene cis/trans partners, geminal and vicinal fluorine, phosphorus.  Each
group of equivalent partners splits the signal into n + 1 lines; the expected multiplet is the
first-order product of the groups (a CH2 between a CH3 and a CH2 is a "qt" when the two J differ,
a sextet when they are equal).

Typical J ranges (common practice; the values every textbook table gives, e.g. Pretsch, Bühlmann &
Badertscher, *Structure Determination of Organic Compounds*, 4th ed., 2009, chapter on 1H coupling
constants; the ranges below are recalled from such tables, "from memory", and deliberately wide):

* vicinal H–C–C–H, freely rotating: 6–8 Hz (accepted 4.5–9); between a CH and the diastereotopic protons
  of a CH2 next to it, anti ≈ 10–12 Hz and gauche ≈ 2–4 Hz (accepted 2.5–12.5);
* aromatic ortho 7–9 Hz (6–10); five-membered heteroaromatic rings 1.5–6 (imidazole and oxazole H4–H5
  about 1 Hz, 0.5–2, often unresolved); pyridine-type C2–C3 4–7;
* aromatic meta 1–3 Hz (0.5–3.5), often unresolved;
* alkene cis ≈ 10 Hz (6–12), trans ≈ 16 Hz (12–18), terminal =CH2 geminal 0–3 Hz;
* aldehyde H–C(=O)–C–H 1–3 Hz;
* H–C–F geminal 45–50 Hz; H–C–C–F vicinal 5–30 Hz; aromatic H/F ortho 6–11 Hz, meta 4–8 Hz;
* H–C–P 10–25 Hz, H–C–X–P 3–25 Hz;
* couplings to OH/NH protons (4–9 Hz) appear only when exchange is slow (DMSO-d6), so they are optional;
* geminal H–C–H of a CH2 whose protons differ (next to a stereocentre, in a ring): 10–18 Hz, optional;
* long-range couplings (para, benzylic, allylic, W) below 1.5 Hz: optional, at most one per signal;
* H–C–D geminal 1–2.6 Hz (the H–H value × γD/γH ≈ 0.15), often unresolved; vicinal H–D below 1 Hz, ignored.

13C lines split by fluorine and phosphorus (common practice, e.g. the same tables; from memory):
¹J(C,F) 230–300 Hz (CF3 ≈ 272, aryl C–F ≈ 245), ²J 15–45 (CF3–C ≈ 32, aryl ortho CH ≈ 21;
a ring carbon without H next to an aryl C–F 8–25, ≈ 10–14 at C1 of 2-fluoroanisole or 2-fluoroaniline), ³J 2–12
(aryl meta ≈ 8, CF3–C–C ≈ 4; to a second fluorine beside a ¹J or ²J, often not printed), ⁴J 0.5–4.5 (often
unresolved); ¹J(C,P) 100–200 Hz, ²J and ³J 2–30 Hz, ⁴J and ⁵J through a ring 0.5–5 Hz (optional);
¹J(C,D) 17–34 Hz (a CD3 septet ≈ 19–22, the CDCl3 triplet ≈ 32); a CDn carbon shows 2n + 1 lines.

The comparison with a printed multiplet is evidence, not a filter: "m", "br" and overlapped signals
constrain nothing; letters that no variant of the expected pattern produces, and J values that no
expected coupling explains, cost a little (the costs are fitted in the ranking).
"""
from __future__ import annotations

import itertools
from dataclasses import dataclass, field
from functools import lru_cache

from rdkit import Chem

from .labels import labelled_hydrogens, proton_counts, split_by_labels
from .structure import TWIN_NEAR_1H, signal_key, symmetry_ranks, twin_sides

#: how a few coupling kinds read in a label (others by their own name)
_KIND_NAMES = {"ortho-5-azole": "imidazole/oxazole H4-H5", "vicinal-dia": "vicinal from a diastereotopic CH2",
               "CF2-sub": "CF2 (ring C without H)", "CF3-beside": "CF3 (beside a larger C–F coupling)"}

#: (low, high) Hz of each coupling kind, with the optional flag (may be unresolved or absent).
J_RANGES = {
    "vicinal": ((4.5, 9.0), False),
    "vicinal-ring": ((2.0, 12.0), False),   # small rings and rigid rings vary widely
    "ortho": ((6.0, 10.0), False),
    "ortho-5": ((1.5, 6.0), False),          # five-membered heteroaromatic rings
    "ortho-5-azole": ((0.5, 2.0), True),     # imidazole/oxazole H4–H5, each carbon on a ring N or O: often unresolved
    "ortho-N": ((3.5, 7.0), False),          # six-membered ring, next to a ring nitrogen (pyridine C2–C3)
    "meta": ((0.5, 3.5), True),
    "cis": ((6.0, 12.5), False),
    "trans": ((12.0, 18.5), False),
    "alkene": ((6.0, 18.5), False),           # C=C stereo not given
    "geminal-alkene": ((0.0, 3.0), True),
    "aldehyde": ((0.5, 3.5), True),
    "exchangeable": ((3.0, 9.0), True),
    "HF-geminal": ((42.0, 55.0), False),
    "HF-vicinal": ((5.0, 30.0), False),
    "HF-ortho": ((6.0, 11.5), False),
    "HF-meta": ((3.5, 8.5), False),
    "HP": ((3.0, 25.0), False),
    "vicinal-pair": ((2.5, 12.5), False),    # to the two diastereotopic protons of one CH2: one J or two
    "vicinal-dia": ((2.5, 12.5), False),     # from a diastereotopic CH2 proton to a CH: anti ≈ 11, gauche ≈ 3
    "vicinal-ring-pair": ((2.0, 12.0), False),
    "geminal": ((10.0, 18.5), True),          # inequivalent CH2 protons (diastereotopic, ring)
    "long-range": ((0.0, 1.5), True),          # para, benzylic, allylic, W couplings
    # 13C lines split by fluorine or phosphorus, by the number of bonds between them (see carbon_multiplets)
    "CF1": ((230.0, 300.0), False), "CF2": ((15.0, 45.0), False), "CF2-sub": ((8.0, 25.0), False), "CF3": ((2.0, 12.0), False),
    "CF4": ((0.5, 4.5), True), "CP1": ((100.0, 200.0), False), "CP2": ((2.0, 30.0), False),
    # a three-bond C–F coupling to another fluorine beside a one- or two-bond one: often left out of the
    # printed letters ('156.0 (d, J = 254 Hz)' for a dq; common practice)
    "CF3-beside": ((2.0, 12.0), True),
    "CP3": ((2.0, 30.0), True),
    # four and five bonds from P through a ring: a benzylphosphonate's meta and para carbons print d, J ≈ 3 Hz
    # (from memory); often unresolved
    "CP-long": ((0.5, 5.0), True),
    # deuterium (spin 1: n deuterons give 2n + 1 lines, carried as 2n partners): 13C of a CDn carbon and the
    # proton left on a CHD or CHD2 group (see chem/labels.py)
    "CD1": ((17.0, 34.0), False), "HD-geminal": ((1.0, 2.6), True),
}
_LETTERS = {"s": 1, "d": 2, "t": 3, "q": 4, "p": 5, "sext": 6, "sept": 7, "oct": 8, "non": 9}
MAX_OPTIONAL = 4  # optional groups beyond this are always taken as unresolved (keeps the variants few)


@dataclass(frozen=True)
class CouplingGroup:
    """Equivalent coupling partners of a proton class."""

    kind: str
    n: int                    # number of partner nuclei
    partner: str = "H"        # H, F or P
    key: int = -1             # symmetry class of the partner atom (groups of one key are equivalent)

    @property
    def j_range(self) -> tuple[float, float]:
        return J_RANGES[self.kind][0]

    @property
    def optional(self) -> bool:
        return J_RANGES[self.kind][1]


@dataclass
class ExpectedMultiplet:
    """The protons of one symmetry class and their couplings."""

    atoms: list[int]          # heavy atoms carrying the class's protons
    n_h: int                  # protons in the class
    groups: list[CouplingGroup] = field(default_factory=list)
    exchangeable: bool = False
    amide_nh2: bool = False   # a primary (thio)amide NH2 (see :attr:`may_split`)
    twin_of: int | None = None   # symmetry rank shared with an alike class told apart (structure.twin_sides)
    _patterns: frozenset | None = field(default=None, repr=False, compare=False)
    _signature: tuple | None = field(default=None, repr=False, compare=False)

    @property
    def signature(self) -> tuple:
        """What the comparison with a printed multiplet depends on (many classes share it); worked out
        once (the groups are fixed when the class is built)."""
        if self._signature is None:
            self._signature = tuple((g.kind, g.n, g.partner) for g in self.groups), self.exchangeable
        return self._signature

    @property
    def may_split(self) -> bool:
        """Whether the class's protons, on one atom, may show as two signals: the two protons of a CH2
        next to a stereocentre or in a ring, or of a =CH2, differ; slow rotation about the C–N bond of a
        primary amide, thioamide or thiourea often shows its NH2 as two 1H signals (common practice, e.g.
        in DMSO-d6).  An aniline, sulfonamide, urea or carbamate NH2 stays one signal."""
        if len(self.atoms) > 1:
            # equivalent CH2 groups of a ring (a 1,4-disubstituted cyclohexane's C2/C6): axial and equatorial
            # protons, two signals of half the class each
            return any(g.kind == "geminal" for g in self.groups)
        return self.amide_nh2 or any(g.kind in ("geminal", "geminal-alkene") for g in self.groups)

    def patterns(self) -> frozenset[tuple[int, ...]]:
        """Every line-count pattern the class may show: sorted tuples of (n + 1) per resolved group,
        1s dropped, with optional groups in or out and groups of overlapping J merged or not."""
        if self._patterns is None:
            self._patterns = _patterns_of(self.signature[0])
        return self._patterns

    def _shown_groups(self) -> list[CouplingGroup]:
        """The groups to print: resolved ones first, then the optional (may be unresolved) ones, each by
        falling J, so a ring CH2 reads 't(d)' (two vicinal partners, a geminal one perhaps), not 's(d)t'."""
        return sorted((g for g in self.groups if g.kind != "long-range"), key=lambda g: (g.optional, -g.j_range[1]))

    def letters(self) -> str:
        """Expected multiplet in letters, optional splittings in brackets (``'t(d)'``; ``'br s'`` for OH/NH/SH)."""
        if self.exchangeable:
            return "br s"
        letters = "".join(_letter(g.n + 1) if not g.optional else f"({_letter(g.n + 1)})" for g in self._shown_groups()) or "s"
        return "s" + letters if letters.startswith("(") else letters

    def label(self) -> str:
        """:meth:`letters` with the couplings, e.g.
        ``'t(d) (ortho 6-10 Hz x2, meta 0.5-3.5 Hz x1 (may be unresolved))'``."""
        gs = self._shown_groups()
        letters = self.letters()
        opt = [g for g in gs if g.optional]
        text = ", ".join(f"{_KIND_NAMES.get(g.kind, g.kind).replace('-pair', ' to a diastereotopic CH2 (one J or two)')}{'' if g.partner == 'H' else ' to ' + g.partner} {g.j_range[0]:g}-{g.j_range[1]:g} Hz "
                         f"x{g.n}{' (may be unresolved)' if g.optional else ''}" for g in gs)
        return f"{letters} ({text})" if gs else letters + (" (no coupled neighbours)" if not opt else "")

    def j_ranges(self) -> list[tuple[float, float]]:
        return [g.j_range for g in self.groups]


@lru_cache(maxsize=8192)
def _patterns_of(groups_sig: tuple) -> frozenset[tuple[int, ...]]:
    return frozenset(p for p, _ in _variants_of(groups_sig))


def _concrete(groups: list[CouplingGroup]) -> list[list[CouplingGroup]]:
    """The group lists a signal may show: a '-pair' group (the two diastereotopic protons of a CH2, or of
    each of two equivalent CH2 groups) as one group of equal couplings or as two groups of half as many
    partners each (a cyclohexane CH between two CH2: 'p', or 'tt' with axial–axial and axial–equatorial J)."""
    out: list[list[CouplingGroup]] = [[]]
    for g in groups:
        if g.kind.endswith("-pair") and g.n >= 2:
            a = CouplingGroup(g.kind, g.n // 2, g.partner, g.key)
            b = CouplingGroup(g.kind, g.n - g.n // 2, g.partner, g.key)
            out = [v + w for v in out for w in ([g], [a, b])]
        else:
            out = [v + [g] for v in out]
    return out


def _letter(lines: int) -> str:
    for k, v in _LETTERS.items():
        if v == lines:
            return k
    return f"({lines})"


def _pattern(groups) -> tuple[int, ...]:
    return tuple(sorted((g.n + 1 for g in groups if g.n > 0), reverse=True))


def _merge_overlapping(groups) -> list[CouplingGroup]:
    """Groups whose J ranges overlap by half the narrower range, or by 1 Hz, merged into one (equal couplings
    look like one group: a 'dd' with J = 7.0 and 6.8 Hz is printed as a 't')."""
    gs = sorted(groups, key=lambda g: -sum(g.j_range))
    merged: list[list[CouplingGroup]] = []
    for g in gs:
        for bucket in merged:
            lo = max(g.j_range[0], bucket[0].j_range[0])
            hi = min(g.j_range[1], bucket[0].j_range[1])
            width = min(g.j_range[1] - g.j_range[0], bucket[0].j_range[1] - bucket[0].j_range[0])
            if hi - lo >= min(0.5 * width, 1.0):
                bucket.append(g)
                break
        else:
            merged.append([g])
    return [CouplingGroup(b[0].kind, sum(x.n for x in b), b[0].partner) for b in merged]


def observed_pattern(letters: str | None) -> tuple[int, ...] | None:
    """Line-count pattern of printed letters (``'td'`` → (3, 2)); None when they say nothing ('m', 'br', none).

    >>> observed_pattern("td"), observed_pattern("s"), observed_pattern("m"), observed_pattern("br s")
    ((3, 2), (), None, None)
    """
    if not letters:
        return None
    s = letters.strip()
    if s.startswith("br") or s in ("m", "ABq"):
        return None
    out = []
    i = 0
    while i < len(s):
        for word in ("sext", "sept", "oct", "non", "s", "d", "t", "q", "p"):
            if s.startswith(word, i):
                out.append(_LETTERS[word])
                i += len(word)
                break
        else:
            return None
    return tuple(sorted((n for n in out if n > 1), reverse=True))


@lru_cache(maxsize=4096)
def _pattern_of(letters: str | None) -> tuple[int, ...] | None:
    return observed_pattern(letters)


def fit_cost(expected: ExpectedMultiplet, letters: str | None, js: tuple = (), tolerance: float = 1.0) -> tuple[int, int]:
    """(pattern misfit 0/1, number of printed J values no expected coupling explains).

    The printed letters fit when some variant of the expected pattern has the same line counts;
    a printed J fits when it lies within ``tolerance`` Hz of an expected coupling's range.
    """
    return _fit(expected.signature, letters, tuple(js), tolerance)


@lru_cache(maxsize=65536)
def _fit(signature: tuple, letters: str | None, js: tuple, tolerance: float) -> tuple[int, int]:
    groups_sig, exchangeable = signature
    pat = _pattern_of(letters)
    if exchangeable:
        # OH/NH/SH: couplings are optional and printed J values are not held against them, but
        # splitting by protons they have no neighbours for is ('d, J = 8 Hz' is not an aryl NH2)
        return int(pat is not None and pat not in _patterns_of(groups_sig)), 0
    bad_pattern = int(pat is not None and pat not in _patterns_of(groups_sig))
    if pat is not None and len(js) > len(pat):
        # more J values than the letters have splittings: a value printed once per coupled proton
        # ('t, J = 6.9, 6.9 Hz') is one J
        kept: list = []
        for j in js:
            if not any(abs(j - k) <= 0.1 for k in kept):
                kept.append(j)
        js = tuple(kept)
    if not js:
        return bad_pattern, 0
    if pat is not None and not bad_pattern and len(js) <= 6:
        # the letters fit: the printed J values must then belong to the splittings of a variant with
        # those letters, one J per splitting ('d, J = 2.3 Hz' cannot be a proton with an ortho neighbour)
        return 0, min(_unexplained(js, ranges, tolerance) for p, ranges in _variants_of(groups_sig) if p == pat)
    ranges = [J_RANGES[k][0] for k, _, _ in groups_sig]
    return bad_pattern, sum(1 for j in js if not any(lo - tolerance <= j <= hi + tolerance for lo, hi in ranges))


def _unexplained(js: tuple, ranges: tuple, tolerance: float) -> int:
    """Printed J values left over by the best one-to-one pairing of J values with coupling ranges."""
    ok = [[lo - tolerance <= j <= hi + tolerance for lo, hi in ranges] for j in js]
    n = min(len(js), len(ranges))
    best = 0
    if len(js) <= len(ranges):
        pairings = ((ok[i][r] for i, r in enumerate(perm)) for perm in itertools.permutations(range(len(ranges)), n))
    else:
        pairings = ((ok[i][r] for r, i in enumerate(perm)) for perm in itertools.permutations(range(len(js)), n))
    for pairs in pairings:
        best = max(best, sum(pairs))
        if best == n:
            break
    return len(js) - best


@lru_cache(maxsize=8192)
def _variants_of(groups_sig: tuple) -> tuple[tuple[tuple[int, ...], tuple], ...]:
    """(line-count pattern, J ranges of its resolved splittings) of every variant :func:`_patterns_of` counts."""
    groups = [CouplingGroup(k, n, p) for k, n, p in groups_sig]
    required = [g for g in groups if not g.optional]
    optional = [g for g in groups if g.optional][:MAX_OPTIONAL]
    out: set = set()
    for k in range(len(optional) + 1):
        for extra in itertools.combinations(optional, k):
            for gs in _concrete(required + list(extra)):
                for v in (gs, _merge_overlapping(gs)):
                    out.add((_pattern(v), tuple(sorted(g.j_range for g in v if g.n > 0))))
    return tuple(sorted(out))


class _RingIndex:
    """Ring facts of one molecule, looked up many times while its multiplets are worked out."""

    def __init__(self, mol: Chem.Mol):
        ri = mol.GetRingInfo()
        self.bond_size: dict[int, int] = {}
        for r in ri.BondRings():
            for b in r:
                if b not in self.bond_size or len(r) < self.bond_size[b]:
                    self.bond_size[b] = len(r)
        self.atom_rings: dict[int, set[int]] = {}
        for k, r in enumerate(ri.AtomRings()):
            for a in r:
                self.atom_rings.setdefault(a, set()).add(k)

    def same(self, i: int, j: int) -> bool:
        return bool(self.atom_rings.get(i, set()) & self.atom_rings.get(j, set()))


_RINGS: dict[int, _RingIndex] = {}


def _rings(mol: Chem.Mol) -> _RingIndex:
    key = id(mol)
    idx = _RINGS.get(key)
    if idx is None or idx.mol is not mol:
        idx = _RingIndex(mol)
        idx.mol = mol
        if len(_RINGS) > 64:
            _RINGS.clear()
        _RINGS[key] = idx
    return idx


def _ring_of_size(mol: Chem.Mol, a: int, b: int) -> int:
    """Size of the smallest ring holding the bond a–b (0 if none)."""
    return _rings(mol).bond_size.get(mol.GetBondBetweenAtoms(a, b).GetIdx(), 0)


def _alkene_kind(mol: Chem.Mol, a: int, b: int) -> str:
    """'cis', 'trans' or 'alkene' (stereo not given) for the single H on a and on b across a=b."""
    bond = mol.GetBondBetweenAtoms(a, b)
    ring = _ring_of_size(mol, a, b)
    if ring and ring <= 8:
        return "cis"  # a ring double bond of a small or medium ring is cis
    stereo = bond.GetStereo()
    if stereo in (Chem.BondStereo.STEREOE, Chem.BondStereo.STEREOZ, Chem.BondStereo.STEREOCIS, Chem.BondStereo.STEREOTRANS):
        # each carbon carries one H and one other substituent, so the protons are cis exactly when
        # the substituents (the stereo reference atoms) are
        return "cis" if stereo in (Chem.BondStereo.STEREOZ, Chem.BondStereo.STEREOCIS) else "trans"
    return "alkene"


def _stereocentre(a: Chem.Atom, ranks) -> bool:
    """A tetrahedral carbon whose four substituents differ topologically (hydrogen counting as one)."""
    if a.GetAtomicNum() != 6 or a.GetIsAromatic() or a.GetHybridization() != Chem.HybridizationType.SP3:
        return False
    nh = a.GetTotalNumHs()
    if nh > 1 or a.GetDegree() + nh != 4:
        return False
    return len({ranks[n.GetIdx()] for n in a.GetNeighbors()}) + nh == 4


def _exchangeable(atom: Chem.Atom) -> bool:
    return atom.GetAtomicNum() in (7, 8, 16)


class _Table:
    """Atom and bond facts of one molecule as plain Python lists (RDKit object access is slow in loops)."""

    _BT = {Chem.BondType.SINGLE: 1, Chem.BondType.DOUBLE: 2, Chem.BondType.TRIPLE: 3, Chem.BondType.AROMATIC: 4}

    def __init__(self, mol: Chem.Mol):
        n = mol.GetNumAtoms()
        atoms = [mol.GetAtomWithIdx(i) for i in range(n)]
        self.z = [a.GetAtomicNum() for a in atoms]
        self.arom = [a.GetIsAromatic() for a in atoms]
        self.nh = proton_counts(mol)   # 1H only: a 2H/3H neither shows nor splits its neighbours (J(H,D) < 1 Hz)
        self.labels = labelled_hydrogens(mol)
        self.sp2 = [a.GetHybridization() == Chem.HybridizationType.SP2 for a in atoms]
        self.in_ring = [a.IsInRing() for a in atoms]
        self.adj: list[list[tuple[int, int, int]]] = [[] for _ in range(n)]   # (neighbour, bond type, bond index)
        for k in range(mol.GetNumBonds()):
            b = mol.GetBondWithIdx(k)
            i, j = b.GetBeginAtomIdx(), b.GetEndAtomIdx()
            t = self._BT.get(b.GetBondType(), 1)
            self.adj[i].append((j, t, k))
            self.adj[j].append((i, t, k))
        self.carbonyl = [self.z[i] == 6 and any(t == 2 and self.z[j] == 8 for j, t, _ in self.adj[i]) for i in range(n)]
        self.dbl_c = [any(t == 2 and self.z[j] == 6 for j, t, _ in self.adj[i]) for i in range(n)]
        self.exch = [z in (7, 8, 16) for z in self.z]


def expected_multiplets(mol: Chem.Mol, ranks: list[int] | None = None) -> list[ExpectedMultiplet]:
    """Expected multiplet of every proton class of ``mol`` (hydrogens implicit), ordered by first atom."""
    if ranks is None:
        ranks = symmetry_ranks(mol)
    T = _Table(mol)
    R = _rings(mol)
    twins = twin_sides(mol, ranks, near=TWIN_NEAR_1H)
    classes: dict[tuple, list[int]] = {}
    for i, nh in enumerate(T.nh):
        if nh > 0:
            classes.setdefault(signal_key(i, ranks, twins), []).append(i)
    chiral = any(_stereocentre(mol.GetAtomWithIdx(i), ranks) for i in range(len(T.z))
                 if T.z[i] == 6 and not T.arom[i] and T.nh[i] <= 1 and len(T.adj[i]) + T.nh[i] == 4)
    amide_n = _amide_nh2_atoms(mol)
    out = []
    for (rank, side), whole in sorted(classes.items(), key=lambda kv: kv[1][0]):
        for atoms in split_by_labels(whole, T.labels):   # a CHD2 beside a CH3 of the same class: two signals
            n_h = sum(T.nh[i] for i in atoms)
            out.append(ExpectedMultiplet(atoms, n_h, _groups(mol, T, R, atoms[0], ranks, chiral), T.exch[atoms[0]],
                                         amide_nh2=atoms[0] in amide_n, twin_of=rank if side is not None else None))
    return sorted(out, key=lambda e: e.atoms[0])


#: NH2 groups whose C–N rotation is slow enough to show two signals (common practice): on a carboxamide
#: or formamide C=O, or on any C=S (thioamides, thioureas, thiosemicarbazides); not on a urea or
#: carbamate C=O, whose NH2 is printed as one 2H signal
_AMIDE_NH2 = [Chem.MolFromSmarts(s) for s in ("[NX3H2]-[CX3](=O)-[#6]", "[NX3H2]-[CX3H1]=O", "[NX3H2]-[CX3]=S")]


def _amide_nh2_atoms(mol: Chem.Mol) -> set[int]:
    """The N atoms of the NH2 groups in :data:`_AMIDE_NH2`."""
    return {m[0] for q in _AMIDE_NH2 for m in mol.GetSubstructMatches(q) if mol.GetAtomWithIdx(m[0]).GetTotalNumHs() == 2}


def _groups(mol: Chem.Mol, T: _Table, R: _RingIndex, ai: int, ranks: list[int], chiral: bool = False) -> list[CouplingGroup]:
    counts: dict[tuple[str, str, int], int] = {}
    own = ranks[ai]

    def add(kind: str, n: int, partner: str, key: int) -> None:
        if partner == "H" and key == own and kind != "geminal-alkene":
            return  # protons of the same class do not split each other's signal (first order)
        if n > 0:
            counts[(kind, partner, key)] = counts.get((kind, partner, key), 0) + n

    z, arom, nh = T.z, T.arom, T.nh
    a_exch = T.exch[ai]
    a_carbonyl = T.carbonyl[ai]
    for bi, btype, bidx in T.adj[ai]:
        zb = z[bi]
        if zb == 9:
            add("HF-geminal", 1, "F", ranks[bi])
            continue
        if zb == 15:
            add("HP", 1, "P", ranks[bi])
            continue
        nb = nh[bi]
        if nb:
            if a_exch or T.exch[bi]:
                add("exchangeable", nb, "H", ranks[bi])
            elif btype == 4 or (arom[ai] and arom[bi]):
                ring = R.bond_size.get(bidx, 0)
                kind = "ortho-5" if ring == 5 else "ortho"
                if ring == 5 and _both_on_ring_n_or_o_t(T, R, ai, bi):
                    kind = "ortho-5-azole"  # imidazole, oxazole H4–H5 (about 1 Hz)
                if ring == 6 and _next_to_ring_n_t(T, R, ai, bi):
                    kind = "ortho-N"  # pyridine H2–H3 (4–6 Hz)
                add(kind, nb, "H", ranks[bi])
            elif btype == 2:
                if nb == 2:                   # =CH2 partner: one proton cis, one trans
                    add("cis", 1, "H", ranks[bi])
                    add("trans", 1, "H", ranks[bi])
                elif nh[ai] == 2:             # each of this =CH2's protons sees the partner cis or trans
                    add("alkene", 1, "H", ranks[bi])
                else:
                    add(_alkene_kind(mol, ai, bi), 1, "H", ranks[bi])
            else:
                if a_carbonyl or T.carbonyl[bi]:
                    add("aldehyde", nb, "H", ranks[bi])
                else:
                    ring = R.bond_size.get(bidx, 0)
                    kind = "vicinal-ring" if ring and ring <= 5 else "vicinal"
                    if nb == 2 and zb == 6 and not arom[bi] and (chiral or T.in_ring[bi]):
                        # a diastereotopic CH2 partner: its two protons may couple with different J,
                        # so the signal is a 'dd' as often as a 't' (see _concrete)
                        kind += "-pair"
                    elif (kind == "vicinal" and nh[ai] == 2 and nb == 1 and zb == 6 and not arom[bi]
                          and (chiral or T.in_ring[ai])):
                        # a diastereotopic CH2's proton next to a CH sees it anti or gauche
                        kind = "vicinal-dia"
                    add(kind, nb, "H", ranks[bi])
        # two bonds away: meta protons, fluorine and phosphorus
        for ci, _, _ in T.adj[bi]:
            if ci == ai:
                continue
            zc = z[ci]
            if zc == 9:
                add("HF-ortho" if arom[ai] and arom[bi] else "HF-vicinal", 1, "F", ranks[ci])
            elif zc == 15:
                add("HP", 1, "P", ranks[ci])
            elif (arom[ai] and arom[bi] and arom[ci] and nh[ci]
                  and not any(x == ci for x, _, _ in T.adj[ai]) and R.same(ai, ci)):
                add("meta", nh[ci], "H", ranks[ci])
            if arom[ai] and arom[bi] and arom[ci]:
                for di, _, _ in T.adj[ci]:
                    if z[di] == 9 and R.same(ai, ci):
                        add("HF-meta", 1, "F", ranks[di])
    if T.labels.get(ai):
        add("HD-geminal", 2 * T.labels[ai], "D", -4)   # CHD2: a quintet of about 2 Hz, often unresolved
    if nh[ai] == 2 and T.dbl_c[ai]:
        add("geminal-alkene", 1, "H", own)       # the two =CH2 protons are not equivalent in fact
    elif nh[ai] == 2 and z[ai] == 6 and not arom[ai] and (chiral or T.in_ring[ai]):
        add("geminal", 1, "H", -2)               # diastereotopic CH2 protons (stereocentre, ring) couple to each other
    if z[ai] == 6 and (arom[ai] or T.sp2[ai] or any(arom[x] for x, _, _ in T.adj[ai])):
        add("long-range", 1, "H", -3)            # one small long-range coupling may be resolved
    if a_exch:
        # exchangeable protons: couplings (if any) are optional; keep them so J values can be explained
        return [CouplingGroup("exchangeable" if p == "H" else k, n, p, key) for (k, p, key), n in counts.items()]
    return [CouplingGroup(k, n, p, key) for (k, p, key), n in counts.items()]


def _on_ring_hetero_t(T: _Table, R: _RingIndex, k: int, pair: tuple[int, int], elements: tuple[int, ...]) -> bool:
    """True when ring atom ``k`` of the bonded ``pair`` is also bonded to an aromatic atom of ``elements``
    (atomic numbers) in a ring it shares."""
    return any(T.z[n] in elements and T.arom[n] and n not in pair and R.same(k, n) for n, _, _ in T.adj[k])


def _next_to_ring_n_t(T: _Table, R: _RingIndex, i: int, j: int) -> bool:
    """True when one of the two aromatic ring atoms is bonded to another aromatic ring N of a shared ring
    (the H2–H3 coupling of pyridines is 4–6 Hz, common practice)."""
    return any(_on_ring_hetero_t(T, R, k, (i, j), (7,)) for k in (i, j))


def _both_on_ring_n_or_o_t(T: _Table, R: _RingIndex, i: int, j: int) -> bool:
    """True when each of two bonded aromatic five-ring carbons is also bonded to an aromatic N or O of a
    shared ring: the H4–H5 coupling of imidazoles and oxazoles is about 1 Hz (common practice, from
    memory: 1-methylimidazole ≈ 1.2 Hz, oxazole ≈ 0.8 Hz) and is often printed as two singlets."""
    return all(_on_ring_hetero_t(T, R, k, (i, j), (7, 8)) for k in (i, j))


def _same_ring(mol: Chem.Mol, i: int, j: int) -> bool:
    return _rings(mol).same(i, j)


def _next_to_ring_n(mol: Chem.Mol, i: int, j: int) -> bool:
    """True when one of the two aromatic ring atoms is bonded to a ring nitrogen of a six-membered ring
    (the H2–H3 coupling of pyridines is 4–6 Hz, common practice)."""
    for k in (i, j):
        for nb in mol.GetAtomWithIdx(k).GetNeighbors():
            if nb.GetAtomicNum() == 7 and nb.GetIsAromatic() and nb.GetIdx() not in (i, j) and _same_ring(mol, k, nb.GetIdx()):
                return True
    return False


_CF_KIND = {("F", 1): "CF1", ("F", 2): "CF2", ("F", 3): "CF3", ("F", 4): "CF4",
            ("P", 1): "CP1", ("P", 2): "CP2", ("P", 3): "CP3", ("P", 4): "CP-long", ("P", 5): "CP-long"}


def _ring_carbon_without_h_beside_aryl_f(mol: Chem.Mol, a: int, f: int) -> bool:
    """An aromatic carbon without H bonded to the aromatic carbon that carries fluorine ``f``."""
    at = mol.GetAtomWithIdx(a)
    if not at.GetIsAromatic() or at.GetTotalNumHs():
        return False
    cf = mol.GetAtomWithIdx(f).GetNeighbors()[0]
    return cf.GetIsAromatic() and mol.GetBondBetweenAtoms(a, cf.GetIdx()) is not None


def carbon_multiplets(mol: Chem.Mol, classes, ranks: list[int] | None = None) -> list[ExpectedMultiplet]:
    """Expected C–F / C–P / C–D splitting of every carbon class (one to four bonds from F, one to five from
    P, deuterium on the carbon itself), in the order of ``classes`` (objects with ``atoms``); a class far
    from F and P and without 2H is a singlet."""
    if ranks is None:
        ranks = symmetry_ranks(mol)
    hetero = [a.GetIdx() for a in mol.GetAtoms() if a.GetAtomicNum() in (9, 15)]
    labels = labelled_hydrogens(mol)
    out = []
    if not hetero:
        return [ExpectedMultiplet(list(c.atoms), len(c.atoms), _deuterium_group(labels, c.atoms[0])) for c in classes]
    dist = Chem.GetDistanceMatrix(mol)
    for c in classes:
        a = c.atoms[0]
        counts: dict[tuple[str, int], int] = {}
        for x in hetero:
            d = int(dist[a, x])
            el = mol.GetAtomWithIdx(x).GetSymbol()
            kind = _CF_KIND.get((el, d))
            if kind == "CF2" and _ring_carbon_without_h_beside_aryl_f(mol, a, x):
                kind = "CF2-sub"
            if kind:
                counts[(kind, ranks[x])] = counts.get((kind, ranks[x]), 0) + 1
        large = {key for (k, key) in counts if k in ("CF1", "CF2", "CF2-sub", "CP1")}
        if large:
            counts = {(("CF3-beside" if k == "CF3" and key not in large else k), key): n for (k, key), n in counts.items()}
        groups = [CouplingGroup(k, n, "F" if k.startswith("CF") else "P", key) for (k, key), n in counts.items()]
        out.append(ExpectedMultiplet(list(c.atoms), len(c.atoms), groups + _deuterium_group(labels, a)))
    return out


def _deuterium_group(labels: dict[int, int], a: int) -> list[CouplingGroup]:
    """The C–D splitting of carbon ``a`` (n deuterons: 2n + 1 lines, carried as 2n partners), or none."""
    return [CouplingGroup("CD1", 2 * labels[a], "D", -4)] if labels.get(a) else []
