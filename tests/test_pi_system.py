"""Hückel π descriptors (shiftrank.prediction.pi_system)."""
import numpy as np
import pytest
from rdkit import Chem
from scipy.stats import spearmanr

from shiftrank.prediction.pi_system import pi_descriptors

# Para-carbon substituent increments of monosubstituted benzenes (ppm, relative to benzene 128.5),
# values from memory of the standard benzene increment tables (e.g. Pretsch, Bühlmann & Badertscher,
# Structure Determination of Organic Compounds, 13C chapter).
PARA_SCS = {
    "[N+](=O)[O-]": 6.1, "C#N": 4.3, "C=O": 5.8, "C(=O)OC": 4.3, "C(C)=O": 4.4,
    "OC": -7.7, "N": -9.8, "F": -4.5, "Cl": -1.9, "Br": -1.6, "O": -7.3, "N(C)C": -11.8, "NC(C)=O": -5.6,
}


def _para_charge(substituent: str) -> float:
    mol = Chem.MolFromSmiles("c1ccc(cc1)" + substituent)
    dist = Chem.GetDistanceMatrix(mol)
    para = [a.GetIdx() for a in mol.GetAtoms() if a.GetIsAromatic() and dist[3][a.GetIdx()] == 3]
    return float(pi_descriptors(mol)[0][para[0]])


def test_para_charges_follow_para_increments():
    # Spiesecke & Schneider 1961 (Tetrahedron Lett. 2, 468): the para 13C shift of a monosubstituted
    # benzene follows the π charge there; a Hückel charge must order the substituents the same way
    charges = [_para_charge(s) for s in PARA_SCS]
    rho = spearmanr(charges, list(PARA_SCS.values())).statistic
    assert rho > 0.9
    assert all(np.sign(q) == np.sign(v) for q, v in zip(charges, PARA_SCS.values()))


def test_ring_nitrogen_and_donor_patterns():
    # common practice (resonance structures): pyridine C2/C4 are π-deficient against C3; pyrrole's carbons
    # are π-rich; the β carbon of an enone is π-deficient
    q = pi_descriptors(Chem.MolFromSmiles("c1ccncc1"))[0]       # N3; C2/C4 are atoms 2, 4; C3 atoms 1, 5; C4 atom 0
    assert q[2] > q[1] and q[0] > q[1] and q[3] < 0
    q = pi_descriptors(Chem.MolFromSmiles("c1cc[nH]c1"))[0]
    assert all(q[i] < 0 for i in (0, 1, 2, 4)) and q[3] > 0
    q = pi_descriptors(Chem.MolFromSmiles("C=CC(C)=O"))[0]
    assert q[0] > 0.1 and q[4] < 0


@pytest.mark.parametrize("smiles", ["c1ccccc1", "C1=CC=C1", "C1=CC=CC=CC=C1", "c1ccc2ccccc2c1"])
def test_alternant_hydrocarbons_are_uniform(smiles):
    # Coulson–Rushbrooke theorem (Coulson & Rushbrooke 1940): every atom of a neutral alternant
    # hydrocarbon carries one π electron, also where a degenerate level is half filled
    q, member, _ = pi_descriptors(Chem.MolFromSmiles(smiles))
    assert np.allclose(q, 0.0, atol=1e-9) and member.all()


@pytest.mark.parametrize("smiles", ["COc1ccc(cc1)C(=O)N(C)C", "O=[N+]([O-])c1ccc2ncccc2c1", "Fc1ccncc1Cl",
                                    "C=CC#N.c1ccsc1", "O=c1cccc[nH]1"])
def test_charge_is_conserved(smiles):
    # each π system keeps its electrons: the π charges of its atoms add up to zero
    q, member, _ = pi_descriptors(Chem.MolFromSmiles(smiles))
    assert abs(q.sum()) < 1e-9
    assert member.sum() >= 6


def test_saturated_molecules_have_no_pi_system():
    q, member, order = pi_descriptors(Chem.MolFromSmiles("OCC(N)C(F)(F)F"))
    assert not member.any() and not q.any() and not order.any()


@pytest.mark.parametrize("nucleus", ["13C", "1H"])
def test_descriptor_columns_carry_the_pi_values(nucleus):
    # the six PI_NAMES columns of either nucleus: the centre's own values, then the summed π charges of
    # the atoms exactly one and two bonds away and the number of π neighbours
    from shiftrank.prediction.environment import PI_NAMES, environments, feature_names

    mol = Chem.MolFromSmiles("COc1ccc(cc1)C(=O)NCc1ccncc1")
    q, member, order = pi_descriptors(mol)
    dist = Chem.GetDistanceMatrix(mol)
    env = environments(mol, nucleus=nucleus)
    cols = [feature_names(nucleus).index(n) for n in PI_NAMES]
    got = env.features[:, cols]
    for row, c in enumerate(env.centres):
        want = [q[c], member[c], order[c], q[dist[c] == 1].sum(), q[dist[c] == 2].sum(), member[dist[c] == 1].sum()]
        assert np.allclose(got[row], want, atol=1e-6)
