"""Self-training label rules (training/pseudo_labels.py) on small worked cases.

Observed values are recalled from standard 13C tables (marked "from memory"); the model predictions
fed to the rules are constructed to put each rule to work.
"""
import numpy as np
from rdkit import Chem

from shiftrank.environment import environments
from training.pseudo_labels import FORCED_MAX_ABS, _assign_one


def _run(smiles, peaks, mu_by_atom, sigma=1.0):
    mol = Chem.MolFromSmiles(smiles)
    env = environments(mol)
    mu = np.array([mu_by_atom[int(a)] for a in env.carbons], float)
    sg = np.full(len(mu), sigma)
    out = _assign_one(mol, env, peaks, mu, sg, max_z=3.0, max_abs=6.0)
    return None if out is None else {int(env.carbons[k]): v for k, v in out}


def test_only_class_of_its_multiplicity_is_labelled_even_far_from_the_prediction():
    # oxirane: one CH2 class, two entries, 40.6 ppm (from memory; the value in NMRShiftDB2's peak
    # lists too); a model trained on substituted epoxides may say ~51
    got = _run("C1CO1", [(40.6, "CH2"), (40.6, "CH2")], {0: 51.0, 1: 51.0})
    assert got == {0: 40.6, 1: 40.6}


def test_forced_label_beyond_the_sanity_bound_is_refused():
    far = 51.0 + FORCED_MAX_ABS + 5
    assert _run("C1CO1", [(far, "CH2"), (far, "CH2")], {0: 51.0, 1: 51.0}) == {}


def test_rival_classes_keep_the_residual_limit():
    # 1-methoxybutane, 13C in CDCl3 (from memory): CH3O 58.5, OCH2 72.7, CH2 31.8, CH2 19.4, CH3 13.9.
    # The predictions are constructed: the methoxy carbon is 10 ppm off, and another CH3 class exists,
    # so that label is not trusted; the close ones are.
    peaks = [(13.9, "CH3"), (19.4, "CH2"), (31.8, "CH2"), (72.7, "CH2"), (58.5, "CH3")]
    mu = {0: 14.2, 1: 19.6, 2: 31.5, 3: 72.4, 5: 48.5}
    got = _run("CCCCOC", peaks, mu)
    assert 5 not in got
    assert got[0] == 13.9 and got[3] == 72.7
