"""2D correlation spectra read as the candidate's connectivity and geometry, beside its 1D assignments.

* HMBC: a cross peak (δC, δH) says a carbon and a proton are two or three bonds apart (2J, 3J; common practice:
  four-bond cross peaks are weaker and rarer, as in a W arrangement or across an aromatic ring);
* COSY: a cross peak (δH, δH) says two protons are coupled: three bonds apart (vicinal), more weakly four
  (meta in an aromatic ring, allylic, W; common practice);
* NOESY / ROESY: a cross peak (δH, δH) says two protons are close in space (common practice: an NOE is seen up to
  about 5 Å, in routine spectra within about 4 Å), judged on a small ensemble of RDKit conformers (ETKDG).

Which atoms a cross peak joins is read as a chemist reads it beside the 1D spectra: each δ is placed on the 1D
line it lies on, and the classes there are those the candidate's own 1D assignment put on that line (weight
``HARD_SHARE``) or those its predicted shifts allow on it (a softmax of each class's Student-t cost plus the 1D
spectrum's own misfit cost of that class on that line: a printed 'd' is no singlet's, a DEPT CH2 no CH); off the lines,
or without that 1D spectrum, the predicted shifts alone decide, against 'none of this candidate's atoms'.  With P
the probability that the two ends stand in the experiment's relation, a cross peak costs −log(ε + (1 − ε)·P)
nats: the cross peaks test the candidate's connectivity (or geometry), not its shifts a second time.
"""
from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
from rdkit import Chem
from rdkit.Chem import AllChem

from ..chem.couplings import expected_multiplets
from ..inputs.peaks import ON_LINE, HsqcList, nearest_line
from ..words import count
from .evidence import CORRELATIONS, EVIDENCE, MODELS_FOR, ClassMeans, NucleusResult, _carbon_classes, _Evidence
from .matching import Assignment, MatchCosts, ObservedPeak, Pairing, PeakSet, SignalClass, t_cost

#: HMBC: bonds between a proton and a carbon that give a cross peak
HMBC_BONDS = (2, 3)
#: the chance that a cross peak shows no pair in the experiment's relation (HMBC: a four-bond correlation or an
#: artefact; common practice puts 4J cross peaks at a few in ten in aromatic compounds).  HMBC: chosen with
#: ``HARD_SHARE`` and the HMBC temperature from a small grid (0.1/0.2; 0/0.25/0.5; 1/2/3) on the 39
#: validation-split compounds of ``benchmarks/bench_hmbc.py``, whose cross peaks are built from measured shifts;
#: COSY and NOESY: the same, chosen by analogy (the open data holds no such spectra)
OTHER = {"HMBC": 0.2, "COSY": 0.2, "NOESY": 0.2}
#: the weight of the 1D assignment itself beside what the shifts allow, in the posterior of which class sits on a
#: line (two classes predicted close together may have been assigned either way)
HARD_SHARE = 0.25
#: nats of a class taking a δ that no 1D line gives, against 'none of the candidate's atoms' (the size of the 13C
#: and 1H ``extra`` costs); chosen
NONE_COST = 6.0
#: COSY: the weight of a four-bond coupling (meta, allylic, W) beside a three-bond one (common practice: weaker,
#: often missing); chosen
COSY_4J = 0.3
#: NOESY: effective H–H distances (Å) within which an NOE is expected, and beyond which none is; linear between.
#: Common practice: the intensity falls as r^-6, about 5 Å is the limit and routine spectra of small molecules show
#: pairs within about 4 Å; the effective distance already sums a methyl's three protons (chosen)
NOE_CLOSE, NOE_FAR = 3.0, 4.5
#: NOESY: conformers embedded per candidate (ETKDG, fixed seed; not minimised) and the largest molecule embedded
NOE_CONFORMERS = 10
NOE_MAX_HEAVY = 80
NOE_SEED = 20261205
#: Å between the two protons of a CH2 (sp3 geometry; from memory)
GEMINAL_HH = 1.8

#: the words each experiment's relation is said in
RELATION = {"HMBC": "two or three bonds apart", "COSY": "coupled (three or four bonds apart)",
             "NOESY": "close in space (within about 4 Å)"}


def hmbc_bonds(mol: Chem.Mol, carbons: list, protons: list) -> np.ndarray:
    """(carbon classes × proton classes) bonds from the protons to the carbon: two or three when any member pair is
    that far (a morpholine's N-CH2 protons reach the other, equivalent N-CH2 carbon over three bonds), else the
    nearest member pair's count (one for a carbon's own protons)."""
    dist = Chem.GetDistanceMatrix(mol)
    out = np.zeros((len(carbons), len(protons)), dtype=int)
    for i, ca in enumerate(carbons):
        for k, hx in enumerate(protons):
            counts = {int(dist[a, x]) + 1 for a in ca for x in hx}
            near = [b for b in HMBC_BONDS if b in counts]
            out[i, k] = near[-1] if near else min(counts)
    return out


def cosy_bonds(mol: Chem.Mol, groups: list) -> np.ndarray:
    """(proton classes × proton classes) bonds between the protons of two classes (two heavy atoms n bonds apart
    carry protons n + 2 bonds apart): the nearest pair of different atoms; 0 on the diagonal (a class with itself)."""
    dist = Chem.GetDistanceMatrix(mol)
    out = np.zeros((len(groups), len(groups)), dtype=int)
    for i, a in enumerate(groups):
        for k, b in enumerate(groups):
            if i != k:
                out[i, k] = min(int(dist[x, y]) for x in a for y in b) + 2
    return out


def proton_distances(mol: Chem.Mol) -> np.ndarray | None:
    """(heavy atoms × heavy atoms) effective distance (Å) between the protons the two atoms carry, over an ensemble
    of ``NOE_CONFORMERS`` ETKDG conformers: (mean over conformers of Σ r⁻⁶ over their proton pairs)^(−1/6), the
    average an NOE sees; ∞ where an atom has no proton.  None when the molecule cannot be embedded in 3D (or is
    larger than ``NOE_MAX_HEAVY`` heavy atoms)."""
    if mol.GetNumHeavyAtoms() > NOE_MAX_HEAVY:
        return None
    mh = Chem.AddHs(mol)
    params = AllChem.ETKDGv3()
    params.randomSeed = NOE_SEED
    params.numThreads = 0   # (all cores; the conformers and so the distances do not depend on it)
    try:
        ids = list(AllChem.EmbedMultipleConfs(mh, NOE_CONFORMERS, params))
    except Exception:  # noqa: BLE001 - RDKit refusing a geometry: no 3D reading for this candidate
        ids = []
    if not ids:
        return None
    n = mol.GetNumAtoms()
    hs = [(a.GetIdx(), a.GetNeighbors()[0].GetIdx()) for a in mh.GetAtoms()
          if a.GetAtomicNum() == 1 and a.GetDegree() == 1 and a.GetNeighbors()[0].GetIdx() < n]
    if not hs:
        return np.full((n, n), np.inf)
    h_idx = np.array([h for h, _ in hs])
    owner = np.array([o for _, o in hs])
    acc = np.zeros((n, n))
    for cid in ids:
        pos = mh.GetConformer(cid).GetPositions()[h_idx]
        d = np.linalg.norm(pos[:, None, :] - pos[None, :, :], axis=-1)
        np.fill_diagonal(d, np.inf)
        w = d ** -6.0
        np.add.at(acc, (owner[:, None], owner[None, :]), w)
    acc /= len(ids)
    with np.errstate(divide="ignore"):
        return np.where(acc > 0, acc ** (-1.0 / 6.0), np.inf)


def noe_strength(r: np.ndarray) -> np.ndarray:
    """1 within ``NOE_CLOSE`` Å, 0 beyond ``NOE_FAR``, linear between."""
    return np.clip((NOE_FAR - r) / (NOE_FAR - NOE_CLOSE), 0.0, 1.0)


@dataclass
class _Side:
    """One dimension of a 2D spectrum (13C or 1H) as the candidate reads it: its classes (atoms, predicted shift and
    σ, after the 1D spectrum's scaling when it was given) and, when that 1D spectrum was given, its observed lines
    and which classes its assignment put on each."""

    atoms: list                  # per class: heavy atoms (carbons; or the atoms carrying the protons)
    mu: np.ndarray
    sigma: np.ndarray
    costs: MatchCosts
    lines: list | None = None    # ObservedPeak of the 1D spectrum
    on_line: dict | None = None  # line index -> classes its assignment put there
    nucleus: str = "13C"
    mismatch: np.ndarray | None = None   # classes × lines: the 1D spectrum's own misfit costs (DEPT, letters, J)
    splittable: np.ndarray | None = None  # 1H: classes whose two protons may show apart (a diastereotopic CH2)

    def posterior(self, delta: float) -> np.ndarray:
        """Probability of each class (and, last, of none of them) being the atom behind a cross peak's δ in this
        dimension.  On a 1D line: the assignment's classes there (``HARD_SHARE``) and what the shifts allow; off the
        lines or without a 1D spectrum: the shifts alone, against 'none' at ``NONE_COST`` nats."""
        line = nearest_line(delta, self.lines, ON_LINE[self.nucleus])
        if line is not None:
            p = self.lines[line]
            lo, hi = (p.lo, p.hi) if p.lo is not None else (p.shift, p.shift)
            dev = np.where(self.mu < lo, lo - self.mu, np.where(self.mu > hi, hi - self.mu, 0.0))
        else:
            dev = delta - self.mu
        c = t_cost(dev, self.sigma, self.costs)
        if line is not None and self.mismatch is not None:   # a 'd' line is no singlet's, a CH2 line no CH's
            c = c + self.mismatch[:, line]
        c = np.append(c, NONE_COST if line is None else np.inf)
        soft = np.exp(-(c - c.min()))
        soft /= soft.sum()
        held = (self.on_line or {}).get(line, []) if line is not None else []
        if not held:
            return soft
        hard = np.zeros_like(soft)
        hard[held] = 1.0 / len(held)
        return HARD_SHARE * hard + (1 - HARD_SHARE) * soft


def _side(nucleus: str, result: NucleusResult | None, atoms: list, means: ClassMeans, costs: MatchCosts,
          split: np.ndarray | None = None) -> _Side:
    """A dimension from the 1D result when given (its classes with their scaled predictions, its lines, its
    assignment), else from the predictions of ``atoms`` (the classes)."""
    if result is not None:
        on: dict = {}
        for p in result.assignment.pairings:
            if p.peak is not None:
                on.setdefault(p.peak, []).append(p.cls)
        cl = result.classes
        return _Side([list(c.atoms) for c in cl], np.array([c.shift for c in cl], float),
                     np.array([c.sigma for c in cl], float), costs, list(result.peaks), on, nucleus, result.mismatch,
                     np.array([bool(c.splittable) for c in cl]))
    m, s = means.of(atoms)
    return _Side([list(a) for a in atoms], np.asarray(m, float), np.asarray(s, float), costs, nucleus=nucleus,
                 splittable=split)


class CorrelationEvidence(_Evidence):
    """A 2D correlation spectrum (``nucleus`` HMBC, COSY or NOESY): each cross peak is read against the pairs of
    classes that stand in the experiment's relation (see the module text)."""

    def __init__(self, nucleus: str):
        self.nucleus = nucleus
        self.part = "geometry" if nucleus == "NOESY" else "connectivity"   # the name of its cost part

    def observed(self, pl: HsqcList) -> list[ObservedPeak]:
        # each cross peak stands alone (one carbon correlates with many protons, one proton with many others);
        # ``shift`` is the first dimension (δC of an HMBC, the larger δH of a COSY or NOESY), ``h_lo`` the second
        return PeakSet(ObservedPeak(a, None, h_lo=b, h_hi=b) for a, b in sorted(set(pl.pairs)))

    def relation(self, mol: Chem.Mol, a: list, b: list, facts=None) -> tuple[np.ndarray, np.ndarray, list[str]]:
        """(strength in [0, 1], the bonds or Å each class pair is apart, notes) for classes ``a`` × ``b``."""
        if self.nucleus == "HMBC":
            bonds = hmbc_bonds(mol, a, b)
            return np.isin(bonds, HMBC_BONDS).astype(float), bonds, []
        if self.nucleus == "COSY":
            bonds = cosy_bonds(mol, a)
            return np.where(bonds == 3, 1.0, np.where(bonds == 4, COSY_4J, 0.0)), bonds, []
        r = getattr(facts, "proton_distances", None) if facts is not None else None
        if r is None:
            r = proton_distances(mol)
            if facts is not None:
                facts.proton_distances = r if r is not None else False
        if r is None or r is False:
            n = len(a)
            return np.full((n, n), 0.5) - 0.5 * np.eye(n), np.full((n, n), np.nan), [
                "NOESY: no 3D conformer could be made for this candidate; its cross peaks are read as uninformative"]
        d = np.array([[min(r[x, y] for x in ga for y in gb if x != y) if i != k else np.inf
                       for k, gb in enumerate(b)] for i, ga in enumerate(a)])
        return noe_strength(d), d, []

    def evaluate(self, mol: Chem.Mol, ranks, mu, sg, peaks, costs: MatchCosts, prepared=None, facts=None,
                 given: dict | None = None) -> NucleusResult:
        """``given``: the candidate's 13C and 1H results of this case (before their atoms are renumbered)."""
        given = given or {}
        means_c, means_h = mu if isinstance(mu, tuple) else (None, mu)
        ems = getattr(facts, "proton_multiplets", None) if facts is not None else None
        ems = [e for e in (ems if ems is not None else expected_multiplets(mol, ranks)) if all(x in means_h.pos for x in e.atoms)]
        h_costs = replace(costs, t_df=costs.h_t_df or costs.t_df, t_scale=costs.h_t_scale, t_widen=1.0)
        side_h = _side("1H", given.get("1H"), [list(e.atoms) for e in ems], means_h, h_costs,
                       np.array([bool(e.may_split) for e in ems]))
        if self.nucleus == "HMBC":
            c_atoms = [c.atoms for c in _carbon_classes(mol, ranks, facts)]
            side_a = _side("13C", given.get("13C"), c_atoms, means_c, replace(costs, h_t_df=None))
        else:
            side_a = side_h
        other = OTHER[self.nucleus]
        if not side_a.atoms or not side_h.atoms:   # no protons (or no carbons): no cross peak is this candidate's
            cost = float(-np.log(other))
            a = Assignment([], list(range(len(peaks))), cost * len(peaks),
                           {self.part: cost * len(peaks)},
                           extra_costs=(cost,) * len(peaks))
            res = NucleusResult(self.nucleus, [], list(peaks), a)
            res.far_cross_peaks = list(range(len(peaks)))
            res.flags = [f"{self.nucleus}: the candidate has no {'protons' if not side_h.atoms else 'carbons'} to make "
                         "these cross peaks"]
            return res
        strength, apart, notes = self.relation(mol, side_a.atoms, side_h.atoms, facts)
        if self.nucleus != "HMBC" and side_h.splittable is not None:
            # the two protons of a diastereotopic CH2 shown apart couple (2J) and lie 1.8 Å apart: a cross peak between
            # its two lines is its own (common practice)
            for i in np.flatnonzero(side_h.splittable):
                strength[i, i], apart[i, i] = 1.0, (2 if self.nucleus == "COSY" else GEMINAL_HH)
        classes, pairings, unexplained, costs_of = [], [], [], []
        for k, pk in enumerate(peaks):
            wa, wb = side_a.posterior(pk.shift)[:-1], side_h.posterior(pk.h_lo)[:-1]
            p = float(wa @ strength @ wb)
            cost = float(-np.log(other + (1 - other) * p))
            costs_of.append(cost)
            # the pair shown: the likeliest related pair, else the likeliest ends whatever their relation
            joint = np.outer(wa, wb)
            i, j = np.unravel_index(np.argmax(joint * strength if p > 0.05 else joint), joint.shape)
            far = strength[i, j] < 0.5
            value = apart[i, j]
            if self.nucleus == "NOESY":
                say = "no 3D conformer" if not np.isfinite(value) else f"{value:.1f} Å apart"
            else:
                say = f"{int(value)} bonds apart" if value else "the same class"
            cls = SignalClass(list(side_a.atoms[i]), say if far else "", float(side_a.mu[i]), float(side_a.sigma[i]),
                              shift_h=float(side_h.mu[j]), sigma_h=float(side_h.sigma[j]), h_atoms=list(side_h.atoms[j]),
                              bonds=None if self.nucleus == "NOESY" else int(value),
                              distance=float(value) if self.nucleus == "NOESY" and np.isfinite(value) else None)
            classes.append(cls)
            pairings.append(Pairing(k, k, None, None, cost, multiplicity_ok=not far))
            if p < 0.5:
                unexplained.append(k)
        total = float(sum(costs_of))
        a = Assignment(pairings, [], total, {self.part: total},
                       extra_costs=tuple(costs_of))
        res = NucleusResult(self.nucleus, classes, list(peaks), a)
        res.far_cross_peaks = unexplained
        res.flags = notes + self.flags(res)
        return res

    def flags(self, res: NucleusResult) -> list[str]:
        n = len(res.far_cross_peaks)
        what = "carbon and proton are" if self.nucleus == "HMBC" else "two protons are"
        return [f"{count(n, self.nucleus + ' cross peak', self.nucleus + ' cross peaks')} whose {what} not "
                f"{RELATION[self.nucleus]} in this candidate (as its 1D assignments and shifts read them)"] if n else []


for _n in CORRELATIONS:
    EVIDENCE[_n] = CorrelationEvidence(_n)
MODELS_FOR.update({"HMBC": ("13C", "1H"), "COSY": ("1H",), "NOESY": ("1H",)})
