"""A self-contained HTML report (no network): ranking, structures, spectra per nucleus, inventory.

Structure drawings come from RDKit (SVG) with every carbon (13C) or every proton-bearing atom (1H)
labelled by its deviation (observed − predicted, ppm) and tinted on a four-step scale of
|deviation| / σ; spectra are drawn with matplotlib and embedded as SVG: 13C as sticks, 1H as
multiplet bars whose width is the printed range and whose height is the integral.
"""
from __future__ import annotations

import html
import io
import re
from pathlib import Path

import matplotlib
import numpy as np

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
from rdkit import Chem  # noqa: E402
from rdkit.Geometry import Point2D  # noqa: E402
from rdkit.Chem.Draw import rdMolDraw2D  # noqa: E402

from .. import __version__  # noqa: E402
from ..errors import InputError  # noqa: E402
from ..inputs.molecules import to_mol  # noqa: E402
from ..score.correlations import RELATION  # noqa: E402
from ..score.evidence import CORRELATIONS  # noqa: E402
from ..score.ranking import CAUTION, CandidateResult, RankResult  # noqa: E402
from ..words import count  # noqa: E402

#: |deviation|/σ steps and their tints: our own scale, from calm to alarming.
SCALE = [(1.0, "#1f7a8c", "within 1σ"), (2.0, "#7fb069", "1–2σ"), (3.0, "#e6aa68", "2–3σ"),
         (float("inf"), "#c1443c", "beyond 3σ")]
UNOBSERVED = "#9e9e9e"
PLOT_CANDIDATES = 3

CSS = """
body{font-family:system-ui,-apple-system,'Segoe UI',sans-serif;margin:24px auto;max-width:1100px;color:#222;line-height:1.4}
h1{font-size:1.6em;margin-bottom:0}h2{border-bottom:2px solid #1f7a8c;padding-bottom:4px;margin-top:40px}
.sub{color:#666}.verdict{font-size:1.15em;padding:8px 12px;background:#eef5f6;border-left:5px solid #1f7a8c;margin:12px 0}
table{border-collapse:collapse;margin:8px 0}td,th{padding:3px 8px;border-bottom:1px solid #ddd;text-align:left;font-size:.92em}
th{background:#f4f4f4}.num{text-align:right;font-variant-numeric:tabular-nums}
.bar{background:#e7e7e7;width:160px;height:12px;display:inline-block;vertical-align:middle}
.bar span{display:block;height:12px;background:#1f7a8c}
.card{border:1px solid #ddd;border-radius:6px;padding:10px;margin:14px 0}
.cardrow{display:flex;flex-wrap:wrap;gap:12px;align-items:flex-start}
.nuc{font-weight:600;color:#1f7a8c;margin-top:10px}
.flag{color:#a33}.err{color:#a33;font-weight:bold}.note{color:#555;font-size:.9em}
.key span{display:inline-block;width:12px;height:12px;margin:0 4px 0 12px;vertical-align:middle}
.caution{margin-top:30px;padding:10px;background:#fff6e5;border:1px solid #e6aa68}
code{font-size:.9em}
"""


def tint(z: float | None) -> str:
    if z is None:
        return UNOBSERVED
    for lim, col, _ in SCALE:
        if abs(z) <= lim:
            return col
    return SCALE[-1][1]


def _hex_rgb(h: str) -> tuple[float, float, float]:
    return tuple(int(h[i:i + 2], 16) / 255 for i in (1, 3, 5))


def structure_svg(cand: CandidateResult, nucleus: str = "13C", size=(340, 260), marked=frozenset()) -> str:
    """RDKit drawing with each observed atom labelled by its number and deviation and tinted by |z| (worst pairing);
    the ``marked`` atoms (those of the lines that separate #1 from #2 most) are drawn with a larger disc and a * before
    their number (RDKit's drawing font has no symbols beyond ASCII)."""
    res = cand.nuclei.get(nucleus)
    try:
        mol = to_mol(cand.smiles)   # (a SMILES or an InChI, numbered as the tables number it)
    except InputError:
        mol = None
    if mol is None or res is None:
        return ""
    worst: dict[int, tuple] = {}
    for p in res.assignment.pairings:
        for a in res.classes[p.cls].atoms:
            key = abs(p.z) if p.z is not None else -1.0
            if a not in worst or key > worst[a][0]:
                worst[a] = (key, p)
    colours, notes = {}, {}
    nd = 1 if nucleus == "13C" else 2
    for a, (_, p) in worst.items():
        colours[a] = _hex_rgb(tint(p.z))
        notes[a] = ("*" if a in marked else "") + f"{a}: " + ("n/o" if p.deviation is None else f"{p.deviation:+.{nd}f}")
    for a, text in notes.items():
        mol.GetAtomWithIdx(a).SetProp("atomNote", text)
    d = rdMolDraw2D.MolDraw2DSVG(*size)
    opts = d.drawOptions()
    opts.annotationFontScale = 0.7
    opts.clearBackground = False
    radii = {a: (0.55 if a in marked else 0.3) for a in colours}
    rdMolDraw2D.PrepareAndDrawMolecule(d, mol, highlightAtoms=list(colours), highlightAtomColors=colours,
                                       highlightBonds=[], highlightAtomRadii=radii)
    d.FinishDrawing()
    svg = d.GetDrawingText()
    return svg[svg.find("<svg"):]


#: colours of the correlations drawn on a structure (RGB 0-1): HMBC proton-to-carbon arrows, COSY and NOESY lines
CORRELATION_COLOURS = {"HMBC": (0.12, 0.40, 0.70), "COSY": (0.20, 0.55, 0.25), "NOESY": (0.75, 0.25, 0.20)}


def correlation_svg(cand: CandidateResult, nucleus: str, size=(340, 260)) -> str:
    """RDKit drawing of the candidate with each cross peak it explains drawn on it: an HMBC as an arrow from the atom
    carrying the protons to the carbon (two or three bonds on), a COSY or NOESY as a line between the two atoms
    carrying the protons; the atoms are numbered as the tables number them."""
    res = cand.nuclei.get(nucleus)
    try:
        mol = to_mol(cand.smiles)
    except InputError:
        mol = None
    if mol is None or res is None or not res.classes:
        return ""
    dist = Chem.GetDistanceMatrix(mol)
    links = set()
    for p in res.assignment.pairings:
        c = res.classes[p.cls]
        if not p.multiplicity_ok or not c.atoms or not c.h_atoms:
            continue
        pairs = [(x, a) for x in c.h_atoms for a in c.atoms if x != a and x < mol.GetNumAtoms() and a < mol.GetNumAtoms()]
        if c.bonds is not None and nucleus != "NOESY":   # the member pair at the counted distance
            want = c.bonds - (1 if nucleus == "HMBC" else 2)
            pairs = [q for q in pairs if int(dist[q]) == want] or pairs
        if pairs:
            links.add(min(pairs, key=lambda q: dist[q]))
    if not links:
        return ""
    for atom in mol.GetAtoms():
        atom.SetProp("atomNote", str(atom.GetIdx()))
    d = rdMolDraw2D.MolDraw2DSVG(*size)
    opts = d.drawOptions()
    opts.annotationFontScale = 0.6
    opts.clearBackground = False
    rdMolDraw2D.PrepareAndDrawMolecule(d, mol)
    colour = CORRELATION_COLOURS[nucleus]
    d.SetLineWidth(2)
    for x, a in sorted(links):
        # (in the drawing's own pixels: where the atoms were drawn), shortened a little at both ends
        p1, p2 = d.GetDrawCoords(int(x)), d.GetDrawCoords(int(a))
        dx, dy = p2.x - p1.x, p2.y - p1.y
        p1, p2 = Point2D(p1.x + 0.15 * dx, p1.y + 0.15 * dy), Point2D(p2.x - 0.15 * dx, p2.y - 0.15 * dy)
        if nucleus == "HMBC":
            d.DrawArrow(p1, p2, False, 0.15, 0.45, colour, True)
        else:
            d.SetColour(colour)
            d.DrawLine(p1, p2, True)
    d.FinishDrawing()
    svg = d.GetDrawingText()
    return svg[svg.find("<svg"):]


def spectrum_svg(result: RankResult, cand: CandidateResult, nucleus: str = "13C") -> str:
    """Observed peaks up (13C sticks, 1H multiplet bars), the candidate's predicted signals down,
    assignment lines between; unexplained peaks crossed, unobserved classes circled."""
    res = cand.nuclei[nucleus]
    peaks = res.peaks
    fig, ax = plt.subplots(figsize=(6.4, 2.6))
    matched = {p.peak for p in res.assignment.pairings if p.peak is not None}
    gap = 0.18  # observed marks stand above +gap, predicted hang below −gap; assignment lines bridge the gap
    top = max([p.capacity or 1 for p in peaks] + [1]) if nucleus == "1H" else 1
    ctop = max([c.units for c in res.classes] + [1]) if nucleus == "1H" else 1
    for j, pk in enumerate(peaks):
        col = "#bbbbbb" if pk.solvent else ("#222222" if j in matched else "#c1443c")
        h = gap + (1 - gap) * ((pk.capacity or 1) / top if nucleus == "1H" else 1)
        if pk.lo is not None and pk.hi is not None and pk.hi > pk.lo:
            ax.fill_between([pk.lo, pk.hi], gap, h, color=col, alpha=0.45, lw=0)
        ax.vlines(pk.shift, gap, h, color=col, lw=1.6)
        if j not in matched:
            ax.plot(pk.shift, h + 0.07, marker="x", color=col, ms=6)
    for p in res.assignment.pairings:
        c = res.classes[p.cls]
        col = tint(p.z)
        h = gap + (1 - gap) * (c.units / ctop if nucleus == "1H" else 1)
        ax.vlines(c.shift, -h, -gap, color=col, lw=1.6)
        if p.peak is not None:
            ax.plot([c.shift, peaks[p.peak].shift], [-gap, gap], color=col, lw=0.9)
        else:
            ax.plot(c.shift, -h - 0.07, marker="o", mfc="none", color=UNOBSERVED, ms=5)
    pad = 8 if nucleus == "13C" else 0.4
    lo = min([p.shift for p in peaks] + [c.shift for c in res.classes]) - pad
    hi = max([p.shift for p in peaks] + [c.shift for c in res.classes]) + pad
    ax.set_xlim(hi, lo)
    ax.set_ylim(-1.2, 1.2)
    ax.set_yticks([-0.5, 0.5], ["predicted", "observed"])
    ax.set_xlabel(f"δ {nucleus} (ppm)")
    for s in ("top", "right", "left"):
        ax.spines[s].set_visible(False)
    ax.tick_params(axis="y", length=0)
    return _svg(fig)


def measured_svg(pl) -> str:
    """The measured spectrum a peak list was picked from, with the picked lines marked (solvent grey)."""
    x, y = pl.trace
    fig, ax = plt.subplots(figsize=(6.4, 1.9))
    ax.plot(x, y, color="#222222", lw=0.6)
    top = float(np.max(y)) if len(y) else 1.0
    for p in pl.peaks:
        ax.plot(p.shift, top * 1.06, marker="v", ms=4, color="#bbbbbb" if p.solvent else "#1f6f8b")
    ax.set_xlim(float(np.max(x)), float(np.min(x)))
    ax.set_ylim(float(np.min(y)) - 0.02 * top, top * 1.14)
    ax.set_yticks([])
    ax.set_xlabel(f"δ {pl.nucleus} (ppm)")
    for side in ("top", "right", "left"):
        ax.spines[side].set_visible(False)
    return _svg(fig)


def _svg(fig) -> str:
    """A finished figure as an inline SVG element (closed afterwards)."""
    fig.tight_layout()
    buf = io.StringIO()
    fig.savefig(buf, format="svg")
    plt.close(fig)
    svg = buf.getvalue()
    return svg[svg.find("<svg"):]


def _fmt(x, nd=2, dash="–"):
    return dash if x is None else f"{x:.{nd}f}"


def _observed_text(pk) -> str:
    s = f"{pk.lo:.2f}–{pk.hi:.2f}" if pk.lo is not None and pk.hi is not None and pk.hi > pk.lo else f"{pk.shift:.2f}"
    if pk.h_lo is not None:   # HSQC or HMBC cross peak: δC / δH
        return s + (f" / {pk.h_lo:.2f}" if pk.h_hi == pk.h_lo else f" / {pk.h_lo:.2f}–{pk.h_hi:.2f}")
    bits = [b for b in (pk.multiplicity, ", ".join(f"{j:g}" for j in pk.j) + " Hz" if pk.j else None,
                        f"{pk.capacity}H" if pk.capacity else None) if b]
    return s + (f" ({'; '.join(bits)})" if bits else "")


def _correlation_block(res, rank_no: int, c: CandidateResult | None = None) -> str:
    """An HMBC's, COSY's or NOESY's cross peaks, each with the atoms it most likely joins in this candidate."""
    e = html.escape
    n = res.nucleus
    hmbc, noe = n == "HMBC", n == "NOESY"
    rows = []
    for row in sorted(res.assignment_table(), key=lambda x: (-x["observed"], -x["observed_h"])):
        far = row.get("distance") if noe else row["bonds"]
        far = "–" if far is None else (f"{far:.1f}" if noe else str(far))
        note = f"<span class=err>{e(', '.join(row['notes']))}</span>" if row["notes"] else ""
        rows.append(f"<tr><td class=num>{row['observed']:.2f} / {row['observed_h']:.2f}</td>"
                    f"<td>{','.join(map(str, row['atoms']))}</td><td>{','.join(map(str, row['h_atoms']))}</td>"
                    f"<td class=num>{far}</td><td class=num>{row['cost']:.2f}</td><td>{note}</td></tr>")
    relation = RELATION[n]
    n_far = len(res.far_cross_peaks)
    summary = f"{n}: {count(res.observed_signals, 'cross peak')}, {n_far} whose ends are not {relation} · cost {res.cost:.1f} nats"
    heads = ("δC / δH", "C atoms", "H on atoms") if hmbc else ("δH / δH", "H on atoms", "H on atoms")
    table = ("<p class='note'>each cross peak with the atoms it most likely joins, as this candidate's 1D assignments "
             "(or its predicted shifts) read them" + (" (distances: an ensemble of RDKit conformers)" if noe else "")
             + f"</p><table><tr><th>{heads[0]}</th><th>{heads[1]}</th><th>{heads[2]}</th>"
             f"<th>{'Å' if noe else 'bonds'}</th><th>cost (nats)</th><th>note</th></tr>" + "".join(rows) + "</table>")
    pic = correlation_svg(c, n) if c is not None else ""
    legend = {"HMBC": "arrows: from the atom carrying the protons to the carbon of each cross peak it explains",
              "COSY": "lines: the two atoms whose protons each cross peak couples",
              "NOESY": "lines: the two atoms whose protons each cross peak places close in space"}[n]
    pic = f"<div class='cardrow'><div>{pic}<p class='note'>{legend}</p></div></div>" if pic else ""
    return (f"<div class='nuc'>{e(summary)}</div>{pic}<details{' open' if rank_no == 1 else ''}>"
            f"<summary>{n} cross peaks</summary>{table}</details>")


def _nucleus_block(result: RankResult, c: CandidateResult, nucleus: str, rank_no: int, with_plots: bool,
                   sep=()) -> str:
    e = html.escape
    res = c.nuclei[nucleus]
    if nucleus in CORRELATIONS:
        return _correlation_block(res, rank_no, c if with_plots else None)
    rows = []
    for row in res.assignment_table():
        obs = "" if row["peak"] is None else e(_observed_text(res.peaks[row["peak"]]))
        sw = tint(row["z"])
        what = e(row["multiplicity"])
        if nucleus == "1H":
            n = row.get("protons_on_peak") or row.get("protons")
            what = f"{n}H, expected {what}" if n else f"expected {what}"
        pred, dev = f"{row['predicted']:.2f} ± {row['sigma']:.2f}", _fmt(row["deviation"])
        if nucleus == "HSQC":
            pred += f" / {row['predicted_h']:.2f} ± {row['sigma_h']:.2f}"
            dev += f" / {_fmt(row.get('deviation_h'))}" if row["peak"] is not None else ""
        rows.append(f"<tr><td><span style='color:{sw}'>■</span> {','.join(map(str, row['atoms']))}</td><td>{what}</td>"
                    f"<td class=num>{pred}</td><td class=num>{obs}</td>"
                    f"<td class=num>{dev}</td><td>{e(', '.join(row['notes']))}</td></tr>")
    for j in res.assignment.unmatched_peaks:
        pk = res.peaks[j]
        rows.append(f"<tr><td>–</td><td></td><td></td><td class=num>{e(_observed_text(pk))}</td><td></td>"
                    f"<td>{'residual solvent' if pk.solvent else 'not explained by this candidate'}</td></tr>")
    head = "protons, expected multiplet" if nucleus == "1H" else "CHn"
    dims = " δC / δH" if nucleus == "HSQC" else ""
    table = (f"<table><tr><th>atoms</th><th>{head}</th><th>predicted{dims} ± σ</th><th>observed{dims}</th>"
             f"<th>deviation{dims}</th><th>note</th></tr>"
             + "".join(rows) + "</table>")
    if res.scaling is not None:
        off, slope, centre = res.scaling
        table = (f"<p class='note'>predictions scaled to this spectrum, DP4-style: {off:+.2f} ppm at {centre:.0f} ppm, "
                 f"slope {slope:.4f}</p>" + table)
    pics = ""
    if with_plots and nucleus != "HSQC":   # HSQC: the table (δC / δH) is the picture
        marked = frozenset()
        if rank_no in (1, 2):   # the atoms of the lines that separate #1 from #2 most
            side = "first_classes" if rank_no == 1 else "second_classes"
            marked = frozenset(a for sp in sep if sp.nucleus == nucleus
                               for row in getattr(sp, side) for a in row["atoms"])
        pics = (f"<div class='cardrow'><div>{structure_svg(c, nucleus, marked=marked)}</div>"
                f"<div>{spectrum_svg(result, c, nucleus)}</div></div>")
    listed = res.listed_signals   # (13C: a value printed twice or with '(2C)' counts for that many)
    seen = f"{res.observed_signals} observed" + (f" ({listed} values listed)" if listed != res.observed_signals else "")
    summary = (f"{nucleus}: {count(len(res.classes), 'expected signal')}, {seen} · MAE {_fmt(res.mae)} ppm · "
               f"{res.beyond_3sigma} beyond 3σ · cost {res.cost:.1f} nats")
    return (f"<div class='nuc'>{e(summary)}</div>{pics}<details{' open' if rank_no == 1 else ''}>"
            f"<summary>{nucleus} assignment table</summary>{table}</details>")


def _candidate_card(result: RankResult, c: CandidateResult, rank_no: int, with_plots: bool, sep=()) -> str:
    e = html.escape
    title = f"#{rank_no} {e(c.name) + ' — ' if c.name else ''}<code>{e(c.smiles)}</code>"
    if c.error:
        return f'<div class="card"><b>{title}</b><p class="err">error: {e(c.error)}</p></div>'
    facts = c.facts
    p = "the only candidate" if result.lone else f"p = {c.probability:.3f}"
    head = f"<b>{title}</b><br><span class='note'>{p} · {facts.formula} · DBE {facts.dbe:g}</span>"
    flags = "".join(f"<div class='flag'>⚑ {e(f)}</div>" for f in c.flags)
    blocks = "".join(_nucleus_block(result, c, n, rank_no, with_plots, sep) for n in result.nuclei if n in c.nuclei)
    return f"<div class='card'>{head}{flags}{blocks}</div>"


def _sample_section(k: int, result: RankResult, lists=None, history=None, inventory=None) -> str:
    e = html.escape
    parts = [f"<h2 id='sample-{k}'>Sample {e(str(result.id or k))}</h2>"]
    hist = history or {}
    bits = [f"{n}: {e(str(v))}" for n, v in (("formula", hist.get("formula")), ("mass", hist.get("mass")),
                                               ("solvent", hist.get("solvent"))) if v]
    for n in result.nuclei:
        ps = result.peaks[n]
        n_obs = sum(1 for p in ps if not p.solvent)
        unit = " cross peak" if n in ("HSQC",) + CORRELATIONS else " signal"
        bits.append(f"{count(n_obs, n + unit)}" + (f" (+{len(ps) - n_obs} solvent)" if len(ps) > n_obs else ""))
    parts.append(f"<p class='sub'>{' · '.join(bits)}</p>")
    parts.append(f"<div class='verdict'>{e(result.verdict)}</div>")
    if lists is not None and not isinstance(lists, dict):   # one peak list given for the sample
        lists = {lists.nucleus: lists}
    for n, pl in (lists or {}).items():
        if getattr(pl, "trace", None) is not None:   # a spectrum read from an instrument file: what was picked
            n_sample = sum(1 for p in pl.peaks if not p.solvent)
            parts.append(f"<h3>Measured {e(n)} spectrum ({e(pl.source)})</h3><div>{measured_svg(pl)}</div>"
                         f"<p class='note'>▼ the {count(n_sample, 'peak')} picked from it"
                         + (" (1H: one mark per multiplet)" if n == "1H" else "") + "; grey: set aside as solvent</p>")
    rows = []
    alone = len(result.nuclei) > 1   # each spectrum's own probability beside its fit
    nuc_heads = "".join((f"<th>p, {n} alone</th>" if alone else "") + f"<th>MAE {n} (ppm)</th>" for n in result.nuclei)
    generated = any(c.generated for c in result.candidates)
    for i, c in enumerate(result.candidates, 1):
        # a named candidate (a generated alternative is named by its relation) shows its SMILES beneath
        label = (f"{e(c.name)}<br><code class='note'>{e(c.smiles)}</code>" if c.name and c.name != c.smiles
                 else f"<code>{e(c.smiles)}</code>")
        if generated and not c.generated:   # beside generated alternatives: the structure(s) the chemist gave
            label = f"<b>given</b> {label}"
        if c.error:
            rows.append(f"<tr><td>{i}</td><td>{label}</td><td colspan={3 + len(result.nuclei) * (2 if alone else 1)} class=err>{e(c.error)}</td></tr>")
            continue
        maes = "".join((f"<td class=num>{'–' if result.lone else _fmt(c.by_spectrum.get(n), 3)}</td>" if alone else "")
                       + f"<td class=num>{_fmt(c.nuclei[n].mae)}</td>" for n in result.nuclei)
        prob = ("– <span class='note'>(one candidate: no probability)</span>" if result.lone else
                f"<div class='bar'><span style='width:{100 * c.probability:.1f}%'></span></div> {c.probability:.3f}")
        rows.append(f"<tr><td>{i}</td><td>{label}</td><td>{prob}</td>{maes}<td class=num>{c.beyond_3sigma}</td>"
                    f"<td>{'✓' if c.formula_ok else ('✗' if c.formula_ok is False else '')}</td></tr>")
    parts.append(f"<table><tr><th>#</th><th>candidate</th><th>probability</th>{nuc_heads}<th>&gt;3σ</th>"
                 "<th>formula</th></tr>" + "".join(rows) + "</table>")
    if result.notes:
        parts.append("<div class='note'>" + "<br>".join(e(n) for n in result.notes) + "</div>")
    sep, hints = result.separation(), result.next_spectrum()
    if sep or hints:
        srows = "".join(f"<tr><td>{e(s.nucleus)}</td><td class=num>{e(s.line)}</td><td class=num>{s.share:+.1f}</td>"
                        f"<td>{e('; '.join(s.first))}</td><td>{e('; '.join(s.second))}</td></tr>" for s in sep)
        table = ("<table><tr><th>spectrum</th><th>line (ppm)</th><th>ln odds</th><th>#1 places there</th>"
                 f"<th>#2 places there</th></tr>{srows}</table><p class='note'>each line's share of the two candidates' "
                 "score difference (+ favours #1; the probabilities' ratio is e to the sum over all lines)</p>") if sep else ""
        parts.append("<details open><summary>What separates #1 from #2 most</summary>" + table
                     + "".join(f"<p class='note'>next measurement: {e(h)}</p>" for h in hints) + "</details>")
    if inventory is not None:
        parts.append("<h3>Inventory and sample-history checks</h3><ul>" + "".join(f"<li>{e(x)}</li>" for x in inventory.lines()) + "</ul>")
        if inventory.regions:
            parts.append("<details><summary>region of each 13C peak (common practice ranges)</summary><table>"
                         + "".join(f"<tr><td class=num>{s:.2f}</td><td>{m or ''}</td><td>{e(h)}</td></tr>" for s, m, h in inventory.regions)
                         + "</table></details>")
    parts.append("<h3>Candidates</h3>")
    key = "".join(f"<span style='background:{col}'></span>{lab}" for _, col, lab in SCALE)
    parts.append(f"<div class='key note'>atom tint, |observed − predicted| / σ: {key}<span style='background:{UNOBSERVED}'></span>unobserved"
                 " · labels on atoms: atom number (as in the tables): deviation in ppm, n/o unobserved (13C drawings: carbons; 1H drawings: the atoms carrying each proton class);"
                 " on #1 and #2, a larger disc and * before the number: an atom of a line that separates them most"
                 " · red marks with × : peaks the candidate does not explain · 1H bars: printed range, height ∝ integral</div>")
    for i, c in enumerate(result.candidates, 1):
        parts.append(_candidate_card(result, c, i, with_plots=i <= PLOT_CANDIDATES and not c.error, sep=sep))
    return "\n".join(parts)


def _scoped(css: str, scope: str) -> str:
    """``css`` with every selector put inside ``scope`` (``body`` becomes the scope itself), so that a report
    section shown inside another page (a notebook) styles only itself.

    >>> _scoped("body{margin:0}h2,td{color:red}", ".x")
    '.x{margin:0}.x h2,.x td{color:red}'
    """
    def one(m):
        sels = [x.strip() for x in m.group(1).split(",")]
        return ",".join(scope if x == "body" else f"{scope} {x}" for x in sels) + "{"
    return re.sub(r"([^{}]+)\{", one, css.strip().replace("\n", ""))


def notebook_html(result: RankResult) -> str:
    """One case's report section, styled, for a notebook cell (``RankResult._repr_html_``); its style is scoped
    to the section and leaves the notebook's own alone."""
    e = html.escape
    return (f"<div class='shiftrank-report'><style>{_scoped(CSS, '.shiftrank-report')}</style>{_sample_section(1, result)}"
            f"<div class='caution'><b>Caution.</b> {e(CAUTION)}</div></div>")


def render_report(results: list[RankResult], peak_lists=None, histories=None, inventories=None,
                  title: str = "shiftrank report", failed=None) -> str:
    """The report as one HTML string; ``failed`` lists (case id, error) of cases that could not be ranked,
    shown in a table of their own so that nothing of the input goes unmentioned."""
    e = html.escape
    n = len(results)
    peak_lists = peak_lists or [None] * n
    histories = histories or [None] * n
    inventories = inventories or [None] * n
    model = results[0].model_version if results else None
    out = [f"<!DOCTYPE html><html lang='en'><head><meta charset='utf-8'><title>{e(title)}</title><style>{CSS}</style></head><body>",
           f"<h1>{e(title)}</h1><p class='sub'>shiftrank {__version__} · shift models {e(str(model))} "
           "(13C and 1H, trained on NMRShiftDB2 data) · probabilities are DP4-style, over the candidates given only</p>"]
    if n > 1:
        rows = []
        for k, r in enumerate(results, 1):
            b = r.best
            rows.append(f"<tr><td><a href='#sample-{k}'>{e(str(r.id or k))}</a></td><td><code>{e(b.name or b.smiles)}</code></td>"
                        f"<td class=num>{'–' if r.lone else f'{b.probability:.3f}'}</td><td>{e(r.verdict)}</td></tr>")
        out.append("<h2>Summary</h2><table><tr><th>sample</th><th>best candidate</th><th>p</th><th>verdict</th></tr>"
                   + "".join(rows) + "</table>")
    if failed:
        out.append(f"<h2>Not ranked ({len(failed)})</h2><table><tr><th>case</th><th>why</th></tr>"
                   + "".join(f"<tr><td>{e(str(cid))}</td><td class='flag'>{e(str(err))}</td></tr>" for cid, err in failed)
                   + "</table>")
    for k, (r, pl, h, inv) in enumerate(zip(results, peak_lists, histories, inventories), 1):
        out.append(_sample_section(k, r, pl, h, inv))
    out.append(f"<div class='caution'><b>Caution.</b> {e(CAUTION)}</div>")
    out.append("<p class='note'>Shift models derived from NMRShiftDB2 (Kuhn &amp; Schlörer 2015, Magn. Reson. Chem. 53, 582), "
               "nmrshiftdb2 database licence.</p></body></html>")
    return "\n".join(out)


def write_report(results: list[RankResult], path, peak_lists=None, histories=None, inventories=None,
                 title: str = "shiftrank report", failed=None) -> Path:
    """Write the report to ``path`` and return it."""
    p = Path(path)
    try:
        p.write_text(render_report(results, peak_lists, histories, inventories, title, failed), encoding="utf-8")
    except OSError as exc:
        from ..errors import InputError
        raise InputError(f"{path}: cannot write the report ({exc.strerror or exc})") from None
    return p
