"""The demo scenario (invented data): structure facts and peak checks for two samples."""
from __future__ import annotations

from importlib import resources

from ..molecules import read_molecules
from ..peaks import read_peaks
from ..structure import facts_from_mol

SAMPLES = [
    ("SNAr product, which fluorine was replaced?", "snar_13c.txt", "snar_candidates.smi", "CDCl3", "C10H11FN2O3"),
    ("Bottle labelled methyl 4-hydroxybenzoate", "bottle_13c.txt", "bottle_candidates.smi", "DMSO-d6", "C8H8O3"),
]


def demo_file(name: str):
    return resources.files("shiftrank.demo") / name


def run_demo(output: str) -> int:
    print("shiftrank demo: INVENTED data for illustration only\n")
    for title, peaks, cands, solvent, formula in SAMPLES:
        with resources.as_file(demo_file(peaks)) as pp, resources.as_file(demo_file(cands)) as cp:
            pl = read_peaks(pp, solvent=solvent)
            recs = read_molecules(cp)
        print(f"== {title} (formula {formula}, {solvent}) ==")
        print(f"   {len(pl.sample_peaks())} sample signals; " + "; ".join(pl.notes))
        for r in recs:
            f = facts_from_mol(r.mol, r.source)
            print(f"   {r.id}: {f.formula}, DBE {f.dbe:g}, expects {f.expected_13c_signals} signals")
        print()
    return 0
