"""Sample-history inventory: what the peak lists account for, compared with the formula.

What a practitioner does by hand before trusting any ranking:

* count 13C signals by type (C, CH, CH2, CH3) and the H they carry;
* normalise 1H integrals to the best small-integer ratio, count protons by region and read the
  patterns a practitioner reads first (two 2H doublets in the aromatic region: a para-disubstituted
  ring; a 3H triplet with a 2H quartet: an ethyl group);
* compare with the formula: which pieces must be duplicated by symmetry (formula has more C/H
  than the signals account for) or which peaks are extra (impurity, solvent, rotamers);
* DBE from the formula and what it suggests;
* a region hint for each 13C peak;
* a mass check of the formula against a measured m/z for [M]+, [M+H]+ and [M+Na]+.

Shift ranges are common practice (typical 13C regions found in any spectroscopy textbook).
"""
from __future__ import annotations

import itertools
from collections import Counter
from dataclasses import dataclass, field
from fractions import Fraction

import numpy as np

from ..errors import InputError
from .formula import dbe, dbe_note, hill, ion_label, ion_mz, neutral_parent, sample_formula
from ..inputs.peaks import DOUBLED_GAP, ON_LINE, PeakList, doubled_pairs, nearest_line
from ..inputs.solvents import exchanges_deuterium
from ..words import count

H_OF = {"C": 0, "CH": 1, "CH2": 2, "CH3": 3}
ORDER = ("CH3", "CH2", "CH", "C")


def region_hint(shift: float, multiplicity: str | None) -> str:
    """Typical 13C region of a peak (common practice).

    >>> region_hint(172.0, "C")
    'carboxyl-type C=O (acid, ester, amide, 165-185 ppm)'
    """
    m = multiplicity
    if shift >= 185:
        if m == "CH":
            return "aldehyde C=O (190-205 ppm)"
        return "ketone/aldehyde C=O (185-220 ppm)"
    if shift >= 165:
        return "carboxyl-type C=O (acid, ester, amide, 165-185 ppm)"
    if shift >= 100:
        if m in ("C", None) and 110 <= shift <= 125:
            return "aromatic/alkene C, or nitrile C≡N (110-125 ppm)"
        if shift >= 150 and m in ("C", None):
            return "aromatic C bound to O/N, or C=N (150-165 ppm)"
        if m in ("CH2",):
            return "terminal alkene =CH2 (105-120 ppm)"
        return "alkene/aromatic sp2 carbon (100-165 ppm)"
    if shift >= 65 and m in ("C", "CH", None) and shift <= 90:
        return "O-bound sp3 carbon (50-90 ppm), or alkyne carbon (65-90 ppm)"
    if shift >= 45:
        if m == "CH3":
            return "O- or N-methyl (OCH3 50-62, NCH3 30-45 ppm)" if shift >= 50 else "N-methyl or alkyl"
        return "heteroatom-bound sp3 carbon (C–N 35-60, C–O 50-90 ppm)"
    if shift >= 35 and m != "C":
        # an amine's or amide's N-CH2 / N-CH3 lies here as often as an alkyl carbon (common practice)
        return "alkyl sp3 carbon (0-45 ppm), or N-bound (C–N 35-60 ppm)"
    if shift >= 0:
        return "alkyl sp3 carbon (0-45 ppm)"
    return "shielded carbon (below 0 ppm; e.g. Si–CH3, cyclopropane)"


def integer_ratio(values: list[float], max_multiplier: int = 6, tolerance: float = 0.12) -> list[int]:
    """Best small-integer set for 1H integrals, e.g. 2.0 : 3.1 : 0.98 → 2 : 3 : 1.

    Divides by the smallest integral, then takes the smallest multiplier whose
    products are all within ``tolerance`` (relative) of whole numbers; falls back
    to the multiplier with the smallest total rounding error.

    >>> integer_ratio([2.0, 3.1, 0.98])
    [2, 3, 1]
    """
    vals = [float(v) for v in values]
    if not vals or any(v <= 0 for v in vals):
        raise InputError("integrals: need positive numbers")
    unit = min(vals)
    best = None
    for k in range(1, max_multiplier + 1):
        scaled = [v / unit * k for v in vals]
        err = max(abs(s - round(s)) / max(round(s), 1) for s in scaled)
        if err <= tolerance:
            return [int(round(s)) for s in scaled]
        total = sum(abs(s - round(s)) for s in scaled)
        if best is None or total < best[0]:
            best = (total, [max(1, int(round(s))) for s in scaled])
    return best[1]


@dataclass
class MassCheck:
    adduct: str
    expected_mz: float
    error_ppm: float
    ok: bool


@dataclass
class Inventory:
    """The arithmetic a practitioner does before looking at candidates."""

    signals_by_type: dict = field(default_factory=dict)
    unknown_type_signals: int = 0
    carbons_observed: int = 0
    h_on_carbon_observed: int = 0
    h_ratio: list[int] | None = None
    h_total_from_integrals: int | None = None
    h_as_printed: bool = False    # the integrals were whole proton counts ('2H'), kept as given
    formula: str | None = None
    dbe: float | None = None
    tentative: str = ""
    inferences: list[str] = field(default_factory=list)
    findings: list[str] = field(default_factory=list)
    regions: list[tuple[float, str | None, str]] = field(default_factory=list)
    mass_checks: list[MassCheck] = field(default_factory=list)

    has_13c: bool = True
    h_regions: list[tuple[str, int]] = field(default_factory=list)   # (region, protons) from 1H integrals
    h_patterns: list[str] = field(default_factory=list)              # first-order patterns read from 1H
    h_duplicates: list[tuple[int, str]] = field(default_factory=list)  # carbons 1H symmetry repeats, and why

    def lines(self) -> list[str]:
        out = []
        typed = any(self.signals_by_type.get(k) for k in ORDER)
        if self.has_13c and typed:
            kinds = ", ".join(f"{self.signals_by_type[k]} {k}" for k in ORDER if self.signals_by_type.get(k))
            if self.unknown_type_signals:
                kinds += f", {self.unknown_type_signals} of unknown type"
            out.append(f"13C signals: {kinds}; {self.carbons_observed} carbons, {self.h_on_carbon_observed} H on carbon")
        elif self.has_13c:
            out.append(f"13C signals: {self.carbons_observed} (no DEPT multiplicities, so no CHn or H count from 13C)")
        if self.h_ratio:
            out.append(f"1H integrals {'as printed' if self.h_as_printed else 'as small integers'}: "
                       f"{':'.join(map(str, self.h_ratio))} (sum {sum(self.h_ratio)})")
        if self.h_regions:
            out.append("1H by region: " + ", ".join(f"{n:g} H {r}" for r, n in self.h_regions if n))
        out.extend(f"1H pattern: {x}" for x in self.h_patterns)
        if self.has_13c and typed:
            out.append(f"tentative piece count: {self.tentative}")
        out.extend(f"inference: {i}" for i in self.inferences)
        out.extend(self.findings)
        if self.mass_checks:
            out.append(mass_check_line(self.mass_checks))
        return out


def mass_check_line(checks: list[MassCheck]) -> str:
    """One line: the ions the measured m/z fits, or the nearest one and how far off it is.

    >>> mass_check_line([MassCheck("[M]+", 152.0468, 6630.2, False), MassCheck("[M+H]+", 153.0546, 1.8, True)])
    'mass check: consistent with [M+H]+ (expected m/z 153.0546, error +1.8 ppm)'
    """
    ok = [m for m in checks if m.ok]
    if ok:
        return "mass check: consistent with " + "; ".join(
            f"{m.adduct} (expected m/z {m.expected_mz:.4f}, error {m.error_ppm:+.1f} ppm)" for m in ok)
    near = min(checks, key=lambda m: abs(m.error_ppm))
    return (f"mass check: fits none of {', '.join(m.adduct for m in checks)}; nearest {near.adduct} "
            f"(expected m/z {near.expected_mz:.4f}, error {near.error_ppm:+.1f} ppm)")


def _duplications(counts: dict, dC: int, dH_range: range, limit: int = 3, classes: dict | None = None,
                  h_signals: list[int] | None = None) -> list[tuple[dict, int, bool]]:
    """Ways to add dC carbons and dH hydrogens (dH in dH_range) as extra copies of observed piece types:
    (extra pieces by type, dH, whether the 1H integrals fit it).

    With ``classes`` (the 13C signals of each protonated type, each its carbon count) and ``h_signals`` (the
    1H integrals in protons), the ways whose copies, spread over those signals, give the printed integrals
    exactly come first: a 2H aromatic singlet and a 6H triplet beside one CH and one CH3 signal say which
    pieces are doubled.  Otherwise at most one way per number of H left for heteroatoms (OH/NH), fewest such H
    first; for each, a whole-spectrum k-fold copy when it fits (k-fold symmetry), else the way closest to
    duplicating each observed type in proportion to its count.
    """
    types = [t for t in ORDER if counts.get(t)]
    total = sum(counts[t] for t in types)
    best: dict[int, tuple] = {}
    fitting: list[tuple] = []
    for combo in itertools.product(range(dC + 1), repeat=len(types)):
        if sum(combo) != dC:
            continue
        h = sum(n * H_OF[t] for n, t in zip(combo, types))
        if h not in dH_range:
            continue
        k_fold = total and all(n == counts[t] * dC / total for n, t in zip(combo, types))
        spread = -1.0 if k_fold else sum(abs(n - counts[t] * dC / total) for n, t in zip(combo, types))
        pieces = {t: n for t, n in zip(types, combo) if n}
        if classes and h_signals and _integrals_fit(pieces, classes, h_signals):
            fitting.append((spread, h, pieces))
        if h not in best or spread < best[h][0]:
            best[h] = (spread, pieces)
    if fitting:
        fitting.sort(key=lambda x: (x[0], -x[1]))
        return [(pieces, h, True) for _, h, pieces in fitting[:limit]]
    ordered = sorted(best.items(), key=lambda kv: -kv[0])
    return [(pieces, h, False) for h, (_, pieces) in ordered[:limit]]


def _integrals_in_protons(inv, nH: int) -> list[int] | None:
    """The 1H integrals as proton counts: the small-integer ratio, scaled when the formula's H is a whole
    multiple of its sum (a symmetric molecule integrated against its smallest signal)."""
    if not inv.h_ratio or not inv.h_total_from_integrals:
        return None
    f = nH // inv.h_total_from_integrals if nH % inv.h_total_from_integrals == 0 else 1
    return [x * max(f, 1) for x in inv.h_ratio]


def _integrals_fit(pieces: dict, classes: dict, h_signals: list[int]) -> bool:
    """Whether the extra pieces, spread over the 13C signals of their type, can give every 1H integral: the
    protonated signals' proton counts (size × H per carbon) equal the printed integrals, NH/OH signals (the
    integrals left over) allowed."""
    want = Counter(h_signals)
    options_by_type = []
    for t in ("CH3", "CH2", "CH"):
        sizes = classes.get(t, [])
        extra = pieces.get(t, 0)
        if not sizes:
            if extra:
                return False
            continue
        ways = [c for c in itertools.product(range(extra + 1), repeat=len(sizes)) if sum(c) == extra]
        if len(ways) > 2000:
            return False   # too many ways to spread them: no claim
        options_by_type.append([[(n + k) * H_OF[t] for n, k in zip(sizes, c)] for c in ways])
    for combo in itertools.product(*options_by_type):
        got = Counter(h for hs in combo for h in hs)
        if not got - want:
            return True
    return False


#: ppm: a cross peak belongs to a 13C peak within this distance in δC; a proton shift to a 1H peak within this
HSQC_C_TOLERANCE = 0.3
HSQC_H_TOLERANCE = 0.03


def chn_from_hsqc(peaks: list, hsqc, h1: PeakList | None = None) -> list[tuple[str | None, int, str]]:
    """(CHn or None, carbons, reason) for each 13C peak, read the way a practitioner reads HSQC beside the 1H
    integrals (common practice): no cross peak at its δC, a carbon without H (or one whose cross peak was
    not listed); two proton shifts on one sp3 carbon, a CH2 with diastereotopic protons; an edited phase
    says CH2 or CH/CH3; otherwise the integral of the one 1H multiplet at the cross peak's δH, when no
    other carbon's cross peak shares it, counts the H: an aromatic or alkene carbon bears at most one
    (a 2H integral there is two equivalent CH; a =CH2 has δC 105–120 and δH below 6.3), an sp3 carbon at
    most three (6H: two equivalent CH3; 9H: three, a tert-butyl)."""
    pairs = list(zip(hsqc.pairs, hsqc.kinds or [None] * len(hsqc.pairs)))
    owner: dict[int, int] = {}
    for k, ((c, _h), _kind) in enumerate(pairs):   # each cross peak to its nearest 13C peak within tolerance
        best = min(range(len(peaks)), key=lambda i: abs(peaks[i].shift - c), default=None)
        if best is not None and abs(peaks[best].shift - c) <= HSQC_C_TOLERANCE:
            owner[k] = best
    h_peaks = h1.sample_peaks() if h1 is not None else []

    def h_peak_of(h: float):
        hits = [j for j, q in enumerate(h_peaks)
                if (q.lo is not None and q.lo - 0.02 <= h <= q.hi + 0.02) or abs(q.shift - h) <= HSQC_H_TOLERANCE]
        return hits[0] if len(hits) == 1 else None

    claims: dict[int, set] = {}
    for k, i in owner.items():
        j = h_peak_of(pairs[k][0][1])
        if j is not None:
            claims.setdefault(j, set()).add(i)
    out = []
    for i, p in enumerate(peaks):
        mine = [pairs[k] for k, o in owner.items() if o == i]
        if not mine:
            out.append(("C", p.count, "no HSQC cross peak"))
            continue
        hs = sorted({round(h, 2) for (_c, h), _k in mine})
        kinds = {k for _, k in mine if k}
        sp2 = p.shift >= 100
        if "CH2" in kinds:
            out.append(("CH2", p.count, "edited HSQC phase"))
            continue
        if len(hs) >= 2 and not sp2:
            out.append(("CH2", p.count, f"two proton shifts {hs[0]:g}/{hs[-1]:g} on one carbon"))
            continue
        j = h_peak_of(hs[0])
        n = h_peaks[j].intensity if j is not None else None
        if j is None or n is None or n <= 0 or len(claims.get(j, ())) != 1 or abs(n - round(n)) > 0.2:
            out.append((None, p.count, "cross peak, but no 1H integral of its own at its δH"))
            continue
        n = int(round(n))
        if sp2:
            if n == 2 and hs[0] < 6.3 and p.shift <= 125 and "CH/CH3" not in kinds:
                out.append(("CH2", p.count, f"=CH2: 2H at δH {hs[0]:g}"))
            else:
                out.append(("CH", max(p.count, n), f"{n}H at δH {hs[0]:g} on sp2 carbon(s)"))
            continue
        per = n / p.count
        if per == int(per) and 1 <= per <= 3:
            mult, carbons = {1: "CH", 2: "CH2", 3: "CH3"}[int(per)], p.count
        elif n % 3 == 0:
            mult, carbons = "CH3", n // 3
        elif n % 2 == 0:
            mult, carbons = "CH2", n // 2
        else:
            out.append((None, p.count, f"{n}H at δH {hs[0]:g}: no whole number of CHn"))
            continue
        if kinds == {"CH/CH3"} and mult == "CH2":
            out.append((None, p.count, "edited phase and integral disagree"))
            continue
        out.append((mult, carbons, f"{n}H at δH {hs[0]:g}"))
    return out


def take_inventory(c13: PeakList | None, h1: PeakList | None = None, formula: str | None = None,
                   mz: float | None = None, mz_tolerance_ppm: float = 5.0, hsqc=None,
                   counted_lines: dict[str, int] | None = None, cosy=None, hmbc=None) -> Inventory:
    """Inventory of a 13C list and/or a 1H list with integrals against the sample history; ``hsqc``
    (cross peaks) gives the CHn of 13C peaks printed without DEPT (:func:`chn_from_hsqc`);
    ``counted_lines``, the number of printed 19F and 31P signals ({nucleus: signals}), is read against the
    formula's F and P; ``cosy`` cross peaks give the spin systems (:func:`spin_systems`), ``hmbc`` ones the carbons
    the 13C list lacks (:func:`carbons_seen_in_hmbc`)."""
    if c13 is None and h1 is None:
        raise InputError("inventory: give a 13C peak list, a 1H peak list or both")
    inv = (_proton_only(h1, formula, mz, mz_tolerance_ppm) if c13 is None
           else _take(c13, h1, formula, mz, mz_tolerance_ppm, hsqc))
    for nucleus, lines in (counted_lines or {}).items():
        el = COUNTED_NUCLEI[nucleus][1]
        inv.findings.append(counted_finding(nucleus, lines, sample_formula(formula)[0].get(el, 0) if formula else None))
    if cosy is not None:
        inv.findings.extend(spin_systems(cosy.pairs, h1))
    if hmbc is not None and c13 is not None:
        inv.findings.extend(carbons_seen_in_hmbc(hmbc.pairs, c13))
    return inv


def spin_systems(pairs, h1: PeakList | None = None) -> list[str]:
    """The spin systems a COSY shows: groups of 1H signals joined by cross peaks (each cross peak's two δH read
    as the 1H lines they lie on, within 0.04 ppm, when a 1H list is given), largest first, with the protons their
    integrals count (common practice: the coupled chains a chemist draws before placing the pieces).

    >>> spin_systems([(7.72, 7.15), (7.40, 7.15), (4.46, 1.54)])
    ['COSY spin systems (coupled 1H signals): 7.72, 7.40, 7.15; 4.46, 1.54']
    """
    def node(d):
        j = nearest_line(d, h1.peaks, ON_LINE["1H"]) if h1 is not None else None
        return (round(h1.peaks[j].shift, 3), h1.peaks[j]) if j is not None else (round(d, 3), None)

    parent: dict = {}

    def find(x):
        while parent.setdefault(x, x) != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x

    lines = {}
    for a, b in pairs:
        (ka, la), (kb, lb) = node(a), node(b)
        lines.setdefault(ka, la)
        lines.setdefault(kb, lb)
        if ka != kb:
            parent[find(ka)] = find(kb)
    groups: dict = {}
    for k in lines:
        groups.setdefault(find(k), []).append(k)
    chains = sorted((sorted(g, reverse=True) for g in groups.values() if len(g) > 1), key=lambda g: (-len(g), -g[0]))
    if not chains:
        return []
    shown = []
    for g in chains:
        ints = [lines[k].intensity for k in g if lines[k] is not None and lines[k].intensity]
        protons = f" ({round(sum(ints))}H)" if len(ints) == len(g) and all(abs(i - round(i)) < 0.2 for i in ints) else ""
        shown.append(", ".join(f"{k:.2f}" for k in g) + protons)
    return ["COSY spin systems (coupled 1H signals): " + "; ".join(shown)]


def carbons_seen_in_hmbc(pairs, c13: PeakList) -> list[str]:
    """Carbons an HMBC shows that the 13C list does not have: cross-peak δC on no 13C line (within 0.6 ppm),
    grouped within 0.6 ppm (common practice: quaternary carbons are weak in a 1D 13C spectrum and often found in
    the HMBC; each is a carbon the formula count and the candidates must hold).

    >>> from shiftrank.inputs.peaks import peak_text
    >>> carbons_seen_in_hmbc([(149.0, 4.2), (149.2, 7.9), (123.6, 7.9)], peak_text("123.6, 40.3"))
    ['HMBC: a carbon at δC 149.1 that the 13C list does not have (2 cross peaks; a quaternary carbon too weak in 1D?)']
    """
    off = sorted(c for c, _ in pairs if nearest_line(c, c13.peaks, ON_LINE["13C"]) is None)
    groups: list[list[float]] = []
    for c in off:
        if groups and c - groups[-1][-1] <= ON_LINE["13C"]:
            groups[-1].append(c)
        else:
            groups.append([c])
    if not groups:
        return []
    said = ", ".join(f"δC {np.mean(g):.1f}" for g in groups)
    n = sum(len(g) for g in groups)
    return [f"HMBC: {'a carbon' if len(groups) == 1 else f'{len(groups)} carbons'} at {said} that the 13C list does not "
            f"have ({count(n, 'cross peak')}; {'a quaternary carbon' if len(groups) == 1 else 'quaternary carbons'} too "
            "weak in 1D?)"]


#: printed nuclei whose signals are counted, not predicted (against the formula's atoms of their element here, against
#: each candidate's environments of it in the ranking): nucleus -> (atomic number, element, word)
COUNTED_NUCLEI = {"19F": (9, "F", "fluorine"), "31P": (15, "P", "phosphorus")}


def counted_finding(nucleus: str, lines: int, n_atoms: int | None) -> str:
    """What the number of printed 19F (31P) signals says against the formula's F (P) count (common practice).

    >>> counted_finding("19F", 1, 3)
    '19F: 1 signal for 3 F in the formula: three equivalent F, a CF3 group most likely'
    """
    _, el, word = COUNTED_NUCLEI[nucleus]
    head = f"{nucleus}: {count(lines, 'signal')}"
    if n_atoms is None:
        return f"{head}: at least {count(lines, word + ' environment')}"
    if n_atoms == 0:
        return f"{head} but the formula has no {el}: check the formula"
    if lines > n_atoms:
        return (f"{head} for {n_atoms} {el} in the formula: more signals than {el} atoms (an isomer mixture, rotamers "
                "or an impurity?)")
    if lines == n_atoms:
        return f"{head} for {n_atoms} {el} in the formula: {f'each {el} in an environment of its own' if n_atoms > 1 else f'one {el}'}"
    if el == "F" and lines == 1 and n_atoms == 3:
        return f"{head} for 3 F in the formula: three equivalent F, a CF3 group most likely"
    like = "a CF3 or CF2 group, or a symmetric substitution pattern" if el == "F" else "a symmetric molecule"
    return f"{head} for {n_atoms} {el} in the formula: {n_atoms - lines} {el} equivalent to others by symmetry ({like})"


def _take(c13: PeakList, h1: PeakList | None, formula: str | None, mz: float | None, mz_tolerance_ppm: float,
          hsqc) -> Inventory:
    peaks = c13.sample_peaks()
    if not peaks:
        raise InputError(f"{c13.source}: no sample peaks left after setting aside solvent signals")
    types = [(p.multiplicity, p.count) for p in peaks]
    # a DEPT-135 '+' phase (CH or CH3) above 90 ppm is a CH: no methyl carbon lies there (common practice)
    types = [("CH", n) if m == "CH/CH3" and p.shift >= 90 else (m, n) for p, (m, n) in zip(peaks, types)]
    from_hsqc = []
    if hsqc is not None and any(p.multiplicity not in H_OF for p in peaks):
        for k, (p, (mult, carbons, why)) in enumerate(zip(peaks, chn_from_hsqc(peaks, hsqc, h1))):
            if p.multiplicity not in H_OF and mult is not None:
                types[k] = (mult, carbons)
                from_hsqc.append(f"{p.shift:g} {mult}{f' ×{carbons}' if carbons > 1 else ''} ({why})")
    by_type = {k: 0 for k in ORDER}
    unknown = 0
    carbons = h_on_c = 0
    for mult, n in types:
        carbons += n
        if mult in H_OF:
            by_type[mult] += n
            h_on_c += H_OF[mult] * n
        else:
            unknown += n
    inv = Inventory(by_type, unknown, carbons, h_on_c)
    pairs = doubled_pairs(peaks, "13C")
    if from_hsqc:
        inv.inferences.append("CHn from the HSQC cross peaks and the 1H integrals (common practice): " + "; ".join(from_hsqc))
    phased = [p.shift for p in peaks if p.multiplicity == "CH/CH3"]
    if phased:
        above = [x for x in phased if x >= 90]
        inv.inferences.append(f"{len(phased)} DEPT-135 '+' peak(s) (CH or CH3)"
                              + (f"; {len(above)} above 90 ppm counted as CH (no methyl carbon there)" if above else "")
                              + (f"; {len(phased) - len(above)} below 90 ppm left as CH or CH3" if len(phased) > len(above) else ""))
    inv.regions = [(p.shift, m, region_hint(p.shift, m)) for p, (m, _n) in zip(peaks, types)]

    n_o_inferred = 0
    for p in peaks:
        if p.shift >= 185:
            inv.inferences.append(f"{p.shift:g} ppm is a ketone/aldehyde carbonyl: at least one O (inference from shift)")
            n_o_inferred += 1
        elif p.shift >= 165 and p.multiplicity in ("C", None):
            inv.inferences.append(f"{p.shift:g} ppm is a carboxyl-type carbon: O (and perhaps N) attached (inference from shift)")
            n_o_inferred += 1
    hetero = f" + ≥{n_o_inferred} O (inferred)" if n_o_inferred else ""
    inv.tentative = f"C{carbons}H{h_on_c}{hetero}" + (f" (+{unknown} carbons of unknown CHn)" if unknown else "") + \
        " — H on heteroatoms (OH, NH) not counted"

    if h1 is not None:
        _read_protons(inv, h1)

    if formula:
        fc = _formula_findings(inv, formula)
        nC, nH = fc.get("C", 0), fc.get("H", 0)
        n_xh_max = fc.get("O", 0) + fc.get("N", 0) * 2 + fc.get("S", 0)
        dC = nC - carbons
        if inv.dbe is not None and inv.dbe >= 4:
            n_arom = sum(1 for p in peaks if 110 <= p.shift <= 160)
            msg = f"DBE {inv.dbe:g} ≥ 4: often an aromatic ring (common practice); {count(n_arom, '13C signal lies', '13C signals lie')} in 110-160 ppm"
            if h1 is not None:
                msg += f", {count(sum(1 for p in h1.sample_peaks() if p.shift > 6.5), '1H signal')} above 6.5 ppm"
            inv.findings.append(msg)
        elif inv.dbe is not None:
            inv.findings.append(f"DBE {inv.dbe:g}: rings plus π bonds; below 4 an aromatic ring is unlikely (common practice)")
        if dC > 0 and not unknown:
            classes = {t: [n for m, n in types if m == t] for t in ("CH3", "CH2", "CH")}
            h_signals = _integrals_in_protons(inv, nH)
            ways = _duplications(by_type, dC, range(max(0, nH - h_on_c - n_xh_max), nH - h_on_c + 1),
                                 classes=classes, h_signals=h_signals)
            if ways:
                texts = []
                fits = ways[0][2]
                for pieces, dh, _fit in ways:
                    xh = nH - h_on_c - dh
                    k_fold = dC % carbons == 0 and all(pieces.get(t, 0) == by_type[t] * (dC // carbons) for t in ORDER if by_type[t])
                    texts.append(" and ".join(f"{n} more {t}" for t, n in pieces.items())
                                 + (f" ({xh} H on O/N)" if xh else " (no H on O/N)")
                                 + (f": a {dC // carbons + 1}-fold symmetric molecule" if k_fold else ""))
                inv.findings.append(f"the formula needs {dC} more C than the signals account for: symmetry-equivalent "
                                    f"(or overlapping) carbons; possible duplicated pieces"
                                    + (f" that the 1H integrals ({':'.join(map(str, h_signals))}) "
                                       "fit" if fits else "") + ": " + "; or ".join(texts)
                                    + ("; or a carbon bound to boron, which is often not seen (common practice)"
                                       if fc.get("B") else ""))
            else:
                inv.findings.append(f"the formula has {dC} more carbons than the signals account for; no duplication of the "
                                    "observed CHn pieces fits its H count: check the multiplicities or the formula")
        elif dC > 0:
            inv.findings.append(f"the formula has {dC} more carbons than the signals: symmetry or overlap"
                                + (" (or a carbon bound to boron, which is often not seen: common practice)"
                                   if fc.get("B") else "") + _symmetry_from_1h(inv.h_duplicates, dC))
        elif dC < 0 and pairs:
            left = carbons - pairs
            inv.findings.append(f"{-dC} more carbon signals than the formula has carbons; the spectrum shows two forms "
                                f"(as stated), and {count(pairs, 'pair')} of lines within {DOUBLED_GAP['13C']:g} ppm read as one "
                                f"carbon each leave {left} signals for {nC} carbons"
                                + (": consistent" if left <= nC else ": still more signals than carbons (impurity?)"))
        elif dC < 0:
            inv.findings.append(f"{-dC} more carbon signals than the formula has carbons: extra peaks "
                                "(impurity, residual solvent, rotamers or C–F coupled lines)")
        else:
            xh = nH - h_on_c
            if unknown:
                inv.findings.append("carbon count matches the formula (one carbon per signal)")
            elif xh < 0:
                inv.findings.append(f"the CHn pieces carry {h_on_c} H but the formula has only {nH}: check the multiplicities")
            else:
                inv.findings.append(f"carbon count matches the formula; {xh} H not on carbon (OH/NH)" if xh else
                                    "carbon and hydrogen counts match the formula exactly")
        if inv.h_total_from_integrals:
            inv.findings.append(_h_sum_finding(inv, fc, h1.solvent))
        if mz is not None:
            _mass_checks(inv, fc, mz, mz_tolerance_ppm)
    elif mz is not None:
        raise InputError("mass check: a measured m/z needs a formula to compare with")
    return inv


#: 1H regions (common practice ranges; boundaries are soft).
H_REGIONS = [(9.0, 16.1, "above 9 ppm (CHO, COOH, NH/OH of amides, phenols, heteroaromatic CH)"),
             (6.5, 9.0, "aromatic/heteroaromatic 6.5-9 ppm"), (4.5, 6.5, "alkene or O-CH-O/N-CH 4.5-6.5 ppm"),
             (2.8, 4.5, "on C next to O/N or halogen 2.8-4.5 ppm"), (1.6, 2.8, "allylic/benzylic/alpha to C=O 1.6-2.8 ppm"),
             (-2.1, 1.6, "alkyl below 1.6 ppm")]


def _by_region(sample, protons) -> list[tuple[str, float]]:
    """Protons per 1H region (:data:`H_REGIONS`) from each signal's proton count."""
    return [(name, sum(n for p, n in zip(sample, protons) if lo <= p.shift < hi)) for lo, hi, name in H_REGIONS]


def _read_protons(inv: Inventory, h1: PeakList) -> None:
    """Integer integrals, protons per region and the first-order patterns of a 1H list."""
    sample = h1.sample_peaks()
    ints = [p.intensity for p in sample if p.intensity is not None and p.intensity > 0]
    if ints and len(ints) == len(sample) and h1.solvent:
        # a trace line where a common solvent residue shows (below half the smallest other integral) is no proton
        # of the compound: set apart before the integrals are read as a ratio, and said
        from ..inputs.solvents import impurity_lines

        trace = {}
        for m in impurity_lines(sample, h1.solvent, "1H"):
            rest = [x for k, x in enumerate(ints) if k not in m.index]
            if rest and all(ints[k] < 0.5 * min(rest) for k in m.index):
                for k in m.index:
                    trace.setdefault(k, []).append(m.name)
        if trace and len(trace) < len(sample):
            inv.findings.append("1H: " + ", ".join(f"{sample[k].shift:g} (integral {ints[k]:g})" for k in sorted(trace))
                                + f" set apart: a trace where {' or '.join(dict.fromkeys(n for k in sorted(trace) for n in trace[k]))} shows in "
                                f"{h1.solvent} (Fulmer et al. 2010, values recalled)")
            sample = [p for k, p in enumerate(sample) if k not in trace]
            ints = [x for k, x in enumerate(ints) if k not in trace]
    if not ints or len(ints) != len(sample):
        if sample:
            inv.findings.append(f"1H: {count(len(sample), 'signal')}; integrals missing for {len(sample) - len(ints)}, so no proton count")
        return
    if any(p.doubled for p in sample) and any(abs(x - round(x)) > 0.05 for x in ints):
        # two forms: the integrals are printed in protons, each line its form's share ('0.5H'); their sum counts
        # the protons, and no small-integer pattern is read from the shares
        total = sum(ints)
        inv.h_total_from_integrals = round(total)
        inv.findings.append(f"1H integrals printed as shares of two forms (e.g. {min(ints):g}H): they sum to {total:g} H")
        inv.h_regions = [(name, round(n, 1)) for name, n in _by_region(sample, ints)]
        return
    if all(x >= 0.95 and abs(x - round(x)) < 0.05 for x in ints):
        # whole proton counts, as printed ('6H', '4H'): they already count protons, and reducing them to a
        # ratio (3:2:2) would hide that they match the formula
        inv.h_ratio, inv.h_as_printed = [round(x) for x in ints], True
    else:
        inv.h_ratio = integer_ratio(ints, max_multiplier=8)
    inv.h_total_from_integrals = sum(inv.h_ratio)
    inv.h_regions = _by_region(sample, inv.h_ratio)
    arom = [(p, n) for p, n in zip(sample, inv.h_ratio) if 6.5 <= p.shift < 8.6]
    # a lone 1H singlet (an azole or pyrimidine CH, an isolated ring H) has no ortho neighbour: it belongs to
    # neither pattern below
    ring_h = [(p, n) for p, n in arom if not (n == 1 and p.multiplicity == "s")]

    def ortho(p) -> bool:
        return not p.j or any(6 <= j <= 10 for j in p.j)
    doublets_2h = [p for p, n in ring_h if n == 2 and p.multiplicity == "d" and ortho(p)]
    # a 4-fluorophenyl prints its AA'BB' halves as dd (H-H ortho, H-F meta ~5 Hz) and t (H-H ortho ~ H-F ortho
    # ~8.5 Hz); common practice, J values from memory
    pair_2h = [p for p, n in ring_h if n == 2 and p.multiplicity in ("d", "dd", "t") and ortho(p)]
    if len(ring_h) == 2 and len(doublets_2h) == 2:
        inv.h_patterns.append("two 2H doublets in the aromatic region with an ortho J: a para-disubstituted benzene ring "
                              "(AA'BB'; common practice)")
    elif len(ring_h) == 2 and len(pair_2h) == 2 and {p.multiplicity for p in pair_2h} == {"dd", "t"}:
        inv.h_patterns.append("a 2H dd and a 2H t in the aromatic region with ortho J: a 4-fluorophenyl group likely (its "
                              "AA'BB' halves split again by F, meta ~5 Hz and ortho ~8.5 Hz; common practice)")
    elif len(doublets_2h) >= 2:
        inv.h_patterns.append(f"{len(doublets_2h)} aromatic 2H doublets: para-disubstituted ring(s) likely (common practice)")
    if sum(n for _, n in ring_h) == 5 and len(ring_h) <= 3:
        inv.h_patterns.append("5 aromatic H in at most three signals: a monosubstituted benzene ring is likely (common practice)")
    # an ethyl group: a 3H triplet and a 2H quartet (k equivalent ethyls: 3k H and 2k H)
    ethyls = [(t, q, n // 3) for t, n in zip(sample, inv.h_ratio) if n % 3 == 0 and n and t.multiplicity == "t"
              and t.shift < 1.6 for q, m in zip(sample, inv.h_ratio) if q.multiplicity == "q" and m * 3 == n * 2]
    if ethyls:
        t, q, k = ethyls[0]
        what = "an ethyl group" if k == 1 else f"{k} equivalent ethyl groups (symmetry)"
        inv.h_patterns.append(f"a {3 * k}H triplet ({t.shift:g}) and a {2 * k}H quartet ({q.shift:g}): {what} "
                              "(common practice)" + (", on O or an aromatic N (quartet above 3.5 ppm)" if q.shift > 3.5 else ""))
    for p, n in zip(sample, inv.h_ratio):
        if p.multiplicity == "s" and n >= 2 and 6.5 <= p.shift < 8.6:
            inv.h_patterns.append(f"{n}H singlet at {p.shift:g} among the aromatic signals: equivalent ring protons without "
                                  "a distinct neighbour (a symmetric substitution, e.g. a para ring with two like "
                                  "groups; common practice)")
        if p.multiplicity == "s" and n == 9 and 0.8 <= p.shift <= 1.6:
            inv.h_patterns.append(f"9H singlet at {p.shift:g}: a tert-butyl group (Boc or tBu; common practice)")
        elif p.multiplicity == "s" and n == 6:
            inv.h_patterns.append(f"6H singlet at {p.shift:g}: two equivalent methyls (a gem-dimethyl, N(CH3)2, or a "
                                  "symmetric molecule; common practice)")
    singlets3 = [p for p, n in zip(sample, inv.h_ratio) if n == 3 and p.multiplicity == "s"]
    for p in singlets3:
        where = ("OCH3, or NCH3 of an azole" if 3.3 <= p.shift <= 4.1 else "NCH3 or COCH3/ArCH3" if 2.0 <= p.shift < 3.3
                 else "CH3 on a quaternary carbon")
        inv.h_patterns.append(f"3H singlet at {p.shift:g}: an isolated methyl ({where}; common practice)")
    inv.h_duplicates = _duplicated_carbons(sample, inv.h_ratio, ethyls[0][2] if ethyls else 1)
    for p, n in zip(sample, inv.h_ratio):
        if (p.multiplicity or "").startswith("br") and n <= 3:
            what = ("a carboxylic acid OH, or an amide/azole NH" if p.shift >= 10.5 else
                    "an NH or OH (amide NH, phenol OH)" if p.shift >= 7.5 else
                    ("an NH2 (aniline or amide)" if n == 2 else "an NH or OH" if n == 1 else "an NH3+ or exchanging OH/NH")
                    + (" or water exchanging with it" if n <= 2 and 3.0 <= p.shift <= 3.6 else ""))
            inv.h_patterns.append(f"broad {n}H signal at {p.shift:g}: exchangeable, {what} likely; shaking with D2O would "
                                  "remove it (common practice)")


def _symmetry_from_1h(dups: list[tuple[int, str]], dC: int) -> str:
    """What the 1H integrals say about ``dC`` carbons more in the formula than 13C signals."""
    if not dups:
        return ""
    k = sum(n for n, _ in dups)
    why = "; ".join(w for _, w in dups)
    if k == dC:
        return f"; the 1H integrals account for all {dC}: {why}"
    if k < dC:
        return (f"; the 1H integrals account for {k} ({why}), leaving {dC - k} for carbons printed once at one "
                "value or not listed (often quaternary)")
    return f"; the 1H integrals suggest {k} repeated carbons ({why}), more than {dC}: some are likely not equivalent"


def _duplicated_carbons(sample, ratio: list[int], ethyls: int) -> list[tuple[int, str]]:
    """Carbons that symmetry repeats, read from 1H signals whose integral counts equivalent groups (common
    practice): an aromatic 2H d/t/dd/s is two equivalent CH (one carbon more than signals), a 4H signal of CH2
    next to a heteroatom two equivalent CH2, a 6H methyl singlet or doublet two CH3, a 9H singlet three,
    k equivalent ethyls 2(k − 1)."""
    out = []
    for p, n in zip(sample, ratio):
        m = (p.multiplicity or "").replace("br ", "")
        if 6.5 <= p.shift < 8.6 and n == 2 and m in ("d", "t", "dd", "s"):
            out.append((1, f"2H {m} at {p.shift:g} (two equivalent ring CH)"))
        elif 2.5 <= p.shift < 4.6 and n == 4 and m in ("t", "m", "s", "br t", "dd"):
            out.append((1, f"4H {m} at {p.shift:g} (two equivalent CH2, as in a morpholine, piperazine or symmetric chain)"))
        elif n == 6 and m in ("s", "d") and p.shift < 4.2:
            out.append((1, f"6H {m} at {p.shift:g} (two equivalent CH3)"))
        elif n == 9 and m == "s" and p.shift < 1.6:
            out.append((2, f"9H s at {p.shift:g} (three equivalent CH3)"))
    if ethyls > 1:
        out.append((2 * (ethyls - 1), f"{ethyls} equivalent ethyl groups"))
    return out


def _h_sum_finding(inv: Inventory, fc: dict, solvent: str | None) -> str:
    """The 1H integrals' sum against the formula's H: equal, a whole fraction of it (symmetry: the integrals
    were scaled to the smallest signal), short by no more than the O/N/S could carry (OH/NH not seen; in
    CD3OD or D2O their deuterium replaces them), or otherwise off."""
    nH, tot = fc.get("H", 0), inv.h_total_from_integrals
    n_xh_max = fc.get("O", 0) + fc.get("N", 0) * 2 + fc.get("S", 0)
    swap = exchanges_deuterium(solvent)
    if nH == tot:
        return f"1H integrals sum to the formula's {nH} H"
    if nH % tot == 0:
        f = nH // tot
        return (f"1H integrals sum to {tot}; the formula has {nH} H: scale ×{f} "
                f"({':'.join(str(x * f) for x in inv.h_ratio)}), a hint of {f}-fold symmetry")
    if 0 < nH - tot <= n_xh_max:
        return (f"1H integrals sum to {tot}, the formula has {nH} H: {nH - tot} H not seen, "
                + (f"as expected in {swap}: its deuterium replaces OH/NH protons (common practice)" if swap else
                   "likely OH/NH exchanging with the solvent or its water"))
    return (f"1H integrals sum to {tot}, formula has {nH} H (ratio {Fraction(nH, tot)}): "
            "overlapped, exchange-broadened or extra signals?")


def _mass_checks(inv: Inventory, fc: dict, mz: float, mz_tolerance_ppm: float) -> None:
    """Compare a measured m/z with the formula's [M]+, [M+H]+ and [M+Na]+ ions."""
    for adduct in ("M+", "M+H", "M+Na"):
        exp = ion_mz(fc, adduct)
        err = (mz - exp) / exp * 1e6
        inv.mass_checks.append(MassCheck(ion_label(adduct), exp, err, abs(err) <= mz_tolerance_ppm))


def _formula_findings(inv: Inventory, formula: str) -> dict:
    """Parse the sample formula into ``inv`` (Hill formula, DBE and its note); return the counts."""
    # a salt, solvate or ion as printed ('C9H11NO3·0.5H2O', '[C9H12NO3]+'): its organic parent, as a ranking reads it
    fc, charge, notes = sample_formula(formula)
    if charge and neutral_parent(fc, charge) is not None:
        fc = neutral_parent(fc, charge)
        notes = notes + [f"read as the neutral parent {hill(fc)} ({'-' if charge > 0 else '+'}{abs(charge)} H)"]
    inv.findings.extend(f"note: {n}" for n in notes)
    inv.formula = hill(fc)
    inv.dbe = dbe(fc)
    note = dbe_note(inv.dbe)
    if note:
        inv.findings.append(f"note: {note}")
    return fc


def _proton_only(h1: PeakList, formula: str | None, mz: float | None, mz_tolerance_ppm: float) -> Inventory:
    inv = Inventory(has_13c=False)
    if not h1.sample_peaks():
        raise InputError(f"{h1.source}: no sample peaks left after setting aside solvent signals")
    _read_protons(inv, h1)
    if formula:
        fc = _formula_findings(inv, formula)
        if inv.dbe >= 4:
            inv.findings.append(f"DBE {inv.dbe:g} ≥ 4: often an aromatic ring (common practice); "
                                f"{count(sum(1 for p in h1.sample_peaks() if p.shift > 6.5), '1H signal')} above 6.5 ppm")
        else:
            inv.findings.append(f"DBE {inv.dbe:g}: rings plus π bonds; below 4 an aromatic ring is unlikely (common practice)")
        if inv.h_total_from_integrals:
            inv.findings.append(_h_sum_finding(inv, fc, h1.solvent))
        if mz is not None:
            _mass_checks(inv, fc, mz, mz_tolerance_ppm)
    elif mz is not None:
        raise InputError("mass check: a measured m/z needs a formula to compare with")
    return inv
