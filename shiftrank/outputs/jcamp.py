"""Predicted spectra written as JCAMP-DX peak tables, to lay over a measured spectrum in any JCAMP-DX viewer.

The open IUPAC exchange format (McDonald & Wilks 1988, Appl. Spectrosc. 42, 151; NMR labels Davies & Lampen
1993, Appl. Spectrosc. 47, 1093): one ``##PEAK TABLE= (XY..XY)`` block per molecule and nucleus, X in ppm.

* 13C: one line per symmetry class at its predicted shift, its height the number of carbons;
* 1H: the lines of each proton class's expected first-order multiplet (:mod:`shiftrank.chem.couplings`;
  each coupling at the middle of its typical range, optional couplings left out) at the predicted shift,
  heights in protons; exchangeable protons as one line.

These are predictions: the file says so in its title and ``##ORIGIN=``.  The peak tables read back with
:func:`shiftrank.inputs.spectra.read_jcamp` (the tests do).
"""
from __future__ import annotations

import re
from pathlib import Path

import numpy as np
from rdkit import Chem

from ..chem.couplings import expected_multiplets
from ..chem.structure import carbon_classes, symmetry_ranks
from ..errors import InputError
from ..inputs.spectra import stick_pattern
from ..prediction.model import MolPrediction

#: 1H observe frequency assumed for turning couplings (Hz) into ppm, unless given
DEFAULT_MHZ_1H = 400.0
#: ratio of the 1H to the 13C observe frequency (gyromagnetic ratios)
H_TO_C = 3.977


def predicted_lines(mol: Chem.Mol, pred: MolPrediction, mhz_1h: float = DEFAULT_MHZ_1H) -> list[tuple[float, float]]:
    """(ppm, height) of the predicted spectrum's lines, lowest shift first."""
    shift = {a.atom: a.shift for a in pred.atoms}
    ranks = symmetry_ranks(mol)
    out: list[tuple[float, float]] = []
    if pred.nucleus == "13C":
        for c in carbon_classes(mol, ranks):
            if all(a in shift for a in c.atoms):
                out.append((float(np.mean([shift[a] for a in c.atoms])), float(len(c.atoms))))
    else:
        for e in expected_multiplets(mol, ranks):
            if not all(a in shift for a in e.atoms):
                continue
            centre = float(np.mean([shift[a] for a in e.atoms]))
            js = [] if e.exchangeable else [sum(g.j_range) / 2 for g in e.groups if not g.optional for _ in range(g.n)]
            pos, rel = stick_pattern(tuple(js))
            out.extend((centre + p / mhz_1h, float(r * e.n_h)) for p, r in zip(pos, rel))
    return sorted(out)


def peak_table(title: str, nucleus: str, lines: list[tuple[float, float]], mhz_1h: float = DEFAULT_MHZ_1H,
               solvent: str | None = None) -> str:
    """The JCAMP-DX 5.01 text of one peak table."""
    mhz = mhz_1h if nucleus == "1H" else mhz_1h / H_TO_C
    head = [f"##TITLE= {title}", "##JCAMP-DX= 5.01", "##DATA TYPE= NMR PEAK TABLE", "##DATA CLASS= PEAK TABLE",
            "##ORIGIN= shiftrank prediction (not a measured spectrum)", "##OWNER= public domain",
            f"##.OBSERVE NUCLEUS= ^{nucleus}", f"##.OBSERVE FREQUENCY= {mhz:.4f}"]
    if solvent:
        head.append(f"##.SOLVENT NAME= {solvent}")
    head += ["##XUNITS= PPM", "##YUNITS= ARBITRARY UNITS", f"##NPOINTS= {len(lines)}", "##PEAK TABLE= (XY..XY)"]
    body = [f"{x:.4f}, {y:.4f}" for x, y in lines]
    return "\n".join(head + body + ["##END="]) + "\n"


def write_predicted(folder: str | Path, record_id: str, mol: Chem.Mol, pred: MolPrediction,
                    mhz_1h: float = DEFAULT_MHZ_1H, solvent: str | None = None, version: str | None = None) -> Path:
    """Write ``<folder>/<id>_<nucleus>.jdx`` and return its path."""
    folder = Path(folder)
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise InputError(f"{folder}: cannot create the folder ({exc.strerror or exc})") from None
    stem = re.sub(r"[^A-Za-z0-9._-]+", "_", str(record_id))[:80] or "record"
    path = folder / f"{stem}_{pred.nucleus}.jdx"
    title = f"{record_id}: predicted {pred.nucleus} (shiftrank" + (f", models {version}" if version else "") + ")"
    try:
        path.write_text(peak_table(title, pred.nucleus, predicted_lines(mol, pred, mhz_1h), mhz_1h, solvent),
                        encoding="utf-8")
    except OSError as exc:
        raise InputError(f"{path}: cannot write ({exc.strerror or exc})") from None
    return path
