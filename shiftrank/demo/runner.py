"""The demo scenario (INVENTED data): three samples ranked, their inventories, one report."""
from __future__ import annotations

from importlib import resources

from ..chem.inventory import take_inventory
from ..inputs.peaks import read_hsqc, read_peaks
from ..outputs.report import write_report
from ..outputs.terminal import print_ranking
from ..score.ranking import case_peaklists, rank

SAMPLES = [
    {"id": "LP-0412 SNAr product", "title": "SNAr of 2,4-difluoronitrobenzene with morpholine: which fluorine was replaced?",
     "peaks": "snar_13c.txt", "hsqc": "snar_hsqc.txt", "candidates": "snar_candidates.smi", "solvent": "CDCl3",
     "formula": "C10H11FN2O3"},
    {"id": "QC-bottle 7731", "title": "Bottle labelled methyl 4-hydroxybenzoate: does the label hold? (13C and 1H)",
     "peaks": "bottle_13c.txt", "peaks_1h": "bottle_1h.txt", "candidates": "bottle_candidates.smi",
     "solvent": "DMSO-d6", "formula": "C8H8O3", "mz": 153.0549},
    {"id": "LP-0419 N-ethylation", "title": "N-Ethylation of methyl indazole-5-carboxylate: N1 or N2? "
     "(printed paragraph; alternatives generated from the intended product)",
     "text": "alkylation_text.txt", "intended": "CCn1ncc2cc(C(=O)OC)ccc21", "formula": "C11H12N2O2"},
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
    print("shiftrank demo — all peak lists and the paragraph are INVENTED for illustration; they are not measurements.\n")
    results, lists, hists, invs = [], [], [], []
    for s in SAMPLES:
        case = {"formula": s["formula"], "solvent": s.get("solvent"), "id": s["id"]}
        if s.get("peaks"):
            with _file(s["peaks"]) as pp:
                case["peaks"] = read_peaks(pp, solvent=s.get("solvent"))
        if s.get("peaks_1h"):
            with _file(s["peaks_1h"]) as hp:
                case["peaks_1h"] = read_peaks(hp, nucleus="1H", solvent=s.get("solvent"))
        if s.get("hsqc"):
            with _file(s["hsqc"]) as hq:
                case["hsqc"] = read_hsqc(hq).records()
        if s.get("text"):
            with _file(s["text"]) as tp:
                case["text"] = tp.read_text(encoding="utf-8")
        if s.get("candidates"):
            with _file(s["candidates"]) as cp:
                cands = _candidates(cp)
        else:
            cands = [("intended product", s["intended"])]
        result = rank(case.get("peaks"), cands, formula=s["formula"], solvent=s.get("solvent"), id=s["id"],
                      peaks_1h=case.get("peaks_1h"), text=case.get("text"), with_isomers=not s.get("candidates"),
                      hsqc=case.get("hsqc"))
        pls, _, _ = case_peaklists(case)
        inv = take_inventory(pls.get("13C"), pls.get("1H"), s["formula"], s.get("mz"), hsqc=pls.get("HSQC"),
                             cosy=pls.get("COSY"), hmbc=pls.get("HMBC"))
        print(f"=== {s['id']}: {s['title']}")
        print(f"    sample history: formula {s['formula']}" + (f", solvent {s['solvent']}" if s.get("solvent") else "")
              + (f", m/z {s['mz']}" if s.get("mz") else ""))
        for line in inv.lines():
            print(f"    {line}")
        print()
        print_ranking(result, s)
        print()
        results.append(result)
        lists.append(pls)
        invs.append(inv)
        hists.append({"formula": s["formula"], "solvent": s.get("solvent"), "mass": None})
    write_report(results, output, lists, hists, invs, title="shiftrank demo report (invented data)")
    print(f"report written to {output}")
    return 0
