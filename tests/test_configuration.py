"""E/Z configuration roles and increments (shiftrank.prediction.configuration).

Sources: the roles are checked against hand enumeration of molecules of our own; the direction of the
effect (a heavy group cis across a double bond shields the sp3 carbon beside it by several ppm, the
steric γ effect) is common practice; the ranking check uses the open NMRShiftDB2 peak lists
(benchmarks/bench_configuration.py builds the same cases).
"""
import json
import re
import shutil
import sys
from pathlib import Path

import numpy as np
import pytest
from rdkit import Chem

from shiftrank import predict
from shiftrank.prediction.configuration import ROLES, configuration_roles, increments_from_entry
from shiftrank.prediction.model_files import ModelFileError, default_model, load_shift_model, models_dir

CIS_SP3 = ROLES.index("sp3 beside the bond, heavy group cis only")
TRANS_SP3 = ROLES.index("sp3 beside the bond, heavy group trans only")


def roles_of(smiles):
    mol = Chem.MolFromSmiles(smiles)
    r = configuration_roles(mol, range(mol.GetNumAtoms()))
    return None if r is None else {i: [ROLES[k] for k in np.flatnonzero(row)] for i, row in enumerate(r) if row.any()}


def test_roles_of_an_enoate_by_hand():
    # ethyl pent-2-enoate, atoms: C0 C1 C2=C3 C4(=O5) O6 C7 C8.  E: the CH2 (atom 1) and the ester carbon
    # (atom 4) trans to each other across C2=C3, so each vinyl H is cis to a heavy group; Z: all the other way
    e = roles_of("CC/C=C/C(=O)OCC")
    assert e[1] == ["sp3 beside the bond, heavy group trans only"]
    assert e[4] == ["sp2 beside the bond, heavy group trans only"]
    assert e[2] == e[3] == ["vinyl CH, its H cis to a heavy group only"]
    z = roles_of("CC/C=C\\C(=O)OCC")
    assert z[1] == ["sp3 beside the bond, heavy group cis only"]
    assert z[4] == ["sp2 beside the bond, heavy group cis only"]
    assert z[2] == z[3] == ["vinyl CH, its H trans to a heavy group only"]


def test_roles_of_a_trisubstituted_alkene_and_an_oxime():
    # 2-methylbut-2-enenitrile drawn E (the two methyls cis): the α-methyl (atom 3) has the β-methyl cis;
    # the β-methyl (atom 0) meets the nitrile and the α-methyl, one on each side
    r = roles_of("C/C=C(\\C)C#N")
    assert r[3] == ["sp3 beside the bond, heavy group cis only"]
    assert r[0] == ["sp3 beside the bond, heavy groups cis and trans"]
    assert r[1] == ["vinyl CH, its H between heavy groups cis and trans"]
    # an oxime's α-carbons: the one syn to OH has the heavy group cis
    ox = roles_of("CC/C(C)=N/O")   # butan-2-one oxime drawn with OH anti to the ethyl
    syn = [i for i, v in ox.items() if v == ["sp3 beside the bond, heavy group cis only"]]
    anti = [i for i, v in ox.items() if v == ["sp3 beside the bond, heavy group trans only"]]
    assert syn == [3] and anti == [1]


def test_no_roles_without_a_stated_configuration_or_in_a_small_ring():
    assert roles_of("CCC=CC(=O)OCC") is None             # configuration not drawn
    assert roles_of("CC1=CCCCC1C") is None               # a ring double bond: geometry fixed
    assert roles_of("c1ccccc1/C=C/c1ccccc1") is not None  # a stilbene is configured


def test_the_cis_group_lowers_the_sp3_prediction():
    """Common practice (the steric γ effect): the sp3 carbon beside a double bond is shielded by a heavy group
    cis to it.  A molecule of our own, not in the data: the CH2 of the Z form is predicted lower."""
    e, z = "CCCC/C=C/C(=O)N1CCOCC1", "CCCC/C=C\\C(=O)N1CCOCC1"
    pe, pz = predict(e).shifts, predict(z).shifts
    assert pz[3] < pe[3] - 1.5
    # the atoms that play no role are predicted alike
    assert pz[0] == pytest.approx(pe[0]) and pz[9] == pytest.approx(pe[9])
    # and a drawing without configuration gets the stereo-blind estimate, that of the E form here
    assert predict("CCCCC=CC(=O)N1CCOCC1").shifts[3] == pytest.approx(pe[3])


def test_increments_come_from_the_manifest():
    assert default_model("13C").config_increments[CIS_SP3] < -1.0
    assert default_model("13C").config_increments[TRANS_SP3] == 0.0
    assert increments_from_entry({}) is None
    assert increments_from_entry({"configuration_increments": {"ppm": {}}}) is None
    with pytest.raises(ValueError, match="unknown configuration roles"):
        increments_from_entry({"configuration_increments": {"ppm": {"allylic": -2}}})


def test_unreadable_increments_are_refused(tmp_path):
    d = tmp_path / "models"
    shutil.copytree(models_dir(), d)
    man = json.loads((d / "manifest.json").read_text())
    man["nuclei"]["13C"]["configuration_increments"]["ppm"] = {"a role we never had": 1.0}
    (d / "manifest.json").write_text(json.dumps(man))
    with pytest.raises(ModelFileError, match="configuration increments are unreadable"):
        load_shift_model(d)


def test_ez_alternatives_on_open_peak_lists(shared_data):
    """NMRShiftDB2 13C lists of never-trained skeletons with a configured double bond beside an sp3 carbon: the
    stated configuration must win clearly more often than its E/Z alternative (the stereo-blind model ties them)."""
    sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "benchmarks"))
    import bench_configuration as bench

    cases = [c for c in bench.cases(shared_data) if c["sp3"]][:80]
    outcomes = bench.run(cases, dept=True)
    assert len(cases) >= 60
    assert outcomes.count("right") >= 2 * outcomes.count("wrong")
    assert outcomes.count("tie") < len(cases) / 3


def test_the_increment_is_shown_where_it_applies():
    # the Python result names it per atom; the CLI prints it in the table and as "ez_increment" in JSON Lines
    import subprocess

    z = "CCCC/C=C\\C(=O)N1CCOCC1"
    atoms = {a.atom: a for a in predict(z).atoms}
    assert atoms[3].configuration == pytest.approx(default_model("13C").config_increments[CIS_SP3])
    assert all(a.configuration == 0.0 for i, a in atoms.items() if i != 3)
    out = subprocess.run([sys.executable, "-m", "shiftrank.cli", "predict", z, "--jsonl"], capture_output=True, text=True)
    obj = json.loads(out.stdout)
    assert list(obj["ez_increment"]) == ["3"] and out.returncode == 0
    out = subprocess.run([sys.executable, "-m", "shiftrank.cli", "predict", "CCCCC=CC(=O)N1CCOCC1", "--jsonl"],
                         capture_output=True, text=True)
    assert "ez_increment" not in json.loads(out.stdout)
    table = subprocess.run([sys.executable, "-m", "shiftrank.cli", "predict", z], capture_output=True, text=True).stdout
    assert re.search(r"E/Z -\d+\.\d \(a group cis across the double bond\)", table)


def test_the_assignment_table_marks_the_carbon_with_the_increment():
    # the ranking's 13C table (terminal, report and JSON share its rows) says which carbon the increment moved;
    # the E drawing, whose CH2 has no group cis to it, carries no such note
    from shiftrank.score.ranking import rank

    z, e = "CCCC/C=C\\C(=O)N1CCOCC1", "CCCC/C=C/C(=O)N1CCOCC1"
    peaks = sorted({round(v, 1) for v in predict(z).shifts.values()})
    res = {c.smiles: c for c in rank(peaks, [z, e]).candidates}
    marked = {tuple(row["atoms"]): row["notes"] for row in res[z].nuclei["13C"].assignment_table()
              if any(n.startswith("E/Z") for n in row["notes"])}
    assert list(marked) == [(3,)]
    assert any(re.fullmatch(r"E/Z -\d+\.\d \(a group cis across the double bond\)", n) for n in marked[(3,)])
    assert not any(n.startswith("E/Z") for row in res[e].nuclei["13C"].assignment_table() for n in row["notes"])


# Prenyl alcohol (3-methylbut-2-en-1-ol) drawn with coordinates: methyl 0 on the CH2OH's side of the C=C (cis),
# methyl 2 on the H's side (trans).  Molecule of our own drawing.
PRENOL_MOLFILE = """prenol
  hand-drawn

  6  5  0  0  0  0  0  0  0  0999 V2000
   -0.5000    0.8660    0.0000 C   0  0
    0.0000    0.0000    0.0000 C   0  0
   -0.5000   -0.8660    0.0000 C   0  0
    1.0000    0.0000    0.0000 C   0  0
    1.5000    0.8660    0.0000 C   0  0
    2.5000    0.8660    0.0000 O   0  0
  1  2  1  0
  2  3  1  0
  2  4  2  0
  4  5  1  0
  5  6  1  0
M  END
"""


def test_twin_pairs_by_hand():
    from shiftrank.prediction.configuration import TWIN_ROLES, twin_pairs

    cis_ch = len(ROLES) - len(TWIN_ROLES)
    assert twin_pairs(Chem.MolFromSmiles("CC(C)=CCO")) == [(0, 2, cis_ch, False)]       # no coordinates: a guess
    assert twin_pairs(Chem.MolFromMolBlock(PRENOL_MOLFILE)) == [(0, 2, cis_ch, True)]   # read from the drawing
    flipped = Chem.MolFromMolBlock(PRENOL_MOLFILE.replace("    1.5000    0.8660", "    1.5000   -0.8660")
                                   .replace("    2.5000    0.8660", "    2.5000   -0.8660"))
    assert twin_pairs(flipped) == [(2, 0, cis_ch, True)]
    assert twin_pairs(Chem.MolFromSmiles("CC(C)=C(C)C")) == []            # both ends alike
    assert twin_pairs(Chem.MolFromSmiles("CC(C)=C(C)CO")) == []           # the other end carries two groups


def test_the_twin_cis_to_the_chain_is_predicted_lower():
    """Common practice (steric γ effect): of a prenyl group's two methyls the one cis to the CH2 is about 8 ppm
    lower (about 17.9 against 25.8 ppm; from memory).  From a molfile the atoms are told apart; from a SMILES
    each gets the mean and the pair is reported."""
    by_drawing = predict(Chem.MolFromMolBlock(PRENOL_MOLFILE)).shifts
    assert by_drawing[2] - by_drawing[0] > 5.0
    assert abs(by_drawing[0] - 17.9) < 2.5 and abs(by_drawing[2] - 25.8) < 2.5
    smiles = predict("CC(C)=CCO")
    assert smiles.shifts[0] == pytest.approx(smiles.shifts[2])
    (i, j, lo, hi), = smiles.cis_trans_pairs
    assert (i, j) == (0, 2) and lo == pytest.approx(by_drawing[0], abs=0.01) and hi == pytest.approx(by_drawing[2], abs=0.01)


def test_twin_increments_on_open_data(shared_data):
    """NMRShiftDB2 validation- and test-split molecules (their molfiles say which twin is cis): on the twin
    carbons the increments lower the MAE by more than 1 ppm."""
    from training.configuration_increments import role_residuals
    from training.data import load_assigned
    from shiftrank.prediction.configuration import TWIN_ROLES

    mols = [m for m in load_assigned(shared_data) if m.split in ("val", "test")]
    before = role_residuals(mols, "13C")
    twin = range(len(ROLES) - len(TWIN_ROLES), len(ROLES))
    inc = default_model("13C").config_increments
    res = np.concatenate([np.asarray(before[k]) for k in twin if k < len(ROLES) - 2])   # the CH-end roles
    fixed = np.concatenate([np.asarray(before[k]) - inc[k] for k in twin if k < len(ROLES) - 2])
    assert len(res) >= 30
    assert np.abs(fixed).mean() < np.abs(res).mean() - 1.0


def test_the_ranking_uses_the_twin_pair_and_says_so():
    # the ranking reads candidates as SMILES: the pair's two values are matched as a pair, and the table says
    # which atoms form it (peaks: the prenyl ester's own predictions from its drawing, rounded)
    from rdkit.Chem import AllChem

    from shiftrank.score.ranking import rank

    prenyl, other = "CC(C)=CCOC(=O)c1ccccc1", "C=C(C)CCOC(=O)c1ccccc1"
    drawn = Chem.MolFromSmiles(prenyl)
    AllChem.Compute2DCoords(drawn)
    peaks = sorted({round(v, 1) for v in predict(drawn).shifts.values()})
    assert 17.0 < peaks[0] < 20.0 and any(24.0 < v < 28.0 for v in peaks)   # the two methyls apart
    res = rank(peaks, [prenyl, other])
    top = res.candidates[0]
    assert top.smiles == prenyl
    notes = {tuple(r["atoms"]): r["notes"] for r in top.nuclei["13C"].assignment_table()}
    assert any("one of a cis/trans pair with atom 2" in n for n in notes[(0,)])
    assert any("one of a cis/trans pair with atom 0" in n for n in notes[(2,)])


def test_twin_orientation_from_3d_coordinates_and_none_from_a_flat_point():
    # 3D coordinates (an embedded conformer): the cis twin is the one whose dihedral to the CH2 is under 90°,
    # worked out here with numpy; a molfile whose atoms all sit at the origin says nothing, and the pair is a guess
    from rdkit.Chem import AllChem
    from shiftrank.prediction.configuration import twin_pairs

    m = Chem.AddHs(Chem.MolFromSmiles("CC(C)=CCO"))
    AllChem.EmbedMolecule(m, randomSeed=11)
    m = Chem.RemoveHs(m)
    xyz = m.GetConformer().GetPositions()

    def dihedral(i, j, k, l):
        b0, b1, b2 = xyz[i] - xyz[j], xyz[k] - xyz[j], xyz[l] - xyz[k]
        v, w = b0 - b1 * (b0 @ b1) / (b1 @ b1), b2 - b1 * (b2 @ b1) / (b1 @ b1)
        return np.degrees(np.arccos(np.clip(v @ w / np.linalg.norm(v) / np.linalg.norm(w), -1, 1)))

    (cis, trans, _, oriented), = twin_pairs(m)
    assert oriented and dihedral(cis, 1, 3, 4) < 90 < dihedral(trans, 1, 3, 4)
    flat = Chem.MolFromMolBlock("\n".join(line if not 3 < i < 10 else "    0.0000    0.0000    0.0000" + line[30:]
                                          for i, line in enumerate(PRENOL_MOLFILE.split("\n"))))
    assert [t[3] for t in twin_pairs(flat)] == [False]
    assert predict(flat).cis_trans_pairs
