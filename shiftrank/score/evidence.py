"""What one nucleus's spectrum says about one candidate: classes, observed peaks, assignment, flags.

One small strategy object per nucleus (:class:`CarbonEvidence`, :class:`ProtonEvidence`) turns a
candidate's predicted shifts and its symmetry classes into :class:`~shiftrank.score.matching.SignalClass`
objects, a printed or typed peak list into :class:`~shiftrank.score.matching.ObservedPeak` objects, and
runs the shared assignment (:func:`shiftrank.score.matching.assign`).  The nucleus decides only:

* 13C: one class per set of equivalent carbons with its CHn; a DEPT multiplicity that differs costs
  ``multiplicity_mismatch``;
* 1H: one class per set of equivalent H-bearing atoms with its number of protons and its expected
  first-order multiplet (:mod:`shiftrank.chem.couplings`); with printed integrals the assignment runs
  over protons; printed letters and J values that the expected multiplet cannot produce cost
  ``multiplicity_mismatch`` and ``j_mismatch``; an unobserved OH/NH/SH class is cheap;
* HSQC: one class per set of equivalent protonated carbons, with the 13C and the 1H prediction; a
  cross peak (δC, δH) costs the Student-t error of both dimensions (each with its own model's fitted
  error); cross peaks at one δC with two δH (the two protons of a CH2) are read as one carbon; the
  phase of a multiplicity-edited spectrum (CH2 against CH/CH3) that the class cannot show costs
  ``multiplicity_mismatch``, as DEPT does for 13C.
"""
from __future__ import annotations

import math
from collections import Counter
from dataclasses import dataclass, field, replace

import numpy as np
from rdkit import Chem

from ..chem.labels import labelled_hydrogens
from ..chem.couplings import ExpectedMultiplet, carbon_multiplets, expected_multiplets, fit_cost
from ..chem.inventory import integer_ratio
from ..chem.structure import carbon_classes
from ..prediction.configuration import increment_note
from ..errors import InputError
from ..inputs.peaks import HSQC_ALLOWS, HsqcList, PeakList, hsqc_list  # noqa: F401 - hsqc_list re-exported
from ..inputs.solvents import SOLVENTS, exchanges_deuterium
from ..words import count
from .matching import Assignment, MatchCosts, ObservedPeak, PeakSet, SignalClass, assign, proton_deviations

#: the 2D experiments read as correlations between atoms (:mod:`.correlations`), not as classes with shifts
CORRELATIONS = ("HMBC", "COSY", "NOESY")

#: ppm over which the slope of a scaling line is judged (a slope 1 % off moves a 13C line 0.5 ppm at 50 ppm from
#: the centre) and the fewest assigned pairs a line is fitted to
SCALE_SPAN = {"13C": 50.0, "1H": 3.0, "HSQC": 50.0}
MIN_SCALE_PAIRS = 4

#: 1H: the share of sample multiplets that must carry an integral for the assignment to run over protons.
INTEGRAL_SHARE = 0.8


_MCODE = {"C": 0, "CH": 1, "CH2": 2, "CH3": 3, "CH4": 4}


class ClassMeans:
    """Predicted shifts and sigmas of a molecule's centres, averaged per class with array arithmetic.

    ``centres`` are heavy-atom indices in the order of ``mu``/``sg``; a class is a list of atoms.  ``ez``: the
    E/Z increments included in ``mu`` (:mod:`shiftrank.prediction.configuration`), None when none applies."""

    def __init__(self, centres, mu, sg, ez=None):
        self.pos = {int(a): k for k, a in enumerate(centres)}
        self.mu, self.sg = np.asarray(mu, dtype=float), np.asarray(sg, dtype=float)
        self.ez = None if ez is None else np.asarray(ez, dtype=float)
        self._member: dict = {}

    def of(self, classes: list[list[int]]):
        key = tuple(len(c) for c in classes), tuple(c[0] for c in classes)
        member = self._member.get(key)
        if member is None:
            member = np.empty(len(self.mu), dtype=np.int64)
            member.fill(-1)
            for k, atoms in enumerate(classes):
                for a in atoms:
                    member[self.pos[a]] = k
            member = self._member[key] = (member, np.bincount(member[member >= 0], minlength=len(classes)))
        idx, size = member
        ok = idx >= 0
        m = np.bincount(idx[ok], weights=self.mu[ok], minlength=len(size)) / size
        s = np.bincount(idx[ok], weights=self.sg[ok], minlength=len(size)) / size
        return m, s

    def configuration_of(self, classes: list[list[int]]) -> list[float]:
        """Mean E/Z increment (ppm) inside each class's predicted shift; zeros when none applies."""
        if self.ez is None:
            return [0.0] * len(classes)
        return [float(np.mean([self.ez[self.pos[a]] for a in atoms])) for atoms in classes]


def _pair_with(c, increment: float) -> list[int] | None:
    """The partner atoms of a class that is one of two alike groups cis and trans across a double bond whose
    predictions the increments split (a SMILES does not say which is which: the pair's two values are what is
    predicted, and the tables say so)."""
    return list(c.twin[0]) if c.twin and c.twin[1] == "alkene" and abs(increment) >= 0.05 else None


def _carbon_classes(mol: Chem.Mol, ranks, facts=None):
    """The carbon symmetry classes, from the candidate's cached facts when given."""
    return facts.carbon_classes if facts is not None else carbon_classes(mol, ranks)


def _has_f_or_p(mol: Chem.Mol, facts=None) -> bool:
    """Whether the candidate has fluorine or phosphorus (from its cached facts when given)."""
    if facts is not None:
        return any(k in facts.counts for k in ("F", "P"))
    return any(a.GetAtomicNum() in (9, 15) for a in mol.GetAtoms())


def _mean(values: dict, atoms) -> float:
    return float(sum(values[a] for a in atoms) / len(atoms))


def _r(x, nd):
    return None if x is None or (isinstance(x, float) and not np.isfinite(x)) else round(float(x), nd)


@dataclass
class NucleusResult:
    """How a candidate explains one nucleus's peaks."""

    nucleus: str
    classes: list[SignalClass]
    peaks: list[ObservedPeak]
    assignment: Assignment
    flags: list[str] = field(default_factory=list)
    by_protons: bool = False          # 1H: assignment over protons (integrals given)
    scaling: tuple | None = None      # (offset, slope, centre) when the predictions were scaled to the spectrum
    far_cross_peaks: list = field(default_factory=list)   # 2D correlations: cross peaks the candidate likely cannot make
    mismatch: np.ndarray | None = field(default=None, repr=False)   # 1D: classes × peaks misfit costs (DEPT, letters, J)
    _n_obs: int | None = field(default=None, repr=False)

    @property
    def cost(self) -> float:
        return self.assignment.total_cost

    @property
    def deviations(self) -> list[float]:
        return [p.deviation for p in self.assignment.pairings if p.deviation is not None]

    @property
    def mae(self) -> float | None:
        d = self.deviations
        return float(np.mean(np.abs(d))) if d else None

    @property
    def max_abs_deviation(self) -> float | None:
        d = self.deviations
        return float(np.max(np.abs(d))) if d else None

    @property
    def beyond_3sigma(self) -> int:
        return len({p.cls for p in self.assignment.pairings if p.z is not None and abs(p.z) > 3})

    @property
    def observed_signals(self) -> int:
        if self._n_obs is None:
            self._n_obs = sum(1 for p in self.peaks if not p.solvent)
        return self._n_obs

    @property
    def listed_signals(self) -> int:
        """Signals the list allows at most: a value printed twice, or with '(2C)', may be one class of equivalent
        nuclei or two classes that coincide, so it counts for up to that many; a line by the solvent's that
        this candidate's assignment takes counts too (a CH at 76.7 beside the CDCl3 triplet)."""
        taken = {p.peak for p in self.assignment.pairings if p.peak is not None}
        return sum(max(1, p.count) for j, p in enumerate(self.peaks) if not p.solvent or j in taken)

    def shared_beyond_listed(self) -> int:
        """Classes that share a line beyond the number of nuclei the list gives it (a line printed once holding two
        classes counts one; a '(2C)' line holding two counts none)."""
        on = Counter(j for j, _ in {(p.peak, p.cls) for p in self.assignment.pairings if p.peak is not None})
        return sum(max(0, n - max(1, self.peaks[j].count)) for j, n in on.items())

    def assignment_table(self) -> list[dict]:
        """One row per class and peak it takes (unobserved classes too), with the notes a reader needs."""
        rows = []
        for p in self.assignment.pairings:
            c = self.classes[p.cls]
            notes = (["unobserved" + (f" ({c.unseen_why})" if c.may_go_unseen else "")] if p.peak is None else []) \
                + (["shares a peak"] if p.shared else []) + ([">3σ"] if p.z is not None and abs(p.z) > 3 else []) \
                + ([] if p.multiplicity_ok else ["DEPT mismatch" if self.nucleus == "13C" else "multiplet mismatch"]) \
                + ([f"E/Z {c.configuration:+.1f}: one of a cis/trans pair with atom {','.join(map(str, c.pair_with))} "
                    "(which is which the drawing does not say)"] if c.pair_with else
                   [increment_note(c.configuration)] if abs(c.configuration) >= 0.05 else [])
            row = {"atoms": c.atoms, "class": p.cls, "multiplicity": c.multiplicity,
                   "predicted": _r(c.shift, 2), "sigma": _r(c.sigma, 2), "peak": p.peak,
                   "observed": None if p.peak is None else _r(self.peaks[p.peak].shift, 3),
                   "deviation": _r(p.deviation, 2), "z": _r(p.z, 2), "shared_peak": p.shared,
                   "multiplicity_ok": p.multiplicity_ok, "notes": notes}
            if self.nucleus in CORRELATIONS:
                pk = self.peaks[p.peak]
                row.update(predicted_h=_r(c.shift_h, 2), observed_h=_r(pk.h_lo, 3), h_atoms=list(c.h_atoms), bonds=c.bonds,
                           cost=_r(p.cost, 3), notes=[] if p.multiplicity_ok else [c.multiplicity])
                if c.distance is not None:
                    row["distance"] = _r(c.distance, 2)
                rows.append(row)
                continue
            if self.nucleus == "HSQC":
                row["predicted_h"], row["sigma_h"] = _r(c.shift_h, 2), _r(c.sigma_h, 2)
                if p.peak is not None:
                    pk = self.peaks[p.peak]
                    row["observed_h"] = _r(pk.h_lo, 3) if pk.h_lo == pk.h_hi else [_r(pk.h_lo, 3), _r(pk.h_hi, 3)]
                    row["deviation_h"] = _r(float(proton_deviations([c], [pk])[0, 0]), 2)
            if self.nucleus == "1H":
                row["protons"] = c.units if self.by_protons else (c.expected.n_h if c.expected is not None else None)
                if self.by_protons:
                    row["protons_on_peak"] = p.units
                if p.peak is not None:
                    pk = self.peaks[p.peak]
                    row["observed_multiplicity"] = pk.multiplicity
                    row["observed_range"] = [pk.lo, pk.hi] if pk.lo is not None else None
            rows.append(row)
        return rows

    def to_dict(self, detail: bool = False) -> dict:
        listed = self.listed_signals
        d = {"expected_signals": len(self.classes), "observed_signals": self.observed_signals,
             **({"listed_values": listed} if listed != self.observed_signals else {}),
             "mae": _r(self.mae, 3), "max_deviation": _r(self.max_abs_deviation, 2),
             "beyond_3sigma": self.beyond_3sigma, "cost": _r(self.cost, 3),
             "cost_parts": {k: _r(v, 3) for k, v in self.assignment.parts.items()}, "flags": self.flags}
        if self.scaling is not None:
            d["scaling"] = {"offset": _r(self.scaling[0], 3), "slope": _r(self.scaling[1], 4), "centre": _r(self.scaling[2], 2)}
        if detail:
            d["assignment"] = self.assignment_table()
            d["unmatched_peaks"] = self.assignment.unmatched_peaks
        return d


@dataclass
class Prepared:
    """What a nucleus's comparison needs that does not depend on the cost settings: the candidate's
    classes, the peaks as this candidate reads them (13C: C–F/C–P lines printed separately may be read
    as one carbon), 0/1 misfit matrices (classes × peaks) and notes."""

    classes: list[SignalClass]
    peaks: list[ObservedPeak]
    bad_pattern: np.ndarray     # printed multiplicity the class cannot show (DEPT for 13C, letters for 1H)
    bad_j: np.ndarray           # printed J values the class cannot explain (13C: C–F/C–P; 1H: H–H, H–F …)
    notes: list[str] = field(default_factory=list)
    alternative: "Prepared | None" = None   # 13C: the peaks read line by line, when some were read as one split carbon
    scaling: tuple | None = None            # (offset, slope, centre) of the predictions scaled to this spectrum


class _Evidence:
    nucleus = ""

    def mismatch(self, prepared: Prepared, costs: MatchCosts) -> np.ndarray:
        return prepared.bad_pattern * costs.multiplicity_mismatch + prepared.bad_j * costs.j_mismatch

    def best_assignment(self, pr: Prepared, costs: MatchCosts) -> tuple[Assignment, Prepared]:
        """The assignment of ``pr``, or of its alternative reading of the peaks when that costs less (a
        reading of split lines as one carbon is a hypothesis the candidate must earn); with
        ``costs.scale_prior``, assigned once more after scaling the predictions to the spectrum."""
        a = assign(pr.classes, pr.peaks, costs, self.mismatch(pr, costs))
        if pr.alternative is not None:
            b = assign(pr.alternative.classes, pr.alternative.peaks, costs, self.mismatch(pr.alternative, costs))
            if b.total_cost <= a.total_cost:
                a, pr = b, pr.alternative
        if costs.scale_prior:
            return self._scaled(a, pr, costs)
        return a, pr

    def _scaled(self, a: Assignment, pr: Prepared, costs: MatchCosts) -> tuple[Assignment, Prepared]:
        """DP4's scaled shifts (Smith & Goodman 2010): fit observed = predicted + offset + (slope − 1)(predicted −
        centre) on the assigned pairs, weighted by 1/σ², with a ridge prior of strength ``scale_prior`` towards
        no change (the slope judged over ``SCALE_SPAN`` ppm), move every class's prediction along the line and
        assign again.  Printed lists come from many laboratories: referencing (TMS or a solvent line at one of
        its quoted values) and solvent move all shifts together."""
        pairs = [(pr.classes[q.cls], q.deviation) for q in a.pairings if q.peak is not None and q.deviation is not None]
        if len(pairs) < MIN_SCALE_PAIRS:
            return a, pr
        x = np.array([c.shift for c, _ in pairs])
        y = x + np.array([d for _, d in pairs])
        w = 1.0 / np.maximum(np.array([c.sigma for c, _ in pairs]), 0.05) ** 2
        centre = float(np.average(x, weights=w))
        X = np.column_stack([np.ones_like(x), x - centre])
        A = (X.T * w) @ X + costs.scale_prior * float(w.mean()) * np.diag([1.0, SCALE_SPAN[self.nucleus] ** 2])
        off, tilt = np.linalg.solve(A, (X.T * w) @ (y - x))
        classes = [replace(c, shift=float(c.shift + off + tilt * (c.shift - centre))) for c in pr.classes]
        scaled = replace(pr, classes=classes, alternative=None, scaling=(float(off), float(1 + tilt), centre))
        return assign(classes, pr.peaks, costs, self.mismatch(scaled, costs)), scaled

    def evaluate(self, mol: Chem.Mol, ranks, mu: dict, sg: dict, peaks: list[ObservedPeak], costs: MatchCosts,
                 prepared: Prepared | None = None, facts=None) -> NucleusResult:
        a, pr = self.best_assignment(prepared or self.prepare(mol, ranks, mu, sg, peaks, facts), costs)
        res = NucleusResult(self.nucleus, pr.classes, pr.peaks, a,
                            by_protons=any(p.capacity is not None for p in pr.peaks), scaling=pr.scaling)
        res.flags = list(pr.notes) + self.flags(res)
        res.mismatch = self.mismatch(pr, costs)   # (a 2D spectrum read beside this one weighs the same misfits)
        return res


#: ppm either side of a solvent line that it covers: 13C, a CDCl3 triplet or a DMSO-d6 septet of J(C,D) about
#: 20-32 Hz spans 0.6-1.3 ppm at 100 MHz; 1H, a residual quintet or a broad water line (from memory)
SOLVENT_HALF_WIDTH = {"13C": 0.6, "1H": 0.08}
#: the chance of lying under the line from which an unlisted class is said to be maybe hidden there
HIDDEN_MIN = 0.1


def _hidden_chance(shift: float, sigma: float, line: float, half_width: float) -> float:
    """The chance that a class predicted at ``shift`` ± ``sigma`` (normal) lies within ``half_width`` of ``line``."""
    s = max(float(sigma), 0.5 * half_width) * math.sqrt(2.0)
    return 0.5 * (math.erf((line + half_width - shift) / s) - math.erf((line - half_width - shift) / s))


def _mark_hidden(classes: list[SignalClass], peaks, nucleus: str) -> None:
    """Mark the classes (not NH/OH) that may lie under one of the solvent's lines: when unlisted, the table and
    the signal count say so.  The cost of leaving one out is unchanged: a discount by this chance was measured
    (13C) and lost a database isomer case, gaining none."""
    for c in classes:
        if c.exchangeable:
            continue
        for line, solvent in getattr(peaks, "solvent_lines", ()):
            if _hidden_chance(c.shift, c.sigma, line, SOLVENT_HALF_WIDTH[nucleus]) >= HIDDEN_MIN:
                c.maybe_hidden, c.unseen_why = True, f"may lie under the {solvent} line at {line:g} ppm"
                break


class CarbonEvidence(_Evidence):
    """13C: carbons by symmetry class and CHn; DEPT multiplicities compared exactly; printed C–F and
    C–P splittings compared with the candidate's carbons one to four bonds from F (three from P)."""

    nucleus = "13C"

    def observed(self, pl: PeakList) -> list[ObservedPeak]:
        out = PeakSet(ObservedPeak(p.shift, p.multiplicity, p.solvent is not None, count=p.count, j=tuple(p.j),
                                   coupling=p.coupling, field=pl.field_mhz, doubled=p.doubled)
                      for p in pl.peaks)
        out.printed = pl.printed   # a printed paragraph's list: the ranking's printed-text settings apply
        out.dept135 = pl.dept135
        out.two_forms = pl.two_forms
        if pl.solvent in SOLVENTS:
            out.solvent_lines = tuple((x, pl.solvent) for x in SOLVENTS[pl.solvent].carbon_13c)
        return out

    def classes(self, mol: Chem.Mol, ranks, mu: dict, sg: dict, peaks, facts=None) -> list[SignalClass]:
        cc = _carbon_classes(mol, ranks, facts)
        if isinstance(mu, ClassMeans):
            m, s = mu.of([c.atoms for c in cc])
            out = [SignalClass(c.atoms, c.multiplicity, a, b, configuration=z, pair_with=_pair_with(c, z))
                   for c, a, b, z in zip(cc, m.tolist(), s.tolist(), mu.configuration_of([c.atoms for c in cc]))]
        else:
            out = [SignalClass(c.atoms, c.multiplicity, _mean(mu, c.atoms), _mean(sg, c.atoms)) for c in cc]
        for c in out:
            if any(n.GetAtomicNum() == 5 for n in mol.GetAtomWithIdx(c.atoms[0]).GetNeighbors()):
                # a carbon bound to boron is broadened by the quadrupolar 11B and often not seen at all
                # ('the carbon attached to boron was not observed': common practice): cheap to leave unlisted
                c.exchangeable, c.unseen_why = True, "bound to boron, often not seen"
            elif getattr(peaks, "dept135", False) and c.multiplicity == "C":
                c.exchangeable, c.unseen_why = True, "quaternary: DEPT-135 does not show it"
        _mark_hidden(out, peaks, "13C")
        return out

    def prepare(self, mol: Chem.Mol, ranks, mu: dict, sg: dict, peaks: list[ObservedPeak], facts=None) -> Prepared:
        classes = self.classes(mol, ranks, mu, sg, peaks, facts)
        if facts is None or _has_f_or_p(mol, facts) or labelled_hydrogens(mol):
            couplings = carbon_multiplets(mol, classes, ranks)
            for c, e in zip(classes, couplings):
                c.expected = e
            if any(e.groups for e in couplings):
                merged, notes = collapse_split_lines(classes, peaks)
                if notes:
                    pr = self._matrices(classes, merged, notes)
                    pr.alternative = self._matrices(classes, peaks, [])
                    return pr
        elif any(p.coupling is not None or p.j for p in peaks):
            for c in classes:   # printed splittings a molecule without F or P cannot show
                c.expected = ExpectedMultiplet(c.atoms, len(c.atoms))
        return self._matrices(classes, peaks, [])

    def _matrices(self, classes, peaks, notes) -> Prepared:
        cls_m = np.array([_MCODE.get(c.multiplicity, 9) for c in classes])
        pk_m = np.array([_MCODE.get(p.multiplicity, 9) if p.multiplicity is not None else -1 for p in peaks])
        bad_p = ((pk_m[None, :] >= 0) & (pk_m[None, :] != cls_m[:, None])).astype(float)
        for j, p in enumerate(peaks):
            if p.multiplicity == "CH/CH3":   # a DEPT-135 '+' phase: either
                bad_p[:, j] = ~np.isin(cls_m, (_MCODE["CH"], _MCODE["CH3"]))
        bad_j = np.zeros_like(bad_p)
        for j, p in enumerate(peaks):
            if p.coupling is None and not p.j:
                continue
            for i, c in enumerate(classes):
                if c.expected is not None:
                    pat, nj = fit_cost(c.expected, p.coupling, p.j, tolerance=2.0)
                    bad_j[i, j] = pat + nj
        return Prepared(classes, peaks, bad_p, bad_j, list(notes))

    def flags(self, res: NucleusResult) -> list[str]:
        out = _count_flags(res, "signals") + _quality_flags(res, ("carbon", "carbons"))
        n_mm = sum(1 for p in res.assignment.pairings if not p.multiplicity_ok)
        if n_mm:
            out.append(f"{count(n_mm, '13C peak', '13C peaks')} assigned against {'its' if n_mm == 1 else 'their'} printed "
                       "multiplicity (DEPT, or a C–F, C–P or C–D splitting)")
        return out


#: Lines of a printed C–F/C–P multiplet: equal spacing within this fraction (or 0.03 ppm) counts as equal.
SPACING_TOLERANCE = 0.12
#: 13C frequencies assumed when the text does not give one (MHz).
FIELD_RANGE = (75.0, 151.0)


def collapse_split_lines(classes: list[SignalClass], peaks: list[ObservedPeak]) -> tuple[list[ObservedPeak], list[str]]:
    """Read lines printed separately as one split carbon where this candidate has a carbon that splits
    so: the expected number of lines, equally spaced by a J the carbon's distance from F or P allows at
    the stated frequency, centred within reach of the carbon's prediction.  Never on spacing alone: a
    candidate without such a carbon keeps every line."""
    free = [j for j, p in enumerate(peaks) if not p.solvent and p.coupling is None and not p.j]
    used: set[int] = set()
    merged: list[ObservedPeak] = []
    notes: list[str] = []
    order = sorted(range(len(classes)), key=lambda i: -max((g.j_range[1] for g in classes[i].expected.groups), default=0))
    for i in order:
        c = classes[i]
        req = [g for g in c.expected.groups if not g.optional]
        if len(req) != 1:
            continue
        g = req[0]
        lines = g.n + 1
        field = next((peaks[j].field for j in free if peaks[j].field), None)
        fmin, fmax = (field, field) if field else FIELD_RANGE
        smin, smax = g.j_range[0] / fmax, g.j_range[1] / fmin
        cand = sorted((peaks[j].shift, j) for j in free if j not in used)
        best = None
        for a in range(len(cand)):
            for b in range(a + 1, len(cand)):
                s = cand[b][0] - cand[a][0]
                if s > smax:
                    break
                if s < smin:
                    continue
                tol = max(0.03, SPACING_TOLERANCE * s)
                chosen = [cand[a][1], cand[b][1]]
                pos, worst = cand[b][0], 0.0
                for _ in range(lines - 2):
                    target = pos + s
                    hit = min(((abs(x - target), j) for x, j in cand if j not in chosen), default=(np.inf, None))
                    if hit[0] > tol:
                        break
                    chosen.append(hit[1])
                    pos = peaks[hit[1]].shift
                    worst = max(worst, hit[0])
                if len(chosen) != lines:
                    continue
                centre = float(np.mean([peaks[j].shift for j in chosen]))
                miss = abs(centre - c.shift)
                if miss > 3 * c.sigma + 2.0:
                    continue
                # equal spacing first (the lines of one multiplet are evenly spaced), then nearness to the prediction
                score = worst / tol + miss / (3 * c.sigma + 2.0)
                if best is None or score < best[0]:
                    best = (score, chosen, centre, s)
        if best is None:
            continue
        _, chosen, centre, s = best
        used.update(chosen)
        letter = {2: "d", 3: "t", 4: "q"}.get(lines, "m")
        j_hz = (s * field,) if field else ()
        merged.append(ObservedPeak(round(centre, 3), None, False, coupling=letter, j=j_hz, field=field))
        shown = "/".join(f"{peaks[j].shift:g}" for j in sorted(chosen, key=lambda j: peaks[j].shift))
        notes.append(f"{lines} lines {shown} read as one carbon split by {g.partner} ({letter}, "
                     + (f"J ≈ {s * field:.0f} Hz at {field:g} MHz" if field else f"spacing {s:.2f} ppm") + ") for atoms "
                     + ",".join(str(a) for a in c.atoms))
    if not used:
        return peaks, []
    kept = sorted([p for j, p in enumerate(peaks) if j not in used] + merged, key=lambda p: p.shift)
    out = peaks.derived(kept) if isinstance(peaks, PeakSet) else PeakSet(kept)
    return out, notes


#: Hz: no H–H coupling exceeds this (geminal and trans-alkene couplings reach about 18.5 Hz, common
#: practice); a larger printed J in a compound without F or P comes from lines picked by a program,
#: and that peak's letters and J values are not compared with the candidate's multiplets
MAX_HH_J = 19.5


class ProtonEvidence(_Evidence):
    """1H: proton classes with their counts and expected multiplets; integrals as units when printed."""

    nucleus = "1H"

    def observed(self, pl: PeakList) -> list[ObservedPeak]:
        sample = [p for p in pl.peaks if p.solvent is None]
        ints = [p.intensity for p in sample if p.intensity is not None and p.intensity > 0]
        caps: dict[int, int] = {}
        if sample and len(ints) >= INTEGRAL_SHARE * len(sample):
            vals = np.array(ints, dtype=float)
            near = (np.abs(vals - np.round(vals)) <= 0.2) & (np.round(vals) >= 1)
            if any(p.doubled for p in sample):
                # two forms: printed in protons, a form's share ('0.5H', '1.5H') rounded up to whole protons
                scaled = np.maximum(1, np.ceil(vals - 0.25)).astype(int)
            elif near.mean() >= 0.75 or (pl.printed and np.any(np.abs(2 * vals - np.round(2 * vals)) > 0.1)):
                # printed in protons; a few odd values (0.1H/0.9H of a tautomer mix) are rounded, at least 1
                # (printed text gives protons: odd shares such as '0.4H' are a trace or an impurity, not a sign
                # that the values are relative areas; halves ('0.5H' each) are two forms' lines, read as a ratio)
                scaled = np.maximum(1, np.round(vals)).astype(int)
            else:  # relative areas: the best small-integer ratio (inventory's rule)
                try:
                    scaled = np.array(integer_ratio(list(vals), max_multiplier=8), dtype=int)
                except InputError:
                    scaled = np.maximum(1, np.round(vals)).astype(int)
            it = iter(scaled.tolist())
            for k, p in enumerate(pl.peaks):
                if p.solvent is None and p.intensity is not None and p.intensity > 0:
                    caps[k] = max(1, int(next(it)))
        out = PeakSet()
        for k, p in enumerate(pl.peaks):
            out.append(ObservedPeak(p.shift, p.multiplicity, p.solvent is not None, p.lo, p.hi, tuple(p.j),
                                    caps.get(k) if caps else None, doubled=p.doubled,
                                    intensity=p.intensity if p.intensity is not None and p.intensity > 0 else None))
        if pl.solvent in SOLVENTS:
            sv = SOLVENTS[pl.solvent]
            out.solvent_lines = tuple((x, pl.solvent) for x in sv.residual_1h) + (
                ((sv.water_1h, f"water ({pl.solvent})"),) if sv.water_1h is not None else ())
        out.exchanging = exchanges_deuterium(pl.solvent)   # OH/NH protons replaced by D: expected unseen
        out.two_forms = pl.two_forms
        return out

    def classes(self, mol: Chem.Mol, ranks, mu: dict, sg: dict, peaks, facts=None) -> list[SignalClass]:
        by_protons = any(p.capacity is not None for p in peaks)
        out = []
        ems = getattr(facts, "proton_multiplets", None) if facts is not None else None
        if ems is None:   # the same for every case a candidate appears in: kept with its (cached) facts
            ems = expected_multiplets(mol, ranks)
            if facts is not None:
                facts.proton_multiplets = ems
        if isinstance(mu, ClassMeans):
            means, sigmas = (x.tolist() for x in mu.of([e.atoms for e in ems]))
        else:
            means = [_mean(mu, e.atoms) for e in ems]
            sigmas = [_mean(sg, e.atoms) for e in ems]
        for e, m_, s_ in zip(ems, means, sigmas):
            out.append(SignalClass(e.atoms, e.letters(), float(m_), float(s_),
                                   e.n_h if by_protons else 1,
                                   exchangeable=e.exchangeable, splittable=e.may_split, expected=e, twin_of=e.twin_of))
        _mark_hidden(out, peaks, "1H")
        swap = getattr(peaks, "exchanging", None)
        if swap:
            for c in out:
                if c.exchangeable:
                    c.exchanged, c.unseen_why = True, f"exchanged for deuterium in {swap}"
        return out

    def prepare(self, mol: Chem.Mol, ranks, mu: dict, sg: dict, peaks: list[ObservedPeak], facts=None) -> Prepared:
        """Classes, and per class × peak the printed-letter misfit (0/1) and the unexplained J count."""
        classes = self.classes(mol, ranks, mu, sg, peaks, facts)
        bad_p = np.zeros((len(classes), len(peaks)))
        bad_j = np.zeros((len(classes), len(peaks)))
        hetero = None
        for j, p in enumerate(peaks):
            if p.multiplicity is None and not p.j:
                continue
            if p.j and max(p.j) > MAX_HH_J:
                if hetero is None:
                    hetero = _has_f_or_p(mol, facts)
                if not hetero:   # no H–H coupling is this large: machine-picked lines, letters and J set aside
                    continue
            for i, c in enumerate(classes):
                bad_p[i, j], bad_j[i, j] = fit_cost(c.expected, p.multiplicity, p.j)
        return Prepared(classes, peaks, bad_p, bad_j)

    def flags(self, res: NucleusResult) -> list[str]:
        classes, peaks, a = res.classes, res.peaks, res.assignment
        out = ([] if _integrals_explain_sharing(res) else _count_flags(res, "1H signals")) \
            + _quality_flags(res, ("proton class", "proton classes"))
        if res.by_protons:
            n_h = sum(c.units for c in classes)
            n_x = sum(c.units for c in classes if c.exchangeable)
            printed = sum(p.capacity or 0 for p in peaks if not p.solvent)
            # NH/OH protons not seen (exchanged, broadened into the baseline) are how spectra are, not a misfit
            unseen_x = sum(classes[p.cls].units for p in a.pairings if p.peak is None and classes[p.cls].exchangeable)
            if printed not in (n_h, n_h - unseen_x) and not any(p.doubled for p in peaks):   # (shares of two forms are rounded up)
                out.append(f"integrals sum to {printed} H; the candidate has {n_h} H"
                           + (f" ({n_x} on O/N/S, often not seen)" if n_x else ""))
        n_mm = len({p.cls for p in a.pairings if not p.multiplicity_ok})
        if n_mm:
            out.append(f"{count(n_mm, 'proton class', 'proton classes')} whose printed multiplet "
                       f"{'its' if n_mm == 1 else 'their'} neighbours cannot produce")
        return out


def _integrals_explain_sharing(res: NucleusResult) -> bool:
    """Whether the 1H signal count differs only because printed multiplets hold several classes, each
    such multiplet integrating to exactly their protons (``7.51–7.47 (m, 3H)`` over a 2H and a 1H class):
    every class but one that often goes unseen (NH/OH, one under a solvent line) is on a peak, no peak is
    unexplained but a second form's line beside its partner.  That is how 1H spectra are printed, not a warning."""
    a, peaks, classes = res.assignment, res.peaks, res.classes
    if not res.by_protons or any(p.peak is None and not classes[p.cls].may_go_unseen for p in a.pairings):
        return False
    if any(not peaks[j].solvent and not peaks[j].doubled for j in a.unmatched_peaks):
        return False
    held: dict[int, int] = {}
    for p in a.pairings:
        if p.peak is not None:   # (a class split over two multiplets, a CH2's two protons, gives each its share)
            held[p.peak] = held.get(p.peak, 0) + p.units
    return all(peaks[j].capacity == n for j, n in held.items())


def _count_flags(res: NucleusResult, what: str) -> list[str]:
    a, peaks = res.assignment, res.peaks
    n_obs = res.observed_signals
    n_unexplained = sum(1 for j in a.unmatched_peaks if not peaks[j].solvent)
    n_second = sum(1 for j in a.unmatched_peaks if not peaks[j].solvent and peaks[j].doubled)
    second = f" ({n_second} beside another line: a second form's?)" if n_second else ""
    missing = [p for p in a.pairings if p.peak is None]
    n_missing = len({p.cls for p in missing})
    unseen = sorted({p.cls for p in missing if res.classes[p.cls].may_go_unseen})
    why = Counter(res.classes[i].unseen_why for i in unseen)
    n_shared = len({p.cls for p in a.pairings if p.shared})
    if n_missing == len(unseen) and not res.shared_beyond_listed() and n_unexplained == n_second:
        # only classes that often go unseen are missing (NH/OH, a carbon on boron, one under the solvent's
        # line), classes share only lines printed for that many nuclei ('53.0, 53.0', '128.4 (2C)'), and the
        # only lines left over are a second form's beside their partners (the text says the spectrum shows
        # two forms): how such spectra are printed
        return []
    if len(res.classes) != n_obs:
        return [f"expects {len(res.classes)} {what} by symmetry, {n_obs} observed"
                + (f"; {count(n_shared, 'class shares a peak', 'classes share peaks')}" if n_shared else "")
                + (f"; {count(n_missing, 'class', 'classes')} unobserved" if n_missing else "")
                + (f" ({', '.join(f'{n} {w}' for w, n in why.items())})" if why else "")
                + (f"; {count(n_unexplained, 'peak', 'peaks')} unexplained{second}" if n_unexplained else "")]
    return [f"{count(n_unexplained, res.nucleus + ' peak', res.nucleus + ' peaks')} unexplained{second}"] if n_unexplained else []


def _quality_flags(res: NucleusResult, what: tuple[str, str]) -> list[str]:
    n = res.beyond_3sigma
    return [f"{count(n, *what)} {'deviates' if n == 1 else 'deviate'} by more than 3σ ({res.nucleus})"] if n else []



#: HSQC: cross peaks whose carbon shifts differ by less than this (ppm) are one carbon with two protons
SAME_CARBON = 0.15


class HsqcEvidence(_Evidence):
    """HSQC: protonated carbon classes with both predictions against (δC, δH) cross peaks."""

    nucleus = "HSQC"

    def observed(self, pl: HsqcList) -> list[ObservedPeak]:
        kinds = pl.kinds or [None] * len(pl.pairs)
        pairs = sorted(zip(pl.pairs, kinds), key=lambda x: x[0])
        out, k = [], 0
        while k < len(pairs):
            group = [pairs[k]]
            while k + len(group) < len(pairs) and pairs[k + len(group)][0][0] - group[0][0][0] < SAME_CARBON:
                group.append(pairs[k + len(group)])
            k += len(group)
            hs = [h for (_, h), _ in group]
            gk = {kd for _, kd in group}
            if len(group) > 2 or max(hs) - min(hs) > 1.5 or len(gk) > 1:   # more than one carbon at this δC
                out.extend(ObservedPeak(c, kd, h_lo=h, h_hi=h) for (c, h), kd in group)
            else:
                out.append(ObservedPeak(float(np.mean([c for (c, _), _ in group])), group[0][1], h_lo=min(hs), h_hi=max(hs)))
        return PeakSet(out)

    def classes(self, mol: Chem.Mol, ranks, mu, sg, peaks, facts=None) -> list[SignalClass]:
        means_c, means_h = mu   # ClassMeans of the 13C and of the 1H prediction
        cc = [c for c in _carbon_classes(mol, ranks, facts) if c.multiplicity != "C"]
        atoms = [c.atoms for c in cc]
        mc, sc = means_c.of(atoms)
        mh, sh = means_h.of(atoms)
        return [SignalClass(c.atoms, c.multiplicity, a, b, shift_h=x, sigma_h=y, configuration=z, pair_with=_pair_with(c, z))
                for c, a, b, x, y, z in zip(cc, mc.tolist(), sc.tolist(), mh.tolist(), sh.tolist(), means_c.configuration_of(atoms))]

    def prepare(self, mol: Chem.Mol, ranks, mu, sg, peaks: list[ObservedPeak], facts=None) -> Prepared:
        classes = self.classes(mol, ranks, mu, sg, peaks, facts)
        bad = np.zeros((len(classes), len(peaks)))
        for j, p in enumerate(peaks):   # the phase of an edited spectrum against the class's CHn
            if p.multiplicity is not None:
                bad[:, j] = [c.multiplicity not in HSQC_ALLOWS[p.multiplicity] for c in classes]
        return Prepared(classes, peaks, bad, np.zeros_like(bad))

    def flags(self, res: NucleusResult) -> list[str]:
        return _count_flags(res, "HSQC cross peaks (protonated carbons)") + _quality_flags(res, ("protonated carbon", "protonated carbons"))


#: the strategy of each kind of spectrum (:mod:`.correlations` adds HMBC, COSY and NOESY when imported, as the
#: ranking does)
EVIDENCE = {"13C": CarbonEvidence(), "1H": ProtonEvidence(), "HSQC": HsqcEvidence()}
#: the shift models each kind of spectrum needs
MODELS_FOR = {"13C": ("13C",), "1H": ("1H",), "HSQC": ("13C", "1H")}

