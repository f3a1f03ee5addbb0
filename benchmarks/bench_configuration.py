"""E/Z alternatives against database 13C lists: does the ranking tell a structure from its other configuration?

    python benchmarks/bench_configuration.py [--data DIR] [--limit N]

Cases: the 13C peak lists (``peaklists.jsonl.gz``) of validation- and test-split skeletons (never trained
on) whose SMILES states the configuration of a double bond (C=C, C=N outside rings smaller than eight)
and whose list has one value per carbon; molecules of the assigned set are left out, because the
configuration increments were fitted on those (``training/configuration_increments.py``).  Candidates:
the structure and each of its E/Z alternatives (``isomers --kind stereo``), sorted by SMILES.  Ranked
with multiplicities (DEPT) and with shifts only, once with the shipped model and once with its
configuration increments switched off (the stereo-blind estimate).

A case counts as right when the structure is first and strictly ahead of the rest; as a tie when it shares
the top probability with another candidate (which the stereo-blind model gives wherever no increment
applies), wherever it was listed.  "sp3 beside" is the subset
where some sp3 carbon beside a configured bond has a heavy group cis or trans across it, the only role
with an increment in the shipped model.
"""
from __future__ import annotations

import argparse
import os
import sys
import time
from pathlib import Path

os.environ.setdefault("OMP_NUM_THREADS", "1")

from rdkit import Chem  # noqa: E402

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from shiftrank.chem.isomers import isomers  # noqa: E402
from shiftrank.prediction.configuration import configuration_roles  # noqa: E402
from shiftrank.prediction.model_files import default_model  # noqa: E402
from shiftrank.score import ranking  # noqa: E402
from shiftrank.score.ranking import rank_many  # noqa: E402
from training.data import DEFAULT_DATA, load_assigned, load_peaklists  # noqa: E402


def cases(data: Path, limit: int | None = None) -> list[dict]:
    assigned = {m.id for m in load_assigned(data)}
    out = []
    for m in load_peaklists(data):
        if m.split not in ("val", "test") or "." in m.smiles or m.id in assigned:
            continue
        mol = Chem.MolFromSmiles(m.smiles)
        if mol is None or sum(a.GetAtomicNum() == 6 for a in mol.GetAtoms()) != len(m.peaks):
            continue
        roles = configuration_roles(mol, range(mol.GetNumAtoms()))
        if roles is None:
            continue
        truth = Chem.MolToSmiles(mol)
        try:
            alts = [a.smiles for a in isomers(truth, kinds="stereo")]
        except Exception:  # noqa: BLE001 - a structure the generator refuses has no case
            continue
        if not alts:
            continue
        distinct = {}
        for v, mult in m.peaks:
            distinct.setdefault(round(v, 2), mult)
        out.append({"id": m.id, "truth": truth, "candidates": sorted({truth, *alts}), "solvent": m.solvent,
                    "peaks": [{"shift": v, "multiplicity": k} if k else {"shift": v} for v, k in sorted(distinct.items())],
                    "sp3": bool(roles[:, :3].any())})
        if limit and len(out) >= limit:
            break
    return out


def outcome(case: dict, result) -> str:
    if isinstance(result, Exception):
        return "failed"
    order = result.candidates
    truth = next(c for c in order if c.smiles == case["truth"])
    if any(c is not truth and abs(c.probability - truth.probability) < 1e-9 for c in order):
        return "tie" if abs(truth.probability - order[0].probability) < 1e-9 else "wrong"
    return "right" if order[0] is truth else "wrong"


def run(all_cases: list[dict], dept: bool) -> list[str]:
    built = []
    for c in all_cases:
        peaks = c["peaks"] if dept else [{"shift": p["shift"]} for p in c["peaks"]]
        built.append({"id": c["id"], "candidates": c["candidates"], "peaks": peaks, "solvent": c["solvent"]})
    return [outcome(c, r) for c, r in zip(all_cases, rank_many(built))]


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--limit", type=int, default=None)
    args = ap.parse_args(argv)
    t0 = time.perf_counter()
    all_cases = cases(args.data, args.limit)
    print(f"{len(all_cases)} cases ({sum(c['sp3'] for c in all_cases)} with an sp3 carbon beside a configured bond), "
          f"{sum(len(c['candidates']) for c in all_cases)} candidates; built in {time.perf_counter() - t0:.1f} s")
    model = default_model("13C")
    shipped = model.config_increments
    for label, inc in (("stereo-blind (increments off)", None), ("shipped", shipped)):
        model.config_increments = inc
        ranking._describe.cache_clear()   # candidates keep their predictions in that cache
        for dept in (True, False):
            res = run(all_cases, dept)
            for subset, keep in (("all", lambda c: True), ("sp3 beside", lambda c: c["sp3"])):
                rows = [r for c, r in zip(all_cases, res) if keep(c)]
                n = len(rows)
                print(f"{label:30s} {'DEPT' if dept else 'shifts only':11s} {subset:10s} n {n:4d}  right "
                      f"{rows.count('right'):4d} ({100 * rows.count('right') / max(n, 1):5.1f} %)  tie {rows.count('tie'):4d}  "
                      f"wrong {rows.count('wrong'):4d}  failed {rows.count('failed')}")
    model.config_increments = shipped
    return 0


if __name__ == "__main__":
    sys.exit(main())
