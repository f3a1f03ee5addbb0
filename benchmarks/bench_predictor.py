"""Predictor benchmark on the held-out test split (InChIKey-skeleton split of ../shared/data).

    python benchmarks/bench_predictor.py [--data DIR] [--nucleus 13C|1H] [--accuracy-only]
    python benchmarks/bench_predictor.py --tree-counts 100,200,300,400 [--nucleus 13C|1H]
    python benchmarks/bench_predictor.py --peaklists [--split val|test]

``--tree-counts``: validation-split MAE of the boosted estimate when every member keeps only its
first N trees (what a faster, smaller model would cost), nothing else.

``--peaklists``: 13C on the unassigned peak lists of never-trained skeletons, by the carbon's
heteroatom neighbours.  NMRShiftDB2's assigned set (and so the test split above) holds no bromine,
iodine, silicon, selenium or boron at all; these lists do.  A list counts when it has one entry per
carbon with multiplicities; within each multiplicity its values go to the carbons by the optimal
assignment to the prediction (Hungarian), so the figures are lower bounds of the true error where
carbons of one multiplicity lie close together, and honest where one carbon is far off.

Reports MAE overall and by atom type and molecule size, aromatic ring atoms by ring type and by
position relative to the ring's substituents (ipso / ortho / meta / para), the 90 % interval
coverage, coverage of atoms, load time and throughput (one thread).  For 1H, the headline MAE is
over C–H heavy atoms (the mean shift of their protons); OH/NH/SH are reported apart.
"""
from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("OMP_NUM_THREADS", "1")  # one core, as the target says

import numpy as np  # noqa: E402
from rdkit import Chem  # noqa: E402

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from training.data import DEFAULT_DATA, load_assigned  # noqa: E402

from cli_run import run_shiftrank  # noqa: E402  (benchmarks/, the script's own folder)


#: (SMILES, atom index, reference shift, source) for tiny molecules: nitriles, small rings, simple
#: heterocycles, carbonyl compounds.  "Fulmer 2010" = Table 2 (CDCl3) of Fulmer et al., Organometallics
#: 2010, 29, 2176; the rest are recalled from standard 13C tables (from memory).
SMALL_MOLECULES = [
    ("c1ccccc1", 0, 128.37, "benzene, Fulmer 2010"),
    ("CC#N", 0, 1.89, "acetonitrile CH3, Fulmer 2010"),
    ("CC#N", 1, 116.43, "acetonitrile CN, Fulmer 2010"),
    ("c1ccncc1", 2, 149.90, "pyridine C2, Fulmer 2010"),
    ("c1ccncc1", 1, 123.75, "pyridine C3, Fulmer 2010"),
    ("c1ccncc1", 0, 135.96, "pyridine C4, Fulmer 2010"),
    ("CCOC(C)=O", 3, 171.36, "ethyl acetate C=O, Fulmer 2010"),
    ("CCOC(C)=O", 1, 60.49, "ethyl acetate OCH2, Fulmer 2010"),
    ("C1CCOC1", 2, 67.97, "THF OCH2, Fulmer 2010"),
    ("C1CCOC1", 0, 25.62, "THF CH2, Fulmer 2010"),
    ("C1COCCO1", 0, 67.14, "1,4-dioxane, Fulmer 2010"),
    ("CN(C)C=O", 3, 162.62, "DMF CHO, Fulmer 2010"),
    ("C[N+](=O)[O-]", 0, 62.50, "nitromethane, Fulmer 2010"),
    ("CCN(CC)CC", 1, 46.25, "triethylamine CH2, Fulmer 2010"),
    ("CCOCC", 1, 65.91, "diethyl ether CH2, Fulmer 2010"),
    ("C1CC1", 0, -2.8, "cyclopropane, from memory"),
    ("C1CO1", 0, 40.6, "oxirane, from memory"),
    ("C1CN1", 0, 18.2, "aziridine, from memory"),
    ("C1COC1", 1, 72.6, "oxetane OCH2, from memory"),
    ("C1COC1", 0, 22.9, "oxetane CH2, from memory"),
    ("C=CC#N", 0, 137.5, "acrylonitrile CH2, from memory"),
    ("C=CC#N", 1, 107.8, "acrylonitrile CH, from memory"),
    ("C=CC#N", 2, 117.2, "acrylonitrile CN, from memory"),
    ("c1ccoc1", 2, 142.8, "furan C2, from memory"),
    ("c1ccoc1", 0, 109.7, "furan C3, from memory"),
    ("c1ccsc1", 2, 125.6, "thiophene C2, from memory"),
    ("c1ccsc1", 0, 127.3, "thiophene C3, from memory"),
    ("c1cc[nH]c1", 2, 118.0, "pyrrole C2, from memory"),
    ("c1cc[nH]c1", 0, 108.0, "pyrrole C3, from memory"),
    ("c1cnccn1", 0, 145.2, "pyrazine, from memory"),
    ("CC=O", 1, 200.5, "acetaldehyde CHO, from memory"),
    ("CC(=O)C1CCCCC1", 1, 211.9, "cyclohexyl methyl ketone C=O, from memory"),
]


def kind(atom) -> str:
    if atom.GetIsAromatic():
        return "aromatic"
    hyb = atom.GetHybridization()
    if hyb == Chem.HybridizationType.SP:
        return "sp"
    if hyb == Chem.HybridizationType.SP2:
        for b in atom.GetBonds():
            if b.GetBondType() == Chem.BondType.DOUBLE and b.GetOtherAtom(atom).GetSymbol() in ("O", "S"):
                return "carbonyl"
        return "sp2"
    return "sp3"


def aromatic_ring(mol, idx: int) -> tuple | None:
    """The largest fully aromatic ring holding atom ``idx``, or None."""
    if not mol.GetAtomWithIdx(idx).GetIsAromatic():
        return None
    rings = [r for r in mol.GetRingInfo().AtomRings() if idx in r and all(mol.GetAtomWithIdx(i).GetIsAromatic() for i in r)]
    return max(rings, key=len) if rings else None


def ring_position(mol, idx: int) -> str | None:
    """For an aromatic ring atom: 'ipso' (bears a substituent), else the closest substituent's position
    ('ortho', 'meta', 'para') around its ring, or 'bare' for an unsubstituted ring; None off rings."""
    r = aromatic_ring(mol, idx)
    if r is None:
        return None
    rset = set(r)

    def substituted(i):
        return any(nb.GetIdx() not in rset for nb in mol.GetAtomWithIdx(i).GetNeighbors())
    if substituted(idx):
        return "ipso"
    k0, n = r.index(idx), len(r)
    for step, name in ((1, "ortho"), (2, "meta"), (3, "para")):
        if step > n // 2:
            break
        if substituted(r[(k0 + step) % n]) or substituted(r[(k0 - step) % n]):
            return name
    return "bare"


def substituent_positions(mol, idx: int) -> list[tuple[str, str]]:
    """For an aromatic ring atom: (substituent class, position of the atom relative to it) for every
    substituent on its ring - 'ipso', 'ortho', 'meta', 'para' around the ring; a ring fused on counts as
    'fused'.  Classes are those of the descriptors' ring-position block (``SUBST_CLASSES``)."""
    from shiftrank.prediction.environment import SUBST_CLASSES, _subst_class

    r = aromatic_ring(mol, idx)
    if r is None:
        return []
    rset, n, k0 = set(r), len(r), r.index(idx)
    out = []
    for k, j in enumerate(r):
        step = min((k - k0) % n, (k0 - k) % n)
        if step > 3:
            continue
        atom = mol.GetAtomWithIdx(j)
        for nb in atom.GetNeighbors():
            if nb.GetIdx() in rset:
                continue
            bond = mol.GetBondBetweenAtoms(j, nb.GetIdx())
            cls = "fused" if bond.IsInRing() else SUBST_CLASSES[_subst_class(nb, atom)]
            out.append((cls, ("ipso", "ortho", "meta", "para")[step]))
    return out


def ring_type(mol, idx: int) -> str | None:
    r = aromatic_ring(mol, idx)
    if r is None:
        return None
    het = any(mol.GetAtomWithIdx(i).GetAtomicNum() != 6 for i in r)
    return f"{'hetero' if het else 'carbo'}cyclic {len(r)}-ring"


def accuracy(args, nucleus: str) -> None:
    from shiftrank.prediction.environment import environments_of, mol_parts
    from shiftrank.prediction.model_files import load_shift_model, read_manifest

    man = read_manifest()
    model = load_shift_model(nucleus=nucleus)
    mols = [m for m in load_assigned(args.data, nucleus=nucleus) if m.split == "test"]
    preds = model.predict_envs(environments_of([mol_parts(m.mol, m.solvent, nucleus) for m in mols]))
    rows = []  # (abs error, sigma, atom, mol)
    for m, p in zip(mols, preds):
        mu, sg = p.shifts, p.sigmas
        for a, y in m.shifts.items():
            rows.append((mu[a] - y, sg[a], m.mol.GetAtomWithIdx(a), m.mol))
    err = np.array([r[0] for r in rows])
    sig = np.array([r[1] for r in rows])
    xh = np.array([r[2].GetAtomicNum() != 6 for r in rows])
    entry = man["nuclei"][nucleus]
    print(f"{nucleus} model {entry['version']}  (manifest test MAE {entry['metrics']['test_mae']})")
    sel = ~xh if nucleus == "1H" else np.ones(len(err), bool)
    what = "C-H heavy atoms" if nucleus == "1H" else "carbons"
    print(f"test split: {len(mols)} molecules, {sel.sum()} assigned {what}")
    e = err[sel]
    print(f"MAE {np.abs(e).mean():.3f} ppm   RMSE {np.sqrt((e ** 2).mean()):.3f}   median AE {np.median(np.abs(e)):.3f}")
    print(f"90 % interval coverage {100 * np.mean(np.abs(e) <= 1.6449 * sig[sel]):.1f} %")
    if nucleus == "1H" and xh.any():
        print(f"OH/NH/SH rows: {xh.sum()}, MAE {np.abs(err[xh]).mean():.3f}, coverage {100 * np.mean(np.abs(err[xh]) <= 1.6449 * sig[xh]):.1f} %")
    groups: dict = {}
    by_subst: dict = {}
    for (d, _, atom, mol), keep in zip(rows, sel):
        if not keep:
            continue
        size = mol.GetNumAtoms()
        sb = "<15" if size < 15 else "15-24" if size < 25 else "25-39" if size < 40 else ">=40"
        nh = atom.GetTotalNumHs()
        keys = [("heavy atoms", sb), ("CHn", ["C", "CH", "CH2", "CH3"][min(nh, 3)]), ("type", kind(atom))]
        rt = ring_type(mol, atom.GetIdx())
        if rt:
            keys += [("aromatic ring", rt), ("aromatic position", ring_position(mol, atom.GetIdx())),
                     ("aromatic by size", sb)]
        for key in keys:
            groups.setdefault(key, []).append(abs(d))
        for key in set(substituent_positions(mol, atom.GetIdx())):
            by_subst.setdefault(key, []).append(abs(d))
    for head in ("CHn", "type", "heavy atoms", "aromatic ring", "aromatic position", "aromatic by size"):
        parts = [f"{k[1]} {np.mean(v):.3f} (n={len(v)})" for k, v in sorted(groups.items()) if k[0] == head]
        if parts:
            print(f"  by {head}: " + ", ".join(parts))
    # the carbons a substituent moves: MAE by the substituent's class and the carbon's position from it
    # (a carbon counts once per substituent class and position on its ring); classes with 30+ ipso carbons
    positions = ("ipso", "ortho", "meta", "para")
    classes = sorted({c for c, _ in by_subst}, key=lambda c: -len(by_subst.get((c, "ipso"), [])))
    shown = [c for c in classes if len(by_subst.get((c, "ipso"), [])) >= 30]
    if shown:
        print("  aromatic ring atoms by substituent and position (MAE, n):")
        print("    " + f"{'substituent':12s}" + "".join(f"{p:>16s}" for p in positions))
        for c in shown:
            cells = [f"{np.mean(by_subst[(c, p)]):7.3f} ({len(by_subst[(c, p)]):4d})" if (c, p) in by_subst else f"{'-':>16s}"
                     for p in positions]
            print("    " + f"{c:12s}" + "".join(f"{x:>16s}" for x in cells))


def peaklist_accuracy(args) -> None:
    """13C error on the complete peak lists of validation/test skeletons by heteroatom neighbours."""
    from collections import defaultdict

    from rdkit import RDLogger

    from shiftrank.chem.structure import MULTIPLICITY
    from shiftrank.prediction.api import predict_many
    from training.data import load_peaklists
    from training.pseudo_labels import match_by_multiplicity

    RDLogger.DisableLog("rdApp.*")
    splits = ("val", "test") if args.split == "both" else (args.split,)
    todo = []
    for m in load_peaklists(args.data):
        if m.split not in splits or "." in m.smiles or any(mult is None for _, mult in m.peaks):
            continue
        mol = Chem.MolFromSmiles(m.smiles)
        if mol is not None and sum(a.GetAtomicNum() == 6 for a in mol.GetAtoms()) == len(m.peaks):
            todo.append((m, mol))
    preds = predict_many([mol for _, mol in todo])
    groups, n_mol = defaultdict(list), 0
    for (m, mol), p in zip(todo, preds):
        if isinstance(p, Exception):
            continue
        atoms = [a for a in mol.GetAtoms() if a.GetAtomicNum() == 6]
        mu, obs = np.array([p.shifts[a.GetIdx()] for a in atoms]), np.array([v for v, _ in m.peaks])
        pairs = match_by_multiplicity([MULTIPLICITY.get(a.GetTotalNumHs()) for a in atoms], mu,
                                      [mult for _, mult in m.peaks], obs)
        if pairs is None:
            continue
        n_mol += 1
        for i, j in pairs:
            atom = atoms[i]
            hetero = sorted({n.GetSymbol() for n in atom.GetNeighbors() if n.GetAtomicNum() != 6})
            where = "aromatic" if atom.GetIsAromatic() else "other"
            d = obs[j] - mu[i]
            groups[("all", "")].append(d)
            for e in hetero:
                groups[(e, where)].append(d)
    print(f"13C on peak lists of {'/'.join(splits)} skeletons: {n_mol} molecules, {len(groups[('all', '')])} carbons "
          "(labels by optimal assignment within each multiplicity)")
    print(f"  all carbons: MAE {np.mean(np.abs(groups[('all', '')])):.2f} ppm")
    print("  carbons bonded to:")
    for (e, where), v in sorted(groups.items(), key=lambda kv: (kv[0][0] not in ("Br", "I", "Si", "Se", "B"), kv[0])):
        if e != "all" and len(v) >= 10:
            print(f"    {e:>3} ({where:8s}) n={len(v):5d}  MAE {np.mean(np.abs(v)):5.2f}  bias (observed − predicted) "
                  f"{np.mean(v):+6.2f}")


def tree_counts(args, counts: list[int]) -> None:
    """Validation MAE of the members' mean with each member cut to its first N trees."""
    from dataclasses import replace

    from shiftrank.prediction.model_files import load_shift_model
    from training.features import rows_from_assigned

    model = load_shift_model(nucleus=args.nucleus)
    mols = load_assigned(args.data, nucleus=args.nucleus)
    split = np.array([m.split for m in mols])
    rows = rows_from_assigned(mols, args.nucleus)
    val = rows.subset(split[rows.mol_idx] == "val")
    X, _ = model.design(val.feats, val.codes, val.rkeys)
    X = np.asfortranarray(X, dtype=np.float64)
    sizes = [len(m.offsets) for m in model.regressors]
    print(f"{args.nucleus}: {len(model.regressors)} members of {sizes} trees; {len(X)} validation-split rows "
          "(1H: every heavy atom with H)")
    model.regressors[0].predict(X[:1])   # the compiled walk loaded before timing
    for n in counts:
        t = time.perf_counter()
        mu = np.mean([replace(m, offsets=m.offsets[:n]).predict(X) for m in model.regressors], axis=0)
        dt = time.perf_counter() - t
        print(f"  first {n:4d} trees per member: validation MAE {np.mean(np.abs(mu - val.y)):.4f}  "
              f"({1e6 * dt / len(X):.1f} µs per row, one thread)")


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--nucleus", choices=["13C", "1H"], default="13C")
    ap.add_argument("--accuracy-only", action="store_true", help="skip the speed and small-molecule sections")
    ap.add_argument("--tree-counts", default=None, help="e.g. 100,200,300,400: validation MAE with fewer trees")
    ap.add_argument("--peaklists", action="store_true", help="13C on never-trained peak lists, by heteroatom neighbour")
    ap.add_argument("--split", choices=("val", "test", "both"), default="both", help="with --peaklists")
    args = ap.parse_args()
    if args.peaklists:
        peaklist_accuracy(args)
        return 0
    if args.tree_counts:
        tree_counts(args, [int(x) for x in args.tree_counts.split(",")])
        return 0
    if args.nucleus == "1H" or args.accuracy_only:
        accuracy(args, args.nucleus)
        return 0
    accuracy(args, "13C")
    print()
    t = time.perf_counter()
    from shiftrank.prediction.model_files import load_shift_model, read_manifest
    model = load_shift_model()
    load_s = time.perf_counter() - t
    man = read_manifest()
    from shiftrank.prediction.environment import environments_of, mol_parts
    from shiftrank.prediction.api import predict_many

    mols = [m for m in load_assigned(args.data) if m.split == "test"]
    preds = model.predict_envs(environments_of([mol_parts(m.mol, m.solvent) for m in mols]))
    # speed, one thread: molecules freshly parsed from SMILES for each run (no RDKit caches warm).
    # "batch" = shiftrank.predict_many on parsed molecules: organic checks, descriptors, model;
    # the second figure adds SMILES parsing.  Run 0 is a warm-up and not counted.
    smiles = [Chem.MolToSmiles(m.mol) for m in mols]
    batch_s, many_s = [], []
    for run in range(6):
        fresh = [Chem.MolFromSmiles(s) for s in smiles]
        t = time.perf_counter()
        many = predict_many(fresh)
        dt = time.perf_counter() - t
        t = time.perf_counter()
        predict_many(smiles)
        dt2 = time.perf_counter() - t
        if run:
            batch_s.append(dt)
            many_s.append(dt2)
    assert not any(isinstance(p, Exception) for p in many)
    n_pred = sum(len(p.carbons) for p in preds)
    n_carbons = sum(sum(1 for a in m.mol.GetAtoms() if a.GetAtomicNum() == 6) for m in mols)
    errs, sig, groups = [], [], {}
    for m, p in zip(mols, preds):
        mu, sg = p.shifts, p.sigmas
        size = m.mol.GetNumAtoms()
        sb = "<15" if size < 15 else "15-24" if size < 25 else "25-39" if size < 40 else ">=40"
        for a, y in m.shifts.items():
            e = mu[a] - y
            errs.append(e)
            sig.append(sg[a])
            atom = m.mol.GetAtomWithIdx(a)
            for key in (("CHn", ["C", "CH", "CH2", "CH3"][min(atom.GetTotalNumHs(), 3)]), ("type", kind(atom)), ("heavy atoms", sb)):
                groups.setdefault(key, []).append(abs(e))
    errs, sig = np.array(errs), np.array(sig)
    print(f"model {man['nuclei']['13C']['version']}  (manifest test MAE {man['nuclei']['13C']['metrics']['test_mae']})")
    print(f"test split: {len(mols)} molecules, {len(errs)} assigned carbons; predicted {n_pred}/{n_carbons} carbons (coverage {100 * n_pred / n_carbons:.1f} %)")
    print(f"MAE {np.abs(errs).mean():.3f} ppm   RMSE {np.sqrt((errs ** 2).mean()):.3f}   median AE {np.median(np.abs(errs)):.3f}   >10 ppm {100 * np.mean(np.abs(errs) > 10):.2f} %")
    print(f"90 % interval coverage {100 * np.mean(np.abs(errs) <= 1.6449 * sig):.1f} %")
    for head in ("CHn", "type", "heavy atoms"):
        parts = [f"{k[1]} {np.mean(v):.2f} (n={len(v)})" for k, v in sorted(groups.items()) if k[0] == head]
        print(f"  by {head}: " + ", ".join(parts))
    print(f"load {load_s:.2f} s")
    n_all = sum(len(p.carbons) for p in many)
    print(f"batch after load (shiftrank.predict_many on parsed molecules), 1 thread, checks and descriptors included: median {n_all / np.median(batch_s):,.0f} carbons/s "
          f"(range {n_all / max(batch_s):,.0f}-{n_all / min(batch_s):,.0f} over 5 runs)")
    print(f"  the same from SMILES strings (parsing included): median {n_all / np.median(many_s):,.0f} carbons/s "
          f"(range {n_all / max(many_s):,.0f}-{n_all / min(many_s):,.0f})")
    sample = mols[:300]
    t = time.perf_counter()
    nc = 0
    for m in sample:
        nc += len(model.predict_mol(m.mol).carbons)
    per = time.perf_counter() - t
    print(f"one molecule per call: {nc / per:,.0f} carbons/s, {1000 * per / len(sample):.2f} ms per molecule")
    with tempfile.TemporaryDirectory() as d:
        smi = Path(d) / "test.smi"
        smi.write_text("\n".join(f"{Chem.MolToSmiles(m.mol)} {m.id}" for m in mols) + "\n")
        t = time.perf_counter()
        run_shiftrank("predict", str(smi), "--jsonl")
        whole = time.perf_counter() - t
    print(f"whole process (shiftrank predict --jsonl, start-up included): {n_carbons / whole:,.0f} carbons/s ({whole:.2f} s for {len(mols)} molecules)")
    print("\nsmall molecules against reference values (Fulmer et al. 2010, Organometallics 29, 2176, Table 2,"
          " CDCl3; others recalled from standard 13C tables, from memory):")
    from shiftrank.prediction.api import predict
    devs, models_only = [], []
    for smi, atom, ref, src in SMALL_MOLECULES:
        p = predict(smi, solvent="CDCl3")
        d = p.shifts[atom] - ref
        devs.append(abs(d))
        how = "in data" if next(c for c in p.carbons if c.atom == atom).whole_molecule else "model"
        print(f"  {smi:<14} C{atom:<2} predicted {p.shifts[atom]:6.1f} ± {p.sigmas[atom]:3.1f} ({how:<7})  reference {ref:6.1f}  "
              f"{d:+6.1f}  {'*' if abs(d) > 5 else ' '} {src}")
        if how == "model":
            models_only.append(abs(d))
    devs = np.array(devs)
    print(f"  {len(devs)} carbons: MAE {devs.mean():.2f}, within 3 ppm {np.sum(devs <= 3)}, within 5 ppm {np.sum(devs <= 5)}")
    m = np.array(models_only)
    if len(m):
        print(f"  of these, {len(m)} predicted by the model (compound not in the training data): MAE {m.mean():.2f}, "
              f"within 3 ppm {np.sum(m <= 3)}, within 5 ppm {np.sum(m <= 5)}")
    print("  ('in data': the compound itself is in the training data and its measured value is reported)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
