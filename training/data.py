"""Reading the NMRShiftDB2 development data and splitting it by InChIKey skeleton.

The data stay in ../shared/data (or a directory given on the command line);
nothing here is copied into the repository.
"""
from __future__ import annotations

import csv
import gzip
import hashlib
import json
from collections import defaultdict
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
from rdkit import Chem, RDLogger
from rdkit.Chem import rdMolDescriptors

from shiftrank.chem.structure import symmetry_ranks
from shiftrank.inputs.molecules import ORGANIC
from shiftrank.inputs.solvents import normalise_solvent

RDLogger.DisableLog("rdApp.*")

DEFAULT_DATA = Path(__file__).resolve().parents[1].parent / "shared" / "data"
#: Carbons whose spectra disagree by more than this are dropped as unreliable.
MAX_SPECTRUM_DISAGREEMENT = 2.0
SHIFT_RANGE = (-10.0, 240.0)


def skeleton(inchikey: str) -> str:
    """First InChIKey block: the connectivity skeleton (stereo variants share it)."""
    return inchikey.split("-")[0]


def split_of(skel: str) -> str:
    """'train' (80 %), 'val' (10 %) or 'test' (10 %) from a hash of the skeleton."""
    h = int(hashlib.sha256(f"shiftrank-split-v1:{skel}".encode()).hexdigest()[:8], 16) % 20
    return "test" if h < 2 else "val" if h < 4 else "train"


@dataclass
class AssignedMol:
    id: str
    mol: Chem.Mol
    shifts: dict          # heavy-atom index (hydrogens removed) -> shift (median over spectra)
    solvent: str | None
    skeleton: str
    split: str


@dataclass
class PeakMol:
    id: str
    smiles: str
    skeleton: str
    split: str
    peaks: list = field(default_factory=list)   # [(shift, multiplicity or None)] one entry per carbon
    solvent: str | None = None


@dataclass
class LoadReport:
    counts: dict = field(default_factory=dict)

    def add(self, key: str, n: int = 1) -> None:
        self.counts[key] = self.counts.get(key, 0) + n


def _organic(mol: Chem.Mol) -> bool:
    syms = {a.GetSymbol() for a in mol.GetAtoms()}
    return syms <= ORGANIC and "C" in syms


#: 1H: spectra of one molecule that disagree on a heavy atom's protons by more than this are dropped.
MAX_SPECTRUM_DISAGREEMENT_1H = 0.3
SHIFT_RANGE_1H = (-2.0, 16.0)


def _read_assigned_rows(data_dir: Path, nucleus: str, report: LoadReport):
    """{id: {atom index: [one value per spectrum]}} and {id: [solvents]} from the assigned CSV of ``nucleus``.

    1H rows are per proton; the protons of one heavy atom in one spectrum are averaged first (their
    mean shift is what the 1H model predicts)."""
    rows: dict = defaultdict(lambda: defaultdict(list))
    solv: dict = defaultdict(list)
    if nucleus == "13C":
        with gzip.open(data_dir / "assigned_13c.csv.gz", "rt") as f:
            for r in csv.DictReader(f):
                report.add("13c_rows")
                rows[r["nmrshiftdb2_id"]][int(r["atom_index"])].append(float(r["shift_ppm"]))
                solv[r["nmrshiftdb2_id"]].append(normalise_solvent(r["solvent"]))
        return rows, solv
    per_spectrum: dict = defaultdict(list)
    with gzip.open(data_dir / "assigned_1h.csv.gz", "rt") as f:
        for r in csv.DictReader(f):
            report.add("1h_rows")
            per_spectrum[(r["nmrshiftdb2_id"], r["spectrum"], int(r["heavy_atom_index"]))].append(float(r["shift_ppm"]))
            solv[r["nmrshiftdb2_id"]].append(normalise_solvent(r["solvent"]))
    for (mid, _, atom), vals in per_spectrum.items():
        rows[mid][atom].append(float(np.mean(vals)))
    return rows, solv


def load_assigned(data_dir: Path = DEFAULT_DATA, report: LoadReport | None = None, nucleus: str = "13C") -> list[AssignedMol]:
    """Assigned shifts of ``nucleus`` joined to their structures (indices mapped to the H-free molecule).

    13C: one value per carbon; 1H: the mean shift of the protons on each heavy atom."""
    report = report or LoadReport()
    rows, solv = _read_assigned_rows(data_dir, nucleus, report)
    limit = MAX_SPECTRUM_DISAGREEMENT if nucleus == "13C" else MAX_SPECTRUM_DISAGREEMENT_1H
    lo, hi = SHIFT_RANGE if nucleus == "13C" else SHIFT_RANGE_1H
    out = []
    sup = Chem.ForwardSDMolSupplier(gzip.open(data_dir / "assigned_structures.sdf.gz"), removeHs=False)
    for mol in sup:
        if mol is None:
            report.add("sdf_unreadable")
            continue
        mid = mol.GetProp("_Name").strip()
        if mid not in rows:
            continue
        for a in mol.GetAtoms():
            a.SetIntProp("orig", a.GetIdx())
        try:
            heavy = Chem.RemoveHs(mol)
        except Exception:  # noqa: BLE001 - a database record RDKit cannot clean
            report.add("mol_unclean")
            continue
        if not _organic(heavy):
            report.add("mol_not_organic")
            continue
        orig_to_new = {a.GetIntProp("orig"): a.GetIdx() for a in heavy.GetAtoms()}
        shifts = {}
        for idx, vals in rows[mid].items():
            new = orig_to_new.get(idx)
            if nucleus == "13C":
                if new is None or heavy.GetAtomWithIdx(new).GetAtomicNum() != 6:
                    report.add("carbon_index_not_carbon")
                    continue
            elif new is None or heavy.GetAtomWithIdx(new).GetTotalNumHs() == 0:
                report.add("heavy_atom_without_h")
                continue
            if max(vals) - min(vals) > limit:
                report.add("atom_dropped_spectra_disagree")
                continue
            v = float(np.median(vals))
            if not lo <= v <= hi:
                report.add("atom_dropped_out_of_range")
                continue
            shifts[new] = v
        if not shifts:
            continue
        s = [x for x in solv[mid] if x]
        key = Chem.MolToInchiKey(heavy) or mid
        sk = skeleton(key)
        out.append(AssignedMol(mid, heavy, shifts, max(set(s), key=s.count) if s else None, sk, split_of(sk)))
        report.add("molecules")
        report.add("atoms", len(shifts))
    return out


def load_peaklists(data_dir: Path = DEFAULT_DATA, report: LoadReport | None = None, nucleus: str = "13C") -> list[PeakMol]:
    """Unassigned peak lists of ``nucleus``: 13C with one entry per carbon and multiplicities; 1H with
    one entry per signal (sometimes per proton), mostly without integrals or multiplicities."""
    report = report or LoadReport()
    out = []
    with gzip.open(data_dir / "peaklists.jsonl.gz", "rt") as f:
        for line in f:
            rec = json.loads(line)
            spectra = [s for s in rec.get("spectra", []) if s.get("nucleus") == nucleus and s.get("peaks")]
            if not spectra:
                continue
            report.add(f"peaklist_molecules_{nucleus}")
            s = spectra[0]
            sk = skeleton(rec["inchikey"])
            peaks = [(float(p[0]), p[1] or None) for p in s["peaks"]]
            out.append(PeakMol(str(rec["nmrshiftdb2_id"]), rec["smiles"], sk, split_of(sk), peaks, normalise_solvent(s.get("solvent"))))
    return out


def literature_part(skel: str) -> str:
    """'dev' or 'heldout' (half each) for a literature compound, from a hash of its InChIKey skeleton:
    the dev half fits the ranking settings on printed text, the held-out half only measures."""
    h = int(hashlib.sha256(f"shiftrank-literature-v1:{skel}".encode()).hexdigest()[:8], 16) % 2
    return "dev" if h == 0 else "heldout"



def regio_candidates(truth: str, max_candidates: int = 12) -> list[str] | None:
    """The structure and its positional isomers from moving one ring substituent
    (:func:`shiftrank.chem.isomers.isomers`, the rule the development regio cases were built by), at most
    ``max_candidates``, sorted by SMILES so the truth has no fixed place; None when there are none."""
    from shiftrank.chem.isomers import isomers

    try:
        alts = [a.smiles for a in isomers(truth, kinds="positional")]
    except Exception:  # noqa: BLE001 - a structure the generator refuses has no case
        return None
    return sorted({truth, *alts[: max_candidates - 1]}) if alts else None


def peaklist_regio_cases(data_dir: Path = DEFAULT_DATA, splits=("val", "test"), max_candidates: int = 12,
                         nucleus: str = "13C") -> list[dict]:
    """Positional-isomer ranking cases from the unassigned peak lists of the given splits (never trained
    on: self-training reads the training split only), for measuring changes with less noise than the
    held-out development regio cases.  A molecule gives a case when it has positional isomers
    (:func:`regio_candidates`) and:

    * 13C: its list has one value per carbon (incomplete lists are skipped); the peaks are one entry per
      distinct value with its multiplicity, as in the development cases (``peaks``);
    * 1H: its list has at least one value per two proton-bearing carbon classes (the lists are often
      incomplete, and give one entry per signal or per proton, seldom an integral or a letter); the
      peaks are the distinct values, shifts only (``peaks_1h``).

    'truth' and 'split' are for scoring only."""
    out = []
    for m in load_peaklists(data_dir, nucleus=nucleus):
        if m.split not in splits or "." in m.smiles:
            continue
        mol = Chem.MolFromSmiles(m.smiles)
        if mol is None:
            continue
        if nucleus == "13C":
            if sum(a.GetAtomicNum() == 6 for a in mol.GetAtoms()) != len(m.peaks):
                continue
        else:
            ranks = symmetry_ranks(mol)
            ch_classes = {ranks[a.GetIdx()] for a in mol.GetAtoms() if a.GetAtomicNum() == 6 and a.GetTotalNumHs()}
            if not ch_classes or 2 * len({round(v, 2) for v, _ in m.peaks}) < len(ch_classes):
                continue
        truth = Chem.MolToSmiles(mol)
        cands = regio_candidates(truth, max_candidates)
        if cands is None:
            continue
        distinct = {}
        for v, mult in m.peaks:
            distinct.setdefault(round(v, 2), mult)
        case = {"id": m.id, "candidates": cands, "solvent": m.solvent,
                "formula": rdMolDescriptors.CalcMolFormula(mol), "truth": truth, "split": m.split}
        if nucleus == "13C":
            case["peaks"] = [{"shift": v, "multiplicity": mult} if mult else {"shift": v} for v, mult in sorted(distinct.items())]
        else:
            case["peaks_1h"] = [{"shift": v} for v in sorted(distinct)]
        out.append(case)
    return out


def _with_both_nuclei(data_dir: Path):
    """(13C record, 1H record) of every compound with assigned 13C and assigned 1H shifts."""
    hmols = {m.id: m for m in load_assigned(data_dir, nucleus="1H")}
    for m in load_assigned(data_dir, nucleus="13C"):
        hm = hmols.get(m.id)
        if hm is not None:
            yield m, hm


def _database_13c(m: AssignedMol, ranks) -> list[dict]:
    """The 13C list as a database gives it: one line per class of equivalent carbons, with its CHn."""
    carbons: dict = {}
    for a, v in m.shifts.items():
        atom = m.mol.GetAtomWithIdx(a)
        carbons.setdefault(ranks[a], {"shift": round(v, 2), "multiplicity": "C" + ("H" * (atom.GetTotalNumHs() > 0))
                                      + (str(atom.GetTotalNumHs()) if atom.GetTotalNumHs() > 1 else "")})
    return sorted(carbons.values(), key=lambda p: p["shift"])


def hsqc_cases(data_dir: Path = DEFAULT_DATA, max_candidates: int = 12) -> list[dict]:
    """Positional-isomer ranking cases with HSQC cross peaks built from measured data.

    Every NMRShiftDB2 compound with assigned 13C and 1H shifts gives one (δC, δH) pair per protonated
    carbon (the 13C value and the mean of its protons' shifts; symmetry-equivalent carbons give one
    pair; 'hsqc_edited' adds the phase a multiplicity-edited spectrum would show); the candidates are the compound and its positional isomers from moving one ring substituent
    (:func:`shiftrank.chem.isomers.isomers`, the rule the development regio cases were built by), at most
    ``max_candidates``, sorted by SMILES so the truth has no fixed place.  Compounds without such isomers
    are skipped.  'truth' and 'split' (of the skeleton) are for scoring only."""
    out = []
    for m, hm in _with_both_nuclei(data_dir):
        phase = {a: "CH2" if m.mol.GetAtomWithIdx(a).GetTotalNumHs() == 2 else "CH/CH3" for a in m.shifts}
        pairs = sorted({(round(m.shifts[a], 2), round(hm.shifts[a], 2), phase[a]) for a in m.shifts
                        if a in hm.shifts and m.mol.GetAtomWithIdx(a).GetTotalNumHs() > 0})
        if len(pairs) < 2:
            continue
        truth = Chem.MolToSmiles(m.mol)
        cands = regio_candidates(truth, max_candidates)
        if cands is None:
            continue
        out.append({"id": m.id, "hsqc": [list(p[:2]) for p in pairs], "hsqc_edited": [list(p) for p in pairs],
                    "candidates": cands, "solvent": m.solvent,
                    "peaks": _database_13c(m, symmetry_ranks(m.mol)), "truth": truth, "split": m.split})
    return out


#: synthetic HMBC spectra (:func:`hmbc_cases`): the share of two-bond and four-bond correlations kept, chosen
#: (common practice: three-bond cross peaks are the strong ones, two-bond ones often weak, four-bond ones rare
#: and mostly within aromatic rings); not measured on real HMBC spectra, which the open data does not hold
HMBC_KEEP_2J = 0.6
HMBC_KEEP_4J = 0.1


#: synthetic COSY: the share of four-bond (aromatic meta) couplings shown; synthetic NOESY: the protons' effective
#: distance (Å, RDKit conformers as :func:`shiftrank.score.correlations.proton_distances` makes them) within which
#: a cross peak is shown.  Chosen; the NOESY cases share the ranking's own geometry model, so they measure what a
#: NOESY adds given that model, not how well it matches real molecules
COSY_KEEP_4J = 0.3
NOESY_WITHIN = 3.5


def _keep(key: str, share: float) -> bool:
    """A fixed pseudo-random choice per key (the same cases on every run)."""
    return int(hashlib.sha256(key.encode()).hexdigest()[:8], 16) / 0xFFFFFFFF < share


def hmbc_cases(data_dir: Path = DEFAULT_DATA, max_candidates: int = 12) -> list[dict]:
    """Positional-isomer ranking cases with HMBC (and COSY, NOESY) cross peaks built from measured shifts.

    The compounds and candidates of :func:`hsqc_cases` (NMRShiftDB2 compounds with assigned 13C and 1H
    shifts against their one-substituent positional isomers).  Each proton-bearing heavy atom X (its protons'
    mean shift) and each carbon C (its 13C shift) whose protons-to-carbon distance is three bonds give a cross
    peak; two bonds in a fixed share ``HMBC_KEEP_2J`` of pairs, four bonds (both atoms aromatic) in
    ``HMBC_KEEP_4J``; symmetry-equivalent pairs give one.  'hmbc_ideal' holds every two- and three-bond pair and
    no other.  'cosy': proton classes on neighbouring heavy atoms (3J), and a fixed share ``COSY_KEEP_4J`` of aromatic
    4J pairs; 'noesy': proton classes whose effective distance on RDKit conformers is within ``NOESY_WITHIN`` Å.  Pairs
    of protons within 0.02 ppm are left out (on the diagonal).  The measured shifts are real; which correlations a
    spectrum shows is a chosen model of it."""
    from shiftrank.score.correlations import proton_distances

    out = []
    for m, hm in _with_both_nuclei(data_dir):
        dist = Chem.GetDistanceMatrix(m.mol)
        ranks = symmetry_ranks(m.mol)
        real, ideal = set(), set()
        for x, dh in hm.shifts.items():
            for c, dc in m.shifts.items():
                bonds = int(dist[x, c]) + 1
                if c == x or bonds > 4:
                    continue
                pair = (round(dc, 2), round(dh, 2))
                key = f"{m.id}:{ranks[c]}:{ranks[x]}"
                if bonds in (2, 3):
                    ideal.add(pair)
                aromatic = m.mol.GetAtomWithIdx(c).GetIsAromatic() and m.mol.GetAtomWithIdx(x).GetIsAromatic()
                if bonds == 3 or (bonds == 2 and _keep(key, HMBC_KEEP_2J)) or (bonds == 4 and aromatic and _keep(key, HMBC_KEEP_4J)):
                    real.add(pair)
        if len(real) < 2:
            continue
        truth = Chem.MolToSmiles(m.mol)
        cands = regio_candidates(truth, max_candidates)
        if cands is None:
            continue
        protons = {}
        for a, v in hm.shifts.items():
            protons.setdefault(ranks[a], round(v, 2))
        cosy, noesy = set(), set()
        r3d = proton_distances(m.mol)
        for x, dx in hm.shifts.items():
            for y, dy in hm.shifts.items():
                if x >= y or abs(dx - dy) < 0.02:
                    continue
                pair = (round(max(dx, dy), 2), round(min(dx, dy), 2))
                aromatic = m.mol.GetAtomWithIdx(x).GetIsAromatic() and m.mol.GetAtomWithIdx(y).GetIsAromatic()
                if dist[x, y] == 1 or (dist[x, y] == 2 and aromatic and _keep(f"{m.id}:{ranks[x]}:{ranks[y]}:4J", COSY_KEEP_4J)):
                    cosy.add(pair)
                if r3d is not None and r3d[x, y] <= NOESY_WITHIN:
                    noesy.add(pair)
        out.append({"id": m.id, "hmbc": sorted(map(list, real)), "hmbc_ideal": sorted(map(list, ideal)),
                    "cosy": sorted(map(list, cosy)), "noesy": sorted(map(list, noesy)),
                    "candidates": cands, "solvent": m.solvent,
                    "peaks": _database_13c(m, ranks),
                    "peaks_1h": sorted(protons.values()), "truth": truth, "split": m.split})
    return out
