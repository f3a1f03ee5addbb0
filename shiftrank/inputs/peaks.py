"""Observed peak lists: reading, validation, duplicates and residual solvent.

Plain text (one peak per line: shift, optional intensity/integral and
multiplicity; ``#`` starts a comment), CSV with a header row, or JSON.

>>> pl = parse_peaks("128.4 CH\\n21.3 CH3\\n", source="inline")
>>> [p.shift for p in pl.peaks]
[21.3, 128.4]
"""
from __future__ import annotations

import csv
import io
import json
import math
import re
from dataclasses import dataclass, field, replace
from pathlib import Path

from ..errors import InputError
from ..words import count
from .files import read_user_text
from .solvents import SOLVENTS, match_solvent, normalise_solvent

RANGES = {"13C": (-20.0, 250.0), "1H": (-2.0, 16.0)}
#: ppm: in a spectrum of two forms (rotamers, an isomer mixture), a line this close to another may be the
#: other form's (13C lines of amide and carbamate rotamers are typically 0.1–1.5 ppm apart, 1H lines
#: 0.02–0.3 ppm; from memory)
DOUBLED_GAP = {"13C": 2.0, "1H": 0.3}
#: Most peaks one list may hold (a spectrum's peak list, not a raw data dump).
MAX_PEAKS = 2000


def check_count(n: int, src: str) -> None:
    if n > MAX_PEAKS:
        raise InputError(f"{src}: {n:,} peaks; the limit is {MAX_PEAKS:,} per list (give the picked peaks, not the raw data)")

#: DEPT-style multiplicities; s/d/t/q is the off-resonance notation (common practice).
_MULT = {
    "c": "C", "c0": "C", "ch0": "C", "s": "C", "cq": "C", "quaternary": "C",
    "ch": "CH", "ch1": "CH", "d": "CH",
    "ch2": "CH2", "t": "CH2",
    "ch3": "CH3", "q": "CH3",
    # a DEPT-135 positive phase: CH or CH3, not told apart
    "ch/ch3": "CH/CH3", "ch3/ch": "CH/CH3", "ch,ch3": "CH/CH3",
}
_SHIFT_COLS = ("shift", "ppm", "delta", "shift_ppm", "δ", "chemical_shift")
_MULT_COLS = ("multiplicity", "mult", "dept", "type", "chn")
_INT_COLS = ("intensity", "integral", "height", "area", "int", "nh")


@dataclass
class Peak:
    """One observed signal."""

    shift: float
    multiplicity: str | None = None   # 13C: C/CH/CH2/CH3; 1H: free text such as 'dd'
    intensity: float | None = None    # 13C intensity or 1H integral
    count: int = 1                    # identical entries merged into this peak
    line: int | None = None
    solvent: str | None = None        # note when the peak sits on a residual solvent signal
    lo: float | None = None           # 1H: printed range (a multiplet 7.10–7.20), else None
    hi: float | None = None
    j: tuple = ()                     # coupling constants (Hz) as printed
    coupling: str | None = None       # 13C: a printed heteronuclear pattern ('q' of a CF3), not a DEPT statement
    note: str = ""                    # printed assignment note (kept, not used)
    doubled: bool = False             # printed beside another line of a spectrum that shows two forms (rotamers)


@dataclass
class PeakList:
    """Peaks of one nucleus, sorted by shift, with the notes made while reading."""

    nucleus: str
    peaks: list[Peak]
    source: str = "input"
    notes: list[str] = field(default_factory=list)
    field_mhz: float | None = None    # observation frequency of this nucleus, when known (printed text)
    trace: tuple | None = None        # (ppm, intensity) of the measured spectrum the peaks were picked from, thinned for display
    printed: bool = False             # read from a printed characterisation paragraph (the ranking has costs of its own for it)
    solvent: str | None = None        # the solvent's key (solvents.SOLVENTS), when known
    dept135: bool = False             # 13C: a DEPT-135 list (signed intensities): no quaternary carbon can show
    two_forms: str | None = None      # the spectrum shows two forms, as said ('mixture of rotamers', 'mixture of isomers')

    @property
    def shifts(self) -> list[float]:
        return [p.shift for p in self.peaks]

    def sample_peaks(self) -> list[Peak]:
        """Peaks not flagged as solvent."""
        return [p for p in self.peaks if p.solvent is None]


def normalise_multiplicity(text: str | None, where: str) -> str | None:
    """Map C/CH/CH2/CH3 (any case) or s/d/t/q to C/CH/CH2/CH3, and CH/CH3 (a DEPT-135 positive phase) to itself;
    empty means unknown."""
    if text is None:
        return None
    t = str(text).strip()
    if not t or t in ("-", "?", "na", "NA"):
        return None
    key = t.lower()
    if key in _MULT:
        return _MULT[key]
    raise InputError(f"{where}: multiplicity '{t}' is not one of C, CH, CH2, CH3, CH/CH3 (or s, d, t, q)")


_MULT_WORDS = {
    "s": "s", "singlet": "s", "d": "d", "doublet": "d", "t": "t", "triplet": "t", "q": "q", "quartet": "q",
    "quint": "p", "quin": "p", "quintet": "p", "p": "p", "pent": "p", "pentet": "p",
    "sext": "sext", "sextet": "sext", "hex": "sext", "sex": "sext", "sept": "sept", "septet": "sept", "hept": "sept",
    "heptet": "sept", "sep": "sept", "hep": "sept", "h": "sext", "hextet": "sext", "qui": "p", "qn": "p", "qnt": "p",
    "oct": "oct", "octet": "oct", "non": "non", "nonet": "non",
    "m": "m", "multiplet": "m", "mc": "m", "brm": "br m",
    "br": "br", "broad": "br", "brs": "br s", "bs": "br s", "brd": "br d", "bd": "br d", "brt": "br t", "bt": "br t",
    "brsinglet": "br s", "abq": "ABq", "ab": "ABq", "ab q": "ABq", "abx": "m", "aa'bb'": "m", "aabb": "m",
    "absystem": "ABq", "abpattern": "ABq", "abquartet": "ABq", "bm": "br m", "broadm": "br m",
    "dm": "m", "tm": "m",  # a doublet or triplet of unresolved multiplets: not first-order
    "overlappingm": "m", "overlappedm": "m", "mov": "m", "ovm": "m", "complexm": "m", "aa'xx'": "m", "aaxx": "m",
}
_RUSSIAN_LETTERS = str.maketrans("сдткм", "sdtqm")
_COMBO = re.compile(r"^(?:[dtq]|quint|quin|p|sext|sept){1,4}$")


def normalise_1h_multiplicity(text: str | None) -> str | None:
    """Printed 1H multiplicity letters in one spelling, or None when ``text`` is not one.

    >>> [normalise_1h_multiplicity(x) for x in ("br.s", "quint", "dd", "app t", "Multiplet", "bs", "CH3")]
    ['br s', 'p', 'dd', 't', 'm', 'br s', None]
    >>> [normalise_1h_multiplicity(x) for x in ("d of d", "ps t", "s (br)", "dd~t")]
    ['dd', 't', 'br s', None]
    >>> [normalise_1h_multiplicity(x) for x in ("dd (AB)", "AB system", "overlapping m", "bm", "dm", "br app t")]
    ['dd', 'ABq', 'm', 'br m', 'm', 'br t']
    >>> [normalise_1h_multiplicity(x) for x in ("broad s", "broad singlet", "br doublet", "broad m")]
    ['br s', 'br s', 'br d', 'br m']
    >>> [normalise_1h_multiplicity(x) for x in ("h", "hextet", "sep", "qui", "qnt")]   # report generators' short forms
    ['sext', 'sext', 'sept', 'p', 'p']
    >>> [normalise_1h_multiplicity(x) for x in ("с", "дд", "т", "к", "м", "уш. с")]   # Russian-language letters
    ['s', 'dd', 't', 'q', 'm', 'br s']
    """
    if text is None:
        return None
    c = re.sub(r"[\s.\-]", "", str(text).lower())
    if c and re.fullmatch(r"(?:уш)?[сдткм]+", c):
        # the letters of Russian-language papers: с (s), д (d), т (t), к (q), м (m), уш. (broad); common practice
        c = ("br" if c.startswith("уш") else "") + c.removeprefix("уш").translate(_RUSSIAN_LETTERS)
    # 'apparent', 'app', 'pseudo' as a prefix, or after 'br' ('br app t'); not inside a word ('overlapping')
    for pre in ("", "broad", "br", "b"):
        hit = next((w for w in ("apparent", "app", "pseudo") if c.startswith(pre + w)), None)
        if hit:
            c = pre + c[len(pre) + len(hit):]
            break
    if c.startswith("ps") and _COMBO.match(c[2:]):   # 'ps t': pseudo-triplet
        c = c[2:]
    if c in _MULT_WORDS:
        return _MULT_WORDS[c]
    if re.fullmatch(r"(?:[dtq]of)+[dtq]", c):          # 'd of d', 'd of t'
        c = c.replace("of", "")
    br = False
    if c.endswith("(br)") or c.endswith("(broad)"):  # 's (br)'
        inner = normalise_1h_multiplicity(c[:c.index("(")])
        return None if inner is None else inner if inner.startswith("br") else "br " + inner
    if c.endswith(")") and "(" in c and c.index("(") > 0:  # 'dd (AB)', 'm (ov)': letters, then a remark
        return normalise_1h_multiplicity(c[:c.index("(")])
    for pre in ("broad", "br", "b"):
        rest = c[len(pre):]
        if c.startswith(pre) and rest and _MULT_WORDS.get(rest, "br").split()[0] != "br" and pre != "b":
            word = _MULT_WORDS[rest]       # 'broad singlet', 'br doublet', 'broad m'
            return word if word == "ABq" else "br " + word
        if c.startswith(pre) and rest and _COMBO.match(rest):
            c, br = rest, True
            break
    if _COMBO.match(c):
        return ("br " if br else "") + c.replace("quint", "p").replace("quin", "p")
    return None


def _number(text, where: str, what: str) -> float:
    try:
        v = float(str(text).strip().replace("−", "-"))
    except ValueError:
        raise InputError(f"{where}: {what} '{text}' is not a number") from None
    if not math.isfinite(v):
        raise InputError(f"{where}: {what} '{text}' is not a finite number")
    return v


def _make_peak(shift, mult, inten, where: str, nucleus: str, lineno: int | None, rng=None, j=None) -> Peak:
    lo = hi = None
    if rng is not None:
        if not isinstance(rng, (list, tuple)) or len(rng) != 2:
            raise InputError(f"{where}: 'range' must be two numbers [low, high]")
        lo, hi = sorted((_number(rng[0], where, "range"), _number(rng[1], where, "range")))
        if shift is None:
            shift = (lo + hi) / 2
    if shift is None:
        raise InputError(f"{where}: no 'shift' (or 'range') given")
    s = _number(shift, where, "shift")
    rlo, rhi = RANGES[nucleus]
    for v in (s, lo, hi):
        if v is not None and not rlo <= v <= rhi:
            hint = ("is this a 13C list? 13C peaks go with --peaks ('peaks' in a batch case)"
                    if nucleus == "1H" and 20 <= v <= RANGES["13C"][1] else "")
            raise OutOfRange(f"{where}: shift {v:g} ppm is outside the {nucleus} range {rlo:g}…{rhi:g} ppm", hint)
    if nucleus == "13C":
        m = normalise_multiplicity(mult, where)
    else:
        m = normalise_1h_multiplicity(mult) if mult not in (None, "") else None
    i = _number(inten, where, "intensity") if inten not in (None, "") else None
    if i is not None and i < 0 and nucleus != "13C":
        raise InputError(f"{where}: integral {i:g} is negative")   # (13C: a DEPT-135 phase, see dept135_from_signs)
    js = ()
    if j is not None:
        if isinstance(j, (int, float)) and not isinstance(j, bool):
            j = [j]
        if not isinstance(j, (list, tuple)):
            raise InputError(f"{where}: 'j' must be a list of coupling constants in Hz")
        js = tuple(_number(x, where, "J") for x in j)
        if any(x < 0 or x > 400 for x in js):
            raise InputError(f"{where}: coupling constants must lie in 0…400 Hz")
    return Peak(s, m, i, 1, lineno, lo=lo, hi=hi, j=js)


def _token_lines(text: str):
    """(line number, line, fields) of each line that is not empty once a '#' comment is cut off; fields
    are separated by spaces, tabs, commas or semicolons."""
    for lineno, raw in enumerate(text.splitlines(), 1):
        line = raw.split("#", 1)[0].strip()
        if line:
            yield lineno, line, [t for t in re.split(r"[\s,;]+", line) if t]


def _plain_1h_tokens(tokens: list[str], counted: list[str]) -> list[str]:
    """The fields of a plain 1H line as the parser expects them, read the way people type them: an
    integral with its unit ('2H', or '2' then 'H') goes to ``counted``; 'J =', 'J=8.4', 'Hz' and brackets
    around fields are dropped, leaving the J values as numbers after the multiplicity."""
    out: list[str] = []
    for t in tokens:
        t = t.strip("()[]")
        m = re.fullmatch(r"(\d+(?:\.\d+)?)H", t)
        if m:
            counted.append(m.group(1))
            continue
        if t == "H" and out and re.fullmatch(r"\d+(?:\.\d+)?", out[-1]):
            counted.append(out.pop())
            continue
        m = re.fullmatch(r"J\d*=?([\d.]*)", t)
        if m:
            if m.group(1):
                out.append(m.group(1))
            continue
        if t in ("=", "Hz", ""):
            continue
        out.append(t)
    return out


def _bare_shifts(tokens: list[str], nucleus: str) -> list[str] | None:
    """The fields of a line that is only a run of three or more shifts (``166.6, 150.1, 137.6``, as copied
    from a printed list without its header), else None; two numbers stay 'shift intensity'."""
    if len(tokens) < 3:
        return None
    lo, hi = RANGES[nucleus]
    try:
        values = [float(t) for t in tokens]
    except ValueError:
        return None
    return tokens if all(lo <= v <= hi and math.isfinite(v) for v in values) else None


def _from_text(text: str, src: str, nucleus: str, notes: list[str] | None = None) -> list[Peak]:
    """Plain lines: ``shift [intensity] [multiplicity]`` (13C); ``shift-or-range [integral] [multiplicity] [J …]`` (1H).
    A 1H list typed ``shift multiplicity integral`` ('2.89 s 3') is read so when no line has an integral before its
    letters, every line has one whole number after them, and a singlet or an unresolved multiplet is among them
    (which has no J to print)."""
    out = []
    pending = []   # 1H lines, read once the whole list is seen
    for lineno, line, toks in _token_lines(text):
        where = f"{src} line {lineno}"
        if not toks:
            raise InputError(f"{where}: no shift value in '{line}'")
        shifts = _bare_shifts(toks, nucleus)
        if shifts:       # '166.6, 150.1, 137.6, …' pasted on one line: one peak per value
            out.extend(_make_peak(v, None, None, f"{where} value {i}", nucleus, lineno) for i, v in enumerate(shifts, 1))
            continue
        shift, rest = toks[0], toks[1:]
        rng = None
        if nucleus == "1H":
            m = re.fullmatch(r"([+-]?\d+(?:\.\d+)?)[-–−]([+-]?\d+(?:\.\d+)?)", shift.replace("–", "-"))
            if m:
                rng, shift = [m.group(1), m.group(2)], None
        nums, words, after = [], [], []
        counted = []   # 1H: an integral typed with its unit ('2H', '2 H'), in any position
        for t in (_plain_1h_tokens(rest, counted) if nucleus == "1H" else rest):
            try:
                float(t)
                (after if words else nums).append(t)
            except ValueError:
                if words and words[-1].lower() in ("br", "br.", "broad") and not after:
                    words[-1] = "br " + t   # 'br s' typed with a space is one multiplicity
                else:
                    words.append(t)
        if nucleus == "1H":
            if len(nums) + len(counted) > 1 or len(words) > 1:
                raise InputError(f"{where}: expected 'shift-or-range [integral] [multiplicity] [J values]', got '{line}'")
            pending.append((shift, words[0] if words else None, (counted + nums)[0] if counted + nums else None, where,
                            lineno, rng, after))
            continue
        if len(nums) + len(after) > 1 or len(words) > 1:
            raise InputError(f"{where}: expected 'shift [intensity] [multiplicity]', got '{line}'")
        num = (nums + after)[0] if nums + after else None
        out.append(_make_peak(shift, words[0] if words else None, num, where, nucleus, lineno))
    if pending:
        swapped = (all(integral is None and len(after) == 1 and float(after[0]).is_integer() and 1 <= float(after[0]) <= 30
                       for _, _, integral, _, _, _, after in pending)
                   and any(m is not None and re.fullmatch(r"(?:br\.? ?)?[sm]|br", m.lower()) for _, m, _, _, _, _, _ in pending))
        if swapped and notes is not None:
            notes.append(f"{src}: read as 'shift multiplicity integral' (a singlet's number cannot be a J value)")
        for shift, mult, integral, where, lineno, rng, after in pending:
            if swapped:   # the one number after the letters is the integral ('2.89 s 3': a singlet has no J)
                integral, after = after[0], []
            out.append(_make_peak(shift, mult, integral, where, nucleus, lineno, rng, after or None))
    return out


def _pick(header: list[str], names: tuple[str, ...]) -> int | None:
    """The column whose header is one of ``names``, or else whose header starts with one of them before a
    unit or remark ('Shift (ppm)', 'δ [ppm]', 'Integral (rel.)', 'Mult.')."""
    heads = [h.strip().lower() for h in header]
    for i, h in enumerate(heads):
        if h in names:
            return i
    for i, h in enumerate(heads):
        word = re.split(r"[\s(\[/.:]", h, maxsplit=1)[0]
        if word in names:
            return i
    return None


def _cell(row: list[str], i: int | None) -> str | None:
    return row[i] if i is not None and i < len(row) else None


_DECIMAL_COMMA = re.compile(r"^\s*([−-]?\d+),(\d+)\s*$")


def _from_csv(text: str, src: str, nucleus: str) -> list[Peak]:
    lines = [ln for ln in text.splitlines() if ln.strip() and not ln.lstrip().startswith("#")]
    first = lines[0]
    # tab, comma or (a European spreadsheet's export) semicolon, whichever the header uses most
    delim = max(("\t", ",", ";"), key=first.count) if any(d in first for d in "\t,;") else ","
    rows = list(csv.reader(io.StringIO("\n".join(lines)), delimiter=delim))
    if delim != ",":
        # a spreadsheet saved in a locale that writes decimal commas ('170,1;1200'): with another separator
        # a comma between digits can only be the decimal mark
        rows = [[_DECIMAL_COMMA.sub(r"\1.\2", c) for c in row] for row in rows]
    header = rows[0]
    si = _pick(header, _SHIFT_COLS)
    if si is None:
        raise InputError(f"{src} line 1: no shift column in header {header} (name one of: {', '.join(_SHIFT_COLS[:3])})")
    mi, ii = _pick(header, _MULT_COLS), _pick(header, _INT_COLS)
    out = []
    for n, row in enumerate(rows[1:], 2):
        where = f"{src} line {n}"
        if len(row) <= si or not row[si].strip():
            raise InputError(f"{where}: missing shift value")
        out.append(_make_peak(row[si], _cell(row, mi), _cell(row, ii), where, nucleus, n))
    return out


def _from_json(text: str, src: str, nucleus: str) -> list[Peak]:
    try:
        data = json.loads(text)
    except json.JSONDecodeError as exc:
        raise InputError(f"{src} line {exc.lineno}: invalid JSON ({exc.msg})") from None
    if isinstance(data, dict):
        data = data.get("peaks", data.get(nucleus))
    if not isinstance(data, list):
        raise InputError(f"{src}: JSON must be a list of peaks or an object with a 'peaks' list")
    return peaks_from_records(data, src, nucleus)


def dept135_from_signs(peaks: list[Peak], notes: list[str], source: str) -> bool:
    """A 13C list with negative intensities is a DEPT-135 spectrum's (common practice): negative lines are CH2,
    positive ones CH or CH3, and quaternary carbons do not appear.  Sets the multiplicities not given and the
    intensities' sizes; True when the list is one."""
    if not any(p.intensity is not None and p.intensity < 0 for p in peaks):
        return False
    for p in peaks:
        if p.intensity is None:
            continue
        if p.multiplicity is None:
            p.multiplicity = "CH2" if p.intensity < 0 else "CH/CH3"
        p.intensity = abs(p.intensity)
    notes.append(f"{source}: negative intensities: read as a DEPT-135 list (negative CH2, positive CH or CH3; "
                 "quaternary carbons do not show in it, so none is missed)")
    return True


def merge_dept135(c13: PeakList, dept: PeakList, tolerance: float = 0.25) -> PeakList:
    r"""The 13C list with multiplicities from a DEPT-135 list of the same sample (common practice): a 13C line
    with a negative DEPT-135 line within ``tolerance`` ppm is CH2, with a positive one CH or CH3, with none a
    quaternary carbon.  Multiplicities already given are kept; DEPT-135 lines with no 13C line are named.

    >>> c = parse_peaks("170.1\n131.5\n66.3\n21.0")
    >>> d = parse_peaks("131.6 100\n66.3 -80\n21.0 60")
    >>> [(p.shift, p.multiplicity) for p in merge_dept135(c, d).peaks]
    [(21.0, 'CH/CH3'), (66.3, 'CH2'), (131.5, 'CH/CH3'), (170.1, 'C')]
    """
    if c13.nucleus != "13C" or dept.nucleus != "13C":
        raise InputError("DEPT-135: both lists must be 13C")
    lines = [p for p in dept.peaks if p.solvent is None]
    if not lines:
        raise InputError(f"{dept.source}: no DEPT-135 line")

    def phase(p: Peak) -> str | None:
        """CH2 down, CH/CH3 up; a line without sign or letters is a protonated carbon of unknown kind."""
        if p.multiplicity in ("CH2", "CH/CH3", "CH", "CH3"):
            return p.multiplicity
        if p.intensity:
            return "CH2" if p.intensity < 0 else "CH/CH3"
        return None

    out, used, n = [], set(), {"CH2": 0, "CH/CH3": 0, "C": 0, "protonated": 0}
    for p in c13.peaks:
        q = replace(p)
        if p.solvent is None and p.multiplicity is None:
            k = min(range(len(lines)), key=lambda i: abs(lines[i].shift - p.shift))
            if abs(lines[k].shift - p.shift) <= tolerance:
                used.add(k)
                q.multiplicity = phase(lines[k])
            else:
                q.multiplicity = "C"
            n["protonated" if q.multiplicity is None else q.multiplicity if q.multiplicity in n else "CH/CH3"] += 1
        out.append(q)
    notes = list(c13.notes) + [f"DEPT-135 from {dept.source}: {n['CH2']} CH2, {n['CH/CH3']} CH or CH3, {n['C']} "
                               f"quaternary (no DEPT-135 line within {tolerance:g} ppm)"
                               + (f", {n['protonated']} protonated of unknown kind (no sign)" if n["protonated"] else "")]
    orphans = [f"{lines[i].shift:g}" for i in range(len(lines)) if i not in used]
    if orphans:
        notes.append(f"DEPT-135 lines without a 13C line within {tolerance:g} ppm: {', '.join(orphans[:8])}")
    return replace(c13, peaks=out, notes=notes)


def looks_like_1h(shifts) -> bool:
    """Whether a list given as 13C is a 1H list: three or more values, all below 12.5 ppm (13C lines of
    organic compounds spread over 0-220 ppm; common practice)."""
    shifts = list(shifts)
    return len(shifts) >= 3 and max(shifts) <= 12.5


def not_13c_message(pl: "PeakList", hint: str = "Give it as the 1H peaks (--peaks-1h; 'peaks_1h' in a batch case "
                                                  "or from Python)") -> str:
    shifts = [p.shift for p in pl.peaks]
    return (f"{pl.source}: all {len(shifts)} 13C values lie between {min(shifts):g} and {max(shifts):g} ppm, the range "
            f"of 1H shifts: is this a 1H list? {hint}")


class OutOfRange(InputError):
    """A shift outside the nucleus's range (a typo, usually); lenient readers set it aside.  ``hint`` says what a
    whole list of such values may be (13C values given as 1H); it is part of the message, not of a set-aside note."""

    def __init__(self, plain: str, hint: str = ""):
        super().__init__(f"{plain}; {hint}" if hint else plain)
        self.plain = plain


#: Lenient readers set aside out-of-range values (typos) only while they are this share of the list at most.
MAX_OUT_OF_RANGE = 0.2


def peaks_from_records(data: list, src: str = "peaks", nucleus: str = "13C", notes: list[str] | None = None) -> list[Peak]:
    """Peaks from a list of numbers or of objects ``{"shift", "multiplicity", "intensity"}`` (1H also
    ``"integral"``, ``"j"`` and ``"range": [low, high]``).

    With a ``notes`` list, a value outside the nucleus's range (a typo such as 1501 for 150.1) is set
    aside with a note instead of failing the whole list, as long as such values are few.
    """
    if not isinstance(data, list):
        raise InputError(f"{src}: expected a list of peaks, got {type(data).__name__}")
    check_count(len(data), src)
    out, dropped = [], []
    for i, item in enumerate(data):
        where = f"'{src}' entry {i + 1}"
        try:
            out.append(_record_peak(item, where, nucleus))
        except OutOfRange as exc:
            if notes is None:
                raise
            dropped.append(exc)
    if dropped:
        if len(dropped) > MAX_OUT_OF_RANGE * len(data) or not out:
            raise InputError(f"{src}: {len(dropped)} of {len(data)} shifts lie outside the {nucleus} range ({dropped[0]})")
        notes.extend(f"{d.plain}: set aside" for d in dropped)
    return out


def _record_peak(item, where: str, nucleus: str) -> Peak:
    if isinstance(item, dict):
        if "shift" not in item and not (nucleus == "1H" and "range" in item):
            raise InputError(f"{where}: object has no 'shift' field")
        inten = item.get("intensity", item.get("integral"))
        return _make_peak(item.get("shift"), item.get("multiplicity"), inten, where, nucleus, None,
                          item.get("range"), item.get("j"))
    if isinstance(item, (int, float)) and not isinstance(item, bool):
        return _make_peak(item, None, None, where, nucleus, None)
    if isinstance(item, (list, tuple)) and item:
        return _make_peak(item[0], item[1] if len(item) > 1 else None, None, where, nucleus, None)
    raise InputError(f"{where}: expected a number or an object with 'shift', got {json.dumps(item, default=str)[:40]}")


def merge_duplicates(peaks: list[Peak], notes: list[str], nucleus: str) -> list[Peak]:
    peaks = sorted(peaks, key=lambda p: p.shift)
    out: list[Peak] = []
    for p in peaks:
        last = out[-1] if out else None
        if last is not None and abs(last.shift - p.shift) < 1e-6 and last.multiplicity == p.multiplicity:
            last.count += 1
            if nucleus == "1H" and p.intensity is not None:
                last.intensity = (last.intensity or 0.0) + p.intensity
            continue
        out.append(p)
    for p in out:
        if p.count > 1:
            notes.append(f"{p.shift:g} ppm listed {p.count} times: read as one line of {p.count} nuclei "
                         "(equivalent, or distinct ones that coincide)")
    return out


def mark_doubled(peaks: list[Peak], nucleus: str) -> int:
    """In a spectrum of two forms, mark every line within ``DOUBLED_GAP`` of another line as possibly the
    other form's (lines already marked stay so); returns how many lines are marked."""
    gap = DOUBLED_GAP[nucleus]
    edges = sorted((pk.lo if pk.lo is not None else pk.shift, pk.hi if pk.hi is not None else pk.shift, k)
                   for k, pk in enumerate(peaks) if pk.solvent is None)
    for a in range(len(edges) - 1):
        (_, hi, k), (lo, _, k2) = edges[a], edges[a + 1]
        if lo - hi <= gap:
            peaks[k].doubled = peaks[k2].doubled = True
    return sum(pk.doubled for pk in peaks)


def doubled_note(said: str, n: int) -> str:
    """The note saying how many lines of a two-form spectrum were marked, and why."""
    return (f"the spectrum shows two forms ('{said}'): {n} line{'s' if n != 1 else ''} printed beside another line "
            "may be the second form's and cost little when no class explains them")


def doubled_pairs(peaks: list, nucleus: str) -> int:
    """How many pairs of lines marked ``doubled`` can be read as one signal each (adjacent lines within
    ``DOUBLED_GAP``; pairing from the low end gives the most pairs)."""
    pts = sorted(p.shift for p in peaks if p.doubled and not p.solvent)
    gap = DOUBLED_GAP[nucleus]
    n, k = 0, 0
    while k + 1 < len(pts):
        if pts[k + 1] - pts[k] <= gap:
            n, k = n + 1, k + 2
        else:
            k += 1
    return n


SOLVENT_RANGE_MAX = 0.05   # ppm: a residual line (a singlet, or the narrow 1:2:3:2:1 quintet of a CHD2 group) is narrower


def flag_solvent(peaks: PeakList, solvent: str | None, keep_integrated: bool = False) -> PeakList:
    """Mark peaks on a residual solvent signal (Fulmer et al. 2010) and note each one.

    13C peaks with a DEPT multiplicity other than C are never solvent (a
    deuterated carbon carries no H); with ``keep_integrated`` (printed 1H text and typed 1H lists, where
    people integrate their compound's signals, not the solvent's) a 1H peak with an integral of at least half
    a proton is never solvent either, and a 1H multiplet printed as a range wider than ``SOLVENT_RANGE_MAX`` ppm
    (``7.35–7.20 (m)``) is not a residual line whatever its centre.
    Flagged peaks stay in the list; the ranking lets them go unmatched at no cost.
    """
    key = normalise_solvent(solvent)
    if key is None:
        return peaks
    peaks.solvent = key
    # (once, not per peak: lists may be long; a line where a common solvent residue shows, a trace of acetone at
    # 0.12 beside 0.96 for one H, is no measure of the list's proton)
    residue = set()
    if peaks.nucleus == "1H":
        from .solvents import impurity_lines

        residue = {k for m in impurity_lines(peaks.peaks, key, "1H") for k in m.index}
    ints = sorted(q.intensity for k, q in enumerate(peaks.peaks) if q.intensity and k not in residue)
    for p in peaks.peaks:
        if p.solvent is not None or peaks.nucleus == "13C" and p.multiplicity not in (None, "C"):
            continue
        # (an integral below half a proton, counted on the list's own scale, is no proton of the compound: a
        # residual line that an instrument's integration took in, '2.50 0.4 m' beside 0.96 for one H)
        others_min = (ints[1] if len(ints) > 1 else 1.0) if ints and p.intensity and p.intensity == ints[0] else \
            (ints[0] if ints else 1.0)
        whole = p.intensity is not None and p.intensity >= 0.5 * min(1.0, others_min)
        if peaks.nucleus == "1H" and (keep_integrated and whole
                                      or p.lo is not None and p.hi - p.lo > SOLVENT_RANGE_MAX):
            continue
        ref = match_solvent(p.shift, key, peaks.nucleus)
        if ref is not None:
            p.solvent = key
            peaks.notes.append(f"{p.shift:g} ppm is at the residual {key} signal ({ref:g} ppm, Fulmer et al. 2010): set aside as possible solvent")
    return peaks


def parse_peaks(text: str, source: str = "input", nucleus: str = "13C", fmt: str | None = None,
                solvent: str | None = None) -> PeakList:
    """Parse peak text in ``fmt`` ('text', 'csv', 'json'; guessed when None)."""
    if nucleus not in RANGES:
        raise InputError(f"nucleus '{nucleus}': use 13C or 1H")
    body = text.strip()
    if not body:
        raise InputError(f"{source}: no peaks (empty input)")
    if fmt is None:
        if body[0] in "[{":
            fmt = "json"
        else:
            content = [ln for ln in body.splitlines() if ln.split("#", 1)[0].strip()]
            if not content:
                raise InputError(f"{source}: no peaks (only comments)")
            first = content[0]
            fmt = "csv" if re.search(r"[A-Za-zδ]{3,}", first) and any(c in first for c in ",\t;") else "text"
    reader = {"json": _from_json, "csv": _from_csv, "text": _from_text}.get(fmt)
    if reader is None:
        raise InputError(f"peak format '{fmt}': use text, csv or json")
    notes: list[str] = []
    raw = _from_text(body, source, nucleus, notes) if reader is _from_text else reader(body, source, nucleus)
    if not raw:
        raise InputError(f"{source}: no peaks found")
    check_count(len(raw), source)
    dept135 = nucleus == "13C" and dept135_from_signs(raw, notes, source)
    pl = PeakList(nucleus, merge_duplicates(raw, notes, nucleus), source, notes, dept135=dept135)
    return flag_solvent(pl, solvent, keep_integrated=True)


def _read_file(path: str | Path) -> tuple[Path, str]:
    """The path and text of a user's file (standard input for '-'), or a clear error naming it."""
    if str(path) == "-":
        from .files import read_stdin_text

        return Path("stdin"), read_stdin_text()
    return Path(path), read_user_text(path, "a peak list")


def read_peaks(path: str | Path, nucleus: str = "13C", solvent: str | None = None, dept135: bool = False) -> PeakList:
    """Read a peak file (.txt, .csv, .tsv, .json; a JCAMP-DX peak table or 1D spectrum, .jdx/.dx, or a Bruker
    processed data set, whose peaks are picked; anything else is read as text), or standard input for '-'.
    ``dept135``: the file is a DEPT-135 spectrum (a trace's lines below the baseline are picked too, as CH2; a
    trace whose title or pulse program says DEPT is read so anyway)."""
    from .spectra import bruker_pdata, is_jcamp, read_bruker, read_jcamp   # (spectra builds on this module)

    if str(path) != "-" and is_jcamp(path):
        return read_jcamp(path, nucleus, solvent, signed=dept135 or None)
    if str(path) != "-" and bruker_pdata(path) is not None:
        return read_bruker(path, nucleus, solvent, signed=dept135 or None)
    p, text, fmt = _peak_file(path)
    return peak_text(text, p.name, nucleus, fmt, solvent)


def _peak_file(path: str | Path) -> tuple[Path, str, str | None]:
    """(path, text, format by suffix: 'json', 'csv' or None) of a peak file, or of standard input for '-' (a list or a
    printed paragraph, pasted or piped), which must not be empty."""
    p, text = _read_file(path)
    if str(path) == "-" and not text.strip():
        raise InputError("stdin: no peaks (standard input is empty, or was read already by another option)")
    return p, text, {".json": "json", ".csv": "csv", ".tsv": "csv"}.get(p.suffix.lower())


def read_peak_lists(path: str | Path, nucleus: str | None = None, solvent: str | None = None) -> list[PeakList]:
    """Every peak list a file holds, for looking at (``shiftrank peaks``).  With ``nucleus``, that one list as
    :func:`read_peaks` reads it.  Without: each 13C and 1H section of a printed paragraph; a plain list as 13C,
    unless all its values lie in the 1H range (:func:`looks_like_1h`: '7.26 d 2' is not a CH at 7.26 ppm), when
    it is read as 1H with a note saying so.
    """
    from .spectra import bruker_pdata, instrument_nucleus, is_jcamp

    if nucleus is not None or (str(path) != "-" and (is_jcamp(path) or bruker_pdata(path) is not None)):
        return [read_peaks(path, nucleus or instrument_nucleus(path), solvent)]
    p, text, fmt = _peak_file(path)
    if fmt is None and _PRINTED.search(text[:2000]):
        from .text import read_nmr_text

        parsed = read_nmr_text(text)
        found = [n for n in ("13C", "1H") if parsed.peaklist(n) is not None]
        return [_printed_peaks(text, p.name, n, solvent, parsed) for n in found or ["13C"]]
    try:
        pl = parse_peaks(text, p.name, "13C", fmt, solvent)
    except InputError as exc13:
        try:
            pl = parse_peaks(text, p.name, "1H", fmt, solvent)
        except InputError:
            raise exc13 from None
        if not looks_like_1h(x.shift for x in pl.peaks):
            raise exc13 from None
    else:
        if not looks_like_1h(x.shift for x in pl.peaks):
            return [pl]
        pl = parse_peaks(text, p.name, "1H", fmt, solvent)
    pl.notes.insert(0, f"{p.name}: every value lies in the 1H range (below 12.5 ppm): read as a 1H list "
                       "(--nucleus 13C reads it as 13C)")
    return [pl]


def peak_text(text: str, source: str = "input", nucleus: str = "13C", fmt: str | None = None,
              solvent: str | None = None) -> PeakList:
    """A peak list given as text, whatever its form: a list (see :func:`parse_peaks`) or, when ``fmt`` is
    not given and the text starts like one, a printed characterisation paragraph (its ``nucleus`` section).

    >>> [p.shift for p in peak_text("13C NMR (101 MHz, CDCl3) δ 170.1, 21.3.").peaks]
    [21.3, 170.1]
    """
    if fmt is None and _PRINTED.search(text[:2000]):
        return _printed_peaks(text, source, nucleus, solvent)
    return parse_peaks(text, source, nucleus, fmt, solvent)


#: the header of a printed characterisation paragraph ('13C NMR (101 MHz, CDCl3) δ …', '1H-NMR', 'δC (100 MHz')
_PRINTED = re.compile(r"(?:\b1\s*H|\b13\s*C|¹H|¹³C)\s*(?:\{\s*1\s*H\s*\}|\{¹H\})?\s*[-‐ ]?\s*NMR|δ\s*[HC]\b\s*[(\[]")


#: a printed HSQC/HMQC section header ('HSQC (DMSO-d6): δC/δH 119.0/7.28, …')
_PRINTED_HSQC = re.compile(r"\b(?:HSQC|HMQC)\b.{0,60}?\d+\.\d+\s*/\s*\d+\.\d+", re.I | re.S)


def _printed_peaks(text: str, name: str, nucleus: str, solvent: str | None, parsed=None) -> PeakList:
    """A peak file that holds a printed paragraph instead of a list: its ``nucleus`` section, read as
    ``--text`` reads it (a note says so), or a clear error when it has none.  ``parsed``: the paragraph already
    read (:func:`shiftrank.inputs.text.read_nmr_text`)."""
    from .text import read_nmr_text   # (text builds on this module)

    parsed = read_nmr_text(text) if parsed is None else parsed
    pl = parsed.peaklist(nucleus, solvent, name)
    if pl is None:
        found = sorted({s.nucleus for s in parsed.sections if s.peaks})
        raise InputError(f"{name}: printed NMR text without a {nucleus} section"
                         + (f" (it has {', '.join(found)})" if found else "") + "; give it as printed text (--text, or text= in Python)")
    pl.notes.insert(0, f"{name}: read as printed characterisation text (its {nucleus} section)")
    return pl


@dataclass
class HsqcList:
    """Cross peaks of a 2D spectrum, as given: (δC, δH) of an HSQC (one bond) or an HMBC (two and three bonds), or
    (δH, δH) of a COSY or a NOESY/ROESY (the larger first); ``nucleus`` names the experiment."""

    pairs: list[tuple[float, float]]
    source: str = "hsqc"
    notes: list[str] = field(default_factory=list)
    nucleus: str = "HSQC"
    #: per cross peak, the phase of a multiplicity-edited HSQC when given: "CH2" or "CH/CH3" (None: not edited)
    kinds: list | None = None

    def records(self) -> list[list]:
        """The cross peaks as ``[δC, δH]`` or ``[δC, δH, phase]`` lists (what :func:`hsqc_list` reads)."""
        kinds = self.kinds or [None] * len(self.pairs)
        return [[c, h, k] if k else [c, h] for (c, h), k in zip(self.pairs, kinds)]


#: multiplicity-edited HSQC phases as people write them, and the CHn each allows
HSQC_KINDS = {"CH2": "CH2", "CH/CH3": "CH/CH3", "CH3/CH": "CH/CH3", "CH,CH3": "CH/CH3", "CH": "CH", "CH3": "CH3",
              "negative": "CH2", "positive": "CH/CH3", "-": "CH2", "+": "CH/CH3"}
HSQC_ALLOWS = {"CH2": {"CH2"}, "CH/CH3": {"CH", "CH3"}, "CH": {"CH"}, "CH3": {"CH3"}}


def _hsqc_kind(value, where: str) -> str | None:
    if value is None:
        return None
    kind = HSQC_KINDS.get(str(value).strip().replace(" ", "")) or HSQC_KINDS.get(str(value).strip().lower())
    if kind is None:
        raise InputError(f"{where}: phase {str(value)[:20]!r} is not one of CH2, CH/CH3, CH, CH3 (or negative/positive)")
    return kind


def hsqc_list(records, source: str = "hsqc", experiment: str = "HSQC") -> HsqcList:
    """Read cross peaks given as ``[δC, δH]`` pairs (or ``[δC, δH, phase]``) or ``{"c": δC, "h": δH,
    "phase": …}`` objects; the phase of a multiplicity-edited HSQC is "CH2" or "CH/CH3" (also
    "negative"/"positive").  ``experiment`` "HMBC" reads the long-range cross peaks of an HMBC, "COSY" and "NOESY"
    the ``[δH, δH]`` cross peaks of those spectra (in either order; diagonal peaks set aside, a pair given on both
    sides of the diagonal read once); none of them has a phase.  A clear error names the entry that cannot be read.

    >>> hsqc_list([[128.4, 7.31], {"c": 21.3, "h": 2.35}]).pairs
    [(128.4, 7.31), (21.3, 2.35)]
    >>> hsqc_list([[40.1, 2.9, "CH2"], [21.3, 2.35, "CH/CH3"]]).kinds
    ['CH2', 'CH/CH3']
    """
    if not isinstance(records, (list, tuple)) or not records:
        raise InputError(f"{source}: expected a non-empty list of [δC, δH] cross peaks")

    protons = experiment in ("COSY", "NOESY")   # two proton dimensions

    def phase(value, where: str) -> str | None:
        if experiment != "HSQC" and value is not None:
            raise InputError(f"{where}: {experiment} cross peaks have no phase; give "
                             + ("[δH, δH]" if protons else "[δC, δH]"))
        return _hsqc_kind(value, where)

    pairs, kinds, diagonal = [], [], 0
    for k, r in enumerate(records, 1):
        kind = None
        if isinstance(r, dict):
            c, h = r.get("c", r.get("13C")), r.get("h", r.get("1H"))
            kind = phase(r.get("phase", r.get("multiplicity")), f"{source} entry {k}")
        elif isinstance(r, (list, tuple)) and len(r) in (2, 3):
            c, h = r[0], r[1]
            if len(r) == 3:
                kind = phase(r[2], f"{source} entry {k}")
        else:
            raise InputError(f"{source} entry {k}: expected [δC, δH] or {{\"c\": δC, \"h\": δH}}, got {str(r)[:40]!r}")
        try:
            if isinstance(c, bool) or isinstance(h, bool):
                raise TypeError
            c, h = float(c), float(h)
        except (TypeError, ValueError):
            raise InputError(f"{source} entry {k}: δC and δH must be numbers, got {str(r)[:40]!r}") from None
        if protons:
            for v in (c, h):
                if not (math.isfinite(v) and -2.0 <= v <= 20.0):
                    raise InputError(f"{source} entry {k}: δH {v:g} ppm is outside -2…20 ppm ({experiment} cross "
                                     "peaks join two protons)")
            if abs(c - h) < DIAGONAL:   # a diagonal peak says nothing about two protons
                diagonal += 1
                continue
            pairs.append((max(c, h), min(c, h)))
            kinds.append(None)
            continue
        if not (math.isfinite(c) and -20.0 <= c <= 250.0):
            raise InputError(f"{source} entry {k}: δC {c:g} ppm is outside -20…250 ppm")
        if not (math.isfinite(h) and -2.0 <= h <= 20.0):
            raise InputError(f"{source} entry {k}: δH {h:g} ppm is outside -2…20 ppm"
                             + (" (give each cross peak as [δC, δH], the carbon first)" if -2.0 <= c <= 20.0 else ""))
        pairs.append((c, h))
        kinds.append(kind)
    if len(pairs) > 2000:
        raise InputError(f"{source}: {len(pairs):,} cross peaks; the limit is 2,000")
    notes = []
    if protons:
        twice = len(pairs) - len(set(pairs))
        if twice:   # a symmetric spectrum shows each cross peak on both sides of the diagonal
            notes.append(f"{source}: {count(twice, 'cross peak')} given on both sides of the diagonal, read once")
            keep = dict.fromkeys(pairs)
            pairs, kinds = list(keep), [None] * len(keep)
        if diagonal:
            notes.append(f"{source}: {count(diagonal, 'diagonal peak')} (both δH within {DIAGONAL} ppm) set aside")
        if not pairs:
            raise InputError(f"{source}: no cross peak off the diagonal")
    return HsqcList(pairs, source, notes, kinds=kinds if any(kinds) else None, nucleus=experiment)


#: COSY / NOESY: a cross peak whose two δH lie closer than this (ppm) is on the diagonal
DIAGONAL = 0.02
#: how far (ppm) a cross peak's δ may lie from a line of the 1D list of its nucleus to be read as that line (the
#: indirect dimension is digitised coarsely); chosen
ON_LINE = {"13C": 0.6, "1H": 0.04}


def nearest_line(delta: float, peaks, tol: float) -> int | None:
    """Index of the 1D line (not a solvent line) that a cross peak's ``delta`` lies on (inside its printed range) or
    nearest to within ``tol`` ppm; None when it lies on none.

    >>> nearest_line(7.41, [Peak(7.26, solvent="CDCl3"), Peak(7.40), Peak(2.35)], 0.04)
    1
    """
    best = None
    for j, p in enumerate(peaks or ()):
        if p.solvent:
            continue
        lo, hi = (p.lo, p.hi) if getattr(p, "lo", None) is not None else (p.shift, p.shift)
        d = 0.0 if lo <= delta <= hi else min(abs(delta - lo), abs(delta - hi))
        if d <= tol and (best is None or d < best[0]):
            best = (d, j)
    return None if best is None else best[1]


def cosy_list(records, source: str = "cosy") -> HsqcList:
    """COSY cross peaks (two coupled protons) as ``[δH, δH]`` pairs; symmetric duplicates are read once, diagonal
    peaks set aside.

    >>> cosy_list([[7.72, 7.15], [7.15, 7.72], [7.4, 7.4]]).pairs
    [(7.72, 7.15)]
    """
    return hsqc_list(records, source, "COSY")


def noesy_list(records, source: str = "noesy") -> HsqcList:
    """NOESY or ROESY cross peaks (two protons close in space) as ``[δH, δH]`` pairs, read as :func:`cosy_list`."""
    return hsqc_list(records, source, "NOESY")


def read_cosy(path: str | Path) -> HsqcList:
    """COSY cross peaks from a file: one 'δH δH' pair per line, or a JSON list."""
    return read_hsqc(path, "COSY")


def read_noesy(path: str | Path) -> HsqcList:
    """NOESY or ROESY cross peaks from a file: one 'δH δH' pair per line, or a JSON list."""
    return read_hsqc(path, "NOESY")


def hmbc_list(records, source: str = "hmbc") -> HsqcList:
    """Read HMBC cross peaks (two- and three-bond H–C correlations) given as ``[δC, δH]`` pairs or
    ``{"c": δC, "h": δH}`` objects.

    >>> hmbc_list([[139.8, 4.05], [124.0, 8.0]]).nucleus
    'HMBC'
    """
    return hsqc_list(records, source, "HMBC")


def read_hmbc(path: str | Path) -> HsqcList:
    """Read HMBC cross peaks from a file, as :func:`read_hsqc` reads HSQC ones (no phase column)."""
    return read_hsqc(path, "HMBC")


def read_hsqc(path: str | Path, experiment: str = "HSQC") -> HsqcList:
    """Read HSQC cross peaks from a file: a JSON list, or text with one "δC δH" pair per line (separated
    by spaces, a comma, a semicolon or a tab), optionally followed by the phase of an edited spectrum
    (CH2 or CH/CH3); '#' starts a comment; a header line without numbers is skipped.  ``experiment`` "HMBC",
    "COSY" or "NOESY" reads those spectra's cross peaks the same way ('δH δH' for the last two).  A Bruker processed
    2D data set (its folder, with ``pdata/N/2rr``) has its cross peaks picked (:func:`.spectra.read_bruker_2d`)."""
    from .spectra import JCAMP_HEADER, bruker_pdata, read_bruker_2d   # (spectra builds on this module)

    if str(path) != "-" and (pdir := bruker_pdata(path)) is not None and (pdir / "2rr").is_file():
        return read_bruker_2d(path, experiment)   # a Bruker 2D data set: its cross peaks are picked
    p, text = _read_file(path)
    if JCAMP_HEADER.search(text[:4000]):
        dims = "δH δH" if experiment in ("COSY", "NOESY") else "δC δH"
        raise InputError(f"{p.name}: a JCAMP-DX file; 2D spectra are not read: give the {experiment} cross peaks as "
                         f"'{dims}' pairs, one per line" + (", or the printed HSQC paragraph" if experiment == "HSQC" else ""))
    if p.suffix.lower() == ".json":
        try:
            return hsqc_list(json.loads(text), p.name, experiment)
        except json.JSONDecodeError as exc:
            raise InputError(f"{p.name} line {exc.lineno}: invalid JSON ({exc.msg})") from None
    if experiment == "HSQC" and _PRINTED_HSQC.search(text[:2000]):
        # a printed paragraph ('HSQC (DMSO-d6): δC/δH 119.0/7.28, …'): its HSQC section, read as --text reads it
        from .text import read_nmr_text   # (text builds on this module)

        found = read_nmr_text(text).hsqc(p.name)
        if found is None:
            raise InputError(f"{p.name}: printed text without HSQC cross peaks; give 'δC δH' pairs, one per line")
        found.notes.insert(0, f"{p.name}: read as printed characterisation text (its HSQC section)")
        return found
    pairs = []
    for n, line, fields in _token_lines(text):
        if len(fields) == 1 and re.fullmatch(r"-?\d+(?:\.\d+)?/-?\d+(?:\.\d+)?", fields[0]):
            fields = fields[0].split("/")        # '119.0/7.28', as δC/δH pairs are printed
        try:
            nums = [float(f) for f in fields[:2]]
        except ValueError:
            if not pairs and not any(re.fullmatch(r"-?\d+(\.\d+)?", f) for f in fields):
                continue   # a header line
            raise InputError(f"{p.name} line {n}: expected two numbers "
                             f"({'δH δH' if experiment in ('COSY', 'NOESY') else 'δC δH'}), got {line[:40]!r}") from None
        if len(nums) != 2 or len(fields) > (3 if experiment == "HSQC" else 2):
            dims = "δH δH" if experiment in ("COSY", "NOESY") else "δC δH"
            raise InputError(f"{p.name} line {n}: expected {dims}" + (" and optionally the edited phase (CH2, CH/CH3)"
                                                                       if experiment == "HSQC" else "") + f", got {line[:40]!r}")
        pairs.append(nums + fields[2:])
    if not pairs:
        raise InputError(f"{p.name}: no cross peaks found")
    if experiment in ("HSQC", "HMBC") and all(a < b and a <= 20.0 for a, b, *_ in pairs) and any(b > 20.0 for _, b, *_ in pairs):
        # every pair has the smaller value first and some second value is no proton shift: the columns are δH δC
        out = hsqc_list([[b, a, *rest] for a, b, *rest in pairs], p.name, experiment)
        out.notes.append(f"{p.name}: read as δH δC (in every line the second value is the larger, and some lie "
                         "beyond 20 ppm)")
        return out
    return hsqc_list(pairs, p.name, experiment)


__all__ = ["Peak", "PeakList", "HsqcList", "parse_peaks", "read_peaks", "read_hsqc", "hsqc_list", "read_hmbc", "hmbc_list",
           "read_cosy", "cosy_list", "read_noesy", "noesy_list", "nearest_line",
           "peaks_from_records",
           "flag_solvent", "SOLVENTS"]
