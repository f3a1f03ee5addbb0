"""The shipped 13C model: integrity, reproducibility and textbook shifts.

Reference shifts are typical values from standard 13C tables (Pretsch, Bühlmann &
Badertscher, Structure Determination of Organic Compounds, 4th ed. 2009, 13C
chapter), recalled from memory, or common practice where marked; tolerances of a
few ppm reflect the predictor's stated accuracy.
"""
import json
import shutil

import numpy as np
import pytest
from rdkit import Chem

from shiftrank.errors import InputError
from shiftrank.prediction.model_files import ModelFileError, load_shift_model, models_dir, read_manifest, sha256_file
from shiftrank.prediction.api import predict


def test_manifest_lists_hashes_licence_and_metrics():
    man = read_manifest()
    assert set(man["files"]) >= {"c13_tables.npz", "c13_trees.npz"}
    assert all(len(h) == 64 for h in man["files"].values())
    assert "nmrshiftdb2" in man["licence"].lower()
    assert man["nuclei"]["13C"]["metrics"]["test_mae"] > 0


@pytest.mark.parametrize("nucleus,tol", [("13C", 0.005), ("1H", 0.0005)])
def test_model_reproduces_manifest_test_sample(shared_data, nucleus, tol):
    """A broken or swapped model file fails here: the fixed test sample's MAE must match the manifest."""
    from training.data import load_assigned
    from training.features import rows_from_assigned

    man = read_manifest()
    sample = man["nuclei"][nucleus]["test_sample"]
    ids = set(sample["nmrshiftdb2_ids"])
    mols = [m for m in load_assigned(shared_data, nucleus=nucleus) if m.id in ids]
    rows = rows_from_assigned(mols, nucleus)
    mu, _, _, _ = load_shift_model(nucleus=nucleus).predict_arrays(rows.feats, rows.codes, ring_keys=rows.rkeys)
    assert len(rows) == sample["atoms"]
    assert float(np.mean(np.abs(mu - rows.y))) == pytest.approx(sample["mae"], abs=tol)


def test_hash_mismatch_is_refused(tmp_path):
    d = tmp_path / "models"
    shutil.copytree(models_dir(), d)
    with open(d / "c13_tables.npz", "ab") as f:
        f.write(b"tampered")
    with pytest.raises(ModelFileError, match="does not match the manifest"):
        load_shift_model(d)
    with open(d / "h1_trees.npz", "ab") as f:
        f.write(b"tampered")
    with pytest.raises(ModelFileError, match="does not match the manifest"):
        load_shift_model(d, nucleus="1H")


def test_file_not_in_manifest_is_refused(tmp_path):
    d = tmp_path / "models"
    shutil.copytree(models_dir(), d)
    man = json.loads((d / "manifest.json").read_text())
    del man["files"]["c13_trees.npz"]
    (d / "manifest.json").write_text(json.dumps(man))
    with pytest.raises(ModelFileError, match="not listed"):
        load_shift_model(d)


def test_member_of_unknown_width_is_refused(tmp_path):
    """A member is fitted on the descriptors alone or on descriptors plus table statistics; a tree file
    whose member expects any other number of columns (another feature set) is refused, not walked."""
    d = tmp_path / "models"
    shutil.copytree(models_dir(), d)
    with np.load(d / "c13_trees.npz") as z:
        arrays = {k: z[k] for k in z.files}
    arrays["m0_scalars"] = arrays["m0_scalars"].copy()
    arrays["m0_scalars"][1] += 1                      # one column more than the full design rows
    np.savez(d / "c13_trees.npz", **arrays)
    man = json.loads((d / "manifest.json").read_text())
    man["files"]["c13_trees.npz"] = sha256_file(d / "c13_trees.npz")
    (d / "manifest.json").write_text(json.dumps(man))
    with pytest.raises(ModelFileError, match="input columns"):
        load_shift_model(d)


def _known_miss(smiles, atom, expected, tol, source, why):
    """A textbook row the model is known to miss: a strict xfail, so a fix shows up as a failure to update."""
    return pytest.param(smiles, atom, expected, tol, source, marks=pytest.mark.xfail(strict=True, reason="known weakness: " + why))


@pytest.mark.parametrize("smiles,atom,expected,tol,source", [
    ("c1ccccc1", 0, 128.4, 2.0, "benzene 128.4 (Pretsch 2009, from memory)"),
    ("CC#N", 1, 117.7, 3.0, "acetonitrile C≡N ~117-118 (Pretsch 2009, from memory)"),
    ("N#Cc1ccccc1", 1, 118.8, 3.0, "benzonitrile C≡N ~119 (from memory)"),
    ("N#Cc1ccccc1", 2, 112.4, 3.0, "benzonitrile ipso C ~112 (from memory)"),
    ("CCOC(C)=O", 3, 171.0, 3.0, "ester C=O ~170-171 (common practice)"),
    ("CC(=O)O", 1, 177.0, 4.0, "carboxylic acid C=O ~175-180 (common practice)"),
    ("c1ccncc1", 2, 150.0, 3.0, "pyridine C2 ~150 (from memory)"),
    ("c1ccncc1", 1, 123.8, 3.0, "pyridine C3 ~124 (from memory)"),
    ("c1ccncc1", 0, 135.9, 3.0, "pyridine C4 ~136 (from memory)"),
    ("c1ccoc1", 2, 142.8, 3.0, "furan C2 ~143 (from memory)"),
    ("c1ccoc1", 0, 109.7, 4.0, "furan C3 ~110 (from memory)"),
    ("C1CCOC1", 2, 67.97, 3.0, "THF OCH2 67.97 (Fulmer 2010, Table 2, THF in CDCl3)"),
    ("C1CCOC1", 0, 25.62, 3.0, "THF CH2 25.62 (Fulmer 2010, Table 2, THF in CDCl3)"),
    ("N#CC1CC1", 1, 122.0, 4.0, "cyclopropanecarbonitrile C≡N ~122 (from memory)"),
    # oxirane and oxetane are in NMRShiftDB2's peak lists (training split): reported as measured
    ("C1CO1", 0, 40.6, 2.0, "oxirane CH2 40.6 (from memory)"),
    # compounds the training data do not contain: predicted by the model
    # the parent cyclopropane has no sphere match at any radius: a retraining moves it by a few ppm either way
    # (−0.2 by model 1.8.0 with its ring-system tables; 1.5 by 1.6.0 and 1.7.0, a strict xfail then; −0.9 by 1.5.0)
    ("C1CC1", 0, -2.8, 4.0, "cyclopropane -2.8 (from memory; no sphere match at any radius)"),
    ("c1cc[nH]c1", 2, 118.0, 3.0, "pyrrole C2 ~118 (from memory; pyrrole's skeleton is in our test split)"),
    ("c1cc[nH]c1", 0, 108.0, 3.0, "pyrrole C3 ~108 (from memory)"),
    ("CN(C)C=O", 3, 162.62, 3.0, "DMF CHO 162.62 (Fulmer 2010, Table 2, CDCl3)"),
    ("CCOCC", 1, 65.91, 3.0, "diethyl ether CH2 65.91 (Fulmer 2010, Table 2, CDCl3)"),
    _known_miss("C1CN1", 0, 18.2, 4.0, "aziridine CH2 ~18 (from memory; not in the data)",
                "the parent aziridine (no sphere match) is predicted 22.8 by model 1.6.0 (24.3 by 1.5.0, 22.3 by 1.4.0, "
                "within 4 ppm with 1.3.0)"),
    ("C1COC1", 1, 72.6, 4.0, "oxetane OCH2 ~72.6 (from memory)"),
    ("c1ccsc1", 2, 125.6, 3.0, "thiophene C2 ~125.6 (from memory)"),
    ("CC(=O)N(C)C", 1, 170.5, 3.0, "amide C=O ~170 (common practice)"),
    # heavy halogens: NMRShiftDB2's assigned set holds no Br or I; learned from peak lists by self-training
    ("Ic1ccccc1", 1, 94.4, 4.0, "iodobenzene C1 94.4 (Pretsch 2009, from memory; 137.8 by model 1.4.0)"),
    ("COc1ccc(I)cc1", 5, 82.7, 4.0, "4-iodoanisole C-I 82.7 (from memory; 131.8 by model 1.4.0)"),
    ("CCCCI", 3, 6.7, 4.0, "1-iodobutane CH2I 6.7 (from memory; 22.9 by model 1.4.0)"),
    ("Brc1ccccc1", 1, 122.6, 3.0, "bromobenzene C1 122.6 (Pretsch 2009, from memory)"),
    # 134.7 by model 1.7.0 (a known miss before: 132.6 by 1.6.0, 132.5 by 1.5.0, 127.0 by 1.4.0)
    ("Ic1ccccc1", 2, 137.4, 4.0, "iodobenzene C2 137.4 (Pretsch 2009, from memory)"),
])
def test_textbook_shifts(smiles, atom, expected, tol, source):
    assert predict(smiles).shifts[atom] == pytest.approx(expected, abs=tol), source


def test_ketone_carbonyl_above_200():
    # common practice: saturated ketone C=O above 200 ppm (cyclohexyl methyl ketone)
    p = predict("CC(=O)C1CCCCC1")
    assert p.shifts[1] > 200


def test_every_carbon_gets_a_prediction_even_unseen_environments():
    odd = "FC(F)(F)C1(C#CC2(Cl)CC2)OC(=S)N1[Si](C)(C)C"
    p = predict(odd)
    n_c = sum(1 for a in Chem.MolFromSmiles(odd).GetAtoms() if a.GetAtomicNum() == 6)
    assert len(p.carbons) == n_c
    assert all(np.isfinite(c.shift) and c.sigma > 0 for c in p.carbons)


@pytest.mark.parametrize("smiles,fragment", [("C1CC", "cannot read it: ring closure 1"), ("O", "no carbon"), ("C[Fe]C", "Fe"), ("", "empty")])
def test_bad_molecules_raise_input_error(smiles, fragment):
    with pytest.raises(InputError, match=fragment):
        predict(smiles)


@pytest.mark.parametrize("thing, fragment", [(["CCO", "CCN"], "got list .*predict_many"), (42, "got int")])
def test_predict_refuses_what_is_not_one_molecule(thing, fragment):
    with pytest.raises(InputError, match=fragment):
        predict(thing)


def test_predict_many_keeps_order_and_reports_each_bad_input():
    from rdkit import Chem
    from shiftrank import InputError, predict_many
    out = predict_many(["CC#N", "C1CC(", "[Na+].[Cl-]", Chem.MolFromSmiles("c1ccncc1"), 7, "O"])
    assert [type(o).__name__ for o in out] == ["MolPrediction", "InputError", "InputError", "MolPrediction",
                                                 "InputError", "InputError"]
    assert "input 1" in str(out[1]) and "Na" in str(out[2]) and "int" in str(out[4]) and "no carbon" in str(out[5])
    assert isinstance(out[1], InputError)
    # the batch path gives the same numbers as one molecule at a time
    assert out[0].shifts == pytest.approx(predict("CC#N").shifts)
    assert out[3].shifts == pytest.approx(predict("c1ccncc1").shifts)


def test_sphere_codes_tell_ring_sizes_apart():
    # a circular code without ring sizes gives every CH2 of any cycloalkane the same code at all radii
    from shiftrank.prediction.environment import environments
    c3 = environments(Chem.MolFromSmiles("C1CC1")).codes[0]
    c6 = environments(Chem.MolFromSmiles("C1CCCCC1")).codes[0]
    assert not set(c3.tolist()) & set(c6.tolist())


def test_compound_in_training_data_gets_its_measured_shifts():
    # propylene oxide is in NMRShiftDB2's peak lists (record 20030831, training split):
    # CH3 18.1, CH2 47.7, CH 47.8 ppm; a compound the data contain is reported as measured
    p = predict("CC1CO1")
    assert all(c.whole_molecule for c in p.carbons)
    assert p.shifts[0] == pytest.approx(18.1, abs=0.05)
    assert p.shifts[1] == pytest.approx(47.8, abs=0.05)
    assert p.shifts[2] == pytest.approx(47.7, abs=0.05)


def test_unseen_compound_is_not_taken_for_a_lookup():
    p = predict("N#CC1(C(F)(F)F)CC(OC2CC2)C1")
    assert not any(c.whole_molecule for c in p.carbons)
