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

from .elements import HYDROGEN_ISOTOPES, average_mass, dbe_valence, is_element, monoisotopic_mass
from ..errors import InputError

_TOKEN = re.compile(r"([A-Z][a-z]?)(\d*)")
_ELECTRON = 0.000548579909  # electron mass (u), CODATA 2018
#: subscript digits, as a formula copied from a word processor carries them ('C₉H₁₁NO₃')
_SUBSCRIPTS = str.maketrans("₀₁₂₃₄₅₆₇₈₉", "0123456789")
_SPACED = re.compile(r"^(?:[A-Z][a-z]?\d*\s+)+[A-Z][a-z]?\d*$")


def parse_formula(text: str) -> Counter:
    """Parse a neutral molecular formula such as ``C6H5Br`` into element counts.

    ``D`` and ``T`` (2H, 3H) are counted as symbols of their own.  Refuses charges, brackets and anything
    that is not element symbols followed by counts, with a message naming the problem.

    >>> dict(parse_formula("C2H6O"))
    {'C': 2, 'H': 6, 'O': 1}
    >>> hill(parse_formula("C₉H₁₁NO₃")), hill(parse_formula("C9 H11 N O3"))
    ('C9H11NO3', 'C9H11NO3')
    """
    if not isinstance(text, str):
        raise InputError(f"formula: expected text, got {type(text).__name__}")
    s = text.strip().translate(_SUBSCRIPTS)
    if _SPACED.match(s):
        s = re.sub(r"\s+", "", s)      # 'C9 H11 N O3', as elemental-analysis lines print it
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
        if sym not in HYDROGEN_ISOTOPES and not is_element(sym):
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
        return sym if n == 1 else f"{sym}{n:g}"   # (a solvate as written may count half a water's O: 'O3.5')

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


#: singly charged ions: the atoms the ion adds (negative: removes) to the molecule, and its charge sign
ADDUCTS = {"M+": ({}, 1), "M-": ({}, -1), "M+H": ({"H": 1}, 1), "M+Na": ({"Na": 1}, 1), "M+K": ({"K": 1}, 1),
           "M+Li": ({"Li": 1}, 1), "M+NH4": ({"N": 1, "H": 4}, 1), "M-H": ({"H": -1}, -1)}


def ion_mz(counts: Counter | dict, adduct: str) -> float:
    """m/z of a singly charged ion of the molecule: ``'M+'`` (radical cation), ``'M+H'``, ``'M+Na'``,
    ``'M+K'``, ``'M+Li'``, ``'M+NH4'``, ``'M-H'`` or ``'M-'`` (electron mass included).

    >>> round(ion_mz(parse_formula("C2H6O"), "M+H"), 4)
    47.0491
    >>> round(ion_mz(parse_formula("C7H6O2"), "M-H"), 4)
    121.0295
    """
    if adduct not in ADDUCTS:
        raise InputError(f"adduct '{adduct}': use one of {', '.join(ADDUCTS)}")
    delta, sign = ADDUCTS[adduct]
    m = monoisotopic_weight(counts) + sum(monoisotopic_mass(el) * n for el, n in delta.items())
    return m - sign * _ELECTRON


def ion_label(adduct: str) -> str:
    """An ion as chemists print it: 'M+H' -> '[M+H]+', 'M+' -> '[M]+', 'M-H' -> '[M-H]-'.

    >>> ion_label("M+Na"), ion_label("M-"), ion_label("M-H")
    ('[M+Na]+', '[M]-', '[M-H]-')
    """
    sign = "-" if ADDUCTS[adduct][1] < 0 else "+"
    return f"[{adduct.rstrip('+-')}]{sign}"


#: a trailing charge: '-', '+', '+2', '(2+)', or ' 2+' after a space (without a space the digits are the last count)
_CHARGE = re.compile(r"^\[?(?P<body>[^\]\[]*?)\]?(?P<charge>\s*[+-]\d*|\s*\(\s*\d*[+-]\d*\s*\)|\s+\d+[+-])\s*$")
_PART_SEP = re.compile(r"\s*(?:·|•|\u22c5|\*|\.|\s\+\s|;|,)\s*")


def salt_parts(text: str) -> list[str]:
    """The parts of a salt or solvate formula as written ('C9H11NO3·0.5H2O' -> ['C9H11NO3', '0.5H2O']): a
    decimal point in a part's leading coefficient is no separator.

    >>> salt_parts("C9H11NO3.2HCl"), salt_parts("C9H11NO3 · 1.5 H2O")
    (['C9H11NO3', '2HCl'], ['C9H11NO3', '1.5 H2O'])
    """
    protected = re.sub(r"(?:(?<=[·•*;,+\u22c5])|(?<=\s))(\s*\d+)\.(\d+)", lambda m: m.group(1) + "\0" + m.group(2),
                       text.strip())
    return [p.replace("\0", ".").strip() for p in _PART_SEP.split(protected) if p.strip()]


#: a molecular weight written after a formula: ' (MW 199.6)', ', 199.64 g/mol', ' [FW = 236.1]'
_TRAILING_MASS = re.compile(
    r"(?:[\s,;]+|[\s,;]*[(\[])\s*(?:(?:MW|M\.W\.|FW|F\.W\.|Mr|M\.?\s*wt\.?|mol(?:ecular|\.)?\s*w(?:eigh)?t\.?|MM)\s*[=:]?\s*)?"
    r"(?P<m>\d{2,4}(?:\.\d+)?)\s*(?:g\s*/\s*mol|g\s*mol(?:-1|−1|⁻¹)|Da)?\s*[)\]]?\s*$", re.I)


def split_weight(text: str) -> tuple[str, float | None]:
    """A formula and the molecular weight written after it, if any ('C8H10ClN3O (MW 199.6)' ->
    ('C8H10ClN3O', 199.6)), as formulas are copied from notebooks and catalogues.

    >>> split_weight("C8H10ClN3O, 199.64 g/mol"), split_weight("C6H12")
    (('C8H10ClN3O', 199.64), ('C6H12', None))
    """
    s = text.strip()
    m = _TRAILING_MASS.search(s)
    if m and re.search(r"[A-Z]", s[:m.start()]):
        return s[:m.start()].strip().rstrip(",;").strip(), float(m.group("m"))
    return s, None


def written_whole(text: str) -> Counter | None:
    """Element counts of a salt or solvate as written, coefficients included (what a balance weighs), or None
    for a formula of one part.

    >>> hill(written_whole("C9H11NO3·0.5H2O")), hill(written_whole("C10H14N2 * 2 HCl"))
    ('C9H12NO3.5', 'C10H16Cl2N2')
    """
    parts = salt_parts(split_weight(text)[0])
    if len(parts) < 2:
        return None
    whole: Counter = Counter()
    for x in parts:
        m = re.match(r"^(\d+(?:\.\d+)?)\s*(.*)$", x.strip())
        n, body = (float(m.group(1)), m.group(2)) if m else (1, x.strip())
        for el, k in _one_part(body)[0].items():
            whole[el] += n * k
    return whole


def neutral_parent(counts: Counter | dict, charge: int) -> Counter | None:
    """The neutral molecule a protonated (charge > 0) or deprotonated (< 0) ion would leave: |charge| H fewer
    or more; None when the ion has too few H.  (A permanently charged ion, a quaternary ammonium, has none.)

    >>> hill(neutral_parent(parse_formula("C9H12NO3"), 1))
    'C9H11NO3'
    """
    out = Counter(counts)
    out["H"] -= charge
    if out["H"] < 0 or not any(v > 0 for v in out.values()):
        return None
    return out


def charged_mz(counts: Counter | dict, charge: int) -> float:
    """m/z of an ion of the given elements and charge (monoisotopic, the electrons' mass counted)."""
    return (monoisotopic_weight(counts) - charge * _ELECTRON) / abs(charge)


def sample_formula(text: str) -> tuple[Counter, int, list[str]]:
    """The formula of a sample as chemists write it: element counts of the organic parent, its charge,
    and notes on what was done.

    A trailing charge (``C24H30N7O3-``, ``[C5H6N]+``, ``C8H10NO2(+)``) is removed and returned; a
    salt or solvate written with a separator (``C17H19NO3·HCl``, ``C6H12O6 . H2O``,
    ``C10H14N2 * 2 HCl``) is reduced to its largest carbon-containing part.

    >>> c, q, notes = sample_formula("C17H19NO3·HCl")
    >>> hill(c), q, len(notes)
    ('C17H19NO3', 0, 1)
    >>> hill(sample_formula("C24H30N7O3-")[0]), sample_formula("C24H30N7O3-")[1]
    ('C24H30N7O3', -1)
    """
    if not isinstance(text, str):
        raise InputError(f"formula: expected text, got {type(text).__name__}")
    s = text.strip()
    notes: list[str] = []
    # 'C8H10ClN3O (MW 199.6)', 'C8H10ClN3O, 199.64 g/mol' as copied from a notebook: the weight is checked
    s, printed_mw = split_weight(s)
    parts = salt_parts(s)
    if len(parts) > 1:
        parsed = []
        for p in parts:
            p2 = re.sub(r"^\d+(?:\.\d+)?\s*", "", p.strip())  # '2 HCl', '3H2O', '0.5 H2O'
            try:
                parsed.append((p, *_one_part(p2)))
            except InputError:
                raise InputError(f"formula '{text}': cannot read the part '{p}'") from None
        organic = [x for x in parsed if x[1].get("C", 0) > 0]
        if not organic:
            raise InputError(f"formula '{text}': no part contains carbon")
        main = max(organic, key=lambda x: (x[1].get("C", 0), sum(x[1].values())))
        dropped = [x[0] for x in parsed if x is not main]
        notes.append(f"formula '{text}': compared on its organic part {hill(main[1])}"
                     f"{' (charge ' + format(main[2], '+d') + ')' if main[2] else ''}; set aside: {', '.join(dropped)}")
        if printed_mw is not None:
            notes.append(_weight_note(text, printed_mw, written_whole(s)))
        return main[1], main[2], notes
    counts, charge = _one_part(s)
    if charge:
        notes.append(f"formula '{text}' carries a charge ({charge:+d}): compared on its elements, allowing "
                     f"{abs(charge)} H more or fewer for the neutral form")
    if printed_mw is not None:
        notes.append(_weight_note(text, printed_mw, counts))
    return counts, charge, notes


def _weight_note(text: str, printed: float, counts) -> str:
    """Whether the weight written after a formula agrees with the formula's average weight (a salt's as written)."""
    mw = average_weight(fold_isotopes(counts))
    agree = "agrees with" if abs(mw - printed) <= 0.6 else "differs from"
    return f"formula '{text}': the weight {printed:g} written after it {agree} {hill(counts)} ({mw:.2f})"


def _one_part(s: str) -> tuple[Counter, int]:
    m = _CHARGE.match(s)
    charge = 0
    if m and re.search(r"[A-Z]", m.group("body")):
        q = m.group("charge").strip("() ")
        sign = -1 if "-" in q else 1
        digits = q.replace("+", "").replace("-", "")
        charge = sign * (int(digits) if digits else 1)
        s = m.group("body")
    return parse_formula(s.strip("[] ")), charge


def fold_isotopes(counts: dict) -> dict:
    """Element counts with D and T counted as H."""
    if not any(k in counts for k in HYDROGEN_ISOTOPES):
        return dict(counts)
    out = {k: v for k, v in counts.items() if k not in HYDROGEN_ISOTOPES}
    out["H"] = out.get("H", 0) + sum(counts.get(k, 0) for k in HYDROGEN_ISOTOPES)
    return out


def formula_matches(candidate: dict, sample: Counter | dict, charge: int = 0) -> bool:
    """True when a candidate's element counts equal the sample's, allowing |charge| H of difference
    (protonation state) when the sample formula was given with a charge."""
    a = {k: v for k, v in candidate.items() if v}
    b = {k: v for k, v in dict(sample).items() if v}
    if not any(k in b for k in HYDROGEN_ISOTOPES):
        # a sample formula without D or T counts a labelled compound's 2H/3H as H
        a = fold_isotopes(a)
    if a == b:
        return True
    if not charge:
        return False
    if {k: v for k, v in a.items() if k != "H"} != {k: v for k, v in b.items() if k != "H"}:
        return False
    return abs(a.get("H", 0) - b.get("H", 0)) <= abs(charge)
