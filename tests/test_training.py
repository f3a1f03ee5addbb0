"""Self-training label rules (training/pseudo_labels.py) on small worked cases.

Observed values are recalled from standard 13C tables (marked "from memory"); the model predictions
fed to the rules are constructed to put each rule to work.
"""
import numpy as np
from rdkit import Chem

from shiftrank.prediction.environment import environments
from training.pseudo_labels import FORCED_MAX_ABS, _assign_one


def _run(smiles, peaks, mu_by_atom, sigma=1.0):
    mol = Chem.MolFromSmiles(smiles)
    env = environments(mol)
    mu = np.array([mu_by_atom[int(a)] for a in env.centres], float)
    sg = np.full(len(mu), sigma)
    out = _assign_one(mol, env, peaks, mu, sg, max_z=3.0, max_abs=6.0)
    return None if out is None else {int(env.centres[k]): v for k, v in out}


def test_only_class_of_its_multiplicity_is_labelled_even_far_from_the_prediction():
    # oxirane: one CH2 class, two entries, 40.6 ppm (from memory; the value in NMRShiftDB2's peak
    # lists too); a model trained on substituted epoxides may say ~51
    got = _run("C1CO1", [(40.6, "CH2"), (40.6, "CH2")], {0: 51.0, 1: 51.0})
    assert got == {0: 40.6, 1: 40.6}


def test_forced_label_beyond_the_sanity_bound_is_refused():
    far = 51.0 + FORCED_MAX_ABS + 5
    assert _run("C1CO1", [(far, "CH2"), (far, "CH2")], {0: 51.0, 1: 51.0}) == {}


def test_close_labels_with_rivals_are_kept():
    # 1-methoxybutane, 13C in CDCl3 (from memory): CH3O 58.5, OCH2 72.7, CH2 31.8, CH2 19.4, CH3 13.9;
    # constructed predictions within a ppm of each: every class is labelled
    peaks = [(13.9, "CH3"), (19.4, "CH2"), (31.8, "CH2"), (72.7, "CH2"), (58.5, "CH3")]
    mu = {0: 14.2, 1: 19.6, 2: 31.5, 3: 72.4, 5: 58.0}
    assert _run("CCCCOC", peaks, mu) == {0: 13.9, 1: 19.4, 2: 31.8, 3: 72.7, 5: 58.5}


def test_far_label_is_kept_when_no_rival_comes_close():
    # oxetane, NMRShiftDB2 peak list 10016041: CH2 22.9, OCH2 72.6 (x2). Two CH2 classes compete, but a
    # model that says 61 for the OCH2 cannot have swapped it with the CH2 predicted at 23
    got = _run("C1COC1", [(22.9, "CH2"), (72.6, "CH2"), (72.6, "CH2")], {0: 23.0, 1: 61.0, 3: 61.0})
    assert got == {0: 22.9, 1: 72.6, 3: 72.6}


def test_far_label_with_a_close_rival_is_refused():
    # constructed values: the carbon predicted at 30 gets the 45 ppm peak, 15 ppm off, while another
    # CH2 predicted at 60 is just as close to it: that label is not trusted
    got = _run("OCCCCOC", [(45.0, "CH2"), (75.0, "CH2"), (25.0, "CH2"), (26.0, "CH2"), (58.0, "CH3")],
               {1: 60.0, 2: 25.5, 3: 26.5, 4: 30.0, 6: 58.2})
    assert 4 not in got and got[2] == 25.0
