"""Residual solvent signals in deuterated NMR solvents.

Values are those of Fulmer, G. R. et al. (2010) Organometallics 29, 2176,
Table 1 (residual 1H of the solvent and of water) and Table 2 (13C of the
solvent), at 298 K, referenced to TMS; pyridine-d5, DMF-d7 and TFA-d, which
those tables do not hold, as commonly tabulated (from memory).  A mixture
('CDCl3 + CD3OD') sets aside the lines of each part.  Peaks that sit on these positions are
set aside with a note rather than silently used or dropped.
"""
from __future__ import annotations

import re
from dataclasses import dataclass


@dataclass(frozen=True)
class Solvent:
    key: str
    name: str
    residual_1h: tuple[float, ...]
    water_1h: float | None
    carbon_13c: tuple[float, ...]


#: Fulmer et al. 2010, Tables 1 and 2.
SOLVENTS = {
    "CDCl3": Solvent("CDCl3", "chloroform-d", (7.26,), 1.56, (77.16,)),
    "DMSO-d6": Solvent("DMSO-d6", "dimethyl sulfoxide-d6", (2.50,), 3.33, (39.52,)),
    "CD3OD": Solvent("CD3OD", "methanol-d4", (3.31,), 4.87, (49.00,)),
    "acetone-d6": Solvent("acetone-d6", "acetone-d6", (2.05,), 2.84, (29.84, 206.26)),
    "C6D6": Solvent("C6D6", "benzene-d6", (7.16,), 0.40, (128.06,)),
    "CD3CN": Solvent("CD3CN", "acetonitrile-d3", (1.94,), 2.13, (1.32, 118.26)),
    "D2O": Solvent("D2O", "deuterium oxide", (4.79,), None, ()),
    "CD2Cl2": Solvent("CD2Cl2", "dichloromethane-d2", (5.32,), 1.52, (53.84,)),
    "THF-d8": Solvent("THF-d8", "tetrahydrofuran-d8", (1.72, 3.58), 2.46, (25.31, 67.21)),
    "toluene-d8": Solvent("toluene-d8", "toluene-d8", (2.08, 6.97, 7.01, 7.09), 0.43, (20.43, 125.13, 127.96, 128.87, 137.48)),
    # not in Fulmer et al. 2010; residual lines as commonly tabulated for these solvents (from memory)
    "pyridine-d5": Solvent("pyridine-d5", "pyridine-d5", (7.22, 7.58, 8.74), 4.9, (123.87, 135.91, 150.35)),
    "DMF-d7": Solvent("DMF-d7", "N,N-dimethylformamide-d7", (2.75, 2.92, 8.03), 3.5, (29.76, 34.89, 163.15)),
    "TFA-d": Solvent("TFA-d", "trifluoroacetic acid-d", (11.50,), None, (116.6, 164.2)),
}

_ALIASES = [
    (r"cdcl3|cdci3|chcl3-d|chloroform", "CDCl3"),
    (r"dmso|dimethyl ?sul(?:f|ph)oxide|c2d6so|cd3socd3", "DMSO-d6"),
    (r"cd3od|methanol|meod|meoh|cd4o", "CD3OD"),
    (r"acetone|\(cd3\)2co|c3d6o", "acetone-d6"),
    (r"c6d6|benzene", "C6D6"),
    (r"cd3cn|acetonitrile|c2d3n", "CD3CN"),
    (r"d2o|deuterium oxide|water", "D2O"),
    (r"cd2cl2|dichloromethane|methylene chloride", "CD2Cl2"),
    (r"thf|tetrahydrofuran", "THF-d8"),
    (r"toluene", "toluene-d8"),
    (r"pyridine|c5d5n", "pyridine-d5"),
    (r"\bdmf\b|dmf-|dimethylformamide|c3d7no", "DMF-d7"),
    (r"\btfa\b|tfa-d|trifluoroacetic|cf3cood", "TFA-d"),
]
#: between the parts of a solvent mixture ('CDCl3 + CD3OD', 'CDCl3/DMSO-d6 (4:1)')
_MIXTURE_SEP = re.compile(r"\s*(?:\+|/|:|\band\b|;)\s*")

#: Half-width of the window in which a peak counts as a solvent signal.
TOLERANCE = {"13C": 0.5, "1H": 0.05}


def normalise_solvent(name: str | None) -> str | None:
    """Canonical key for a solvent name, or None when unknown or unreported.

    >>> normalise_solvent("Dimethylsulphoxide-D6 (DMSO-D6, C2D6SO))")
    'DMSO-d6'
    >>> normalise_solvent("Unreported") is None
    True

    Text taken from a PDF often has its subscripts set apart ('CDCl 3', 'CD 2 Cl 2'): read as written first, then
    with the spaces beside digits removed.

    >>> normalise_solvent("CDCl 3"), normalise_solvent("CD 2 Cl 2"), normalise_solvent("D 2 O")
    ('CDCl3', 'CD2Cl2', 'D2O')
    """
    if not name:
        return None
    key = _lookup(name.strip().lower())
    if key is None and re.search(r"[a-z]\s+\d|\d\s+[a-z]", name.lower()):
        key = _lookup(re.sub(r"(?<=[a-z])\s+(?=\d)|(?<=\d)\s+(?=[a-z])", "", name.strip().lower()))
    return key


def _lookup(s: str) -> str | None:
    for key in SOLVENTS:
        if s == key.lower():
            return key
    hits = {key for pattern, key in _ALIASES if re.search(pattern, s)}
    if len(hits) == 1:
        return hits.pop()
    if len(hits) > 1:
        return _mixture(s)
    return None


def _mixture(s: str) -> str | None:
    """The key of a mixture of two or three known solvents ('CDCl3 + CD3OD'), registered in :data:`SOLVENTS`
    with every part's residual lines (the water line moves with the mixture and is left out); None when the
    parts are not each one known solvent.

    >>> normalise_solvent("CDCl3 + CD3OD"), SOLVENTS["CDCl3 + CD3OD"].carbon_13c
    ('CDCl3 + CD3OD', (77.16, 49.0))
    """
    s = re.sub(r"\(.*?\)|\d+(?:\.\d+)?\s*:\s*\d+(?:\.\d+)?|\d+(?:\.\d+)?\s*%", " ", s)   # '(9:1)', '10%'
    parts = [x.strip() for x in _MIXTURE_SEP.split(s) if x.strip()]
    keys = []
    for part in parts:
        if not part:
            continue
        found = {key for pattern, key in _ALIASES if re.search(pattern, part)}
        if len(found) != 1:
            return None
        keys.append(found.pop())
    keys = list(dict.fromkeys(keys))
    if not 2 <= len(keys) <= 3:
        return None
    key = " + ".join(keys)
    if key not in SOLVENTS:
        sols = [SOLVENTS[k] for k in keys]
        SOLVENTS[key] = Solvent(key, " + ".join(x.name for x in sols), tuple(v for x in sols for v in x.residual_1h),
                                None, tuple(v for x in sols for v in x.carbon_13c))
    return key


def solvent_signals(key: str, nucleus: str = "13C") -> tuple[float, ...]:
    """Residual signals of a solvent (13C, or 1H including water)."""
    sol = SOLVENTS[key]
    if nucleus == "13C":
        return sol.carbon_13c
    return sol.residual_1h + ((sol.water_1h,) if sol.water_1h is not None else ())


#: Solvents whose deuterium takes the place of OH/NH/SH protons (and of the water's): in these those protons
#: are usually not seen at all (common practice).  A mixture with one of them exchanges too.
EXCHANGING = ("CD3OD", "D2O", "TFA-d")


def exchanges_deuterium(key: str | None) -> str | None:
    """The part of solvent ``key`` that exchanges OH/NH protons for deuterium, or None.

    >>> exchanges_deuterium("CDCl3 + CD3OD"), exchanges_deuterium("DMSO-d6")
    ('CD3OD', None)
    """
    if not key:
        return None
    for part in key.split(" + "):
        if part in EXCHANGING:
            return part
    return None


#: Common laboratory solvents and grease as trace impurities in CDCl3 and DMSO-d6: name -> formula (None: grease)
#: and, per solvent, the 13C lines and the 1H lines with their protons (ppm, H).  The shifts are those tabulated by
#: Fulmer et al. 2010 (Organometallics 29, 2176, Tables 1 and 2), recalled from memory: close enough to point at a
#: residue, not a substitute for the table.
IMPURITIES = {
    "acetic acid": ("C2H4O2", {"CDCl3": {"13C": (175.99, 20.81), "1H": ((2.10, 3),)},
                               "DMSO-d6": {"13C": (171.93, 20.95), "1H": ((1.91, 3),)}}),
    "acetone": ("C3H6O", {"CDCl3": {"13C": (207.07, 30.92), "1H": ((2.17, 6),)},
                          "DMSO-d6": {"13C": (206.31, 30.56), "1H": ((2.09, 6),)}}),
    "acetonitrile": ("C2H3N", {"CDCl3": {"13C": (116.43, 1.89), "1H": ((2.10, 3),)},
                               "DMSO-d6": {"13C": (117.91, 1.03), "1H": ((2.07, 3),)}}),
    "dichloromethane": ("CH2Cl2", {"CDCl3": {"13C": (53.52,), "1H": ((5.30, 2),)},
                                   "DMSO-d6": {"13C": (54.84,), "1H": ((5.76, 2),)}}),
    "diethyl ether": ("C4H10O", {"CDCl3": {"13C": (65.91, 15.20), "1H": ((3.48, 4), (1.21, 6))},
                                 "DMSO-d6": {"13C": (62.05, 15.12), "1H": ((3.38, 4), (1.09, 6))}}),
    "DMF": ("C3H7NO", {"CDCl3": {"13C": (162.62, 36.50, 31.39), "1H": ((8.02, 1), (2.96, 3), (2.88, 3))},
                       "DMSO-d6": {"13C": (162.29, 35.73, 30.73), "1H": ((7.95, 1), (2.89, 3), (2.73, 3))}}),
    "DMSO": ("C2H6OS", {"CDCl3": {"13C": (40.76,), "1H": ((2.62, 6),)}}),
    "1,4-dioxane": ("C4H8O2", {"CDCl3": {"13C": (67.14,), "1H": ((3.71, 8),)},
                               "DMSO-d6": {"13C": (66.36,), "1H": ((3.57, 8),)}}),
    "ethanol": ("C2H6O", {"CDCl3": {"13C": (58.28, 18.41), "1H": ((3.72, 2), (1.25, 3))},
                          "DMSO-d6": {"13C": (56.07, 18.51), "1H": ((3.44, 2), (1.06, 3))}}),
    "ethyl acetate": ("C4H8O2", {"CDCl3": {"13C": (171.36, 60.49, 21.04, 14.19), "1H": ((4.12, 2), (2.05, 3), (1.26, 3))},
                                 "DMSO-d6": {"13C": (170.31, 59.74, 20.68, 14.40), "1H": ((4.03, 2), (1.99, 3), (1.17, 3))}}),
    "n-hexane": ("C6H14", {"CDCl3": {"13C": (31.64, 22.70, 14.14), "1H": ((1.26, 8), (0.88, 6))},
                           "DMSO-d6": {"13C": (30.95, 22.05, 13.88), "1H": ((1.25, 8), (0.86, 6))}}),
    "methanol": ("CH4O", {"CDCl3": {"13C": (50.41,), "1H": ((3.49, 3),)},
                          "DMSO-d6": {"13C": (48.59,), "1H": ((3.16, 3),)}}),
    "2-propanol": ("C3H8O", {"CDCl3": {"13C": (64.50, 25.14), "1H": ((4.04, 1), (1.22, 6))},
                             "DMSO-d6": {"13C": (64.92, 25.43), "1H": ((3.78, 1), (1.04, 6))}}),
    "tetrahydrofuran": ("C4H8O", {"CDCl3": {"13C": (67.97, 25.62), "1H": ((3.76, 4), (1.85, 4))},
                                  "DMSO-d6": {"13C": (67.03, 25.14), "1H": ((3.60, 4), (1.76, 4))}}),
    "toluene": ("C7H8", {"CDCl3": {"13C": (137.89, 129.07, 128.26, 125.33, 21.46), "1H": ((2.36, 3),)},
                         "DMSO-d6": {"13C": (137.35, 128.88, 128.18, 125.29, 20.99), "1H": ((2.30, 3),)}}),
    "triethylamine": ("C6H15N", {"CDCl3": {"13C": (46.25, 11.61), "1H": ((2.53, 6), (1.03, 9))},
                                 "DMSO-d6": {"13C": (45.74, 10.75), "1H": ((2.43, 6), (0.93, 9))}}),
    "grease": (None, {"CDCl3": {"13C": (29.76,), "1H": ((1.26, None), (0.86, None))}}),
}
#: Half-width of the window in which a line counts as an impurity's (printed values move with concentration).
IMPURITY_TOLERANCE = {"13C": 0.3, "1H": 0.03}


@dataclass(frozen=True)
class ImpurityMatch:
    name: str
    shifts: tuple          # the observed lines that match, in the table's order
    index: tuple           # their positions in the lines given
    protons: tuple         # 1H: protons of the impurity at each line (None: unknown, grease)
    formula: str | None


def impurity_lines(peaks, key: str | None, nucleus: str = "13C") -> list[ImpurityMatch]:
    """Impurities of :data:`IMPURITIES` whose every line in solvent ``key`` is among ``peaks`` (anything with a
    ``shift`` and, for a printed range, ``lo`` and ``hi``: the range counts where it covers the value), most lines
    first.  A solvent outside the table gives none.

    >>> from shiftrank.inputs.peaks import parse_peaks
    >>> [(m.name, m.shifts) for m in impurity_lines(parse_peaks("171.3\\n60.5\\n21.0\\n14.2\\n").peaks, "CDCl3")]
    [('ethyl acetate', (171.3, 60.5, 21.0, 14.2))]
    """
    tol = IMPURITY_TOLERANCE[nucleus]
    lines = [(p.shift, p.shift if getattr(p, "lo", None) is None else p.lo,
              p.shift if getattr(p, "hi", None) is None else p.hi) for p in peaks]
    out = []
    for name, (formula, by_solvent) in IMPURITIES.items():
        ref = by_solvent.get(key or "", {}).get(nucleus)
        if not ref:
            continue
        hit, where, protons = [], [], []
        for v in ref:
            v, n_h = (v, None) if isinstance(v, float) else v
            near = [k for k, (_, lo, hi) in enumerate(lines) if lo - tol <= v <= hi + tol]
            if not near:
                break
            k = min(near, key=lambda k: abs(lines[k][0] - v))
            hit.append(lines[k][0])
            where.append(k)
            protons.append(n_h)
        else:
            out.append(ImpurityMatch(name, tuple(hit), tuple(where), tuple(protons), formula))
    return sorted(out, key=lambda m: -len(m.shifts))


def match_solvent(shift: float, key: str, nucleus: str = "13C") -> float | None:
    """The residual signal of ``key`` within tolerance of ``shift``, or None."""
    tol = TOLERANCE[nucleus]
    for ref in solvent_signals(key, nucleus):
        if abs(shift - ref) <= tol:
            return ref
    return None
