"""Characterisation text as chemists print it: ``1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), …``.

:func:`read_nmr_text` splits a paragraph (or several) into nucleus sections, reads each section's
conditions (spectrometer frequency, solvent) and its peaks: a shift or a shift range, the integral
(``2H``), the multiplicity letters (``s``, ``dd``, ``br s``, ``m`` …), the coupling constants, a
carbon count (``2C``) and the assignment note, which is kept but not used.  Real papers vary; the
reader accepts ``(2H, d, J = 8 Hz)`` as well as ``(d, J = 8 Hz, 2H)``, ``δ =``, ``ppm``, unicode
minus signs and dashes, ``br.s``, ``J1 = …, J2 = …``, several J values, text mangled by a wrong
encoding (``Î´`` for δ), a missing frequency or solvent, and a 13C line with its C–F coupling
(``124.4 (q, J = 272 Hz)`` is ONE carbon).  A fragment that cannot be read is named in a note;
nothing is dropped silently.

>>> t = read_nmr_text("1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), 7.20–7.10 (m, 3H), 3.80 (s, 3H); "
...                   "13C NMR (101 MHz, CDCl3) δ 170.1, 128.4 (q, J = 32.5 Hz), 21.3.")
>>> [(s.nucleus, s.solvent, len(s.peaks)) for s in t.sections]
[('1H', 'CDCl3', 3), ('13C', 'CDCl3', 3)]
>>> p = t.sections[0].peaks[1]
>>> p.lo, p.hi, p.integral, p.multiplicity
(7.1, 7.2, 3.0, 'm')
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field

from ..errors import InputError
from .files import fold_full_width
from ..words import count
from .peaks import (HSQC_KINDS, RANGES, HsqcList, Peak, PeakList, check_count, doubled_note, flag_solvent, hsqc_list,
                    mark_doubled, merge_duplicates, normalise_1h_multiplicity)
from .solvents import normalise_solvent

#: Ratio of the 1H to the 13C Larmor frequency (gyromagnetic ratios; 400 MHz 1H ≈ 100.6 MHz 13C).
H_TO_C = 3.9772
#: A 13C section whose stated frequency exceeds this is quoting the spectrometer's 1H frequency.
MAX_13C_MHZ = 250.0
MAX_TEXT = 200_000  # characters; longer text is refused (a whole article, not a characterisation)

_DASHES = "\u2010\u2011\u2012\u2013\u2014\u2015\u2212\u2043\ufe63\uff0d"
_MOJIBAKE = ("Î´", "â€", "Â", "Ã")

#: 2D correlations other than HSQC/HMQC: sections of their own; the δ/δ pairs of an HMBC, COSY, NOESY or ROESY are
#: read (``_PAIRED_2D``), the rest (and correlations printed only as labels) noted and not used
OTHER_2D = ("HMBC", "COSY", "NOESY", "ROESY", "TOCSY", "HETCOR")
# a nucleus header: 1H NMR, ¹H-NMR, 13C{1H} NMR, 13C-APT NMR, 19F NMR, "H NMR" …
_HEADER = re.compile(
    r"(?<![A-Za-z0-9])(?P<mass>1|13|19|31|15|11|2|29|77)?\s?(?P<el>H|C|F|P|N|B|D|Si|Se)"
    r"(?:\s*\{\s*1?\s*H\s*\})?(?:[\s-]*(?:APT|DEPT(?:-?135)?|UDEFT|PENDANT|JMOD))?[\s-]*NMR\b"
    r"|(?<![A-Za-z])(?P<el2>H|C)(?:\s*\{\s*1?\s*H\s*\})?[\s-]*NMR\b"
    r"|(?<![A-Za-z0-9])(?P<mass3>1|13)(?P<el3>H|C)(?=\s*[(:])"
    r"|(?<![A-Za-z0-9])(?P<bare>NMR)\b"
    # the 'δH (400 MHz; CDCl3) 7.26 …' / 'δC (101 MHz, CDCl3) …' style: δ with the nucleus, then conditions
    # in brackets that give the field (a bare 'δH 7.13' inside a section is no header)
    r"|δ\s?(?P<el4>H|C)(?=\s*\([^()]*MHz[^()]*\))"
    # one-bond 1H–13C correlations printed as δC/δH pairs: 'HSQC (CDCl3): 128.4/7.26, …', '1H–13C HSQC', 'HMQC'
    r"|(?<![A-Za-z0-9])(?P<hsqc>(?:(?:1H\s*[-,/]?\s*13C|13C\s*[-,/]?\s*1H)[\s-]*)?(?:(?:multiplicity[\s-]*)?edited[\s-]*)?"
    r"(?:HSQC|HMQC))(?![A-Za-z])"
    # other 2D correlations: read as sections of their own so that their pairs never join a 1H or 13C list
    r"|(?<![A-Za-z0-9])(?P<other2d>" + "|".join(OTHER_2D) + r")(?![A-Za-z])", re.I)
#: a correlation printed in a 2D section: '7.26/128.4', 'H-2/C-4', 'H-2 (7.26)/C-4 (128.4)'
_CORRELATION = re.compile(r"\d\s*/\s*[+-]?\d|\bH-?[\w′']+(?:\s*\([^()]*\))?\s*/\s*[CH]-?[\w′']+")
#: a cross peak of an HSQC section: 'δ/δ', the second value possibly a range ('41.2/2.95-3.10'), then an optional
#: phase or CHn in brackets
_HSQC_PAIR = re.compile(r"(?<![\d.])(?P<a>[+-]?\d{1,3}(?:\.\d+)?)\s*/\s*(?P<b>[+-]?\d{1,3}(?:\.\d+)?)"
                        r"(?:\s*-\s*(?P<b2>\d{1,3}\.\d+))?(?!\d|\.\d)(?:\s*\(\s*(?P<kind>[^()]{1,12}?)\s*\))?")
_V = r"[+-]?\d{1,3}\.\d+"
#: other ways of printing a cross peak, rewritten as 'a/b' before the pairs are read: '128.4 (7.26)' or
#: '41.2 (2.95, 3.10)' (δC with its protons in brackets), '(7.26, 128.4)' (a bracketed pair after '(δH, δC)'),
#: 'δC 128.4 ↔ δH 7.26' (an arrow between the two)
_HSQC_BRACKETED_H = re.compile(rf"(?<![\d./])(?P<c>{_V})\s*\(\s*(?P<h>{_V}(?:\s*[,;]\s*{_V})?)\s*\)")
_HSQC_TUPLE = re.compile(rf"\(\s*(?P<a>{_V})\s*[,;]\s*(?P<b>{_V})\s*\)")
_HSQC_ARROW = re.compile(rf"(?P<a>{_V})\s*(?:↔|⟷|<->|<=>|→|⇔)\s*(?:δ\s*[HC]?\s*[=:]?\s*)?(?P<b>{_V})")


#: one proton to several carbons in an HMBC section: 'δH 4.07 → δC 139.9, 132.7' or '4.07 → 139.9 and 132.7'
_ONE_TO_MANY = re.compile(rf"(?P<a>{_V})\s*(?:→|->|⟶|⇒)\s*(?:δ\s*C?\s*[=:]?\s*)?(?P<bs>{_V}(?:\s*(?:,|and)\s*{_V})+)")


def _hmbc_arrows(text: str) -> str:
    """An HMBC section's one-to-many correlations written as 'a/b' pairs, one per carbon."""
    return _ONE_TO_MANY.sub(lambda m: ", ".join(f"{m.group('a')}/{b}" for b in re.split(r"\s*(?:,|and)\s*",
                                                                                        m.group("bs").strip())), text)


def _hsqc_slashes(text: str) -> str:
    """``text`` with its bracketed, tupled and arrowed cross peaks written as 'a/b' pairs."""
    def bracketed(m: re.Match) -> str:
        return ", ".join(f"{m.group('c')}/{h}" for h in re.split(r"\s*[,;]\s*", m.group("h").strip()))
    text = _HSQC_BRACKETED_H.sub(bracketed, text)
    text = _HSQC_TUPLE.sub(lambda m: f"{m.group('a')}/{m.group('b')}", text)
    return _HSQC_ARROW.sub(lambda m: f"{m.group('a')}/{m.group('b')}", text)


#: superscript and subscript digits as printed in '¹³C NMR' and 'CDCl₃'
_SUPER = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹₀₁₂₃₄₅₆₇₈₉", "01234567890123456789")
_NUM = r"[+-]?\d+(?:\.\d+)?"
_SHIFT_ITEM = re.compile(
    rf"^\s*(?:and\s+|&\s*)?(?P<a>{_NUM})\s*(?:(?:-|to|–|~|\.\.)\s*(?P<b>{_NUM}))?\s*(?:ppm)?\s*(?P<rest>.*)$", re.S | re.I)
_INTEGRAL = re.compile(r"^(?P<n>\d+(?:\.\d+)?)\s*H(?:s)?$|^(?P<n2>\d+(?:\.\d+)?)\s*x\s*H$", re.I)
#: a proton count that leads a part without its comma or with a word around it ('1H Ar-H', '1H d', 'each 1H',
#: '2 x 1H', 'IH'); not '1H-pyrazole' or '2H,' (the plain count is `_INTEGRAL`)
_INTEGRAL_LEAD = re.compile(r"^(?:each\s+)?(?:(?P<times>[1-9])\s*[x×]\s*)?(?P<n>[1-9]\d?|I)\s*H(?=\s|$)"
                            r"(?:\s+(?P<rest>(?![A-Za-z]*NMR)\S.*))?$")
_LETTERS_THEN_INTEGRAL = re.compile(r"^(?P<letters>[A-Za-z][A-Za-z. ]{0,12}?)\s+(?P<n>[1-9]\d?)\s*H$")
#: a carbon count: "2C", "2 × CH", "2CH3", "CH2 × 2", "x 2", "2 x"; the H label (group h or c2) says CH/CH2/CH3
_CARBONS = re.compile(r"^(?:(?P<n>\d+)\s*(?:[x×]\s*)?(?:CF|C|carbons?|Cs)(?:[\s-]?(?P<h>H[0-9]?|q|ar|arom|Ar))?\b"
                      r"|(?P<c2>C|CH[0-9]?)\s*[x×]\s*(?P<n2>\d+)\b|[x×]\s*(?P<n3>\d)$|(?P<n4>\d)\s*[x×]$)", re.I)
_NUMBER_WORDS = {"two": 2, "three": 3, "four": 4, "five": 5, "six": 6}
#: carbons counted in words or with a word between: 'two overlapping signals', 'two C', '3 overlapped carbons'
_WORD_CARBONS = re.compile(r"^(?P<n>two|three|four|five|six|[2-9])\s+(?:(?:overlapping|overlapped|coincident|equivalent|"
                           r"coinciding)\s+)?(?:signals?|carbons?|C|peaks?|lines?|resonances?)$", re.I)
#: a J value: not the '1' of '1H' or '1Н' ('J = 7.9 and 4.8 Hz' is a list), nor, after a list printed without
#: its 'Hz', an atom label or a count ('J = 4.0, 5′′-H', 'J = 15.6, 3-H', '3(9)-CH3', '2 × CH', '1,4-disubstituted')
_JNUM = (r"[+-]?(?:\d+\.\d+|\d+(?!(?:,\d+)+-))(?![\d.])(?!\s*(?!Hz|and\b)[^\W\d_])"
         r"(?![′″'’‘`]|-\s*[^\W\d_]|\(|\s*×)")
_JVAL = re.compile(rf"(?<![A-Za-z0-9])(?:[1-5]\s?)?J(?:[-_]?[A-Za-z0-9,\-′″‴'’]{{0,10}}|\s*[-_]?\s*[A-Za-z][A-Za-z0-9,\-′″‴'’]{{0,9}})?(?:\s*\(\s*[A-Za-z0-9′″‴'’]{{1,4}}\s*,\s*[A-Za-z0-9′″‴'’]{{1,4}}\s*\))?\s*(?:[=:]|\s|-(?=\s*\d))\s*(?P<vals>{_JNUM}(?:\s*(?:,|and|&|/|;)\s*{_JNUM})*)\s*(?:Hz)?", re.I)
_DEPT = {"ch3": "CH3", "ch2": "CH2", "ch": "CH", "c": "C", "cq": "C", "qc": "C", "quaternary": "C", "q c": "C", "c q": "C"}


@dataclass
class PrintedPeak:
    """One printed signal."""

    shift: float                    # the printed value, or the middle of a printed range
    lo: float | None = None         # range, when printed as 7.20–7.10
    hi: float | None = None
    integral: float | None = None   # 1H: number of H (2H)
    multiplicity: str | None = None  # printed letters, normalised: s, d, dd, td, br s, m, ABq …
    j: tuple = ()                   # coupling constants (Hz) as printed
    count: int = 1                  # 13C: carbons at this value ("2C")
    shift_h: float | None = None    # HSQC: the proton shift of the cross peak (``shift`` is δC)
    sign: str | None = None         # 13C: a printed phase '+' or '-' (DEPT-135: CH/CH3 up, CH2 down)
    dept: str | None = None         # 13C: C/CH/CH2/CH3 when printed (DEPT)
    note: str = ""                  # assignment text, kept, not used
    fragment: str = ""              # the printed text of this peak
    twin: bool = False              # one of two values sharing one description ('4.50/4.43 (s, 1H)', '8.36 and 8.19 (s, 1H)')


@dataclass
class TextSection:
    """One nucleus paragraph: conditions and peaks."""

    nucleus: str                    # '1H', '13C', or another nucleus such as '19F' (read, not used)
    header: str
    field_mhz: float | None = None  # as printed
    solvent: str | None = None      # canonical key (see shiftrank.inputs.solvents) or None
    solvent_text: str | None = None
    peaks: list[PrintedPeak] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    bracket_twins: int = 0            # values printed in brackets beside values ('144.63 (142.48)')
    doubled: str | None = None      # the printed words saying the spectrum shows two forms ('mixture of rotamers')

    @property
    def carbon_mhz(self) -> float | None:
        """13C observation frequency: a printed value above ~250 MHz is the 1H frequency (÷ 3.977)."""
        if self.field_mhz is None:
            return None
        return self.field_mhz / H_TO_C if self.field_mhz > MAX_13C_MHZ else self.field_mhz


@dataclass
class NmrText:
    sections: list[TextSection]
    notes: list[str] = field(default_factory=list)

    def section(self, nucleus: str) -> TextSection | None:
        """The first section of ``nucleus`` that has peaks (or the first at all)."""
        found = [s for s in self.sections if s.nucleus == nucleus]
        with_peaks = [s for s in found if s.peaks]
        return (with_peaks or found or [None])[0]

    @property
    def solvent(self) -> str | None:
        for s in self.sections:
            if s.solvent:
                return s.solvent
        return None

    def hsqc(self, source: str = "HSQC text", experiment: str = "HSQC") -> HsqcList | None:
        """The cross peaks of the first HSQC/HMQC section (``experiment`` "HMBC", "COSY" or "NOESY": of the first such
        section with δ/δ pairs; a ROESY section counts as NOESY) as an :class:`~shiftrank.inputs.peaks.HsqcList`
        (None when the text prints none)."""
        sec = self.section(experiment)
        if (sec is None or not sec.peaks) and experiment == "NOESY":
            sec = self.section("ROESY")
        if sec is None or not sec.peaks:
            return None
        records = [[p.shift, p.shift_h] + ([p.dept] if p.dept and experiment == "HSQC" else []) for p in sec.peaks]
        out = hsqc_list(records, source, experiment)
        out.notes.extend(sec.notes)
        return out

    def hmbc(self, source: str = "HMBC text") -> HsqcList | None:
        """The δC/δH cross peaks of the first HMBC section (None when the text prints none as numbers)."""
        return self.hsqc(source, "HMBC")

    def peaklist(self, nucleus: str, solvent: str | None = None, source: str = "text") -> PeakList | None:
        """The section's peaks as a :class:`~shiftrank.inputs.peaks.PeakList` (None when absent)."""
        sec = self.section(nucleus)
        if sec is None or not sec.peaks:
            return None
        return section_peaklist(sec, solvent, source)


#: an assignment note that names a solvent, water or grease and nothing else: the line is not the compound's
#: ('overlapped with CHCl3' and 'exchangeable with D2O' are the compound's own lines and do not match; TMS is
#: also a group, Si(CH3)3, and is left out)
_MARKED_SOLVENT = re.compile(
    r"^\s*(?:residual\s+)?(?:H2O|HDO|HOD|water|CHCl3|CDCl3|DMSO(?:-d6)?|CH2Cl2|CD2Cl2|DCM|EtOAc|AcOEt|ethyl acetate|acetone"
    r"|CH3OH|MeOH|methanol|CD3OD|hexanes?|n-hexane|grease|Et2O|diethyl ether|toluene|THF|pentane|CH3CN|MeCN|acetonitrile"
    r"|C6H6|benzene|solvent|impurity|residual solvent)(?:\s*(?:solvent|signal|peak|impurity|residual|\+\s*H2O))?\s*$",
    re.I)


#: off-resonance notation of a 13C list: the letters count the attached H (common practice)
_OFF_RESONANCE = {"s": "C", "d": "CH", "t": "CH2", "q": "CH3"}


def off_resonance_letters(sec: TextSection) -> bool:
    """Whether a 13C section's s/d/t/q letters count attached H rather than describe C–F/C–P splitting:
    no J value printed anywhere in it, at least three lettered lines making up 80 % of its lines, every
    letter one of s/d/t/q, and at least two different letters (a list of singlets says nothing) and no
    DEPT label already printed."""
    if sec.nucleus != "13C" or any(p.j or p.dept for p in sec.peaks):
        return False
    letters = [p.multiplicity for p in sec.peaks if p.multiplicity]
    return (len(letters) >= 3 and len(letters) >= 0.8 * len(sec.peaks)
            and set(letters) <= set(_OFF_RESONANCE) and len(set(letters)) >= 2)


def section_peaklist(sec: TextSection, solvent: str | None = None, source: str = "text") -> PeakList:
    check_count(len(sec.peaks), f"{source} ({sec.nucleus})")
    lo, hi = RANGES[sec.nucleus]
    notes = [f"{sec.nucleus} text: {n}" for n in sec.notes]
    off_resonance = off_resonance_letters(sec)
    if off_resonance:
        notes.append("13C text: s/d/t/q printed without any J value: read as C/CH/CH2/CH3 (off-resonance "
                     "notation), not as C–F splitting")
    peaks = []
    for p in sec.peaks:
        if not lo <= p.shift <= hi:
            notes.append(f"{sec.nucleus} text: '{p.fragment}' lies outside {lo:g}…{hi:g} ppm: set aside")
            continue
        if off_resonance:
            pk = Peak(p.shift, _OFF_RESONANCE.get(p.multiplicity or ""), None, max(p.count, 1), None, None)
        elif sec.nucleus == "13C":
            pk = Peak(p.shift, p.dept, None, max(p.count, 1), None, None, coupling=_coupling(p), j=p.j)
            if p.lo is not None and p.hi is not None and p.hi - p.lo > 1.0:
                # '114.2–134.8 (Caromatic)': a region of several carbons, which a 13C list cannot rank on
                notes.append(f"13C text: '{p.fragment}' is a region ({p.lo:g}–{p.hi:g} ppm), read as one line at its "
                             f"centre; its carbons are not listed one by one, so the ranking uses little of it")
        else:
            pk = Peak(p.shift, p.multiplicity, p.integral, 1, None, None, lo=p.lo, hi=p.hi, j=p.j)
        pk.note = p.note
        pk.doubled = bool(sec.doubled and p.twin)
        if _MARKED_SOLVENT.match(p.note or ""):
            # '1.56 (br s, 2H, H2O)', '5.30 (s, CH2Cl2)', '77.16 (CDCl3)': the authors say the line is not their
            # compound's (their integral counts the solvent's protons)
            pk.solvent = p.note
            notes.append(f"{sec.nucleus} text: '{p.fragment}' is marked as {p.note} in the text: set aside")
        peaks.append(pk)
    if sec.doubled:   # the pairs printed with one description are marked already
        n = mark_doubled(peaks, sec.nucleus)
        if n:
            notes.append(f"{sec.nucleus} text: {doubled_note(sec.doubled, n)}")
    if sec.nucleus == "13C":
        merged = merge_duplicates(peaks, notes, "13C")
    else:
        merged = sorted(peaks, key=lambda q: -q.shift)
        merged.reverse()
    pl = PeakList(sec.nucleus, merged, source, notes,
                  sec.carbon_mhz if sec.nucleus == "13C" else sec.field_mhz, printed=True, two_forms=sec.doubled)
    return flag_solvent(pl, solvent or sec.solvent, keep_integrated=True)


#: words saying that a spectrum shows two forms of the compound
_DOUBLED = re.compile(r"\brotamer|\bconformers?\b|\bmixture\s+of\s+(?:[\w/]+\s+){0,3}(?:(?:regio-?)?isomers|diastereo(?:iso)?mers|"
                      r"rotamers|conformers|tautomers|atropisomers|anomers|epimers|[EZ]\s*/\s*[EZ])|\b[EZ]\s*/\s*[EZ][\s-]+(?:isomers|mixture)|"
                      r"\b(?:isomeric|diastereomeric|rotameric|conformational|regioisomeric)\s+mixture", re.I)


def _coupling(p: PrintedPeak) -> str | None:
    m = p.multiplicity
    return m if m and m not in ("s", "br s", "br") else None


#: a run of the characters UTF-8 bytes become when read as cp1252 or Latin-1
_MOJIBAKE_RUN = re.compile("[\u00c0-\u00ff][\u0080-\u00bf\u0152\u0153\u0160\u0161\u0178\u017d\u017e\u0192"
                           "\u02c6\u02dc\u2013\u2014\u2018-\u201e\u2020-\u2022\u2026\u2030\u2039\u203a\u20ac\u2122]+")


def _mend_run(m: re.Match) -> str:
    for enc in ("cp1252", "latin-1"):
        try:
            return m.group(0).encode(enc).decode("utf-8")
        except (UnicodeEncodeError, UnicodeDecodeError):
            continue
    return m.group(0)


#: Cyrillic letters drawn like Latin ones
_CYRILLIC_LOOKALIKE = str.maketrans("АВСЕНКМОРТХаеорсху", "ABCEHKMOPTXaeopcxy")


def _repair(text: str) -> str:
    """Undo the usual encoding accident (UTF-8 read as Latin-1/cp1252) and normalise dashes and spaces."""
    if any(m in text for m in _MOJIBAKE):
        for enc in ("cp1252", "latin-1"):
            try:
                text = text.encode(enc).decode("utf-8")
                break
            except (UnicodeEncodeError, UnicodeDecodeError):
                continue
        else:   # a paste mixing the accident with real unicode ('¹H-NMR … Î´ 1.52â€“1.58'): mend run by run
            text = _MOJIBAKE_RUN.sub(_mend_run, text)
    text = fold_full_width(text).translate(_SUPER)
    for ch in _DASHES:
        text = text.replace(ch, "-")
    text = re.sub(r"[\u00a0\u2009\u202f\u2002\u2003\u200b\t]", " ", text)
    text = text.replace("\u00d7", "×").replace("\u03b4", "δ").replace("\u2032", "'")
    if re.search("[\u0400-\u04ff]", text):
        # Cyrillic look-alikes in Latin text ('1Н', 'СН3', '(С)': a keyboard layout or an OCR slip) are their Latin
        # letters.  A paragraph in Russian (Cyrillic letters that look like no Latin one: 'ЯМР', 'Гц', 'д') keeps
        # its words, 'с' for a singlet among them; only tokens mixing scripts are mended there
        russian = re.search("[\u0400-\u04ff]", text.translate(_CYRILLIC_LOOKALIKE))
        text = re.sub(r"\w+", lambda m: m.group(0).translate(_CYRILLIC_LOOKALIKE)
                      if not russian or re.search(r"[0-9A-Za-z]", m.group(0)) else m.group(0), text)
        text = text.replace("Гц", "Hz").replace("м.д.", "ppm")   # Russian units: hertz, parts per million
    return text


def _split_top(text: str, seps: str = ",;") -> list[str]:
    """Split at separators outside brackets."""
    out, depth, cur = [], 0, []
    for ch in text:
        if ch in "([{":
            depth += 1
        elif ch in ")]}":
            depth = max(0, depth - 1)
        if ch in seps and depth == 0:
            out.append("".join(cur))
            cur = []
        else:
            cur.append(ch)
    out.append("".join(cur))
    return out


def _nucleus(m: re.Match) -> str | None:
    if m.group("hsqc"):
        return "HSQC"
    if m.group("other2d"):
        return m.group("other2d").upper()
    if m.group("bare"):
        return None  # "NMR (300 MHz, CDCl3) δ …": the nucleus is read from the values
    el = (m.group("el") or m.group("el2") or m.group("el3") or m.group("el4") or "").upper()
    el = {"SI": "Si", "SE": "Se"}.get(el, el)
    mass = m.group("mass") or m.group("mass3")
    if el == "H" and mass in (None, "1"):
        return "1H"
    if el == "C" and mass in (None, "13"):
        return "13C"
    if el == "D" or (el == "H" and mass == "2"):
        return "2H"
    return f"{mass or ''}{el}"


def _read_conditions(sec: TextSection, cond: str) -> None:
    m = re.search(r"(\d+(?:\.\d+)?)\s*MHz", cond, re.I)
    if m:
        sec.field_mhz = float(m.group(1))
    for part in re.split(r"[,;:()]", cond):
        part = part.strip()
        if not part or re.search(r"MHz|^\d+\s*K$|^δ|ppm|^T\s*=|°C|^r\.?t\.?$|^\d+$", part, re.I):
            continue
        key = normalise_solvent(part)
        if key is None and re.fullmatch(r"(?:d\d*-?)?dmso(?:-?d\d*)?", part, re.I):
            key = "DMSO-d6"
        if key is not None:
            if sec.solvent and sec.solvent != key:
                sec.notes.append(f"conditions '{cond.strip()}' name two solvents ({sec.solvent}, {key}); using {sec.solvent}")
                continue
            sec.solvent, sec.solvent_text = key, part
        elif re.search(r"[a-z]{3,}", part, re.I) and re.search(r"d\d|\bD\d?O\b|CD|C6D6|cdcl|solvent", part, re.I):
            sec.solvent_text = part
            sec.notes.append(f"solvent '{part}' has no residual-signal table here; its signals are not set aside")


#: the first shift of a list: a value followed by a bracket, a separator, the end, or a full stop and the next
#: sentence ('19F NMR (376 MHz, CDCl3) δ −65.2. HRMS …', a one-line section)
_FIRST_SHIFT = re.compile(r"(?<![A-Za-z0-9.,/])[+-]?\d{1,3}\.\d+(?=\s*(?:(?:-|~|to)\s*\d{1,3}\.\d+\s*)?(?:ppm\s*)?(?:[(\[,;/]|and\b|\.?\s*$|\.\s+(?=[A-Z])))"
                          # or a list with spaces or line breaks between its values: 'δ 162.9 161.0 157.5'
                          r"|(?<![A-Za-z0-9.,/])[+-]?\d{1,3}\.\d+(?=\s+[+-]?\d{1,3}\.\d+(?![\d.])(?!\s*(?:MHz|Hz|K\b)))")


_FIRST_INTEGER = re.compile(r"(?<![A-Za-z0-9.,/])\d{1,3}(?=\s*[,;]\s*\d{1,3}\s*[,;]\s*\d{1,3}\b)")


def _header_end(body: str) -> tuple[str, str]:
    """Split a section body into (conditions text, peak text) at the first shift outside brackets.

    Conditions may come in one or several brackets, before or after δ: '(400 MHz, CDCl3) δ',
    'δ (400 MHz; CDCl3):', '(CDCl3, 400 MHz, δ ppm):', '(400 MHz, DMSO-d6) (Figure S31) δ:'.
    """
    depth = 0
    depth_at = []
    for ch in body:
        if ch in "([{":
            depth += 1
        depth_at.append(depth)
        if ch in ")]}":
            depth = max(0, depth - 1)
    for pattern in (_FIRST_SHIFT, _FIRST_INTEGER):  # shifts printed without decimals come second
        for m in pattern.finditer(body):
            if depth_at[m.start()] == 0:
                return body[:m.start()], body[m.start():]
    if "[" in body:  # peaks printed inside square brackets within prose: "[δH 7.85 (2H, d), 7.45 (2H, t)]"
        return _header_end(body.replace("[", " ").replace("]", " "))
    m = _PROSE_SHIFT.search(body)
    if m:   # a value stated in prose: '… recorded a singlet signal at δ = 13.34 ppm for NH'
        return body[:m.start("v")], body[m.start("v"):]
    return body, ""


#: a shift stated in a sentence rather than listed: 'at δ = 13.34 ppm', 'δ 7.26 ppm'
_PROSE_SHIFT = re.compile(r"δ\s*[HC]?\s*[=:]?\s*(?P<v>[+-]?\d{1,3}\.\d+)(?=\s*ppm\b)")


#: 'J = 8,4 Hz', '21,8 Hz': a comma between digits with no space, right before 'Hz', is a decimal comma (two
#: coupling constants are printed with a space, 'J = 8.4, 2.0 Hz')
_J_DECIMAL_COMMA = re.compile(r"(?<![\d.,])(\d{1,3}),(\d{1,2})(?=\s*Hz)", re.I)


def _compact(w: str) -> str:
    """Lower case without spaces or dots, as multiplicity letters and DEPT labels are compared ('br. s' -> 'brs')."""
    return re.sub(r"[\s.]+", "", w.lower())


def _parse_detail(detail: str, peak: PrintedPeak, nucleus: str, notes: list[str]) -> None:
    """Read '(d, J = 8.4 Hz, 2H, H-3)' into the peak's fields; unread words go to the note."""
    d = _J_DECIMAL_COMMA.sub(r"\1.\2", detail)
    if d != detail:
        notes.append("a decimal comma in a J value read as a decimal point (e.g. 'J = 8,4 Hz' as 8.4 Hz)")
    js: list[float] = []
    for m in _JVAL.finditer(d):
        js.extend(float(v) for v in re.findall(_NUM, m.group("vals")))
    d = _JVAL.sub(" ", d)
    leftovers = []
    parts = list(_split_top(d, ",;"))
    while parts:
        w = parts.pop(0).strip().strip(".").strip()
        if nucleus == "1H" and peak.integral is None:
            m = _INTEGRAL_LEAD.match(w)
            if m:
                # "1H Ar-H", "1H d", "each 1H", "2 x 1H", "IH": the proton count with the rest of the part after
                # it (a missing comma, a typo for '1'); the rest is read as a part of its own
                n = float(m.group("n").upper().replace("I", "1"))
                peak.integral = n * (float(m.group("times")) if m.group("times") else 1.0)
                if m.group("rest"):
                    parts.insert(0, m.group("rest"))
                continue
            m = _LETTERS_THEN_INTEGRAL.match(w)
            if m and normalise_1h_multiplicity(_compact(m.group("letters"))) is not None:
                parts[:0] = [m.group("letters"), m.group("n") + "H"]   # "br s 1H": letters and count without a comma
                continue
        if not w:
            continue
        compact = _compact(w)
        m = _INTEGRAL.match(w.replace(" ", "")) or _INTEGRAL.match(w)
        if m and peak.integral is None:
            peak.integral = float(m.group("n") or m.group("n2"))
            continue
        if m:   # '(m, 8H; 6H, OCH3, 2H, NH2)': the first count is the multiplet's, the later ones a breakdown
            leftovers.append(w)
            continue
        wm = _WORD_CARBONS.match(w)
        if wm and nucleus == "13C" and peak.count == 1:
            # '(two overlapping signals)', '(two C)', '(3 overlapping carbons)': carbons printed at one value
            n = wm.group("n")
            peak.count = int(n) if n.isdigit() else _NUMBER_WORDS[n.lower()]
            continue
        m = _CARBONS.match(w)
        if m and nucleus == "13C":
            peak.count = max(1, int(next(g for g in m.group("n", "n2", "n3", "n4") if g)))
            label = (m.group("h") or (m.group("c2") or "")[1:]).upper()
            if peak.dept is None and label[:1] == "H":   # "2 × CH", "2CH3", "CH2 × 2": printed CHn (DEPT)
                peak.dept = "C" + label
            elif peak.dept is None and label == "Q":     # "2Cq"
                peak.dept = "C"
            rest = w[m.end():].strip()
            if rest:
                leftovers.append(rest)
            continue
        mult = normalise_1h_multiplicity(compact)
        if mult is not None and peak.multiplicity is None:
            peak.multiplicity = mult
            continue
        if mult is not None and nucleus == "1H" and "ABq" not in (mult, peak.multiplicity):
            # 'broad' printed as a part of its own, after or before the letters: '(s, br, 1H)', '(br, d, 2H)'
            if mult == "br" and not peak.multiplicity.startswith("br"):
                peak.multiplicity = "br " + peak.multiplicity
                continue
            if peak.multiplicity == "br" and not mult.startswith("br"):
                peak.multiplicity = "br " + mult
                continue
        if nucleus == "13C" and compact in _DEPT and peak.dept is None:
            peak.dept = _DEPT[compact]
            continue
        if nucleus == "13C" and w in ("+", "-") and peak.sign is None:
            peak.sign = w   # a phase; read as DEPT-135 by _dept135 when the section says so
            continue
        if re.fullmatch(rf"{_NUM}\s*Hz", w, re.I):
            # a J list continued after a comma ("J = 8.4 Hz, 2.0 Hz"); a bare number after a J list is part of
            # an assignment note ("CH3-Ph-3,5", "H-2,6"), not a coupling: the J pattern takes a list printed
            # without 'Hz' whole ("J = 8.4, 2.0")
            js.append(float(re.match(_NUM, w).group(0)))
            continue
        if re.fullmatch(rf"{_NUM}\s*,?\s*{_NUM}?\s*Hz", w, re.I):
            js.extend(float(v) for v in re.findall(_NUM, w))
            continue
        if (nucleus == "1H" and re.fullmatch(r"\d{1,2}\.\d{1,2}", w) and 0.3 <= float(w) <= 25.0
                and re.fullmatch(r"(?:br\s)?[dtqp]+|sext|sept", peak.multiplicity or "")):
            # '(d, 5.4, 2H)': a J printed with neither 'J' nor 'Hz', after letters that have splittings
            js.append(float(w))
            continue
        jm = re.fullmatch(r"(?:[1-5]\s?)?J(?:\s*\(\s*[A-Za-z]{1,2}\s*,\s*[A-Za-z]{1,2}\s*\)|[A-Za-z]{0,3})\s*[=:]?\s*"
                          r"(\d{1,2}\.\d+)\s+([A-Za-z].*)", w)
        more = re.fullmatch(r"(\d{1,2}\.\d+)\s+([A-Za-z].*)", w)
        splits = len(re.findall(r"[dtqp]", re.sub(r"^br\s*", "", peak.multiplicity or "")))
        if jm or (more and js and len(js) < splits):
            # 'J = 7.2 CH3', '(dd, J 8.0, 2.0 Aryl-H)': a J value printed without 'Hz' and run into the
            # assignment note (the second only while the letters still want a splitting)
            m2 = jm or more
            js.append(float(m2.group(1)))
            parts.insert(0, m2.group(2))
            continue
        if (nucleus == "1H" and peak.multiplicity is not None and peak.integral is None and not leftovers
                and re.fullmatch(r"[1-9]\d?", w)):
            # "(t, 2, J = 7.1 Hz, CH2Cl)": the proton count without its 'H', after the letters; a bare
            # number alone ("6.1 (2)") is an atom label
            peak.integral = float(w)
            continue
        leftovers.append(w)
    peak.j = tuple(js)
    peak.note = ", ".join(leftovers)


_LEAD = re.compile(r"^\s*(?:[:=,;)\]]|δ\s*[HC]?\b|δ|\[\s*δ?\s*,?\s*\(?ppm\)?\s*\]|\(\s*ppm\s*\)|/\s*ppm|(?:in\s+)?ppm\b|d(?=\s*[:=]?\s*\d))\s*", re.I)
_LABEL = re.compile(r"^[A-Za-z][\w\[\]\-,' ]{0,40}:\s*(?=[+-]?\d)")


def _strip_lead(text: str) -> str:
    """Drop what may precede the first shift: ':', '=', 'δ', 'ppm', '[δ, ppm] =', 'd' standing for δ."""
    prev = None
    while prev != text:
        prev = text
        text = _LEAD.sub("", text, count=1)
    return text


#: a value written with a decimal comma and no space after it: '166,9' (not '166, 9' nor '1,2,3-')
_BARE_DECIMAL_COMMA = re.compile(r"(?<![\d,.])\d{1,3},\d{1,3}(?![\d,])")
_DECIMAL_COMMA = re.compile(r"(?<![\d.,])(\d{1,3}),(\d{1,3})(?=\s*(?:-\s*\d{1,3},\d{1,3}\s*)?[(\[])")
#: peaks gathered in square brackets under a label: "Ar-H [7.39 (d, 2H), 7.88 (d, 2H)]", "(C=N) [163.1, 165.5]"
_GROUP = re.compile(r"^(?:[A-Za-z][\w\-' ]{0,30}|\([^()]{1,20}\))\s*\[(?P<inner>\s*[+-]?\d{1,3}\.\d+\s*[-,(].*)\]$", re.S)
_PEAK_START = re.compile(r"[,;]\s*(?=(?:and\s+)?\d{1,3}\.\d+\s*(?:-\s*\d{1,3}\.\d+\s*)?[(\[])")


#: a value printed with two decimal points ('121.9.1'): its first part is the shift
_TWO_POINTS = re.compile(r"(?<![\d.])(\d{1,3}\.\d+)\.\d+(?![\d.])")


def _read_peaks(sec: TextSection, text: str, start_dept: str | None = None) -> None:
    body = _strip_lead(text.strip()).rstrip(".").strip()
    body = re.sub(r"\s*ppm\s*\.?\s*$", "", body)
    # 'ppm' printed after each value ('21.5 ppm (CH3), 33.7 ppm', '[120.5 ppm, 127.1 ppm]', '28.7/28.0 ppm (8)')
    body = re.sub(r"(?<=\d)\s*ppm\b(?=\s*(?:[,;/\])(\[]|$))", "", body)
    if not body:
        return
    fixed = _DECIMAL_COMMA.sub(r"\1.\2", body)
    if fixed != body:
        sec.notes.append("decimal commas read as decimal points (e.g. '6,98' as 6.98)")
        body = fixed
    # typing and OCR slips inside a value: the letter O for a zero ('15O.1', '3.8O'), two decimal points
    fixed = re.sub(r"(?<=\d)[Oo](?=\.\d)|(?<=\d\.)[Oo](?=\d|\b)|(?<=\d\.\d)[Oo](?![A-Za-z])", "0", body)
    if fixed != body:
        sec.notes.append("the letter O inside a value read as a zero (e.g. '15O.1' as 150.1)")
        body = fixed
    def first_part(m: re.Match) -> str:
        sec.notes.append(f"'{m.group(0)}' has two decimal points: read as {m.group(1)}")
        return m.group(1)
    body = _TWO_POINTS.sub(first_part, body)
    if body.count("(") != body.count(")") or body.count("[") != body.count("]"):
        # an unclosed bracket would swallow every later peak: split before each 'shift (' and at top-level commas
        sec.notes.append("brackets in the peak list are unbalanced; peaks were separated at each 'shift (' and at commas outside brackets")
        pending = [piece for chunk in _PEAK_START.split(body) for piece in _split_top(chunk, ",;")]
    else:
        pending = [c for c in _split_top(body, ",;")]
    group_dept = start_dept
    while pending:
        frag = _strip_lead(pending.pop(0).strip().strip(".").strip())
        lab = _LABEL.match(frag)  # "Azo: 8.18 (2H, d)" or "CH: 130.2": a group label before the shift
        if lab:
            word = frag[:lab.end()].rstrip(": ").lower().replace(" ", "")
            if sec.nucleus == "13C" and word in _DEPT:
                group_dept = _DEPT[word]
            frag = frag[lab.end():]
        if not frag:
            continue
        if re.fullmatch(r"(?:and|ppm|δ|\(?ppm\)?)", frag, re.I):
            continue
        label = frag.lower().replace(" ", "")
        if sec.nucleus == "13C" and label in _DEPT:
            group_dept = _DEPT[label]  # a DEPT label before the values it covers
            continue
        gm = _GROUP.match(frag)
        if gm:  # "Ar-H [7.39 (d, 2H), 7.88 (d, 2H)]": peaks gathered under a label, read one by one
            pending[0:0] = _split_top(gm.group("inner"), ",;")
            continue
        if frag.startswith("(") and sec.peaks and not sec.peaks[-1].fragment.rstrip().endswith(")"):
            # "7.82, (dd, J = 8.0 Hz, 1H)": the detail of the peak before, separated by a stray comma
            last = sec.peaks[-1]
            _parse_detail(frag.strip("()"), last, sec.nucleus, sec.notes)
            last.fragment += ", " + frag
            continue
        m = _SHIFT_ITEM.match(frag)
        if not m:
            sec.notes.append(f"cannot read '{frag[:60]}' as a peak")
            continue
        a = float(m.group("a"))
        b = float(m.group("b")) if m.group("b") else None
        rest = m.group("rest").strip()
        lost = re.match(rf"^(?P<b>{_NUM})\s*(?P<rest>[(\[].*)$", rest, re.S) if sec.nucleus == "1H" and b is None else None
        if lost and 0 < abs(a - float(lost.group("b"))) <= 1.0:
            # '7.36 7.28 (m, 4H)': a bare 1H value beside a described one is a range whose dash was lost in copying
            # from a PDF (a plain list of values, '8.05 6.40 3.78', has no descriptions); read as the range it is
            b, rest = float(lost.group("b")), lost.group("rest")
            sec.notes.append(f"'{m.group('a')} {lost.group('b')}': read as the range {max(a, b):g}–{min(a, b):g} "
                             "(a dash lost in copying?)")
        twin = None
        tm = (re.match(rf"^(?:and)\s*(?P<b>{_NUM})(?:\s*-\s*{_NUM})?\s*(?P<rest>[(\[].*)$", rest, re.S)
              or re.match(rf"^/\s*(?P<b>{_NUM})(?:\s*-\s*{_NUM})?\s*(?P<rest>(?:[(\[].*)?)$", rest, re.S))
        if tm:  # "8.36 and 8.19 (s, 1H)": two values sharing one description
            twin, rest = float(tm.group("b")), tm.group("rest")
        peak = PrintedPeak(a, fragment=frag)
        if b is not None:
            if b < 0 < a:  # "7.20-7.10" read as 7.20 and -7.10
                b = abs(b)
            lo, hi = min(a, b), max(a, b)
            if hi - lo > (3.0 if sec.nucleus == "1H" else 30.0):
                sec.notes.append(f"'{frag[:60]}': a range of {hi - lo:g} ppm is implausible; read its first value only")
            else:
                peak.lo, peak.hi, peak.shift = lo, hi, round((lo + hi) / 2, 4)
        detail, extra = "", rest
        pm = (re.match(r"^\((?P<d>(?:[^()]|\((?:[^()]|\([^()]*\))*\))*)\)\s*(?P<after>.*)$", rest, re.S)
              or re.match(r"^\[(?P<d>[^\[\]]*)\]\s*(?P<after>.*)$", rest, re.S))
        if pm:
            detail, extra = pm.group("d"), pm.group("after").strip()
        elif rest.startswith(("(", "[")):  # unclosed bracket: take the rest as the detail
            detail, extra = rest[1:], ""
        alt = re.fullmatch(rf"\s*({_NUM})\s*", detail) if detail and twin is None and b is None else None
        if alt and 0 < abs(float(alt.group(1)) - a) <= (5.0 if sec.nucleus == "13C" else 0.5) and "." in alt.group(1):
            # '144.63 (142.48)': a value in brackets beside a value, the second form's line (a tautomer, rotamer or
            # isomer printed after the main one); read as a line of its own, marked as its twin
            twin, detail = float(alt.group(1)), ""
            sec.bracket_twins += 1
        if detail:
            _parse_detail(detail, peak, sec.nucleus, sec.notes)
        if extra:
            words = extra.strip(" .")
            if re.match(rf"^(?:and\s+)?{_NUM}\b", words) and re.match(r"^(?:and\s+)?\d", words):
                pending.insert(0, words)  # two peaks without a separator: "1.46 (s, 9H) 1.45-1.20 (m, 6H)"
                peak.fragment = frag[:len(frag) - len(extra)].strip()
            else:
                mult = normalise_1h_multiplicity(words)
                im = _INTEGRAL.match(words.replace(" ", ""))
                if mult is not None and peak.multiplicity is None:
                    peak.multiplicity = mult
                elif im:
                    peak.integral = float(im.group("n") or im.group("n2"))
                elif not re.search(r"\d+\.\d+", words) and len(words) <= 60:
                    peak.note = (peak.note + ", " + words).strip(", ")
                else:
                    sec.notes.append(f"'{frag[:60]}': could not read '{words[:40]}' after the shift")
        if peak.dept is None and group_dept is not None:
            peak.dept = group_dept
        sec.peaks.append(peak)
        if twin is not None:
            each = "each" in detail
            other = PrintedPeak(twin, integral=peak.integral, multiplicity=peak.multiplicity, j=peak.j, count=peak.count,
                                sign=peak.sign, dept=peak.dept, note=peak.note, fragment=frag, twin=True)
            peak.twin = True
            if peak.integral and not each:
                peak.integral = other.integral = peak.integral / 2
            sec.peaks.append(other)


def _infer_nucleus(peaks_text: str, hint: str | None) -> tuple[str, str]:
    """1H or 13C from the printed values when the header does not say; returns (nucleus, reason)."""
    vals = [float(v) for v in re.findall(r"(?<![\w.])\d{1,3}(?:\.\d+)?(?![\d.]|\s*(?:Hz|MHz|H\b|C\b))", peaks_text)]
    if hint in ("1H", "13C"):
        return hint, "as the caller said"
    if vals and max(vals) > 20 and sum(v > 16 for v in vals) >= 0.3 * len(vals):
        return "13C", "values up to %g ppm" % max(vals)
    return "1H", "values within 0-16 ppm"


def read_nmr_text(text: str, source: str = "text", nucleus: str | None = None) -> NmrText:
    """Read printed NMR characterisation text into sections of peaks.

    Raises :class:`~shiftrank.errors.InputError` only when the text holds no peaks at all (or is
    not text); unreadable fragments inside a section become notes.  Text without any NMR header is
    read as one section whose nucleus is ``nucleus`` when given, else inferred from the values (noted).
    """
    if not isinstance(text, str):
        raise InputError(f"{source}: expected characterisation text, got {type(text).__name__}")
    if len(text) > MAX_TEXT:
        raise InputError(f"{source}: text of {len(text):,} characters exceeds the limit of {MAX_TEXT:,}; "
                         "give the characterisation paragraphs only")
    table = _read_table(text)
    if table is not None:
        return table
    t = _repair(text)
    heads = _real_heads(t, list(_HEADER.finditer(t)))
    out = NmrText([])
    spans = [(h.start(), h.end(), _nucleus(h), h.group(0).strip()) for h in heads]
    if not spans:
        spans = [(0, 0, None, "")]
    pre = t[:spans[0][0]].strip()
    if re.search(r"\d+\.\d+", pre):
        out.notes.append(f"text before the first NMR header was not read: '{pre[:60]}'")
    for k, (_, h_end, nuc, header) in enumerate(spans):
        end = spans[k + 1][0] if k + 1 < len(spans) else len(t)
        body = t[h_end:end]
        comma_note = None
        if not re.search(r"\d\.\d", body) and len(_BARE_DECIMAL_COMMA.findall(body)) >= 2:
            # no value with a decimal point, but values such as '166,9; 163,4' (the decimal comma of some
            # house styles, ISO 80000-1; from memory): every digit,digit of the section is a decimal comma
            body = re.sub(r"(?<=\d),(?=\d)", ".", body)
            comma_note = "decimal commas read as decimal points throughout the section (no value has a decimal point)"
        if nuc in _PAIRED_2D:
            body = _hmbc_arrows(body)
        if nuc in ("HSQC",) + _PAIRED_2D:
            body = _hsqc_slashes(body)
        cond, peaks_text = _header_end(body)
        if nuc is None:
            nuc, why = _infer_nucleus(peaks_text, nucleus)
            sec = TextSection(nuc, header)
            sec.notes.append(f"no nucleus in the header '{header}': read as {nuc} ({why})" if header else
                             f"no NMR header: read as {nuc} ({why})")
        else:
            sec = TextSection(nuc, header)
        if comma_note:
            sec.notes.append(comma_note)
        # (a value of four or more digits before the list, '1666, 150.1', is a typo for a shift, not a condition)
        stray = re.findall(r"(?<![\d.\w])(?:\d{1,3}\.\d+|\d{4,}(?:\.\d+)?)(?![\d.])(?!\s*(?:MHz|K\b|°|Hz|ppm\)|ppm\s*\)))",
                           cond)
        if stray and peaks_text:
            sec.notes.append(f"values before the peak list were not read as peaks: {', '.join(stray[:5])} (in '{cond.strip()[:60]}')")
        # conditions may also trail the header without brackets: "1H NMR, CDCl3, 400 MHz: δ …"
        if not cond.strip() and re.match(r"\s*[,:]", peaks_text):
            m = re.match(r"\s*[,:]\s*([^δ\d]*?(?:\d+(?:\.\d+)?\s*MHz[^δ\d]*)?)(?=[δ\d])", peaks_text)
            if m:
                cond, peaks_text = m.group(1), peaks_text[m.end():]
        _read_conditions(sec, cond)
        if sec.nucleus == "HSQC" or (sec.nucleus in _PAIRED_2D and _HSQC_PAIR.search(peaks_text)):
            _read_hsqc(sec, header + " " + cond, peaks_text)
            out.sections.append(sec)
            continue
        if sec.nucleus in OTHER_2D:
            sec.notes.append(f"{sec.nucleus} correlations read as a section of their own and not used for ranking: "
                             f"'{_clip(body.strip(' :'), 50)}'")
            out.sections.append(sec)
            continue
        peaks_text = _strip_trailer(peaks_text)
        two = _DOUBLED.search(header + " " + cond) or _DOUBLED.search(peaks_text)
        if two:
            sec.doubled = two.group(0)
        # ('C:' of the 'δC:' symbol is no label: "13C NMR (CDCl3) δC: 55.2, …" has no quaternary carbons; with a
        # space, "δ C, 34.8, CH, 146.7", it is one)
        lead = re.search(r"(?<![A-Za-z0-9δ])(Cq|C|CH|CH2|CH3)\s*[:,]\s*(?:δ\s*[HC]?)?\s*[:=]?\s*$", cond)
        _read_peaks(sec, peaks_text, _DEPT.get(lead.group(1).lower()) if lead and sec.nucleus == "13C" else None)
        if sec.bracket_twins:
            one = sec.bracket_twins == 1
            sec.notes.append(f"{count(sec.bracket_twins, 'value')} printed in brackets beside "
                             f"{'another read as a line of its own' if one else 'others read as lines of their own'} "
                             "(a second form's: a tautomer, rotamer or isomer?)")
            if sec.bracket_twins >= 2 and sec.doubled is None:
                sec.doubled = "second-form values in brackets"
        if sec.nucleus == "13C":
            _dept135(sec, header + " " + cond)
        if _read_prose(sec, body):
            pass
        elif re.search(r"[^()δ]{0,40}δ\s*[HC]?\s*[=:]?\s*$", cond) and len(sec.peaks) == 1 \
                and re.search(r"[a-z]{4,}\s+[a-z]{3,}", cond):
            word = re.search(r"(singlet|doublet|triplet|quartet|multiplet)\b[^()δ]{0,25}δ\s*[HC]?\s*[=:]?\s*$", cond, re.I)
            if word and sec.nucleus == "1H" and sec.peaks[0].multiplicity is None:
                sec.peaks[0].multiplicity = normalise_1h_multiplicity(word.group(1))
            sec.notes.append(f"one value read from a sentence: '{_clip(cond.strip() + ' ' + peaks_text.strip(), 80)}'")
        if sec.nucleus not in ("1H", "13C") and sec.peaks:
            sec.notes.append(f"{sec.nucleus} section read ({count(len(sec.peaks), 'peak')}) but not used for ranking")
        out.sections.append(sec)
    # (a sentence before the first header may say it too: 'obtained as a 3:1 mixture of regioisomers. 1H NMR …')
    said = next((s.doubled for s in out.sections if s.doubled), None) or (
        m.group(0) if (m := _DOUBLED.search(pre)) else None)
    for s in out.sections:   # the compound shows its two forms in every spectrum of the paragraph
        if said and s.doubled is None and s.nucleus in ("1H", "13C"):
            s.doubled = said
    if not any(s.peaks for s in out.sections):
        why = "; ".join(n for s in out.sections for n in s.notes[:2])
        raise InputError(f"{source}: no NMR peaks could be read from '{_clip(text)}'" + (f" ({why})" if why else ""))
    for nuc in ("1H", "13C", "HSQC") + _PAIRED_2D:
        n = sum(1 for s in out.sections if s.nucleus == nuc and s.peaks)
        if n > 1:   # several compounds pasted together, or one spectrum in two solvents: say which one counts
            first = next(s for s in out.sections if s.nucleus == nuc and s.peaks)
            out.notes.append(f"{n} {nuc} sections with peaks; only the first ('{_clip(first.header + ' ' + first.peaks[0].fragment, 40)}…') "
                             "is used: give one compound's paragraphs per case")
    return out


def _dept135(sec: TextSection, conditions: str) -> None:
    """A 13C list printed with DEPT-135 phases ('38.14 (-), 66.84 (+), …, 136.31 (q)'): '-' is a CH2, '+' a CH or
    a CH3, 'q' a quaternary carbon (common practice).  Read so only when the header names DEPT or the list marks
    its quaternary carbons beside the signs (an APT list, whose phases pair C with CH2, is not read this way)."""
    signed = [p for p in sec.peaks if p.sign]
    if len(signed) < 2:
        return
    quaternary = [p for p in sec.peaks if not p.sign and not p.j and (p.multiplicity == "q" or p.dept == "C")]
    if not (re.search(r"DEPT", conditions, re.I) or quaternary) or re.search(r"APT|JMOD|J-mod", conditions, re.I):
        sec.notes.append(f"{len(signed)} values carry a phase (+/-) that was not read as DEPT (no DEPT in the header, "
                         "no quaternary carbons marked)")
        return
    for p in signed:
        p.dept = "CH2" if p.sign == "-" else "CH/CH3"
    for p in quaternary:
        p.dept, p.multiplicity = "C", None
    sec.notes.append("DEPT-135 phases read: (-) CH2, (+) CH or CH3" + (", q quaternary" if quaternary else ""))


def _real_heads(t: str, heads: list[re.Match]) -> list[re.Match]:
    """The header matches that open a section: an 'HSQC'/'HMQC' inside brackets ('128.4 (CH, from HSQC)') or
    not followed by any δ/δ pair before the next header ('observed using HSQC or HMBC experiments. δC 162.1,
    …') is a word of the paragraph, not a section."""
    if not any(h.group("hsqc") or h.group("other2d") for h in heads):
        return heads
    out = []
    for k, h in enumerate(heads):
        if h.group("hsqc") or h.group("other2d"):
            before = t[:h.start()]
            if before.count("(") > before.count(")") or before.count("[") > before.count("]"):
                continue
            end = heads[k + 1].start() if k + 1 < len(heads) else len(t)
            span = t[h.end():end]
            pairs = _HSQC_PAIR.search(_hsqc_slashes(_hmbc_arrows(span)))
            if not (pairs if h.group("hsqc") else pairs or _CORRELATION.search(span)):
                continue
        out.append(h)
    return out


#: a value mentioned in a sentence: 'δH 7.17 (2H, d, J = 8.0 Hz)', 'at δ = 13.34 ppm', 'δC 173.0', a range 'δH 1.16-1.29'
_PROSE_MENTION = re.compile(r"δ\s*(?P<el>[HC](?![A-Za-z]))?\s*[=:]?\s*(?P<v>[+-]?\d{1,3}\.\d+)(?:\s*-\s*(?P<v2>\d{1,3}\.\d+))?"
                            r"(?:\s*ppm)?(?:\s*\((?P<det>[^()]*)\))?")
_PROSE_WORD = re.compile(r"\b(singlet|doublet|triplet|quartet|quintet|multiplet|broad singlet)s?\b", re.I)


def _read_prose(sec: TextSection, body: str) -> bool:
    """A spectrum described in sentences ('The proton signals at δH 7.17 (2H, d, J = 8.0 Hz) and δH 7.33 (3H, m)
    indicated …; the terminal methyl appeared at δH 0.88 as triplet'): every 'δ value' mention of the section's
    nucleus is a peak, with its bracketed details and a multiplet word of its own clause.  Used only when it
    finds more peaks than the list reading (a printed list has one δ) and the text reads as sentences; a span
    'from δC 127.55 to δC 138.40' (several signals, how many unknown) is left out with a note."""
    if sec.nucleus not in ("1H", "13C") or body.count("δ") < 2 or not re.search(r"[A-Za-z]{3,}\s+[a-z]{3,}\s+[a-z]{2,}\s", body):
        return False
    mentions = [m for m in _PROSE_MENTION.finditer(body)
                if not m.group("el") or (m.group("el").upper() == "H") == (sec.nucleus == "1H")]
    if len(mentions) < 2 or len(mentions) <= len(sec.peaks):
        return False
    peaks, notes, skip = [], [], set()
    for k, m in enumerate(mentions):
        if k in skip:
            continue
        nxt = mentions[k + 1] if k + 1 < len(mentions) else None
        if nxt is not None and re.fullmatch(r"\s*to\s*", body[m.end():nxt.start()]):
            notes.append(f"a span of signals '{_clip(body[m.start():nxt.end()], 40)}' was not read as peaks")
            skip.add(k + 1)
            continue
        v = float(m.group("v"))
        p = PrintedPeak(v, fragment=m.group(0).strip())
        if m.group("v2"):
            lo, hi = sorted((v, float(m.group("v2"))))
            p.shift, p.lo, p.hi = round((lo + hi) / 2, 4), lo, hi
        if m.group("det"):
            _parse_detail(m.group("det"), p, sec.nucleus, notes)
        if sec.nucleus == "1H" and p.multiplicity is None:
            start = max(mentions[k - 1].end() if k else 0, body.rfind(".", 0, m.start()) + 1, m.start() - 40)
            stop = min(nxt.start() if nxt is not None else len(body), m.end() + 40)
            end_clause = body.find(".", m.end())
            if end_clause != -1 and not re.match(r"\d", body[end_clause + 1:end_clause + 2]):
                stop = min(stop, end_clause)
            word = _PROSE_WORD.search(body, m.end(), stop) or _PROSE_WORD.search(body, start, m.start())
            if word:
                p.multiplicity = normalise_1h_multiplicity(word.group(1))
        peaks.append(p)
    if len(peaks) <= len(sec.peaks):
        return False
    sec.peaks = peaks
    sec.notes = [n for n in sec.notes if n.startswith("no ")] + notes + [
        f"read as a description in sentences: {count(len(peaks), 'value')} at their 'δ' mentions"]
    return True


#: 2D sections whose numeric correlations are read as δ/δ pairs beside HSQC (COSY, NOESY, ROESY: two protons)
_PAIRED_2D = ("HMBC", "COSY", "NOESY", "ROESY")


def _read_hsqc(sec: TextSection, conditions: str, text: str) -> None:
    """Cross peaks 'δC/δH' of an HSQC, HMQC or HMBC section (δH/δH of a COSY, NOESY or ROESY section, in either order).  The order is δC/δH unless the text says 'δH/δC' (or
    '1H/13C'); without either, the larger value of a pair is taken as δC (a carbon's shift in ppm exceeds its
    protons' except near 0 ppm, e.g. a silyl methyl, or, in an HMBC, a carbon below about 12 ppm seen from an
    aromatic proton), with a note."""
    what = sec.nucleus
    protons = what in ("COSY", "NOESY", "ROESY")
    order = None
    m = re.search(r"δ\s?([HC])\s*[/,]\s*δ?\s?([HC])|\b(1H|13C)\s*/\s*(1H|13C)\b", conditions + " " + text[:40], re.I)
    # ('δH 4.07 → δC 139.9', rewritten as 'δH 4.07/139.9': the pair's first value is named)
    named = re.search(r"δ\s?([HC])\s*[=:]?\s*[+-]?\d{1,3}(?:\.\d+)?\s*/", text)
    if m:
        first = (m.group(1) or m.group(3) or "").upper()
        order = "HC" if first in ("H", "1H") else "CH"
    elif named:
        order = "HC" if named.group(1).upper() == "H" else "CH"
    guessed = 0
    for pm in _HSQC_PAIR.finditer(text):   # (other ways of printing a pair were rewritten as 'a/b' by the caller)
        a, b = float(pm.group("a")), float(pm.group("b"))
        if order == "HC" or (order is None and b > a):
            if pm.group("b2"):   # 'δH-range/δC' is not a form in use; read the pair as printed
                continue
            c, hs = b, [a]
        else:
            c, hs = a, [b] + ([float(pm.group("b2"))] if pm.group("b2") else [])
        if order is None and min(a, b) < 0.5 and max(a, b) < 5:
            guessed += 1
        kind = None
        if pm.group("kind"):
            kind = HSQC_KINDS.get(pm.group("kind").replace(" ", "")) or HSQC_KINDS.get(pm.group("kind").strip().lower())
        if not (-2.0 if protons else -20.0) <= c <= (20.0 if protons else 250.0) or not all(-2.0 <= h <= 20.0 for h in hs):
            sec.notes.append(f"{what} pair '{pm.group(0).strip()}' set aside: " + ("both δH must lie within -2…20 ppm"
                             if protons else "δC must lie within -20…250 ppm and δH within -2…20 ppm") + " (a typo?)")
            continue
        for h in hs:
            sec.peaks.append(PrintedPeak(c, shift_h=h, dept=kind, fragment=pm.group(0)))
    if sec.peaks and order is None and not protons:
        sec.notes.append(f"{what} pairs read as δC/δH by size (the larger value as δC); write 'δC/δH' or 'δH/δC' "
                         "in the header to fix the order" + (f"; {guessed} pair(s) near 0 ppm are uncertain" if guessed else ""))
    rest = _HSQC_PAIR.sub(" ", text)
    rest = re.sub(r"\d+(?:\.\d+)?\s*MHz", " ", rest)
    if re.search(r"\d", rest):   # nothing dropped silently: what the pairs did not take is named
        left = ", ".join(x.strip() for x in re.findall(r"[^,;]*\d[^,;]*", rest)[:4])
        sec.notes.append(f"in the {what} section, not read as δC/δH pairs: '{_clip(left)}'")


#: a header cell of an assignment table naming its 13C or its 1H column
_TABLE_C = re.compile(r"δ\s*C\b|13\s*C|carbon", re.I)
_TABLE_H = re.compile(r"δ\s*H\b|1\s*H\b|proton", re.I)


def _read_table(raw: str) -> NmrText | None:
    """An assignment table pasted as text: a header row naming a 13C and a 1H column, then one row per
    position, cells separated by tabs ('2⇥53.8⇥4.73⇥(1H, dd, 9.8, 6.0)'); rows on lines of their own, or
    run together with each new row starting at its position label.  The 13C column gives the 13C list,
    the 1H column and what follows it the 1H list (a '—' cell is no value).  None when the text is not
    such a table."""
    if raw.count("\t") < 4:
        return None
    lines = [ln for ln in raw.splitlines() if ln.strip()]
    if len(lines) < 3:
        lines = re.split(r"\s+(?=\d{1,3}[a-z]?['′″]*\s*\t)", raw.strip())
    rows = [[_repair(c).strip() for c in ln.split("\t")] for ln in lines]
    head = col_c = col_h = None
    for k, r in enumerate(rows[:4]):   # the header row: one cell names the 13C column, another the 1H column
        r = [re.sub(r"\{\s*1\s*H\s*\}", "", c) for c in r]   # '13C{1H}': the decoupling mark names no 1H column
        cs = [i for i, c in enumerate(r) if _TABLE_C.search(c) and not _TABLE_H.search(c)]
        hs = [i for i, c in enumerate(r) if _TABLE_H.search(c) and not _TABLE_C.search(c)]
        if cs and hs:
            head, col_c, col_h = k, cs[0], hs[0]
            break
    if head is None:
        return None
    c_vals, h_vals = [], []
    for r in rows[head + 1:]:
        c = r[col_c] if len(r) > col_c else ""
        # the 1H cell runs to the 13C column, or to the end of the row (details printed in a cell of their own)
        h = " ".join(r[col_h:col_c] if col_h < col_c else r[col_h:])
        if re.fullmatch(r"[+-]?\d{1,3}(?:\.\d+)?(?:\s*\([^()]*\))?", c):
            c_vals.append(c)
        if re.match(r"[+-]?\d{1,2}\.\d+", h):
            h_vals.append(h)
    if len(c_vals) + len(h_vals) < 3:
        return None
    out = NmrText([])
    for nuc, vals in (("1H", h_vals), ("13C", c_vals)):
        if not vals:
            continue
        sec = TextSection(nuc, "table")
        _read_conditions(sec, " ".join(" ".join(r) for r in rows[:head + 1]))
        _read_peaks(sec, ", ".join(vals))
        sec.notes.append(f"read from an assignment table: {count(len(sec.peaks), 'value')} in its {nuc} column")
        out.sections.append(sec)
    return out if any(s.peaks for s in out.sections) else None


def _clip(text: str, n: int = 60) -> str:
    s = " ".join(str(text).split())
    return s if len(s) <= n else s[:n] + "…"


def _strip_trailer(text: str) -> str:
    """Drop what follows the peak list in the same paragraph: HRMS, IR, m.p., elemental analysis."""
    m = re.search(r"\b(HRMS|HR-MS|ESI|MS\s*\(|IR\s*\(|IR:|m\.p\.|mp\b|Anal\.|Elemental|UV|\[α\])", text)
    return text[:m.start()] if m else text
