"""The demo scenario (INVENTED data): rank two samples, take their inventories, write one report."""
from __future__ import annotations

from importlib import resources

from ..chem.inventory import take_inventory
from ..inputs.peaks import read_peaks
from ..score.ranking import rank
from ..outputs.report import write_report
from ..outputs.terminal import print_ranking

SAMPLES = [
    {"id": "LP-0412 SNAr product", "title": "SNAr of 2,4-difluoronitrobenzene with morpholine: which fluorine was replaced?",
     "peaks": "snar_13c.txt", "candidates": "snar_candidates.smi", "solvent": "CDCl3", "formula": "C10H11FN2O3",
     "peaks_1h": None, "mz": None},
    {"id": "QC-bottle 7731", "title": "Bottle labelled methyl 4-hydroxybenzoate: does the label hold?",
     "peaks": "bottle_13c.txt", "candidates": "bottle_candidates.smi", "solvent": "DMSO-d6", "formula": "C8H8O3",
     "peaks_1h": "bottle_1h.txt", "mz": 153.0549},
]


def _file(name: str):
    return resources.as_file(resources.files("shiftrank.demo") / name)


def _candidates(path) -> list[tuple[str, str]]:
    out = []
    for line in path.read_text().splitlines():
        if line.strip() and not line.startswith("#"):
            smi, _, name = line.strip().partition(" ")
            out.append((name.strip() or None, smi))
    return out


def run_demo(output: str) -> int:
    print("shiftrank demo — all peak lists are INVENTED for illustration; they are not measurements.\n")
    results, pls, hists, invs = [], [], [], []
    for s in SAMPLES:
        with _file(s["peaks"]) as pp, _file(s["candidates"]) as cp:
            pl = read_peaks(pp, solvent=s["solvent"])
            cands = _candidates(cp)
        h1 = None
        if s["peaks_1h"]:
            with _file(s["peaks_1h"]) as hp:
                h1 = read_peaks(hp, nucleus="1H", solvent=s["solvent"])
        result = rank(pl, cands, formula=s["formula"], solvent=s["solvent"], id=s["id"])
        inv = take_inventory(pl, h1, s["formula"], s["mz"])
        print(f"=== {s['id']}: {s['title']}")
        print(f"    sample history: formula {s['formula']}, solvent {s['solvent']}" + (f", m/z {s['mz']}" if s["mz"] else ""))
        for line in inv.lines():
            print(f"    {line}")
        print()
        print_ranking(result, s["peaks"])
        print()
        results.append(result); pls.append(pl); invs.append(inv)
        hists.append({"formula": s["formula"], "solvent": s["solvent"], "mass": None})
    write_report(results, output, pls, hists, invs, title="shiftrank demo report (invented data)")
    print(f"report written to {output}")
    return 0
