"""Structure facts: formula, DBE and symmetry classes from a structure.

Sources: topological symmetry from RDKit canonical ranking without tie-breaking
(Schneider, Sayle & Landrum 2015, J. Chem. Inf. Model. 55, 2111); the signal
counts below follow from molecular symmetry (common practice).
"""
import pytest
from rdkit import Chem

from shiftrank.errors import InputError
from shiftrank.chem.structure import structure_facts


def test_mirror_symmetric_chain_has_fewer_signals():
    f = structure_facts("CCCOCCC")  # dipropyl ether: 6 carbons, 3 signals
    assert f.n_carbons == 6
    assert f.expected_13c_signals == 3
    assert sorted(c.multiplicity for c in f.carbon_classes) == ["CH2", "CH2", "CH3"]


def test_para_disubstituted_benzene_two_aromatic_signals():
    f = structure_facts("COc1ccc(OC)cc1")  # 1,4-dimethoxybenzene
    mol = Chem.MolFromSmiles(f.smiles)
    aromatic = [c for c in f.carbon_classes if mol.GetAtomWithIdx(c.atoms[0]).GetIsAromatic()]
    assert len(aromatic) == 2
    assert sorted(c.size for c in aromatic) == [2, 4]
    assert f.expected_13c_signals == 3
    assert f.multiplicity_counts() == {"CH3": 1, "C": 1, "CH": 1}


def test_meta_isomer_has_more_signals_than_para():
    para = structure_facts("Clc1ccc(Cl)cc1")
    meta = structure_facts("Clc1cccc(Cl)c1")
    ortho = structure_facts("Clc1ccccc1Cl")
    assert (para.expected_13c_signals, meta.expected_13c_signals, ortho.expected_13c_signals) == (2, 4, 3)


def test_formula_mass_dbe_from_structure():
    f = structure_facts("NC(=O)c1ccncc1")  # isonicotinamide C6H6N2O
    assert f.formula == "C6H6N2O"
    assert f.dbe == 5
    assert f.average_mass == pytest.approx(6 * 12.011 + 6 * 1.008 + 2 * 14.007 + 15.999, abs=0.01)


def test_hydrogen_classes():
    f = structure_facts("CC(=O)OCC")  # ethyl acetate: 3 H environments
    assert f.expected_1h_signals == 3


def test_bad_smiles():
    with pytest.raises(InputError, match="cannot parse"):
        structure_facts("C1CC(")
