"""Text output for a person at a terminal: the ranking table, the verdict and the assignment of the best."""
from __future__ import annotations

import sys

from ..score.ranking import CAUTION


def print_ranking(result, peaks_src: str, out=sys.stdout) -> None:
    n_obs = sum(1 for p in result.peaks if not p.solvent)
    n_solv = len(result.peaks) - n_obs
    print(f"Peaks: {peaks_src}: {n_obs} signals" + (f" (+{n_solv} set aside as solvent)" if n_solv else ""), file=out)
    for n in result.notes:
        print(f"  note: {n}", file=out)
    print(file=out)
    print(f" {'#':>2}  {'p':>6}  {'MAE':>5} {'max':>5} {'>3σ':>4} {'signals':>8}  candidate", file=out)
    for i, c in enumerate(result.candidates, 1):
        label = f"{c.name}  {c.smiles}" if c.name else c.smiles
        if c.error:
            print(f" {i:>2}  {'-':>6}  {'':>5} {'':>5} {'':>4} {'':>8}  {label}\n       error: {c.error}", file=out)
            continue
        sig = f"{len(c.classes)}/{n_obs}"
        print(f" {i:>2}  {c.probability:6.3f}  {c.mae:5.2f} {c.max_abs_deviation:5.1f} {c.beyond_3sigma:>4} {sig:>8}  {label}", file=out)
        for fl in c.flags:
            print(f"       ! {fl}", file=out)
    print(f"\nVerdict: {result.verdict}", file=out)
    best = result.best
    if not best.error:
        print(f"\nAssignment for #1 ({best.name or best.smiles}):", file=out)
        print(f"  {'atoms':<12} {'CHn':<4} {'predicted':>9} {'±σ':>5} {'observed':>9} {'dev':>6}  note", file=out)
        for row in best.assignment_table():
            atoms = ",".join(str(a) for a in row["atoms"])
            obs = "" if row["peak"] is None else f"{result.peaks[row['peak']].shift:9.2f}"
            dev = "" if row["deviation"] is None else f"{row['deviation']:+6.2f}"
            print(f"  {atoms:<12} {row['multiplicity']:<4} {row['predicted']:9.2f} {row['sigma']:5.2f} {obs:>9} {dev:>6}  {', '.join(row['notes'])}", file=out)
        for j in best.assignment.unmatched_peaks:
            p = result.peaks[j]
            why = "solvent" if p.solvent else "unexplained"
            print(f"  {'-':<12} {p.multiplicity or '':<4} {'':>9} {'':>5} {p.shift:9.2f} {'':>6}  {why}", file=out)
    print(f"\nModel {result.model_version}. Caution: {CAUTION}", file=out)
