"""A self-contained HTML report (no network): ranking, structures, stick spectra, inventory.

Structure drawings come from RDKit (SVG) with every carbon labelled by its
deviation (observed − predicted, ppm) and tinted on a four-step scale of
|deviation| / σ; stick spectra are drawn with matplotlib and embedded as SVG.
"""
from __future__ import annotations

import html
import io
from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
from rdkit import Chem  # noqa: E402
from rdkit.Chem.Draw import rdMolDraw2D  # noqa: E402

from .. import __version__  # noqa: E402
from ..score.ranking import CAUTION, CandidateResult, RankResult  # noqa: E402

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


def structure_svg(cand: CandidateResult, size=(340, 260)) -> str:
    """RDKit drawing with each carbon labelled by its deviation and tinted by |z|."""
    mol = Chem.MolFromSmiles(cand.smiles)
    if mol is None:
        return ""
    colours, notes = {}, {}
    for p in cand.assignment.pairings:
        cls = cand.classes[p.cls]
        for a in cls.atoms:
            colours[a] = _hex_rgb(tint(p.z))
            notes[a] = "n/o" if p.deviation is None else f"{p.deviation:+.1f}"
    for a, text in notes.items():
        mol.GetAtomWithIdx(a).SetProp("atomNote", text)
    d = rdMolDraw2D.MolDraw2DSVG(*size)
    opts = d.drawOptions()
    opts.annotationFontScale = 0.7
    opts.clearBackground = False
    rdMolDraw2D.PrepareAndDrawMolecule(d, mol, highlightAtoms=list(colours), highlightAtomColors=colours,
                                       highlightBonds=[])
    d.FinishDrawing()
    svg = d.GetDrawingText()
    return svg[svg.find("<svg"):]


def spectrum_svg(result: RankResult, cand: CandidateResult) -> str:
    """Stick plot: observed peaks up, the candidate's predicted signals down, assignment lines between."""
    fig, ax = plt.subplots(figsize=(6.4, 2.6))
    peaks = result.peaks
    matched = {p.peak for p in cand.assignment.pairings if p.peak is not None}
    gap = 0.18  # observed sticks stand above +gap, predicted hang below −gap; assignment lines bridge the gap
    for j, pk in enumerate(peaks):
        col = "#bbbbbb" if pk.solvent else ("#222222" if j in matched else "#c1443c")
        ax.vlines(pk.shift, gap, 1, color=col, lw=1.6)
        if j not in matched:
            ax.plot(pk.shift, 1.07, marker="x", color=col, ms=6)
    for p in cand.assignment.pairings:
        c = cand.classes[p.cls]
        col = tint(p.z)
        ax.vlines(c.shift, -1, -gap, color=col, lw=1.6)
        if p.peak is not None:
            ax.plot([c.shift, peaks[p.peak].shift], [-gap, gap], color=col, lw=0.9)
        else:
            ax.plot(c.shift, -1.07, marker="o", mfc="none", color=UNOBSERVED, ms=5)
    lo = min([p.shift for p in peaks] + [c.shift for c in cand.classes]) - 8
    hi = max([p.shift for p in peaks] + [c.shift for c in cand.classes]) + 8
    ax.set_xlim(hi, lo)
    ax.set_ylim(-1.2, 1.2)
    ax.set_yticks([-0.5, 0.5], ["predicted", "observed"])
    ax.set_xlabel("δ 13C (ppm)")
    for s in ("top", "right", "left"):
        ax.spines[s].set_visible(False)
    ax.tick_params(axis="y", length=0)
    fig.tight_layout()
    buf = io.StringIO()
    fig.savefig(buf, format="svg")
    plt.close(fig)
    svg = buf.getvalue()
    return svg[svg.find("<svg"):]


def _fmt(x, nd=2, dash="–"):
    return dash if x is None else f"{x:.{nd}f}"


def _candidate_card(result: RankResult, c: CandidateResult, rank_no: int, with_plots: bool) -> str:
    e = html.escape
    title = f"#{rank_no} {e(c.name) + ' — ' if c.name else ''}<code>{e(c.smiles)}</code>"
    if c.error:
        return f'<div class="card"><b>{title}</b><p class="err">error: {e(c.error)}</p></div>'
    facts = c.facts
    head = (f"<b>{title}</b><br><span class='note'>p = {c.probability:.3f} · {facts.formula} · DBE {facts.dbe:g} · "
            f"{len(c.classes)} expected signals · MAE {_fmt(c.mae)} ppm · max {_fmt(c.max_abs_deviation, 1)} ppm · "
            f"{c.beyond_3sigma} beyond 3σ</span>")
    flags = "".join(f"<div class='flag'>⚑ {e(f)}</div>" for f in c.flags)
    rows = []
    for row in c.assignment_table():
        obs = "" if row["peak"] is None else f"{result.peaks[row['peak']].shift:.2f}"
        sw = tint(row["z"])
        rows.append(f"<tr><td><span style='color:{sw}'>■</span> {','.join(map(str, row['atoms']))}</td><td>{row['multiplicity']}</td>"
                    f"<td class=num>{row['predicted']:.2f} ± {row['sigma']:.2f}</td><td class=num>{obs}</td>"
                    f"<td class=num>{_fmt(row['deviation'])}</td><td>{', '.join(row['notes'])}</td></tr>")
    for j in c.assignment.unmatched_peaks:
        pk = result.peaks[j]
        rows.append(f"<tr><td>–</td><td>{pk.multiplicity or ''}</td><td></td><td class=num>{pk.shift:.2f}</td><td></td>"
                    f"<td>{'residual solvent' if pk.solvent else 'not explained by this candidate'}</td></tr>")
    table = ("<table><tr><th>atoms</th><th>CHn</th><th>predicted ± σ</th><th>observed</th><th>deviation</th><th>note</th></tr>"
             + "".join(rows) + "</table>")
    pics = ""
    if with_plots:
        pics = f"<div class='cardrow'><div>{structure_svg(c)}</div><div>{spectrum_svg(result, c)}</div></div>"
    return f"<div class='card'>{head}{flags}{pics}<details{' open' if rank_no == 1 else ''}><summary>assignment table</summary>{table}</details></div>"


def _sample_section(k: int, result: RankResult, pl=None, history=None, inventory=None) -> str:
    e = html.escape
    parts = [f"<h2 id='sample-{k}'>Sample {e(str(result.id or k))}</h2>"]
    hist = history or {}
    bits = [f"{n}: {e(str(v))}" for n, v in (("formula", hist.get("formula")), ("mass", hist.get("mass")),
                                               ("solvent", hist.get("solvent"))) if v]
    n_obs = sum(1 for p in result.peaks if not p.solvent)
    bits.append(f"{n_obs} 13C signals" + (f" (+{len(result.peaks) - n_obs} solvent)" if len(result.peaks) > n_obs else ""))
    parts.append(f"<p class='sub'>{' · '.join(bits)}</p>")
    parts.append(f"<div class='verdict'>{e(result.verdict)}</div>")
    rows = []
    for i, c in enumerate(result.candidates, 1):
        label = e(c.name) if c.name else f"<code>{e(c.smiles)}</code>"
        if c.error:
            rows.append(f"<tr><td>{i}</td><td>{label}</td><td colspan=4 class=err>{e(c.error)}</td></tr>")
            continue
        rows.append(f"<tr><td>{i}</td><td>{label}</td><td><div class='bar'><span style='width:{100 * c.probability:.1f}%'></span></div> "
                    f"{c.probability:.3f}</td><td class=num>{_fmt(c.mae)}</td><td class=num>{c.beyond_3sigma}</td>"
                    f"<td>{'✓' if c.formula_ok else ('✗' if c.formula_ok is False else '')}</td></tr>")
    parts.append("<table><tr><th>#</th><th>candidate</th><th>probability</th><th>MAE (ppm)</th><th>&gt;3σ</th>"
                 "<th>formula</th></tr>" + "".join(rows) + "</table>")
    if result.notes:
        parts.append("<div class='note'>" + "<br>".join(e(n) for n in result.notes) + "</div>")
    if inventory is not None:
        parts.append("<h3>Inventory and sample-history checks</h3><ul>" + "".join(f"<li>{e(x)}</li>" for x in inventory.lines()) + "</ul>")
        parts.append("<details><summary>region of each peak (common practice ranges)</summary><table>"
                     + "".join(f"<tr><td class=num>{s:.2f}</td><td>{m or ''}</td><td>{e(h)}</td></tr>" for s, m, h in inventory.regions)
                     + "</table></details>")
    parts.append("<h3>Candidates</h3>")
    key = "".join(f"<span style='background:{col}'></span>{lab}" for _, col, lab in SCALE)
    parts.append(f"<div class='key note'>carbon tint, |observed − predicted| / σ: {key}<span style='background:{UNOBSERVED}'></span>unobserved"
                 " · labels on atoms: deviation in ppm · red sticks with × : peaks the candidate does not explain</div>")
    for i, c in enumerate(result.candidates, 1):
        parts.append(_candidate_card(result, c, i, with_plots=i <= PLOT_CANDIDATES and not c.error))
    return "\n".join(parts)


def render_report(results: list[RankResult], peak_lists=None, histories=None, inventories=None,
                  title: str = "shiftrank report") -> str:
    """The report as one HTML string."""
    e = html.escape
    n = len(results)
    peak_lists = peak_lists or [None] * n
    histories = histories or [None] * n
    inventories = inventories or [None] * n
    model = results[0].model_version if results else None
    out = [f"<!DOCTYPE html><html lang='en'><head><meta charset='utf-8'><title>{e(title)}</title><style>{CSS}</style></head><body>",
           f"<h1>{e(title)}</h1><p class='sub'>shiftrank {__version__} · 13C model {e(str(model))} "
           "(trained on NMRShiftDB2 data) · probabilities are DP4-style, over the candidates given only</p>"]
    if n > 1:
        rows = []
        for k, r in enumerate(results, 1):
            b = r.best
            rows.append(f"<tr><td><a href='#sample-{k}'>{e(str(r.id or k))}</a></td><td><code>{e(b.name or b.smiles)}</code></td>"
                        f"<td class=num>{b.probability:.3f}</td><td>{e(r.verdict)}</td></tr>")
        out.append("<h2>Summary</h2><table><tr><th>sample</th><th>best candidate</th><th>p</th><th>verdict</th></tr>"
                   + "".join(rows) + "</table>")
    for k, (r, pl, h, inv) in enumerate(zip(results, peak_lists, histories, inventories), 1):
        out.append(_sample_section(k, r, pl, h, inv))
    out.append(f"<div class='caution'><b>Caution.</b> {e(CAUTION)}</div>")
    out.append("<p class='note'>Shift model derived from NMRShiftDB2 (Kuhn &amp; Schlörer 2015, Magn. Reson. Chem. 53, 582), "
               "nmrshiftdb2 database licence.</p></body></html>")
    return "\n".join(out)


def write_report(results: list[RankResult], path, peak_lists=None, histories=None, inventories=None,
                 title: str = "shiftrank report") -> Path:
    """Write the report to ``path`` and return it."""
    p = Path(path)
    p.write_text(render_report(results, peak_lists, histories, inventories, title), encoding="utf-8")
    return p
