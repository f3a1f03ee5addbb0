"""Instrument files: JCAMP-DX 1D NMR spectra and peak tables, and Bruker processed 1D data sets, read into
peak lists.

JCAMP-DX is the open exchange format of IUPAC (McDonald, R. S.; Wilks, P. A. (1988) Appl. Spectrosc. 42,
151; the NMR labels: Davies, A. N.; Lampen, P. (1993) Appl. Spectrosc. 47, 1093).  Two kinds of block
are read:

* a **peak table** (``##PEAK TABLE= (XY..XY)``, also ``(XYW..XYW)`` and ``(XYM..XYM)``): the lines the
  instrument software picked, with their heights (and widths or multiplicity letters);
* a **processed 1D spectrum** (``##XYDATA= (X++(Y..Y))``, plain or compressed (ASDF); decoded by
  nmrglue's JCAMP-DX reader), whose peaks are picked here: local maxima standing ``min_snr`` times above
  the noise (σ from the median absolute deviation of the whole trace, which is mostly baseline), each
  refined by a parabola through its three highest points.

13C: every picked line is one peak (C–F multiplet lines stay separate lines, as printed lists have them;
the ranking reads them as one carbon where a candidate allows).  1H: lines closer than ``MULTIPLET_GAP_HZ``
are one multiplet, integrated over its span (the area of the trace, or the lines' heights × widths for a
peak table); a first-order pattern is named when the lines say so (one line s; two of equal height d;
1:2:1 t; 1:3:3:1 q; four equal lines at a, b, a spacings dd), else m; J values come from the spacings
at the observe frequency.  Residual solvent signals (Fulmer et al. 2010) are flagged as for typed lists.
X values in Hz are converted with ``##.OBSERVE FREQUENCY``; ``##.SHIFT REFERENCE`` is not applied (the
trace is taken as referenced).

A **Bruker processed data set** (the experiment folder, its ``pdata/N`` folder or the ``1r`` file) is read with
nmrglue's Bruker reader: the real spectrum ``1r`` scaled by ``NC_proc``, placed on the ppm scale by the
``procs`` parameters (``OFFSET``, ``SW_p``, ``SF``, ``SI``), its nucleus and solvent from the experiment's
``acqus`` (``NUC1``, ``SOLVENT``); its peaks are picked as a JCAMP-DX trace's are.

Owns file reading and peak picking; returns :class:`~shiftrank.inputs.peaks.PeakList` objects for the
rest of the program, which never sees the trace.
"""
from __future__ import annotations

import itertools
import re
import warnings
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ..errors import InputError
from .files import read_user_text
from .peaks import RANGES, Peak, PeakList, check_count, dept135_from_signs, flag_solvent, normalise_1h_multiplicity
from .solvents import normalise_solvent, solvent_signals

#: file name endings read as JCAMP-DX
JCAMP_EXTENSIONS = (".jdx", ".dx", ".jcamp", ".jcm")
#: largest file read (a 1D spectrum of 256k points in ASDF is a few MB)
MAX_BYTES = 64 * 1024 * 1024
#: default peak-picking threshold in multiples of the noise σ, per nucleus (13C quaternary lines are weak)
MIN_SNR = {"13C": 6.0, "1H": 10.0}
#: 1H: lines closer than this belong to one multiplet (no H–H coupling exceeds about 18.5 Hz, common practice)
MULTIPLET_GAP_HZ = 20.0
#: 1H: a multiplet's integration span reaches this many line widths beyond its outer lines
SPAN_WIDTHS = 4.0
#: 1H: multiplets with less than this share of the largest one's area are set aside (the 13C satellites of a
#: strong singlet are 0.55 % of it each, common practice)
WEAK_SHARE = 0.02


@dataclass
class Trace:
    """A processed 1D spectrum: shifts (ppm, ascending) and intensities."""

    ppm: np.ndarray
    y: np.ndarray
    mhz: float | None


def is_jcamp(path: str | Path) -> bool:
    return Path(path).suffix.lower() in JCAMP_EXTENSIONS


def bruker_pdata(path: str | Path) -> Path | None:
    """The processed-data folder of a Bruker data set given as the experiment folder ('…/10': its pdata/1), a
    processing folder ('…/10/pdata/1') or its real spectrum file ('…/1r'); None for anything else."""
    p = Path(path)
    try:
        if p.is_file() and p.name in ("1r", "procs"):
            p = p.parent
        if p.is_dir():
            if (p / "1r").is_file() or (p / "2rr").is_file():
                return p
            if (p / "pdata").is_dir():
                numbered = sorted((d for d in (p / "pdata").iterdir() if d.is_dir() and d.name.isdigit()),
                                  key=lambda d: int(d.name))
                for d in numbered:
                    if (d / "1r").is_file() or (d / "2rr").is_file():
                        return d
    except OSError:
        return None
    return None


def _bruker_text(value) -> str | None:
    """A Bruker parameter string without its angle brackets ('<CDCl3>' -> 'CDCl3')."""
    if value is None:
        return None
    t = str(value).strip().strip("<>").strip()
    return t or None


def read_bruker(path: str | Path, nucleus: str = "13C", solvent: str | None = None,
                min_snr: float | None = None, signed: bool | None = None) -> PeakList:
    """Peaks picked from a Bruker processed 1D spectrum (the real part, ``1r``, with its ``procs``; the
    experiment's ``acqus`` for the nucleus and solvent when present), read with nmrglue.  The ppm scale is
    the processing parameters': the first point at ``OFFSET`` ppm, ``SW_p`` Hz over ``SI`` points at ``SF`` MHz
    (Bruker's processed-data layout; the spectrum is taken as referenced, as a JCAMP-DX trace is)."""
    pdir = bruker_pdata(path)
    where = str(path)
    if pdir is None:
        raise InputError(f"{path}: not a Bruker processed data set (no pdata/N/1r)")
    if (pdir / "2rr").is_file() and not (pdir / "1r").is_file():
        raise InputError(f"{where}: a 2D spectrum (2rr); give the 1D 13C or 1H data set, or its peak list (a 2D data "
                         "set goes to --hsqc, --hmbc, --cosy or --noesy)")
    dic, data = _nmrglue(lambda ng: ng.bruker.read_pdata(str(pdir), scale_data=True), "Bruker data",
                         f"{where}: the processed data cannot be read")
    procs, acqus = dic.get("procs") or {}, dic.get("acqus") or {}
    y = _one_d(data, f"{where}: the processed data")
    ppm = _axis(procs, len(y), where, "procs")
    sf = float(procs["SF"])
    found = _bruker_text(acqus.get("NUC1")) or _bruker_text(procs.get("AXNUC"))
    found = found if found in ("1H", "13C") else (None if found in (None, "off") else found)
    if found is not None and found != nucleus:
        raise InputError(f"{where}: the data set holds a {found} spectrum (NUC1 {found}), given as {nucleus}{_nucleus_hint(found)}")
    trace = Trace(ppm[::-1].copy(), y[::-1].copy(), sf)
    if signed is None:   # a DEPT pulse program ('dept135')
        signed = nucleus == "13C" and "dept" in str(acqus.get("PULPROG", "")).lower()
    picked, height, width = pick_lines(trace, nucleus, min_snr, signed=bool(signed))
    what = (f"Bruker {nucleus} spectrum ({pdir.parent.parent.name}/pdata/{pdir.name}), {len(y):,} points: {len(picked)} "
            f"lines picked above {min_snr or MIN_SNR[nucleus]:g}× the noise")
    return _lines_to_peaklist(picked, height, width, [None] * len(picked), trace, nucleus, sf,
                              _bruker_text(acqus.get("SOLVENT")), solvent, where, what, [])


#: 2D cross peaks picked from a Bruker 2rr: standing this many times above the noise (σ from the median absolute
#: deviation of the whole matrix) and at least this share of the tallest (t1 noise and artefacts stay below it);
#: chosen; more than ``MAX_2D_PEAKS`` picked is refused (give the cross peaks as a list instead)
MIN_SNR_2D = 8.0
MIN_SHARE_2D = 0.02
MAX_2D_PEAKS = 400
#: the nuclei of each 2D experiment's indirect (F1) and direct (F2) dimensions
DIMS_2D = {"HSQC": ("13C", "1H"), "HMBC": ("13C", "1H"), "COSY": ("1H", "1H"), "NOESY": ("1H", "1H")}


def _axis(par: dict, n: int, where: str, name: str) -> np.ndarray:
    """The ppm of each point of one dimension from its processing parameters (``OFFSET`` of the first point,
    ``SW_p`` Hz over the points at ``SF`` MHz)."""
    try:
        offset, sw_p, sf = float(par["OFFSET"]), float(par["SW_p"]), float(par["SF"])
    except (KeyError, TypeError, ValueError):
        raise InputError(f"{where}: {name} lacks OFFSET, SW_p or SF, which place the spectrum on the ppm scale") from None
    if sf <= 0 or sw_p <= 0:
        raise InputError(f"{where}: {name} has SF = {sf:g} MHz and SW_p = {sw_p:g} Hz; both must be positive")
    return offset - np.arange(n) * (sw_p / sf) / n


def _refine(a: np.ndarray, i: int, j: int) -> tuple[float, float]:
    """Sub-point position of a 2D maximum: a parabola through it and its two neighbours in each dimension."""
    out = []
    for k, (lo, mid, hi) in enumerate(((a[i - 1, j], a[i, j], a[i + 1, j]) if 0 < i < a.shape[0] - 1 else (0, 1, 0),
                                       (a[i, j - 1], a[i, j], a[i, j + 1]) if 0 < j < a.shape[1] - 1 else (0, 1, 0))):
        den = lo - 2 * mid + hi
        out.append(0.5 * (lo - hi) / den if den < 0 else 0.0)
    return i + out[0], j + out[1]


def read_bruker_2d(path: str | Path, experiment: str = "HSQC", min_snr: float | None = None):
    """Cross peaks picked from a Bruker processed 2D data set (``2rr`` with its ``procs`` for F2 and ``proc2s`` for
    F1; the experiment's ``acqus``), read with nmrglue, as the :class:`~shiftrank.inputs.peaks.HsqcList` of
    ``experiment`` (HSQC, HMBC: F1 13C, F2 1H; COSY, NOESY: 1H in both).  A cross peak is a local maximum of the
    absolute intensity over its 5 × 5 neighbourhood standing ``MIN_SNR_2D`` times above the noise and at least
    ``MIN_SHARE_2D`` of the tallest; its position is refined by a parabola in each dimension.  An HSQC with peaks of
    both signs is taken as multiplicity-edited (negative CH2, positive CH/CH3; common practice)."""
    from scipy.ndimage import maximum_filter

    from .peaks import hsqc_list

    pdir = bruker_pdata(path)
    where = str(path)
    if pdir is None or not (pdir / "2rr").is_file():
        raise InputError(f"{where}: not a Bruker processed 2D data set (no pdata/N/2rr)")
    dic, data = _nmrglue(lambda ng: ng.bruker.read_pdata(str(pdir), scale_data=True), "Bruker data",
                         f"{where}: the processed data cannot be read")
    data = np.asarray(data, dtype=float)
    if data.ndim != 2 or min(data.shape) < 3:
        raise InputError(f"{where}: the processed data are not a 2D matrix")
    procs, proc2s, acqus = dic.get("procs") or {}, dic.get("proc2s") or {}, dic.get("acqus") or {}
    f2 = _axis(procs, data.shape[1], where, "procs")
    f1 = _axis(proc2s, data.shape[0], where, "proc2s")
    want = DIMS_2D[experiment]
    got = (_bruker_text(proc2s.get("AXNUC")) or _bruker_text(acqus.get("NUC2")), _bruker_text(procs.get("AXNUC")) or
           _bruker_text(acqus.get("NUC1")))
    if experiment in ("COSY", "NOESY") and got[0] in (None, "off"):
        got = (got[1], got[1])   # a homonuclear experiment names one nucleus
    if any(g not in (None, "off") and g != w for g, w in zip(got, want)):
        raise InputError(f"{where}: the data set correlates {got[0]} (F1) with {got[1]} (F2); {experiment} spectra have "
                         f"{want[0]} in F1 and {want[1]} in F2")
    a = np.abs(data)
    centre = np.median(data)
    noise = 1.4826 * float(np.median(np.abs(data - centre))) or float(np.std(data)) or 1.0
    floor = max((min_snr or MIN_SNR_2D) * noise, MIN_SHARE_2D * float(a.max()))
    peaks = np.argwhere((a == maximum_filter(a, size=5, mode="nearest")) & (a > floor))
    if len(peaks) > MAX_2D_PEAKS:
        raise InputError(f"{where}: {len(peaks):,} cross peaks stand above {floor / noise:.0f}× the noise; give the "
                         f"{experiment} cross peaks as a list of pairs (or raise the threshold)")
    if not len(peaks):
        raise InputError(f"{where}: no cross peak stands above {floor / noise:.0f}× the noise")
    records, signs = [], []
    for i, j in peaks:
        x, y = _refine(a, int(i), int(j))
        d1 = float(np.interp(x, np.arange(len(f1)), f1))
        d2 = float(np.interp(y, np.arange(len(f2)), f2))
        records.append([round(d1, 2 if want[0] == "13C" else 3), round(d2, 3)])
        signs.append(data[i, j] < 0)
    if experiment == "HSQC" and any(signs) and not all(signs):   # both phases: a multiplicity-edited spectrum
        records = [r + ["CH2" if neg else "CH/CH3"] for r, neg in zip(records, signs)]
    out = hsqc_list(records, f"{Path(where).name} ({experiment})", experiment)
    out.notes.insert(0, f"{where}: Bruker 2D data set ({data.shape[0]} × {data.shape[1]} points): {len(records)} cross "
                        f"peaks picked above {floor / noise:.0f}× the noise" + (", with the phases of an edited HSQC"
                        if experiment == "HSQC" and out.kinds else ""))
    return out


#: the line every JCAMP-DX file carries
JCAMP_HEADER = re.compile(r"^\s*##JCAMP-?DX\s*=", re.I | re.M)


def _label(raw: str) -> str:
    """A JCAMP-DX label in its compared form: upper case without spaces, '-', '/', '_' (the standard's rule)."""
    return re.sub(r"[\s\-/_]", "", raw).upper()


def _blocks(text: str) -> list[dict]:
    """The labelled data records of each block (a block starts at ##TITLE=); values keep their lines."""
    blocks: list[dict] = []
    cur: dict | None = None
    key = None
    for line in text.splitlines():
        line = line.split("$$", 1)[0].rstrip()
        m = re.match(r"\s*##([^=]*)=(.*)$", line)
        if m:
            key = _label(m.group(1))
            if key == "TITLE" or cur is None:
                cur = {}
                blocks.append(cur)
            cur.setdefault(key, m.group(2).strip())
            continue
        if cur is not None and key is not None and line.strip():
            cur[key] = cur[key] + "\n" + line
    return blocks


def _nucleus(block: dict) -> str | None:
    raw = block.get(".OBSERVENUCLEUS") or ""
    m = re.search(r"(\d+)\s*([A-Za-z]{1,2})", raw)
    if not m:
        return None
    return m.group(1) + m.group(2).capitalize()


def _nucleus_hint(found: str) -> str:
    """Which option takes a spectrum of nucleus ``found``."""
    return {"1H": " (a 1H spectrum goes to --peaks-1h, 'peaks_1h' or 'file_1h')",
            "13C": " (a 13C spectrum goes to --peaks, 'peaks' or 'file_13c')"}.get(found, "")


def instrument_nucleus(path: str | Path) -> str:
    """The nucleus an instrument file declares (JCAMP-DX ``##.OBSERVE NUCLEUS=``, Bruker ``acqus`` ``NUC1``) when
    it is 1H or 13C; '13C' otherwise (what a peak file is read as by default)."""
    found = None
    try:
        pdir = bruker_pdata(path)
        if pdir is not None:
            acqus = pdir.parent.parent / "acqus"
            if acqus.is_file():
                m = re.search(r"^##\$NUC1=\s*<?([^>\s]+)", acqus.read_text(errors="replace"), re.M)
                found = m.group(1) if m else None
        elif is_jcamp(path):
            blocks = _blocks(Path(path).read_text(errors="replace"))
            found = next((n for n in map(_nucleus, blocks) if n), None)
    except OSError:
        found = None
    return found if found in ("1H", "13C") else "13C"


def _float(block: dict, key: str, where: str) -> float | None:
    raw = block.get(key)
    if raw is None or not raw.strip():
        return None
    try:
        return float(raw.split()[0].rstrip(","))
    except ValueError:
        raise InputError(f"{where}: ##{key}= '{raw[:30]}' is not a number") from None


def read_jcamp(path: str | Path, nucleus: str = "13C", solvent: str | None = None,
               min_snr: float | None = None, signed: bool | None = None) -> PeakList:
    """Peaks of a JCAMP-DX file (a peak table, or a processed 1D spectrum whose peaks are picked).

    Raises :class:`~shiftrank.errors.InputError` naming the file and the problem (not JCAMP-DX, another
    nucleus than ``nucleus``, Hz without an observe frequency, no data block, no peak above the threshold).
    """
    p = Path(path)
    if not p.exists():
        raise InputError(f"{p}: no such file")
    if p.stat().st_size > MAX_BYTES:
        raise InputError(f"{p.name}: {p.stat().st_size:,} bytes; JCAMP-DX files above {MAX_BYTES:,} bytes are not read")
    text = read_user_text(p, "a JCAMP-DX file", fallback="latin-1")
    where = p.name
    if not JCAMP_HEADER.search(text):
        raise InputError(f"{where}: not a JCAMP-DX file (no '##JCAMP-DX=' line)")
    blocks = _blocks(text)
    table = next((b for b in blocks if "PEAKTABLE" in b), None)
    spectrum = next((b for b in blocks if "XYDATA" in b or "DATATABLE" in b or "XYPOINTS" in b), None)
    block = table if table is not None else spectrum
    head = blocks[0]
    dims = ((block or head).get("NUMDIM") or head.get("NUMDIM") or "1").split()[0]
    if (dims != "1" or re.search(r"^\s*##PAGE=\s*F1\s*=", text, re.I | re.M)
            or block is None and re.search(r"nD|2D", head.get("DATATYPE", ""))):
        raise InputError(f"{where}: a 2D spectrum (##NUM DIM= {dims}); give the 1D 13C or 1H spectrum, or its peak list "
                         "(HSQC: its cross peaks as 'δC δH' pairs)")
    if block is None:
        raise InputError(f"{where}: JCAMP-DX file without a peak table (##PEAK TABLE=) or a spectrum (##XYDATA=, ##XYPOINTS=)")
    found = _nucleus(block) or _nucleus(head)
    if found is not None and found != nucleus:
        raise InputError(f"{where}: the file holds a {found} spectrum (##.OBSERVE NUCLEUS= "
                         f"{(block.get('.OBSERVENUCLEUS') or head.get('.OBSERVENUCLEUS') or '').strip()}), given as {nucleus}"
                         f"{_nucleus_hint(found)}")
    mhz = _float(block, ".OBSERVEFREQUENCY", where) or _float(head, ".OBSERVEFREQUENCY", where)
    file_solvent = (block.get(".SOLVENTNAME") or head.get(".SOLVENTNAME") or "").strip() or None
    notes: list[str] = []
    if table is not None:
        ppm, height, width, letters = _peak_table(table, mhz, where)
        what = f"JCAMP-DX {nucleus} peak table, {len(ppm)} lines"
        trace = None
    else:
        trace = (_xypoints(block, mhz, where) if "XYPOINTS" in block and "XYDATA" not in block and "DATATABLE" not in block
                 else _trace(p, block, mhz, where))
        if signed is None:   # a DEPT spectrum says so in its title or pulse sequence
            signed = nucleus == "13C" and bool(re.search(r"dept", " ".join(
                (b.get(k) or "") for b in (block, head) for k in ("TITLE", ".PULSESEQUENCE")), re.I))
        ppm, height, width = pick_lines(trace, nucleus, min_snr, signed=bool(signed))
        letters = [None] * len(ppm)
        what = (f"JCAMP-DX {nucleus} spectrum, {len(trace.y):,} points: {len(ppm)} lines picked above "
                f"{min_snr or MIN_SNR[nucleus]:g}× the noise")
    return _lines_to_peaklist(ppm, height, width, letters, trace, nucleus, mhz, file_solvent, solvent, where, what, notes)


def _lines_to_peaklist(ppm, height, width, letters, trace, nucleus: str, mhz, file_solvent, solvent, where: str,
                       what: str, notes: list[str]) -> PeakList:
    """The lines of an instrument file (a peak table's, or those picked from a ``trace``) as a peak list: range
    checks, 1H multiplets and integrals, the solvent's lines set aside (the file's solvent unless ``solvent``)."""
    if mhz:
        what += f", {mhz:g} MHz"
    if file_solvent:
        what += f", solvent '{file_solvent}'"
    notes.append(f"{where}: {what}")
    if not len(ppm):
        raise InputError(f"{where}: no {nucleus} peak found" + (" above the picking threshold" if trace is not None else ""))
    lo, hi = RANGES[nucleus]
    keep = (ppm >= lo) & (ppm <= hi) & np.isfinite(height)
    if not keep.all():
        notes.append(f"{where}: {int((~keep).sum())} lines outside {lo:g}…{hi:g} ppm set aside")
    ppm, height, width = ppm[keep], height[keep], width[keep]
    letters = [m for m, k in zip(letters, keep) if k]
    if not len(ppm):
        raise InputError(f"{where}: no {nucleus} peak within {lo:g}…{hi:g} ppm")
    dept = False
    if nucleus == "13C":
        peaks = [Peak(round(float(x), 3), None, round(float(h), 4), line=None) for x, h in zip(ppm, height)]
        dept = dept135_from_signs(peaks, notes, where)   # lines picked below the baseline: a DEPT-135 trace
    else:
        peaks = _multiplets(ppm, height, width, letters, mhz, trace, notes, where)
    check_count(len(peaks), where)
    pl = PeakList(nucleus, sorted(peaks, key=lambda q: q.shift), where, notes, mhz,
                  trace=thumbnail(trace) if trace is not None else None, dept135=dept)
    key = normalise_solvent(solvent) if solvent else normalise_solvent(file_solvent) if file_solvent else None
    if file_solvent and key is None and not solvent:
        notes.append(f"{where}: solvent '{file_solvent}' has no residual-signal table here; its signals are not set aside")
    before = len(pl.notes)
    pl = flag_solvent(pl, key)
    if key is not None and nucleus == "13C":
        _solvent_multiplet(pl, key, mhz)
    inside = []
    if nucleus == "1H":
        refs = solvent_signals(key, "1H") if key is not None else []
        for q in pl.peaks:   # a residual solvent line is a singlet; a multiplet around it is the sample's (with it)
            if q.lo is not None and (q.solvent is not None or any(q.lo <= r <= q.hi for r in refs)):
                q.solvent = None
                inside.append(f"{q.lo:g}–{q.hi:g}")
        # integrals relative to the smallest multiplet of the sample
        areas = [q.intensity for q in pl.peaks if q.solvent is None and q.intensity]
        unit = min(areas) if areas else 1.0
        for q in pl.peaks:
            if q.intensity is not None:
                q.intensity = round(q.intensity / unit, 2)
        _split_wide_doublets(pl, where)
    n = sum(1 for q in pl.peaks if q.solvent)
    if n or inside:   # one note for the solvent's lines instead of one per line
        del pl.notes[before:]
    if n:
        pl.notes.append(f"{where}: {n} line{'s' if n != 1 else ''} at the residual {key} signal"
                        + (" and its C–D multiplet" if nucleus == "13C" else "") + " (Fulmer et al. 2010): set aside as solvent")
    if inside:
        pl.notes.append(f"{where}: the residual {key} signal lies inside the multiplet{'s' if len(inside) > 1 else ''} "
                        f"{', '.join(inside)}: kept as the sample's, its integral includes the solvent")
    return pl


#: 1H: a doublet this wide (Hz) is a geminal or trans-alkene coupling, one proton per line pair (common practice)
WIDE_DOUBLET_HZ = 12.0


def _split_wide_doublets(pl: PeakList, where: str) -> None:
    """Two lines read as a doublet with J above ``WIDE_DOUBLET_HZ`` whose integral is 2.5 or more times the
    smallest multiplet's are two singlets (two OCH3 groups 14 Hz apart), not one proton's geminal or trans
    coupling: split, with a note."""
    out, split = [], []
    for q in pl.peaks:
        if (q.solvent is None and q.multiplicity == "d" and q.j and q.j[0] > WIDE_DOUBLET_HZ and q.intensity
                and q.intensity >= 2.5 and q.lo is not None and q.hi is not None):
            for x in (q.lo, q.hi):
                out.append(Peak(x, "s", round(q.intensity / 2, 2), 1, None, None))
            split.append(f"{q.shift:g}")
        else:
            out.append(q)
    if split:
        pl.peaks = sorted(out, key=lambda q: q.shift)
        pl.notes.append(f"{where}: {len(split)} two-line group{'s' if len(split) != 1 else ''} at {', '.join(split)} ppm "
                        f"read as two singlets: a doublet wider than {WIDE_DOUBLET_HZ:g} Hz is one proton's (geminal or "
                        "trans), and these integrate to more")


#: Hz: largest one-bond 13C–2H coupling of the common deuterated solvents (CDCl3 32 Hz; DMSO-d6 21 Hz;
#: from memory); the lines of a solvent's C–D multiplet lie within 3 of them of its centre (a septet)
CD_COUPLING_HZ = 32.0


def _solvent_multiplet(pl: PeakList, key: str, mhz: float | None) -> None:
    """Flag the outer lines of the solvent's C–D multiplet, which a picked spectrum shows line by line."""
    reach = 3 * CD_COUPLING_HZ / (mhz or 75.0) + 0.05
    refs = solvent_signals(key, "13C")
    for p in pl.peaks:
        if p.solvent is None and any(abs(p.shift - r) <= reach for r in refs):
            p.solvent = key


def _table(block: dict, key: str, where: str) -> tuple[str, list[list[str]]]:
    """The form ('XY', 'XYW' or 'XYM') and the rows of a tabular record (##PEAK TABLE=, ##XYPOINTS=)."""
    raw = block[key]
    label = "##PEAK TABLE=" if key == "PEAKTABLE" else "##XYPOINTS="
    form = re.match(r"\s*\(\s*(XY[WM]?)\s*\.\.\s*XY[WM]?\s*\)", raw, re.I)
    if not form:
        raise InputError(f"{where}: {label} must start with (XY..XY), (XYW..XYW) or (XYM..XYM); got '{raw[:30]}'")
    width = len(form.group(1))
    rows = []
    for g in re.split(r"[;\n]+", raw[form.end():]):
        vals = [v for v in re.split(r"[,\s]+", g.strip()) if v]
        rows.extend(vals[k:k + width] for k in range(0, len(vals), width))
    return form.group(1).upper(), rows


def _factor(block: dict, key: str, where: str) -> float:
    """##XFACTOR / ##YFACTOR: what the tabulated values are multiplied by (1 when absent)."""
    f = _float(block, key, where)
    return 1.0 if f is None or f == 0 else f


def _peak_table(block: dict, mhz: float | None, where: str):
    form, rows = _table(block, "PEAKTABLE", where)
    xs, ys, ws, ms = [], [], [], []
    for r in rows:
        if len(r) < 2:
            raise InputError(f"{where}: peak table entry '{' '.join(r)}' has no intensity")
        try:
            xs.append(float(r[0]))
            ys.append(float(r[1]))
        except ValueError:
            raise InputError(f"{where}: peak table entry '{', '.join(r)}' is not numeric") from None
        w = None
        m = None
        if len(form) == 3 and len(r) > 2:
            if form.endswith("W"):
                try:
                    w = float(r[2])
                except ValueError:
                    raise InputError(f"{where}: peak width '{r[2]}' is not a number") from None
            else:
                m = r[2]
        ws.append(w)
        ms.append(m)
    xf = _factor(block, "XFACTOR", where)
    x = _to_ppm(np.array(xs, dtype=float) * xf, block, mhz, where)
    order = np.argsort(x)
    w = np.array([np.nan if v is None else v for v in ws], dtype=float) * xf
    if _label(block.get("XUNITS", "PPM")) == "HZ" and mhz:
        w = w / mhz   # widths in the X unit
    y = np.array(ys, dtype=float) * _factor(block, "YFACTOR", where)
    return x[order], y[order], w[order], [ms[k] for k in order]


def _xypoints(block: dict, mhz: float | None, where: str) -> Trace:
    """A spectrum tabulated as (X, Y) pairs (##XYPOINTS=), as some exports write it instead of ##XYDATA=."""
    _, rows = _table(block, "XYPOINTS", where)
    try:
        pts = np.array([[float(r[0]), float(r[1])] for r in rows if len(r) >= 2], dtype=float)
    except ValueError:
        raise InputError(f"{where}: ##XYPOINTS= holds a value that is not a number") from None
    if len(pts) < 16 or not np.isfinite(pts).all():
        raise InputError(f"{where}: ##XYPOINTS= holds {len(pts)} usable points; a spectrum needs more")
    x = _to_ppm(pts[:, 0] * _factor(block, "XFACTOR", where), block, mhz, where)
    order = np.argsort(x)
    return Trace(x[order], pts[order, 1] * _factor(block, "YFACTOR", where), mhz)


def _to_ppm(x: np.ndarray, block: dict, mhz: float | None, where: str) -> np.ndarray:
    unit = _label(block.get("XUNITS", "PPM") or "PPM")
    if unit == "PPM":
        return x
    if unit == "HZ":
        if not mhz:
            raise InputError(f"{where}: X values in Hz but no ##.OBSERVE FREQUENCY= to convert them to ppm")
        return x / mhz
    raise InputError(f"{where}: ##XUNITS= {block.get('XUNITS')} is neither PPM nor HZ")


def _nmrglue(read, what: str, cannot: str):
    """``read(nmrglue)`` with nmrglue's warnings silenced; its own errors (malformed or damaged data) become an
    :class:`InputError` starting with ``cannot``."""
    try:
        import nmrglue as ng
    except ImportError:   # pragma: no cover - a dependency of the package
        raise InputError(f"reading {what} needs nmrglue (pip install nmrglue)") from None
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        try:
            return read(ng)
        except Exception as exc:   # nmrglue's own errors on malformed lines or a damaged data set
            raise InputError(f"{cannot} ({type(exc).__name__}: {exc})") from None


def _one_d(data, what: str) -> np.ndarray:
    """The decoded data as a 1D trace of at least 16 finite values, or an error naming ``what`` it should be."""
    y = np.asarray(data, dtype=float)
    if y.ndim != 1 or len(y) < 16 or not np.isfinite(y).all():
        raise InputError(f"{what} are not a 1D trace of finite values ({y.shape} values)")
    return y


def _trace(path: Path, block: dict, mhz: float | None, where: str) -> Trace:
    dic, data = _nmrglue(lambda ng: ng.jcampdx.read(str(path)), "JCAMP-DX spectra",
                         f"{where}: the spectrum's data lines cannot be decoded")
    if data is None:
        raise InputError(f"{where}: no spectrum data could be decoded")
    y = _one_d(data[0] if isinstance(data, list) else data, f"{where}: the spectrum data")
    first, last, unit = _x_range(block, where)
    x = _to_ppm(np.linspace(first, last, len(y)), {"XUNITS": unit}, mhz, where)
    if x[0] > x[-1]:
        x, y = x[::-1].copy(), y[::-1].copy()
    return Trace(x, y, mhz)


def _x_range(block: dict, where: str) -> tuple[float, float, str]:
    """First and last X value and the X unit of a spectrum: ##FIRSTX/##LASTX/##XUNITS of an XYDATA block, or
    the X column of ##FIRST/##LAST/##UNITS in an NTUPLES block (the column ##SYMBOL calls X)."""
    first, last = _float(block, "FIRSTX", where), _float(block, "LASTX", where)
    if first is not None and last is not None:
        return first, last, block.get("XUNITS", "PPM") or "PPM"
    if "FIRST" in block and "LAST" in block:
        symbols = [t.strip().upper() for t in (block.get("SYMBOL") or "X").split(",")]
        k = symbols.index("X") if "X" in symbols else 0
        try:
            first = float(block["FIRST"].split(",")[k])
            last = float(block["LAST"].split(",")[k])
        except (ValueError, IndexError):
            raise InputError(f"{where}: ##FIRST= / ##LAST= do not give the X column's first and last value") from None
        units = (block.get("UNITS") or "").split(",")
        return first, last, (units[k].strip() if k < len(units) and units[k].strip() else "PPM")
    raise InputError(f"{where}: the spectrum has no ##FIRSTX= / ##LASTX= (nor ##FIRST= / ##LAST= of NTUPLES)")


#: points kept of a trace for display (the report draws the measured spectrum)
THUMBNAIL_POINTS = 4000


def thumbnail(trace: Trace, n: int = THUMBNAIL_POINTS) -> tuple[np.ndarray, np.ndarray]:
    """(ppm, intensity) of at most ``2 n`` points keeping every bin's lowest and highest value (narrow lines
    keep their full height)."""
    k = int(np.ceil(len(trace.y) / n))
    if k <= 1:
        return trace.ppm.copy(), trace.y.copy()
    m = len(trace.y) // k * k
    y = trace.y[:m].reshape(-1, k)
    x = trace.ppm[:m].reshape(-1, k).mean(axis=1)
    lo, hi = y.min(axis=1), y.max(axis=1)
    return np.repeat(x, 2), np.column_stack([lo, hi]).ravel()


def noise_sigma(y: np.ndarray) -> float:
    """Robust noise level of a trace: 1.4826 × the median absolute deviation of its point-to-point
    differences / √2 (the baseline dominates a spectrum; differences remove a slow baseline drift)."""
    d = np.diff(y)
    dev = np.abs(d - np.median(d))
    s = 1.4826 * np.median(dev) / np.sqrt(2.0)
    if s == 0:   # integer data with a noise below one count: the median difference is 0; the mean is not
        s = 1.2533 * np.mean(dev) / np.sqrt(2.0)
    if s == 0:   # a noiseless (computed) trace: a millionth of its largest value
        s = 1e-6 * float(np.max(np.abs(y))) or 1.0
    return float(s)


def pick_lines(trace: Trace, nucleus: str, min_snr: float | None = None, signed: bool = False):
    """(ppm, height, width in ppm) of the lines standing ``min_snr`` × σ above the baseline and as much
    above the lower of their two neighbouring minima (so the noise on a strong line's flank is no line).
    ``signed`` (a DEPT-135 trace, whose CH2 lines point down): the lines below the baseline too, with negative
    heights."""
    if signed:
        up = pick_lines(trace, nucleus, min_snr)
        down = pick_lines(Trace(trace.ppm, -trace.y, trace.mhz), nucleus, min_snr)
        order = np.argsort(np.concatenate([up[0], down[0]]))
        return (np.concatenate([up[0], down[0]])[order], np.concatenate([up[1], -down[1]])[order],
                np.concatenate([up[2], down[2]])[order])
    from scipy.signal import find_peaks

    y, x = trace.y, trace.ppm
    base = float(np.median(y))
    sigma = noise_sigma(y)
    if sigma <= 0:
        sigma = max(1e-12, 1e-6 * float(np.max(np.abs(y - base))))
    k = min_snr or MIN_SNR[nucleus]
    idx, props = find_peaks(y, height=base + k * sigma, prominence=k * sigma, width=0, rel_height=0.5)
    widths = props["widths"]
    # two maxima of one line (noise on its top: equal heights both count as prominent) are one line: lines
    # count as resolved only when the trace between them dips below half the smaller one's height
    keep: list[int] = []
    for n, i in enumerate(idx):
        if keep:
            j = idx[keep[-1]]
            dip = float(np.min(y[j:i + 1])) - base
            if dip > 0.5 * min(y[i], y[j]) - 0.5 * base:
                if y[i] > y[j]:
                    keep[-1] = n
                continue
        keep.append(n)
    idx, widths = idx[keep], widths[keep]
    step = float(x[1] - x[0])
    ppm = []
    for i in idx:
        a, b, c = (y[i - 1], y[i], y[i + 1]) if 0 < i < len(y) - 1 else (y[i], y[i], y[i])
        den = a - 2 * b + c
        off = 0.5 * (a - c) / den if den != 0 else 0.0
        ppm.append(x[i] + off * step)
    return np.array(ppm), y[idx] - base, np.maximum(widths, 1.0) * step


#: first-order analysis: most couplings sought in one multiplet, and the tolerances of a match
MAX_COUPLINGS = 4
LINE_TOLERANCE_HZ = 0.6
HEIGHT_TOLERANCE = 0.45   # a line's share of the multiplet's height may differ by this fraction of itself


def stick_pattern(js: tuple) -> tuple[np.ndarray, np.ndarray]:
    """Positions (Hz, from the centre) and relative heights of the first-order pattern of couplings ``js``,
    lines closer than the tolerance merged."""
    pos = np.zeros(1)
    h = np.ones(1)
    for j in js:
        pos = np.concatenate([pos - j / 2, pos + j / 2])
        h = np.concatenate([h, h])
    order = np.argsort(pos)
    pos, h = pos[order], h[order]
    out_p, out_h = [pos[0]], [h[0]]
    for p_, h_ in zip(pos[1:], h[1:]):
        if p_ - out_p[-1] <= LINE_TOLERANCE_HZ:
            out_p[-1] = (out_p[-1] * out_h[-1] + p_ * h_) / (out_h[-1] + h_)
            out_h[-1] += h_
        else:
            out_p.append(p_)
            out_h.append(h_)
    return np.array(out_p), np.array(out_h) / np.sum(out_h)


def first_order(pos_hz: np.ndarray, h: np.ndarray) -> tuple[str, tuple]:
    """Letters and J values (Hz, largest first) of a multiplet's lines read as a first-order pattern, or
    ('m', ()) when no set of up to ``MAX_COUPLINGS`` couplings reproduces them.

    Every coupling of a first-order multiplet is the distance from its outermost line to some other line
    (flip that one spin), so the candidates are those distances; the fewest couplings whose pattern puts a
    line within ``LINE_TOLERANCE_HZ`` of every observed line, with the observed relative heights, win
    (the analysis of Hoye, Hanson & Vyvyan 1994, J. Org. Chem. 59, 4096, done by search).  Equal couplings
    name one letter: (7.6, 7.6, 1.5) is 'td'.

    >>> first_order(np.array([0.0, 2.0, 8.4, 10.4]), np.ones(4))
    ('dd', (8.4, 2.0))
    """
    n = len(pos_hz)
    if n == 1:
        return "s", ()
    pos = np.sort(np.asarray(pos_hz, dtype=float))
    rel = np.asarray(h, dtype=float)[np.argsort(pos_hz)]
    rel = rel / rel.sum()
    cands = sorted({round(float(d), 2) for d in pos[1:] - pos[0] if d > LINE_TOLERANCE_HZ})
    centre = float(np.sum(pos * rel))
    best = None
    for k in range(1, MAX_COUPLINGS + 1):
        if 2 ** k < n:
            continue
        for js in itertools.combinations_with_replacement(cands, k):
            sp, sh = stick_pattern(js)
            if len(sp) != n:
                continue
            sp = sp + centre
            err = np.abs(sp - pos)
            if err.max() > LINE_TOLERANCE_HZ + 0.02 * (pos[-1] - pos[0]):
                continue
            if np.any(np.abs(sh - rel) > HEIGHT_TOLERANCE * np.maximum(sh, rel)):
                continue
            score = float(err.sum())
            if best is None or score < best[0]:
                best = (score, js)
        if best is not None:
            break
    if best is None:
        return "m", ()
    groups: list[list[float]] = []
    for j in sorted(best[1], reverse=True):
        if groups and abs(groups[-1][0] - j) <= LINE_TOLERANCE_HZ:
            groups[-1].append(j)
        else:
            groups.append([j])
    letters = "".join({1: "d", 2: "t", 3: "q", 4: "p"}.get(len(g), "m") for g in groups)
    return letters, tuple(round(float(np.mean(g)), 1) for g in groups)


def _multiplets(ppm, height, width, letters, mhz, trace: Trace | None, notes: list[str], where: str) -> list[Peak]:
    """1H lines grouped into multiplets with their integrals, letters and J values."""
    if not mhz:
        raise InputError(f"{where}: a 1H spectrum needs ##.OBSERVE FREQUENCY= to group its lines into multiplets")
    gap = MULTIPLET_GAP_HZ / mhz
    groups, cur = [], [0]
    for k in range(1, len(ppm)):
        if ppm[k] - ppm[k - 1] <= gap:
            cur.append(k)
        else:
            groups.append(cur)
            cur = [k]
    groups.append(cur)
    out: list[Peak] = []
    areas = []
    spans = []
    for g in groups:
        w = np.nanmedian(width[g]) if np.isfinite(width[g]).any() else 0.002
        spans.append((ppm[g[0]] - SPAN_WIDTHS * w, ppm[g[-1]] + SPAN_WIDTHS * w))
    for k, g in enumerate(groups):
        lo, hi = spans[k]
        if k > 0:
            lo = max(lo, (ppm[groups[k - 1][-1]] + ppm[g[0]]) / 2)
        if k + 1 < len(groups):
            hi = min(hi, (ppm[g[-1]] + ppm[groups[k + 1][0]]) / 2)
        if trace is not None:
            sel = (trace.ppm >= lo) & (trace.ppm <= hi)
            base = float(np.median(trace.y))
            area = float(np.sum(trace.y[sel] - base)) * float(trace.ppm[1] - trace.ppm[0])
        else:
            wv = np.where(np.isfinite(width[g]), width[g], 1.0)
            area = float(np.sum(height[g] * wv))
        areas.append(max(area, 0.0))
        printed = next((m for m in (letters[i] for i in g) if m), None)
        if printed:
            mult, js = normalise_1h_multiplicity(printed), ()
        else:
            mult, js = first_order(ppm[g] * mhz, height[g])
        centre = float(np.average(ppm[g], weights=np.maximum(height[g], 1e-12)))
        pk = Peak(round(centre, 4), mult, None, 1, None, None, j=js)
        if len(g) > 1:
            pk.lo, pk.hi = round(float(ppm[g[0]]), 4), round(float(ppm[g[-1]]), 4)
        out.append(pk)
    top = max(areas) if areas else 0.0
    weak = [k for k, a in enumerate(areas) if a < WEAK_SHARE * top]
    if weak:   # 13C satellites and spinning sidebands of strong lines, traces of impurities
        notes.append(f"{where}: {len(weak)} weak 1H multiplet{'s' if len(weak) != 1 else ''} below {WEAK_SHARE:.0%} of the "
                     f"largest set aside (satellites, sidebands or traces?): "
                     + ", ".join(f"{out[k].shift:g}" for k in weak[:8]) + (" …" if len(weak) > 8 else ""))
    keep = [k for k in range(len(out)) if k not in set(weak)]
    for k in keep:
        out[k].intensity = areas[k]   # in area units here; made relative once solvent lines are known
    notes.append(f"{where}: {len(keep)} 1H multiplets from {len(ppm)} lines (lines within {MULTIPLET_GAP_HZ:g} Hz "
                 "grouped); integrals relative to the smallest sample multiplet" + ("" if trace is not None else
                                                                                   ", from line heights × widths"))
    out = [out[k] for k in keep]
    return out
