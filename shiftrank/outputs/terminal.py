"""Text output for a person at a terminal: the ranking table, the verdict and the assignment of the best."""
from __future__ import annotations

import sys

from ..score.evidence import CORRELATIONS as CORRELATED   # (the 2D experiments read as correlations between atoms)
from ..score.ranking import CAUTION
from ..words import count


def _fmt(x, spec: str, width: int) -> str:
    return f"{x:{spec}}" if x is not None else " " * (width - 1) + "-"


#: the input fields that can carry each spectrum (a printed paragraph may carry any of them)
SOURCES = {"13C": ("peaks", "text"), "1H": ("peaks_1h", "text"), "HSQC": ("hsqc", "text"), "HMBC": ("hmbc", "text"),
           "COSY": ("cosy", "text"), "NOESY": ("noesy", "text")}


def peak_sources(given: dict) -> dict:
    """Nucleus -> the named input (file) that gave its peaks, from ``{field: name}``: a peak list given for the
    nucleus before the text (the ranking reads it so).

    >>> s = peak_sources({"peaks": "a_13c.txt", "peaks_1h": None, "text": "a.txt"})
    >>> s["13C"], s["1H"]
    ('a_13c.txt', 'a.txt')
    """
    return {n: next((given[k] for k in keys if given.get(k)), "") for n, keys in SOURCES.items()}


def print_ranking(result, inputs: dict, out=None) -> None:
    """The ranking of one case: peaks read, one line per candidate with its flags, the verdict, and the
    carbon-by-carbon (and proton-by-proton) assignment of the best candidate.  ``inputs`` names the files
    given, ``{field: name}`` as in :data:`SOURCES`; each nucleus's line names its own."""
    out = out or sys.stdout
    nuclei = result.nuclei
    sources = peak_sources(inputs)
    for n in nuclei:
        peaks = result.peaks[n]
        n_obs = sum(1 for p in peaks if not p.solvent)
        n_solv = len(peaks) - n_obs
        unit = "cross peak" if n in ("HSQC",) + CORRELATED else "signal"
        print(f"{n} peaks: {sources.get(n) or 'input'}: {count(n_obs, unit)}" + (f" (+{n_solv} set aside as solvent)" if n_solv else ""), file=out)
    for note in result.notes:
        print(f"  note: {note}", file=out)
    print(file=out)
    alone = len(nuclei) > 1   # then each spectrum's own probability is shown beside its fit
    head = "".join((f" {'p ' + n:>7}" if alone else "") + f" {'MAE ' + n:>9} {'sig.':>6}" for n in nuclei)
    print(f" {'#':>2}  {'p':>6} {head} {'>3σ':>4}  candidate", file=out)
    generated = any(c.generated for c in result.candidates)
    for i, c in enumerate(result.candidates, 1):
        label = f"{c.name}  {c.smiles}" if c.name else c.smiles
        if generated and not c.generated:   # beside generated alternatives: which structures the chemist gave
            label = f"(given) {label}"
        if c.error:
            print(f" {i:>2}  {'-':>6} {' ' * len(head)} {'':>4}  {label}\n       error: {c.error}", file=out)
            continue
        cols = ""
        for n in nuclei:
            r = c.nuclei[n]
            if alone:
                cols += f" {'–':>7}" if result.lone else f" {_fmt(c.by_spectrum.get(n), '7.3f', 7)}"
            # (HMBC, COSY, NOESY: the cross peaks whose ends the candidate relates so, of those observed)
            expected = r.observed_signals - len(r.far_cross_peaks) if n in CORRELATED else len(r.classes)
            cols += f" {_fmt(r.mae, '9.2f', 9)} {expected:>3}/{r.observed_signals:<2}"
        prob = f"{'–':>6}" if result.lone else f"{c.probability:6.3f}"
        print(f" {i:>2}  {prob} {cols} {c.beyond_3sigma:>4}  {label}", file=out)
        for fl in c.flags:
            print(f"       ! {fl}", file=out)
    print(f"\nVerdict: {result.verdict}", file=out)
    print_separation(result, out)
    best = result.best
    if not best.error:
        for n in nuclei:
            print_assignment(best, n, out)
    print(f"\nModels {result.model_version}. Caution: {CAUTION}", file=out)


def _short(label: str, width: int = 40) -> str:
    return label if len(label) <= width else label[:width - 1] + "…"


def print_separation(result, out=None) -> None:
    """The lines that separate the best candidate from the runner-up (:meth:`RankResult.separation`)."""
    out = out or sys.stdout
    sep, hints = result.separation(), result.next_spectrum()
    if sep or hints:
        one, two = (_short(c.name or c.smiles) for c in (result.best, result.runner_up))
        print(f"\nWhat separates #1 ({one}) from #2 ({two}) most (ln odds of the line; + favours #1, − favours #2):",
              file=out)
    for s in sep:
        print(f"  {s.nucleus:<4}{s.line:>14}  {s.share:+6.1f}  #1: {'; '.join(s.first)}", file=out)
        print(f"  {'':<4}{'':>14}  {'':>6}  #2: {'; '.join(s.second)}", file=out)
    for hint in hints:
        print(f"  next measurement: {hint}", file=out)


def print_assignment(cand, nucleus: str, out=None) -> None:
    """The assignment table of one candidate for one nucleus."""
    out = out or sys.stdout
    if nucleus in CORRELATED:
        return print_correlations(cand, nucleus, out)
    r = cand.nuclei[nucleus]
    what = {"13C": "carbon", "1H": "proton class", "HSQC": "protonated carbon"}[nucleus]
    print(f"\n{nucleus} assignment for {cand.name or cand.smiles}, {what} by {what}:", file=out)
    if r.scaling is not None:
        off, slope, centre = r.scaling
        print(f"  (predictions scaled to this spectrum, DP4-style: {off:+.2f} ppm at {centre:.0f} ppm, slope {slope:.4f})",
              file=out)
    kind = "expected" if nucleus == "1H" else "CHn"
    nd = 2
    hsqc = nucleus == "HSQC"
    print(f"  {'atoms':<12} {kind:<9} {'predicted':>9} {'±σ':>5} {'observed':>13} {'dev':>6}  "
          + ("δH pred  δH obs   dev  " if hsqc else "") + "note", file=out)
    for row in r.assignment_table():
        atoms = ",".join(str(a) for a in row["atoms"])
        if len(atoms) > 12:
            atoms = atoms[:11] + "…"
        obs = ""
        if row["peak"] is not None:
            pk = r.peaks[row["peak"]]
            obs = f"{pk.lo:.2f}-{pk.hi:.2f}" if pk.lo is not None and pk.hi != pk.lo else f"{pk.shift:.{nd}f}"
            if nucleus == "1H" and pk.multiplicity:
                obs += f" {pk.multiplicity}"
        dev = "" if row["deviation"] is None else f"{row['deviation']:+6.2f}"
        mult = row["multiplicity"]
        if nucleus == "1H":
            mult = f"{row.get('protons_on_peak') or row.get('protons') or ''}H {mult}"
        h = ""
        if hsqc:
            oh = row.get("observed_h")
            oh = "" if oh is None else (f"{oh:.2f}" if not isinstance(oh, list) else f"{oh[0]:.2f}/{oh[1]:.2f}")
            dh = "" if row.get("deviation_h") is None else f"{row['deviation_h']:+.2f}"
            h = f"{row['predicted_h']:7.2f} {oh:>9} {dh:>5}  "
        print(f"  {atoms:<12} {mult[:9]:<9} {row['predicted']:9.2f} {row['sigma']:5.2f} {obs:>13} {dev:>6}  {h}"
              f"{', '.join(row['notes'])}", file=out)
    for j in r.assignment.unmatched_peaks:
        p = r.peaks[j]
        why = "solvent" if p.solvent else "unexplained"
        shown = f"{p.lo:.2f}-{p.hi:.2f}" if p.lo is not None and p.hi != p.lo else f"{p.shift:.2f}"
        if p.h_lo is not None:
            shown += f" / {p.h_lo:.2f}"
        print(f"  {'-':<12} {(p.multiplicity or '')[:9]:<9} {'':>9} {'':>5} {shown:>13} {'':>6}  {why}", file=out)


def print_correlations(cand, nucleus: str = "HMBC", out=None) -> None:
    """The cross peaks of an HMBC, COSY or NOESY for one candidate: for each, the atoms it most likely joins (as the
    candidate's 1D assignments and shifts read them), how far apart they are (bonds, or Å in space) and its cost."""
    out = out or sys.stdout
    r = cand.nuclei[nucleus]
    hmbc = nucleus == "HMBC"
    print(f"\n{nucleus} cross peaks for {cand.name or cand.smiles}, each with the atoms it most likely joins:", file=out)
    first, second = ("δC", "δH") if hmbc else ("δH", "δH")
    ends = ("C atoms", "H on atoms") if hmbc else ("H on atoms", "H on atoms")
    apart = "Å" if nucleus == "NOESY" else "bonds"
    print(f"  {first:>7} {second:>6}  {ends[0]:<10} {ends[1]:<10} {apart:>5} {'cost':>6}  note", file=out)
    for row in sorted(r.assignment_table(), key=lambda x: (-x["observed"], -x["observed_h"])):
        a = ",".join(str(x) for x in row["atoms"])
        b = ",".join(str(x) for x in row["h_atoms"])
        far = row.get("distance") if nucleus == "NOESY" else row["bonds"]
        far = "-" if far is None else (f"{far:.1f}" if nucleus == "NOESY" else str(far))
        print(f"  {row['observed']:7.2f} {row['observed_h']:6.2f}  {a[:10]:<10} {b[:10]:<10} {far:>5} "
              f"{row['cost']:6.2f}  {', '.join(row['notes'])}", file=out)
    for j in r.assignment.unmatched_peaks:   # (a candidate without protons: no pair to show)
        p = r.peaks[j]
        print(f"  {p.shift:7.2f} {p.h_lo:6.2f}  {'-':<10} {'-':<10} {'-':>5} {r.assignment.extra_costs[j]:6.2f}  "
              "no atoms of this candidate can make it", file=out)
