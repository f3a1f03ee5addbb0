"""Molecular formulas: strict parsing, Hill order, masses and DBE.

>>> f = parse_formula("C9H9N3O2")
>>> hill(f)
'C9H9N3O2'
>>> dbe(f)
7.0
"""
from __future__ import annotations

import re
from collections import Counter

from .elements import average_mass, dbe_valence, is_element, monoisotopic_mass
from ..errors import InputError

_TOKEN = re.compile(r"([A-Z][a-z]?)(\d*)")
_ELECTRON = 0.000548579909  # electron mass (u), CODATA 2018


def parse_formula(text: str) -> Counter:
    """Parse a neutral molecular formula such as ``C6H5Br`` into element counts.

    Refuses isotope labels (``D``, ``T``), charges, brackets and anything that
    is not element symbols followed by counts, with a message naming the problem.

    >>> dict(parse_formula("C2H6O"))
    {'C': 2, 'H': 6, 'O': 1}
    """
    if not isinstance(text, str):
        raise InputError(f"formula: expected text, got {type(text).__name__}")
    s = text.strip()
    if not s:
        raise InputError("formula: empty formula")
    if any(ch in s for ch in "+-^"):
        raise InputError(f"formula '{text}': charges are not supported; give the neutral formula")
    if any(ch in s for ch in "()[]{}.·*"):
        raise InputError(f"formula '{text}': brackets, dots and hydrates are not supported; write each element once, e.g. C6H5Br")
    counts: Counter = Counter()
    pos = 0
    for m in _TOKEN.finditer(s):
        if m.start() != pos:
            break
        sym, num = m.group(1), m.group(2)
        if sym in ("D", "T"):
            raise InputError(f"formula '{text}': isotope label '{sym}' is not supported; count it as H")
        if not is_element(sym):
            raise InputError(f"formula '{text}': '{sym}' is not an element symbol")
        n = int(num) if num else 1
        if n == 0:
            raise InputError(f"formula '{text}': element '{sym}' has count 0")
        counts[sym] += n
        pos = m.end()
    if pos != len(s):
        raise InputError(f"formula '{text}': cannot read '{s[pos:]}' (expected element symbols with counts, e.g. C9H9N3O2)")
    return counts


def hill(counts: Counter | dict) -> str:
    """Hill-order string: C, then H, then the rest alphabetically (all alphabetical without C).

    >>> hill({"O": 1, "H": 6, "C": 2})
    'C2H6O'
    """
    def part(sym: str) -> str:
        n = counts[sym]
        return sym if n == 1 else f"{sym}{n}"

    syms = [s for s, n in counts.items() if n > 0]
    if "C" in syms:
        order = ["C"] + (["H"] if "H" in syms else []) + sorted(s for s in syms if s not in ("C", "H"))
    else:
        order = sorted(syms)
    return "".join(part(s) for s in order)


def average_weight(counts: Counter | dict) -> float:
    """Average molecular weight (g/mol) from standard atomic weights."""
    return sum(average_mass(s) * n for s, n in counts.items())


def monoisotopic_weight(counts: Counter | dict) -> float:
    """Monoisotopic mass (u) of the neutral molecule."""
    return sum(monoisotopic_mass(s) * n for s, n in counts.items())


def dbe(counts: Counter | dict) -> float:
    """Degree of unsaturation, DBE = 1 + ½ Σ nᵢ(vᵢ − 2), with valences from
    :func:`shiftrank.chem.elements.dbe_valence` (S counted as 2, P as 3).

    A half-integer result means the formula is not that of a neutral closed-shell
    molecule under those valences (a radical, an ion, or a typo); see :func:`dbe_note`.

    >>> dbe(parse_formula("C6H6"))
    4.0
    """
    return 1.0 + 0.5 * sum(n * (dbe_valence(s) - 2) for s, n in counts.items())


def dbe_note(value: float) -> str | None:
    """A warning for impossible DBE values, or None when the value is a plain whole number ≥ 0."""
    if value != int(value):
        return f"DBE {value:g} is half-integer: not a neutral closed-shell formula (check for a charge, a radical or a typo)"
    if value < 0:
        return f"DBE {value:g} is negative: the formula has more H/halogen than the skeleton can carry"
    return None


def ion_mz(counts: Counter | dict, adduct: str) -> float:
    """m/z of a singly charged ion: ``'M+'`` (radical cation), ``'M+H'`` or ``'M+Na'``.

    >>> round(ion_mz(parse_formula("C2H6O"), "M+H"), 4)
    47.0491
    """
    m = monoisotopic_weight(counts)
    if adduct == "M+":
        return m - _ELECTRON
    if adduct == "M+H":
        return m + monoisotopic_mass("H") - _ELECTRON
    if adduct == "M+Na":
        return m + monoisotopic_mass("Na") - _ELECTRON
    raise InputError(f"adduct '{adduct}': use M+, M+H or M+Na")
