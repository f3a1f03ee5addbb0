"""Assigning observed peaks to a candidate's symmetry classes (Hungarian algorithm), for either nucleus.

Each symmetry class is one expected signal with a predicted shift μ, an uncertainty σ and what
else the nucleus tells (13C: the CHn multiplicity; 1H: the number of protons and the expected
multiplet).  The assignment minimises a total cost in nats (negative log-likelihood) with
``scipy.optimize.linear_sum_assignment`` (Kuhn–Munkres) over *units*:

* 13C, and 1H without integrals: a class is one unit and a peak takes any number of classes, the
  second, third … at an ``overlap`` cost (two carbons printed at one value);
* 1H with integrals: a class is as many units as it has protons and a multiplet offers as many units
  as its integral, so a "m, 5H" takes five protons from one or several classes and a diastereotopic
  CH2 may split over two 1H multiplets.  Each proton beyond a multiplet's integral, and each proton
  of its integral that no class supplies, costs ``integral_mismatch``; each further class inside a
  printed first-order multiplet (a clean d, t, dd …) costs ``shared_multiplet``, and each further class
  inside an unresolved one (an 'm', a printed range, no letters) the smaller ``shared_unresolved``: a
  class inside a range is scored at zero deviation, so without it every class placed there would lower
  the total (the Student-t term of a small σ is negative at zero deviation).

The cost of a class ↔ peak pair is a Student-t error of (δ − μ)/σ (parameters fitted to the
predictor's held-out residuals, as DP4 does with its own errors — Smith & Goodman 2010; a printed
range counts as δ anywhere inside it), plus a finite mismatch cost when the peak's multiplicity
contradicts the class (13C DEPT against CHn; 1H letters and J values against the expected
multiplet), shared equally by the class's units.  A class left unassigned costs ``missing``
(``missing_exchangeable`` for OH/NH/SH protons, which are often not seen; optionally less for a
quaternary carbon or a class predicted next to another, which printed lists often leave out); a
peak left unexplained costs ``extra`` (shared by its units); residual solvent peaks go unmatched for
free.  The overlap cost may depend on how close a class's prediction is to its nearest neighbour's:
two carbons predicted 0.3 ppm apart are often printed as one value, two predicted 15 ppm apart are not.
"""
from __future__ import annotations

import itertools
from dataclasses import dataclass, field, replace

import numpy as np
from scipy.optimize import linear_sum_assignment
from scipy.special import gammaln

from ..chem.couplings import observed_pattern

BIG = 1e6
MAX_EXCESS_COPIES = 4  # 1H: units a multiplet may hold beyond its integral
MAX_TIE_COMBINATIONS = 32  # 1H: classes split over several multiplets are tied jointly up to this many ways


@dataclass(frozen=True)
class MatchCosts:
    """Penalty terms in nats and the Student-t error model of one nucleus."""

    t_df: float = 4.0
    t_scale: float = 1.0
    t_widen: float = 1.0                 # printed shifts scatter more than the model's own residuals: scale × this
    overlap: float = 2.5
    missing: float = 6.0
    extra: float = 6.0
    multiplicity_mismatch: float = 9.0   # 13C: DEPT against CHn; 1H: printed letters against the expected multiplet
    missing_exchangeable: float = 1.0    # 1H: an OH/NH/SH class not observed
    missing_exchanged: float = 0.0       # 1H: the same in CD3OD or D2O, whose deuterium replaces it; chosen, not fitted
    j_mismatch: float = 1.0              # per printed J no expected coupling explains (1H: H–H/H–F; 13C: C–F/C–P)
    integral_mismatch: float = 2.0       # 1H: per proton beyond, or missing from, a multiplet's integral
    overlap_far: float | None = None     # overlap cost of a class whose nearest other class is predicted ≥ near_scale away
    near_scale: float = 2.0              # ppm: how close two predictions must be for a shared peak to be likely
    missing_quaternary: float | None = None  # 13C: an unlisted quaternary carbon (weak lines are often not printed)
    missing_near: float | None = None    # a class predicted within near_scale of another class, unlisted
    shared_multiplet: float = 0.0        # 1H: per further class inside one printed first-order multiplet (d, t, dd …)
    shared_unresolved: float = 0.0       # 1H: per further class inside one printed unresolved multiplet ('m', a range, 'br')
    extra_doubled: float = 1.0           # an unexplained line that may be a second form's (text says rotamers); chosen, not fitted
    scale_prior: float | None = None     # DP4-style scaled shifts: ridge strength of each candidate's line fit (None: off)
    h_t_df: float | None = None          # HSQC: Student-t of the proton dimension (None: no proton dimension)
    h_t_scale: float = 1.0

    def overlap_for(self, gap: np.ndarray) -> np.ndarray:
        """Overlap cost per class from the gap (ppm) to the nearest other class's prediction: ``overlap``
        for twins, rising linearly to ``overlap_far`` at ``near_scale`` (constant when it is None)."""
        if self.overlap_far is None:
            return np.full(len(gap), self.overlap)
        w = np.clip(gap / max(self.near_scale, 1e-6), 0.0, 1.0)
        return self.overlap + (self.overlap_far - self.overlap) * w

    def missing_for(self, classes, gap: np.ndarray) -> np.ndarray:
        """Cost of leaving each class unlisted: ``missing`` (``missing_exchangeable`` for OH/NH/SH, ``missing_exchanged``
        for those in a solvent that exchanges them for deuterium), lowered to
        ``missing_quaternary`` for quaternary carbons and ``missing_near`` next to another class's prediction."""
        out = np.array([self.missing_exchanged if c.exchanged else self.missing_exchangeable if c.exchangeable
                        else self.missing for c in classes], dtype=float)
        if self.missing_quaternary is not None:
            q = np.array([c.multiplicity == "C" for c in classes], dtype=bool)
            out = np.where(q, np.minimum(out, self.missing_quaternary), out)
        if self.missing_near is not None:
            out = np.where(gap < self.near_scale, np.minimum(out, self.missing_near), out)
        return out


@dataclass(slots=True)
class SignalClass:
    """One expected signal of a candidate."""

    atoms: list[int]
    multiplicity: str           # 13C: C/CH/CH2/CH3; 1H: the expected multiplet in letters
    shift: float
    sigma: float
    units: int = 1              # 1H with integrals: protons in the class
    exchangeable: bool = False  # may go unobserved for a physical reason: 1H OH/NH/SH; 13C a carbon bound to boron
    unseen_why: str = "exchangeable"   # that reason, as the tables and flags say it
    exchanged: bool = False     # 1H: an OH/NH/SH class in CD3OD or D2O: replaced by deuterium, expected unseen
    maybe_hidden: bool = False  # 13C: predicted under the solvent's line; said so when unlisted, at the full cost
    splittable: bool = False    # 1H: a CH2 whose two protons may differ (may show two multiplets)
    expected: object = None     # 1H: shiftrank.chem.couplings.ExpectedMultiplet
    shift_h: float | None = None  # HSQC: predicted mean shift of the carbon's protons, and its σ
    sigma_h: float | None = None
    twin_of: int | None = None  # 1H: classes with the same value are alike groups told apart (one multiplet is fine)
    h_atoms: list | None = None   # HMBC: the heavy atoms carrying the protons of this C–H pair (``atoms``: the carbons)
    bonds: int | None = None      # HMBC: bonds from those protons to the carbons (COSY: between the two protons)
    distance: float | None = None  # NOESY: the two protons' effective distance in space (Å)
    configuration: float = 0.0    # 13C, HSQC: ppm of E/Z increments inside ``shift`` (said in the tables)
    pair_with: list | None = None  # 13C, HSQC: the alike atoms cis/trans across a double bond whose increment split them

    @property
    def may_go_unseen(self) -> bool:
        return self.exchangeable or self.maybe_hidden


@dataclass
class ObservedPeak:
    shift: float
    multiplicity: str | None = None   # 13C: CHn from DEPT; 1H: printed letters
    solvent: bool = False
    lo: float | None = None           # printed range (1H multiplets)
    hi: float | None = None
    j: tuple = ()
    capacity: int | None = None       # 1H: integral in protons; None when the peak takes any number of classes
    count: int = 1                    # 13C: carbons printed at this value ("2C")
    coupling: str | None = None       # 13C: printed C–F/C–P splitting letters ('q' of a CF3)
    field: float | None = None        # 13C observation frequency (MHz) when the text gives it
    h_lo: float | None = None         # HSQC: proton shift of the cross peak (a range: the two protons of one CH2)
    h_hi: float | None = None
    doubled: bool = False             # a line beside another of a spectrum showing two forms (rotamers): may be the other form's
    intensity: float | None = None    # 1H: the integral as given (protons or a relative area), before rounding to ``capacity``


@dataclass(slots=True)
class Pairing:
    """One line of the assignment table."""

    cls: int                  # index into the candidate's classes
    peak: int | None          # index into the observed peaks, None when the class is unobserved
    deviation: float | None   # observed − predicted (ppm); 0 inside a printed range
    z: float | None           # deviation / sigma
    cost: float
    shared: bool = False      # this class shares its peak with another class
    multiplicity_ok: bool = True
    units: int = 1            # protons of the class on this peak (1H with integrals)


@dataclass
class Assignment:
    pairings: list[Pairing]
    unmatched_peaks: list[int]
    total_cost: float
    parts: dict = field(default_factory=dict)   # cost by kind: deviation, overlap, missing, extra, multiplicity, …
    extra_costs: tuple = ()                     # per peak: what it costs when no class explains it


_LOGC: dict[float, float] = {}


def t_cost(dev: np.ndarray, sigma: np.ndarray, costs: MatchCosts) -> np.ndarray:
    """−log density of a Student-t with scale σ·t_scale·t_widen for deviations ``dev`` (nats)."""
    nu = costs.t_df
    s = sigma * (costs.t_scale * costs.t_widen)
    z = dev / s
    logc = _LOGC.get(nu)
    if logc is None:
        logc = _LOGC[nu] = float(gammaln((nu + 1) / 2) - gammaln(nu / 2) - 0.5 * np.log(nu * np.pi))
    return (nu + 1) / 2 * np.log1p(z * z / nu) - logc + np.log(s)


class PeakSet(list):
    """A list of :class:`ObservedPeak` that keeps its shift arrays once computed (the same observed peaks
    are matched against every candidate of a case)."""

    _arrays = None
    printed = False   # read from printed text (see RankingSettings.for_peaks)
    solvent_lines: tuple = ()   # 13C: (ppm, solvent) of the solvent's own lines, under which a carbon can hide
    dept135 = False             # 13C: a DEPT-135 list, which shows no quaternary carbon
    exchanging: str | None = None   # 1H: the solvent (part) whose deuterium replaces OH/NH protons (CD3OD, D2O)
    two_forms: str | None = None    # the spectrum shows two forms, as said (PeakList.two_forms)

    def derived(self, peaks) -> "PeakSet":
        """A PeakSet of other peaks (C–F lines read as one carbon) that keeps what is known of this one's spectrum
        (printed, solvent lines, DEPT-135, exchange, two forms)."""
        out = PeakSet(peaks)
        out.__dict__.update({k: v for k, v in self.__dict__.items() if k != "_arrays"})
        return out

    def arrays(self):
        if self._arrays is None:
            obs = np.array([p.shift for p in self], dtype=float)
            lo = np.array([p.lo if p.lo is not None else p.shift for p in self], dtype=float)
            hi = np.array([p.hi if p.hi is not None else p.shift for p in self], dtype=float)
            extra_free = np.array([p.solvent for p in self], dtype=bool)
            flexible = all(p.capacity is None for p in self)
            doubled = np.array([p.doubled for p in self], dtype=bool)
            self._arrays = (obs, lo, hi, bool(np.any(hi > lo)), extra_free, flexible, doubled)
        return self._arrays


def _arrays(peaks):
    if isinstance(peaks, PeakSet):
        return peaks.arrays()
    return PeakSet(peaks).arrays()


def deviations(classes: list[SignalClass], peaks: list[ObservedPeak], mu: np.ndarray | None = None) -> np.ndarray:
    """(classes × peaks) observed − predicted; a printed range counts from its nearer edge (0 inside)."""
    if mu is None:
        mu = np.array([c.shift for c in classes], dtype=float)
    obs, lo, hi, ranged, _, _, _ = _arrays(peaks)
    if ranged:
        return np.where(mu[:, None] < lo[None, :], lo[None, :] - mu[:, None],
                        np.where(mu[:, None] > hi[None, :], hi[None, :] - mu[:, None], 0.0))
    return obs[None, :] - mu[:, None]


def proton_deviations(classes: list[SignalClass], peaks: list[ObservedPeak]) -> np.ndarray:
    """HSQC: (classes × cross peaks) observed − predicted proton shift, 0 inside a cross peak's proton range."""
    mu = np.array([c.shift_h for c in classes], dtype=float)
    lo = np.array([p.h_lo for p in peaks], dtype=float)
    hi = np.array([p.h_hi for p in peaks], dtype=float)
    return np.where(mu[:, None] < lo[None, :], lo[None, :] - mu[:, None],
                    np.where(mu[:, None] > hi[None, :], hi[None, :] - mu[:, None], 0.0))


def _mismatch(classes, peaks, costs: MatchCosts, mismatch=None) -> tuple[np.ndarray, np.ndarray]:
    """(cost matrix, boolean 'contradicts' matrix) of the multiplicity terms."""
    nc, npk = len(classes), len(peaks)
    if mismatch is not None:
        cost = np.asarray(mismatch, dtype=float).reshape(nc, npk)
        return cost, cost > 0
    bad = np.array([[p.multiplicity is not None and p.multiplicity != c.multiplicity for p in peaks] for c in classes],
                   dtype=bool).reshape(nc, npk)
    return bad * costs.multiplicity_mismatch, bad


def assign(classes: list[SignalClass], peaks: list[ObservedPeak], costs: MatchCosts = MatchCosts(),
           mismatch: np.ndarray | None = None) -> Assignment:
    """Optimal peak ↔ class assignment allowing overlap, missing classes and extra peaks.

    ``mismatch`` (classes × peaks, nats) replaces the default multiplicity comparison (exact CHn
    equality) with a nucleus's own, e.g. the 1H multiplet fit.  Units come from
    ``SignalClass.units`` and ``ObservedPeak.capacity`` (see the module text).

    >>> cls = [SignalClass([0], "CH3", 20.0, 1.5), SignalClass([1], "C", 170.0, 2.0)]
    >>> a = assign(cls, [ObservedPeak(171.0, "C"), ObservedPeak(21.0, "CH3")])
    >>> [(p.cls, p.peak) for p in a.pairings]
    [(0, 1), (1, 0)]
    """
    nc, npk = len(classes), len(peaks)
    sg = np.array([c.sigma for c in classes], dtype=float)
    mu = np.array([c.shift for c in classes], dtype=float)
    dev = deviations(classes, peaks, mu) if npk else np.zeros((nc, 0))
    dcost = t_cost(dev, sg[:, None], costs) if npk else dev
    if npk and nc and costs.h_t_df is not None:
        dcost = dcost + t_cost(proton_deviations(classes, peaks), np.array([c.sigma_h for c in classes], float)[:, None],
                               replace(costs, t_df=costs.h_t_df, t_scale=costs.h_t_scale, t_widen=1.0))
    mcost, bad = _mismatch(classes, peaks, costs, mismatch) if npk else (dev, dev.astype(bool))
    base = dcost + mcost
    if npk:
        _, _, _, _, solvent, flexible, doubled = _arrays(peaks)
        extra = np.where(solvent, 0.0, np.where(doubled, min(costs.extra_doubled, costs.extra), costs.extra))
    else:
        extra, flexible = np.zeros(0), True
    gap = np.full(nc, np.inf)
    if nc > 1:
        d = np.abs(mu[:, None] - mu[None, :])
        np.fill_diagonal(d, np.inf)
        gap = d.min(axis=1)
    miss = costs.missing_for(classes, gap)
    over = costs.overlap_for(gap)
    units = np.array([max(1, int(c.units)) for c in classes])
    if units.max(initial=1) == 1 and flexible:
        a = _assign_classes(classes, peaks, costs, dev, dcost, mcost, bad, base, extra, miss, over)
    else:
        a = _assign_units(classes, peaks, costs, dev, dcost, mcost, bad, base, extra, miss, units, over)
    a.extra_costs = tuple(float(x) for x in extra)
    return a


def _assign_classes(classes, peaks, costs, dev, dcost, mcost, bad, base, extra, miss, over) -> Assignment:
    """One unit per class, any number of classes per peak (the second and later at an overlap cost)."""
    nc, npk = len(classes), len(peaks)
    copies = max(1, min(nc, int(np.ceil(nc / max(npk, 1))) + 1)) if npk else 0
    # columns: first copy of each peak (assigning it saves its 'extra' cost), further copies (overlap), 'missing'
    width = npk * copies
    mat = np.full((nc, width + nc), BIG)
    if npk:
        mat[:, :npk] = base - extra[None, :]
        if copies > 1:
            mat[:, npk:width] = np.tile(base + over[:, None], (1, copies - 1))
    mat[np.arange(nc), width + np.arange(nc)] = miss
    rows, cols = linear_sum_assignment(mat)   # rows come back in order 0..nc-1
    observed = cols < width
    j = np.where(observed, cols % max(npk, 1), -1)
    shared_copy = observed & (cols >= npk)
    used = np.bincount(j[observed], minlength=npk) if npk else np.zeros(0, dtype=int)
    r_obs = rows[observed]
    j_obs = j[observed]
    d = dev[r_obs, j_obs]
    sg = np.array([c.sigma for c in classes], dtype=float)
    parts = {"deviation": float(dcost[r_obs, j_obs].sum()), "overlap": float(over[rows[shared_copy]].sum()),
             "missing": float(miss[rows[~observed]].sum()), "extra": 0.0, "multiplicity": float(mcost[r_obs, j_obs].sum())}
    cost_row = np.where(observed, base[rows, np.maximum(j, 0)] if npk else 0.0, miss[rows]) + np.where(shared_copy, over[rows], 0.0)
    dev_row = np.full(nc, np.nan)
    dev_row[observed] = d
    z_row = dev_row / sg[rows]
    ok_row = np.ones(nc, dtype=bool)
    ok_row[observed] = ~bad[r_obs, j_obs]
    sh_row = np.zeros(nc, dtype=bool)
    if npk:
        sh_row[observed] = used[j_obs] > 1
    pairings = [Pairing(r, (jj if jj >= 0 else None), (dv if jj >= 0 else None), (zz if jj >= 0 else None), cst, sh, ok)
                for r, jj, dv, zz, cst, sh, ok in zip(rows.tolist(), j.tolist(), dev_row.tolist(), z_row.tolist(),
                                                      cost_row.tolist(), sh_row.tolist(), ok_row.tolist())]
    unmatched = np.flatnonzero(used == 0).tolist() if npk else []
    parts["extra"] = float(extra[unmatched].sum()) if unmatched else 0.0
    total = float(sum(parts.values()))
    return Assignment(pairings, unmatched, total, parts)


def _cheapest_tie(mat, groups, row_cls, col_peak_arr):
    """Of several ways to tie classes to single targets (each a list of (class, peak or -1 for unobserved)),
    the cost matrix with the cheapest assignment, and that assignment."""
    best = None
    for ties in groups:
        trial = mat.copy()
        for i, keep in ties:
            # the unobserved columns carry peak -1, so keep == -1 allows all of them
            trial[np.ix_(np.flatnonzero(row_cls == i), np.flatnonzero(col_peak_arr != keep))] = BIG
        tr, tc = linear_sum_assignment(trial)
        total = float(trial[tr, tc].sum())
        if best is None or total < best[0]:
            best = (total, trial, tr, tc)
    return best[1:]


def _assign_units(classes, peaks, costs, dev, dcost, mcost, bad, base, extra, miss, units, over) -> Assignment:
    """Protons as units: a class spends ``units`` units, a multiplet offers ``capacity`` units."""
    nc, npk = len(classes), len(peaks)
    sg = np.array([c.sigma for c in classes], dtype=float)
    row_cls = np.repeat(np.arange(nc), units)
    n_rows = len(row_cls)
    per_unit = base[row_cls] / units[row_cls, None]
    cols, col_peak, col_kind = [], [], []   # kind 0: within capacity, 1: beyond it
    caps = np.array([max(1, int(p.capacity)) if p.capacity is not None else 1 for p in peaks], dtype=int)
    # (a line of a two-form spectrum integrates for its form's share: its protons may all be the other form's)
    under = np.array([0.0 if p.solvent or p.doubled else costs.integral_mismatch for p in peaks])
    for j, p in enumerate(peaks):
        # the first unit of a peak saves its whole 'extra' cost (a peak explained by any proton is
        # explained); each further unit up to the integral saves one 'integral_mismatch'
        cols.append((per_unit[:, j] - extra[j])[:, None])
        col_peak.append(j)
        col_kind.append(0)
        for _ in range(caps[j] - 1):
            cols.append((per_unit[:, j] - under[j])[:, None])
            col_peak.append(j)
            col_kind.append(0)
        extra_unit = np.full(n_rows, costs.integral_mismatch) if p.capacity is not None else over[row_cls]
        for _ in range(min(MAX_EXCESS_COPIES, n_rows)):
            cols.append((per_unit[:, j] + extra_unit)[:, None])
            col_peak.append(j)
            col_kind.append(1)
    missing = np.full((n_rows, n_rows), BIG)
    np.fill_diagonal(missing, miss[row_cls] / units[row_cls])
    mat = np.hstack(cols + [missing]) if cols else missing
    n_pc = len(col_peak)
    col_peak_arr = np.array(col_peak + [-1] * n_rows)

    def build(r, c) -> Assignment:
        return _unit_assignment(r, c, classes, peaks, costs, dev, dcost, mcost, bad, base, extra, miss, units, over,
                                sg, row_cls, col_peak, col_kind, n_pc, caps, under)

    r0, c0 = linear_sum_assignment(mat)

    def split_classes(r_idx, c_idx) -> tuple[np.ndarray, list[int]]:
        target = col_peak_arr[c_idx[np.argsort(r_idx)]]
        # (a splittable class shows at most two signals: the two protons of its CH2, or its axial and
        # equatorial halves)
        return target, [i for i in range(nc) if len(set(target[row_cls == i].tolist())) > (2 if classes[i].splittable else 1)]

    def exact_lines(i: int) -> set[int]:
        return {j for j in range(npk) if peaks[j].capacity is not None and caps[j] == units[i] and abs(dev[i, j]) <= 3.0 * sg[i]}

    def untie(mat, r_idx, c_idx, also_exact: bool):
        """Equivalent protons cannot show two signals: only a CH2 whose protons may differ (diastereotopic,
        =CH2) may split over multiplets; the classes split by the optimum are tied each to one of the targets
        it was split over (``also_exact``: or to a multiplet integrating to exactly its protons within 3σ) -
        the combination giving the cheapest assignment - and solved again."""
        for _ in range(4):
            target, bad_split = split_classes(r_idx, c_idx)
            if not bad_split:
                break
            options = [sorted(set(np.unique(target[row_cls == i]).tolist()) | (exact_lines(i) if also_exact else set()))
                       for i in bad_split]
            if np.prod([len(o) for o in options]) <= MAX_TIE_COMBINATIONS:
                groups = [list(zip(bad_split, combo)) for combo in itertools.product(*options)]   # all at once
                mat, r_idx, c_idx = _cheapest_tie(mat, groups, row_cls, col_peak_arr)
            else:
                for i, opts in zip(bad_split, options):   # too many: one class after another
                    mat, r_idx, c_idx = _cheapest_tie(mat, [[(i, keep)] for keep in opts], row_cls, col_peak_arr)
        return build(r_idx, c_idx)

    # the unit optimum may fill a multiplet with two smaller classes (two 3H singlets in a 6H singlet) and split
    # the class that fits it whole, which the shared-multiplet cost (charged afterwards) then makes the worse
    # reading: the ties are also tried with such exact multiplets, and the cheaper whole assignment is kept
    target, split = split_classes(r0, c0)
    if not split:
        return build(r0, c0)
    plain = untie(mat, r0, c0, False)
    if all(exact_lines(i) <= set(target[row_cls == i].tolist()) for i in split):
        return plain   # (no exact line beyond the split targets: the same ties)
    exact = untie(mat, r0, c0, True)
    return exact if exact.total_cost < plain.total_cost - 1e-9 else plain


def _unit_assignment(r_idx, c_idx, classes, peaks, costs, dev, dcost, mcost, bad, base, extra, miss, units, over,
                     sg, row_cls, col_peak, col_kind, n_pc, caps, under) -> Assignment:
    """The :class:`Assignment` (pairings, unexplained peaks, cost parts) of one unit assignment (rows, columns)."""
    npk = len(peaks)
    got: dict[tuple[int, int | None], list[int]] = {}
    parts = {"deviation": 0.0, "overlap": 0.0, "missing": 0.0, "extra": 0.0, "multiplicity": 0.0, "integral": 0.0}
    used = np.zeros(npk, dtype=int)
    for r, c in zip(r_idx, c_idx):
        i = int(row_cls[r])
        if c >= n_pc:
            got.setdefault((i, None), []).append(0)
            parts["missing"] += float(miss[i] / units[i])
            continue
        j = col_peak[c]
        used[j] += 1
        got.setdefault((i, j), []).append(col_kind[c])
        parts["deviation"] += float(dcost[i, j] / units[i])
        parts["multiplicity"] += float(mcost[i, j] / units[i])
        if col_kind[c]:
            if peaks[j].capacity is not None:
                parts["integral"] += costs.integral_mismatch
            else:
                parts["overlap"] += float(over[i])
    classes_on_peak = np.zeros(npk, dtype=int)
    kinds_on_peak: dict[int, set] = {}
    for (i, j) in got:
        if j is not None:
            classes_on_peak[j] += 1
            kinds_on_peak.setdefault(j, set()).add(classes[i].twin_of if classes[i].twin_of is not None else ("class", i))
    if costs.shared_multiplet or costs.shared_unresolved:
        # a clean doublet or triplet holding two different protons is a coincidence; an 'm' or a printed
        # range often holds several classes, but each further class there still needs its own shift to fall
        # inside it, and a class inside a range otherwise gains its best density for free
        # (charged after the assignment; it decides only between the two ways of tying split classes)
        # (two alike groups told apart, such as the methyls of an isopropyl beside a stereocentre, often share one)
        for j in range(npk):
            if classes_on_peak[j] > 1:
                resolved = observed_pattern(peaks[j].multiplicity) is not None
                cost = costs.shared_multiplet if resolved else costs.shared_unresolved
                parts["overlap"] += cost * float(len(kinds_on_peak[j]) - 1)
    pairings = []
    for (i, j), kinds in sorted(got.items(), key=lambda kv: (kv[0][0], -1 if kv[0][1] is None else kv[0][1])):
        n = len(kinds)
        if j is None:
            pairings.append(Pairing(i, None, None, None, float(miss[i] * n / units[i]), units=n))
            continue
        d = float(dev[i, j])
        unit_over = costs.integral_mismatch if peaks[j].capacity is not None else float(over[i])
        cst = float(base[i, j] * n / units[i] + sum(kinds) * unit_over)
        pairings.append(Pairing(i, j, d, float(d / sg[i]), cst, bool(classes_on_peak[j] > 1), bool(not bad[i, j]), n))
    unmatched = [j for j in range(npk) if used[j] == 0]
    parts["extra"] = float(sum(extra[j] for j in unmatched))
    # protons a multiplet's integral promises but no class supplies (an unexplained multiplet: beyond its first)
    parts["integral"] += float(sum(under[j] * (caps[j] - max(1, min(used[j], caps[j]))) for j in range(npk)))
    total = float(sum(parts.values()))
    return Assignment(pairings, unmatched, total, parts)
