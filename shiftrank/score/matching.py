"""Assigning observed peaks to a candidate's symmetry classes (Hungarian algorithm).

Each symmetry class of carbons is one expected signal with a predicted shift
μ, an uncertainty σ and a multiplicity.  The assignment minimises a total cost
in nats (negative log-likelihood) with ``scipy.optimize.linear_sum_assignment``
(Kuhn–Munkres) over a matrix that lets the spectrum deviate from the ideal:

* class ↔ peak: Student-t error of (δ − μ)/σ (parameters fitted to the
  predictor's held-out residuals, as DP4 does with its own errors — Smith &
  Goodman 2010);
* a second, third … class on the same peak (accidental overlap): the t cost
  plus ``overlap`` nats;
* a class with no peak (signal too weak or hidden): ``missing`` nats;
* a peak no class takes (impurity, rotamer, solvent): ``extra`` nats, except
  peaks flagged as residual solvent, which go unmatched for free;
* a peak whose DEPT multiplicity differs from the class's CHn:
  ``multiplicity_mismatch`` nats on top (finite, so one mislabelled peak
  cannot veto an otherwise perfect candidate).  Peaks without multiplicity
  match any class: partial DEPT information constrains only the peaks that carry it.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from scipy.optimize import linear_sum_assignment
from scipy.special import gammaln

BIG = 1e6


@dataclass(frozen=True)
class MatchCosts:
    """Penalty terms in nats and the Student-t error model."""

    t_df: float = 4.0
    t_scale: float = 1.0
    overlap: float = 2.5
    missing: float = 6.0
    extra: float = 6.0
    multiplicity_mismatch: float = 9.0


@dataclass
class SignalClass:
    """One expected signal of a candidate."""

    atoms: list[int]
    multiplicity: str
    shift: float
    sigma: float


@dataclass
class ObservedPeak:
    shift: float
    multiplicity: str | None = None
    solvent: bool = False


@dataclass
class Pairing:
    """One line of the assignment table."""

    cls: int                  # index into the candidate's classes
    peak: int | None          # index into the observed peaks, None when the class is unobserved
    deviation: float | None   # observed − predicted (ppm)
    z: float | None           # deviation / sigma
    cost: float
    shared: bool = False      # this class shares its peak with another class
    multiplicity_ok: bool = True


@dataclass
class Assignment:
    pairings: list[Pairing]
    unmatched_peaks: list[int]
    total_cost: float
    parts: dict = field(default_factory=dict)   # cost by kind: deviation, overlap, missing, extra, multiplicity


def t_cost(dev: np.ndarray, sigma: np.ndarray, costs: MatchCosts) -> np.ndarray:
    """−log density of a Student-t with scale σ·t_scale for deviations ``dev`` (nats)."""
    nu = costs.t_df
    s = sigma * costs.t_scale
    z = dev / s
    logc = gammaln((nu + 1) / 2) - gammaln(nu / 2) - 0.5 * np.log(nu * np.pi)
    return -(logc - (nu + 1) / 2 * np.log1p(z * z / nu)) + np.log(s)


def assign(classes: list[SignalClass], peaks: list[ObservedPeak], costs: MatchCosts = MatchCosts()) -> Assignment:
    """Optimal peak ↔ class assignment allowing overlap, missing classes and extra peaks.

    >>> cls = [SignalClass([0], "CH3", 20.0, 1.5), SignalClass([1], "C", 170.0, 2.0)]
    >>> a = assign(cls, [ObservedPeak(171.0, "C"), ObservedPeak(21.0, "CH3")])
    >>> [(p.cls, p.peak) for p in a.pairings]
    [(0, 1), (1, 0)]
    """
    nc, npk = len(classes), len(peaks)
    mu = np.array([c.shift for c in classes])
    sg = np.array([c.sigma for c in classes])
    obs = np.array([p.shift for p in peaks])
    dev = obs[None, :] - mu[:, None]
    base = t_cost(dev, sg[:, None], costs)
    mm = np.array([[p.multiplicity is not None and p.multiplicity != c.multiplicity for p in peaks] for c in classes],
                  dtype=bool).reshape(nc, npk)
    base = base + mm * costs.multiplicity_mismatch
    extra = np.array([0.0 if p.solvent else costs.extra for p in peaks])
    copies = max(1, min(nc, int(np.ceil(nc / max(npk, 1))) + 1)) if npk else 0
    # columns: first copy of each peak (assigning it saves its 'extra' cost), further copies (overlap), 'missing'
    blocks = [base - extra[None, :]] + [base + costs.overlap] * (copies - 1)
    missing = np.full((nc, nc), BIG)
    np.fill_diagonal(missing, costs.missing)
    mat = np.hstack(blocks + [missing]) if npk else missing
    rows, cols = linear_sum_assignment(mat)
    pairings: list[Pairing] = []
    used = np.zeros(npk, dtype=int)
    parts = {"deviation": 0.0, "overlap": 0.0, "missing": 0.0, "extra": 0.0, "multiplicity": 0.0}
    for r, c in zip(rows, cols):
        if c >= npk * copies:
            pairings.append(Pairing(int(r), None, None, None, costs.missing))
            parts["missing"] += costs.missing
            continue
        j = int(c % npk)
        copy = c // npk
        used[j] += 1
        cst = float(base[r, j])
        if mm[r, j]:
            parts["multiplicity"] += costs.multiplicity_mismatch
        parts["deviation"] += cst - (costs.multiplicity_mismatch if mm[r, j] else 0.0)
        if copy > 0:
            parts["overlap"] += costs.overlap
            cst += costs.overlap
        d = float(dev[r, j])
        pairings.append(Pairing(int(r), j, d, float(d / sg[r]), cst, False, bool(not mm[r, j])))
    for p in pairings:
        if p.peak is not None and used[p.peak] > 1:
            p.shared = True
    unmatched = [j for j in range(npk) if used[j] == 0]
    parts["extra"] = float(sum(extra[j] for j in unmatched))
    pairings.sort(key=lambda p: p.cls)
    total = float(sum(parts.values()))
    return Assignment(pairings, unmatched, total, parts)
