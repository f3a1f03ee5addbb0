"""Mass-spectrometry statements inside characterisation text, read as sample history.

A characterisation paragraph usually ends with the molecular ion: ``HRMS (ESI) m/z [M + Na]+ calcd for
C11H14O4Na 233.0784, found 233.0786``.  :func:`read_mass_statements` finds such statements (``HRMS``,
``HR-ESI-MS``, ``MS (ESI)``, ``m/z`` …) and reads the ion type (``[M+H]+``, ``[M+Na]+``, ``[M]+``,
``[M−H]−`` …), the printed formula after *calcd for*, the calculated and the found m/z.
:func:`ion_fits` then tells whether a candidate's neutral formula gives that ion: a candidate with
another molecular formula does not.

The printed formula may be that of the neutral molecule or of the ion (``C11H14O4Na``); which one is
decided by the printed calculated value.  High-resolution values (three or more decimals) are
compared within 10 ppm (at least 0.002 u), nominal values within 0.6 u.  The found value is checked,
and the printed calculated value too, so that a typo in one of them does not reject the right
formula.

>>> s = read_mass_statements("13C NMR δ 166.8. HRMS (ESI) m/z [M + Na]+ calcd for C11H14O4Na 233.0784, found 233.0786.")
>>> s[0].adduct, s[0].found, s[0].neutral
('M+Na', 233.0786, 'C11H14O4')
>>> from shiftrank.chem.formula import parse_formula
>>> ion_fits(parse_formula("C11H14O4"), s[0]), ion_fits(parse_formula("C12H16O4"), s[0])
(True, False)
"""
from __future__ import annotations

import re
from collections import Counter
from dataclasses import dataclass

from ..chem.formula import _SUBSCRIPTS, ADDUCTS, hill, ion_label, ion_mz, parse_formula
from ..errors import InputError
from .files import fold_full_width

#: ions tried when a statement prints none: the common ones (the molecule's formula, the nearest ion),
#: and every ion a candidate may fit
LIKELY_ADDUCTS = ("M+H", "M+Na", "M+", "M-H")
ANY_ADDUCTS = LIKELY_ADDUCTS + ("M+K", "M+NH4", "M-")
HIGH_RES_PPM = 10.0
HIGH_RES_FLOOR = 0.002   # u
NOMINAL_TOL = 0.6        # u

#: where a mass statement starts
_START = re.compile(r"(?<![A-Za-z])(?:HR[\s-]?(?:ESI|EI|FAB|APCI|MALDI|CI)?[\s-]?(?:TOF[\s-]?)?MS|(?:ESI|EI|FAB|APCI|MALDI|CI|LC)[\s-]?(?:HR[\s-]?)?(?:TOF[\s-]?)?MS"
                    r"|MS\s*(?=\()|MS\s*:|HRMS|m/z)", re.I)
#: where it ends: the next kind of data
_STOP = re.compile(r"(?<![A-Za-z])(?:IR\b|FT-?IR|Anal\.|Elemental|m\.p\.|mp\b|UV\b|\[α\]|1H\s*NMR|13C\s*NMR|R[f]\b)")
_ADDUCT = re.compile(r"[\[(]\s*M\s*(?:(?P<sign>[+\-])\s*(?P<what>H|Na|K|NH4|Li)\s*)?[\])]\s*(?P<charge>\+|-|•\+|\+•|\.\+)?"
                     r"|[\[(]\s*M\s*(?P<inner>\+|-)\s*•?\s*[\])]"
                     r"|(?<![A-Za-z\[(])M\s*(?P<bare>\+|-)(?!\s*(?:H|Na|K|NH4|Li)\b)")
#: any printed ion label in brackets, also those not used: '[2M+Na]+', '[M+2H]2+', '[M−H2O+H]+', '[M-Boc+H]+'
_ANY_ION = re.compile(r"[\[(]\s*(?P<inner>\d*\s*M\b[^\])\[(]{0,24})[\])]")
_KNOWN_ION = re.compile(r"M(?:[+\-](?:H|Na|K|NH4|Li))?[+\-]?•?")
_FORMULA = r"\[?(?P<formula>(?:[A-Z][a-z]?\d*){2,})\]?\s*(?:[+\-]|\(?[+\-]\)?|•\+)?"
_CALCD = re.compile(rf"(?:calcd\.?|calc\.?|calculated|cal\.|requires|theor\.?|theoretical)\s*(?:for|as)?\s*:?\s*(?:{_FORMULA})?"
                    rf"\s*(?:[\[(]\s*M[^\])]*[\])]\s*[+\-]?)?\s*[,:=]?\s*(?:m/z\s*[:=]?\s*)?(?P<value>\d+\.\d+)", re.I)
_CALCD_AFTER = re.compile(rf"(?:calcd\.?|calc\.?|calculated|requires)\s*:?\s*(?:m/z\s*)?(?P<value>\d+\.\d+)\s*(?:for\s*{_FORMULA})?", re.I)
_FOUND = re.compile(r"(?:found|obsd\.?|observed|measured|exp\.?)\s*[:=,]?\s*(?:m/z\s*[:=]?\s*)?(?P<value>\d+\.\d+)", re.I)
_VALUE_NEAR_ADDUCT = re.compile(r"(?P<value>\d{2,4}(?:\.\d+)?)\s*(?:\(\s*)?(?=[\[(]?\s*M\s*[\]+\-)])")
_ADDUCT_THEN_VALUE = re.compile(r"\s*[:=]?\s*(?P<value>\d{2,4}\.\d+)")


@dataclass(frozen=True)
class MassStatement:
    """One printed molecular-ion statement."""

    found: float                  # the measured m/z as printed
    adduct: str | None = None     # 'M+H', 'M+Na', 'M+', 'M-H' … (see shiftrank.chem.formula.ADDUCTS); None: not printed
    calcd: float | None = None    # the printed calculated m/z
    formula: str | None = None    # the printed formula after 'calcd for', as printed
    neutral: str | None = None    # the neutral molecule's formula (Hill), when the printed formula and value tell it
    fragment: str = ""
    source: str = "text"          # where it was read: 'text', or 'given' for a measured m/z passed as a number
    decimals: int | None = None   # decimals of the found value as printed ('233.0780': 4); None: from the number

    @property
    def high_resolution(self) -> bool:
        return (self.decimals if self.decimals is not None else _decimals(self.found)) >= 3

    def describe(self) -> str:
        ion = ion_label(self.adduct) if self.adduct else "ion type not printed"
        return (f"m/z {self.found} ({ion})" + (f", printed as calculated {self.calcd}" if self.calcd else "")
                + (f" for {self.formula}" if self.formula else "") + (f" (molecule {self.neutral})" if self.neutral else ""))


def _decimals(x: float) -> int:
    s = repr(x)
    return len(s.split(".")[1]) if "." in s else 0


def _adduct_of(m: re.Match) -> str | None:
    bare = m.group("bare") or m.group("inner")
    if bare:
        return "M+" if bare == "+" else "M-"
    what, sign, charge = m.group("what"), m.group("sign"), (m.group("charge") or "+")
    if what is None:
        return "M-" if charge == "-" else "M+"
    key = f"M{sign}{what}"
    return key if key in ADDUCTS else None


def _tolerance(value: float, high_resolution: bool | None = None) -> float:
    if high_resolution is None:
        high_resolution = _decimals(value) >= 3
    if high_resolution:
        return max(value * HIGH_RES_PPM * 1e-6, HIGH_RES_FLOOR)
    return NOMINAL_TOL


def _neutral_from(formula: str, adduct: str | None, calcd: float | None, charged: bool = False) -> str | None:
    """The molecule's formula from a printed one that may be the molecule's or the ion's (tried first
    when the formula was printed with a charge or in brackets)."""
    body = re.sub(r"[\[\]()+\-•\s]", "", formula)
    try:
        counts = parse_formula(body)
    except InputError:
        return None
    adducts = [adduct] if adduct else LIKELY_ADDUCTS
    if calcd is None:
        return hill(counts)   # nothing to tell the two readings apart: as printed, the molecule's
    for as_ion in ((True, False) if charged else (False, True)):
        for a in adducts:
            cand = _remove(counts, ADDUCTS[a][0]) if as_ion else counts
            if cand is not None and abs(ion_mz(cand, a) - calcd) <= max(_tolerance(calcd), 0.003):
                return hill(cand)
    return None


def _remove(counts: Counter, delta: dict) -> Counter | None:
    """counts minus the atoms an adduct adds (plus those it removes); None when impossible."""
    out = Counter(counts)
    for el, n in delta.items():
        out[el] -= n
        if out[el] < 0:
            return None
        if out[el] == 0:
            del out[el]
    return out if out else None


def read_mass_statements(text: str) -> list[MassStatement]:
    """Molecular-ion statements in characterisation text (nothing when there is none)."""
    if not isinstance(text, str):
        return []
    t = fold_full_width(text).replace("−", "-").replace("–", "-").replace("⁺", "+").replace("⁻", "-").replace("·", "•")
    t = t.translate(_SUBSCRIPTS)   # 'C₉H₁₂NO₃', as a formula copied from a word processor carries it
    out: list[MassStatement] = []
    pos = 0
    for start in _START.finditer(t):
        if start.start() < pos:   # inside the statement read last
            continue
        stop = _STOP.search(t, start.end())
        pos = min(stop.start() if stop else len(t), start.start() + 300)
        st = _statement(t[start.start():pos])
        if st is not None:
            out.append(st)
    return out


def _statement(seg: str) -> MassStatement | None:
    label = _ANY_ION.search(seg)
    if label is not None and not _KNOWN_ION.fullmatch(re.sub(r"\s", "", label.group("inner"))):
        return None   # a dimer, a multiply charged ion or a fragment: not the molecule's own ion
    ad = _ADDUCT.search(seg)
    adduct = _adduct_of(ad) if ad else None
    calc = _CALCD.search(seg)
    if calc is None or calc.group("formula") is None:
        after = _CALCD_AFTER.search(seg)
        if after is not None and after.group("formula"):
            calc = after
    found = _FOUND.search(seg)
    printed = found.group("value") if found else None
    if printed is None and ad is not None:
        # 'm/z 233.0786 [M+Na]+' or 'm/z [M+H]+ = 165.0912' without the word 'found'
        near = _VALUE_NEAR_ADDUCT.search(seg)
        after = _ADDUCT_THEN_VALUE.match(seg, ad.end())
        if near and (calc is None or near.start("value") != calc.start("value")):
            printed = near.group("value")
        elif after and (calc is None or after.start("value") != calc.start("value")):
            printed = after.group("value")
    if printed is None:
        return None
    value = float(printed)
    decimals = len(printed.split(".")[1]) if "." in printed else 0
    calcd = float(calc.group("value")) if calc else None
    formula = calc.group("formula") if calc and calc.group("formula") else None
    charged = False
    if formula:
        a, b = calc.start("formula"), calc.end("formula")
        charged = seg[max(a - 1, 0):a] == "[" or bool(re.match(r"\]?\s*[+\-]", seg[b:b + 3]))
    neutral = _neutral_from(formula, adduct, calcd, charged) if formula else None
    return MassStatement(value, adduct, calcd, formula, neutral, " ".join(seg.split())[:120], decimals=decimals)


def ion_fits(counts: Counter | dict, st: MassStatement) -> bool:
    """Whether a neutral molecule of ``counts`` gives the printed ion (the found or the calculated m/z)."""
    adducts = [st.adduct] if st.adduct else ANY_ADDUCTS
    for a in adducts:
        mz = ion_mz(counts, a)
        for v in (st.found, st.calcd):
            if v is not None and abs(mz - v) <= _tolerance(v, st.high_resolution):
                return True
    return False


def nearest_ion(counts: Counter | dict, st: MassStatement) -> tuple[str, float]:
    """The candidate's ion closest to the found value: (adduct, m/z)."""
    adducts = [st.adduct] if st.adduct else LIKELY_ADDUCTS
    return min(((a, ion_mz(counts, a)) for a in adducts), key=lambda x: abs(x[1] - st.found))


#: an elemental analysis: 'Anal. Calcd for C9H11NO3: C, 59.66; …', 'Elemental analysis calcd (%) for C9H11NO3',
#: 'Anal. calc. for C9H11NO3·0.5H2O'
_ANALYSIS = re.compile(r"\b(?:Anal(?:ysis)?|Elemental\s+analysis|Microanalysis)\.?\s*(?:\(%\)\s*)?"
                       r"(?:calcd|calc\.?|calculated|required|requires)\.?\s*(?:\(%\)\s*)?(?:for\s*)?:?\s*"
                       r"(?P<f>(?:[A-Z][a-z]?\d*)+(?:\s*[·•.]\s*\d*(?:\.\d+)?\s*(?:[A-Z][a-z]?\d*)+)*)", re.I)


def read_analysis_formula(text: str) -> str | None:
    """The formula an elemental analysis in characterisation text was calculated for (a solvate or salt as
    printed, 'C9H11NO3·0.5H2O'), or None.

    >>> read_analysis_formula("Anal. Calcd for C₉H₁₁NO₃: C, 59.66; H, 6.12; N, 7.73. Found: C, 59.58")
    'C9H11NO3'
    """
    if not isinstance(text, str):
        return None
    m = _ANALYSIS.search(text.translate(_SUBSCRIPTS).replace("•", "·"))
    if m is None or not re.search(r"C\d*", m.group("f")):
        return None
    return m.group("f").strip(" .")
