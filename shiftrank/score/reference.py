"""A sample's peaks against a reference spectrum of the same nucleus (an authentic sample, a certified standard).

The orthogonal check a ranking cannot replace: when a reference spectrum of the compound is at hand, every
reference signal should reappear in the sample within the reproducibility of shifts measured in the same
solvent, and every further sample line is an impurity, a second form or residual solvent.

* The two lists may be referenced slightly differently (TMS against the solvent line): the offset is the
  median of the differences between the closest lines of the two lists and is removed before matching, and
  reported.
* Lines are paired one to one (Hungarian algorithm, ``scipy.optimize.linear_sum_assignment``) by their
  distance after the offset; a pair further apart than ``tolerance`` (13C 0.5 ppm, 1H 0.05 ppm by default;
  common practice for spectra taken in one solvent; a broad 1H line, 0.5 ppm) is no pair.  A 1H pair whose printed or picked
  multiplicities differ, or whose relative integrals differ by more than half, is listed as such.
* Residual solvent lines of either list take no part.

Owns the comparison; calls :mod:`shiftrank.inputs` for the lists.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from scipy.optimize import linear_sum_assignment

from ..errors import InputError
from ..inputs.peaks import PeakList
from ..words import count

#: ppm: largest difference of one signal between two spectra of one compound in one solvent (common practice)
TOLERANCE = {"13C": 0.5, "1H": 0.05}
#: ppm: the same for a broad 1H line (NH, OH), whose shift depends on concentration, water and temperature
#: (common practice)
BROAD_TOLERANCE = 0.5


def _letters(mult: str) -> str:
    """Multiplet letters without 'br': a broad and a sharp singlet are one pattern; how broad an exchangeable
    proton's line is depends on the sample's water and acid."""
    return mult[3:] if mult.startswith("br ") else "s" if mult == "br" else mult


def _broad(peak) -> bool:
    return bool(peak.multiplicity) and peak.multiplicity.startswith("br")
#: what a comparison with a reference can and cannot say
CAUTION = ("A match with a reference spectrum supports identity only when both were taken in the same solvent and "
           "conditions; isomers can match closely. Confirm by an orthogonal method where it matters and follow local "
           "regulations and validated procedures.")
#: a referencing offset larger than this (ppm) is not removed but reported as a problem
MAX_OFFSET = {"13C": 2.0, "1H": 0.2}


@dataclass
class LinePair:
    reference: float
    sample: float
    deviation: float                  # sample − reference, after the offset
    note: str = ""                    # 1H: a multiplicity or integral that differs
    broad: bool = False               # 1H: a broad (exchangeable) line on either side, paired within BROAD_TOLERANCE


@dataclass
class Comparison:
    nucleus: str
    pairs: list[LinePair] = field(default_factory=list)
    missing: list[float] = field(default_factory=list)    # reference lines the sample lacks
    extra: list[float] = field(default_factory=list)      # sample lines the reference lacks
    offset: float = 0.0
    tolerance: float = 0.0
    notes: list[str] = field(default_factory=list)

    @property
    def consistent(self) -> bool:
        return not self.missing and not any(p.note for p in self.pairs)

    def verdict(self) -> str:
        n_ref = len(self.pairs) + len(self.missing)
        worst = max((abs(p.deviation) for p in self.pairs if not p.broad), default=0.0)
        moved = max((abs(p.deviation) for p in self.pairs if p.broad and abs(p.deviation) > self.tolerance), default=0.0)
        if self.consistent:
            text = (f"consistent with the reference: all {n_ref} reference {self.nucleus} signals found within "
                    f"{self.tolerance:g} ppm (largest difference {worst:.2f} ppm"
                    + (f"; broad NH/OH lines within {BROAD_TOLERANCE:g} ppm, largest {moved:.2f} ppm" if moved else "")
                    + ")")
            if self.extra:
                text += (f"; {count(len(self.extra), 'further sample line')} (an impurity, a second form, solvent, "
                         "or a less symmetric compound?)")
            return text
        bits = []
        if self.missing:
            bits.append(f"{len(self.missing)} of {n_ref} reference signals not found within {self.tolerance:g} ppm")
        odd = [p for p in self.pairs if p.note]
        if odd:
            bits.append(f"{count(len(odd), 'paired signal')} with a different multiplet or integral")
        if self.extra:
            bits.append(f"{count(len(self.extra), 'sample line')} without a reference line")
        return "not consistent with the reference: " + "; ".join(bits)

    def to_dict(self) -> dict:
        return {"nucleus": self.nucleus, "consistent": self.consistent, "verdict": self.verdict(),
                "offset": round(self.offset, 4), "tolerance": self.tolerance,
                "pairs": [{"reference": p.reference, "sample": p.sample, "deviation": round(p.deviation, 4),
                           **({"note": p.note} if p.note else {}), **({"broad": True} if p.broad else {})}
                          for p in self.pairs],
                "missing": self.missing, "extra": self.extra, "notes": self.notes}


def compare_spectra(sample: PeakList, reference: PeakList, tolerance: float | None = None) -> Comparison:
    """Pair the sample's lines with the reference's (see the module text).

    >>> from shiftrank.inputs.peaks import parse_peaks
    >>> ref = parse_peaks("166.1\\n162.0\\n131.5\\n120.4\\n115.4\\n51.8\\n")
    >>> c = compare_spectra(parse_peaks("166.3\\n162.2\\n131.7\\n120.6\\n115.6\\n52.0\\n30.1\\n"), ref)
    >>> c.consistent, round(c.offset, 2), c.extra
    (True, 0.2, [30.1])
    """
    if sample.nucleus != reference.nucleus:
        raise InputError(f"compare: the sample is a {sample.nucleus} list and the reference a {reference.nucleus} list")
    nuc = sample.nucleus
    tol = TOLERANCE[nuc] if tolerance is None else float(tolerance)
    if not np.isfinite(tol) or tol <= 0:
        raise InputError(f"compare: tolerance {tolerance!r} must be a positive number (ppm)")
    s_lines, r_lines = sample.sample_peaks(), reference.sample_peaks()
    if not s_lines or not r_lines:
        raise InputError("compare: " + ("the sample" if not s_lines else "the reference") + " has no lines besides solvent")
    out = Comparison(nuc, tolerance=tol)
    s = np.array([p.shift for p in s_lines])
    r = np.array([p.shift for p in r_lines])
    nearest = s[np.abs(s[:, None] - r[None, :]).argmin(axis=0)] - r
    offset = float(np.median(nearest))
    if abs(offset) > MAX_OFFSET[nuc]:
        out.notes.append(f"the lists differ by {offset:+.2f} ppm overall, more than referencing explains "
                         f"({MAX_OFFSET[nuc]:g} ppm): not removed (another solvent, or another compound?)")
        offset = 0.0
    elif abs(offset) > tol / 5:
        out.notes.append(f"the sample is referenced {offset:+.3f} ppm from the reference; removed before pairing")
    else:
        offset = 0.0
    out.offset = offset
    d = np.abs((s - offset)[None, :] - r[:, None])
    limit = np.full(d.shape, tol)
    if nuc == "1H" and tolerance is None:
        # a broad (exchangeable NH/OH) line moves with concentration, water and temperature: a pair with a broad
        # line on either side (the other list may print the same NH2 as a plain 's') counts within BROAD_TOLERANCE
        sb = np.array([_broad(p) for p in s_lines])
        rb = np.array([_broad(p) for p in r_lines])
        either = rb[:, None] | sb[None, :]
        limit = np.where(either, BROAD_TOLERANCE, tol)
    cost = np.where(d <= limit, d, 1e6)
    rows, cols = linear_sum_assignment(cost)
    kept = [(i, j) for i, j in zip(rows, cols) if cost[i, j] < 1e6]
    scale = None
    if nuc == "1H":   # integrals compared on the paired lines' common scale (either list may be relative)
        both = [(s_lines[j].intensity, r_lines[i].intensity) for i, j in kept
                if s_lines[j].intensity and r_lines[i].intensity]
        if both:
            scale = sum(a for a, _ in both) / sum(b for _, b in both)
    for i, j in kept:
        note = []
        if nuc == "1H":
            ms, mr = s_lines[j].multiplicity, r_lines[i].multiplicity
            if ms and mr and _letters(ms) != _letters(mr) and "m" not in (ms, mr):
                note.append(f"multiplet {ms} against {mr}")
            si, ri = s_lines[j].intensity, r_lines[i].intensity
            if scale and si and ri and not 0.5 <= si / scale / ri <= 1.5:
                note.append(f"integral {si / scale:.2g} H against {ri:.2g} H")
        broad = nuc == "1H" and (_broad(s_lines[j]) or _broad(r_lines[i]))
        out.pairs.append(LinePair(float(r[i]), float(s[j]), float(s[j] - offset - r[i]), "; ".join(note), broad))
    out.pairs.sort(key=lambda p: p.reference)
    paired_r = {i for i, _ in kept}
    paired_s = {j for _, j in kept}
    out.missing = sorted(float(r[i]) for i in range(len(r)) if i not in paired_r)
    out.extra = sorted(float(s[j]) for j in range(len(s)) if j not in paired_s)
    if out.extra and sample.solvent:
        # further sample lines that are all the lines of a common solvent residue (common practice: checked first)
        from ..inputs.solvents import impurity_lines

        extra = [s_lines[j] for j in range(len(s)) if j not in paired_s]
        for m in impurity_lines(extra, sample.solvent, nuc):
            out.notes.append(f"further sample line{'s' if len(m.shifts) > 1 else ''} {', '.join(f'{v:g}' for v in m.shifts)} "
                             f"{'are' if len(m.shifts) > 1 else 'is'} where {m.name} shows in {sample.solvent} (Fulmer et al. "
                             "2010, Tables 1 and 2, values recalled): a solvent or grease residue?")
    return out
