"""Ring-system keys (shiftrank.prediction.ring_systems): the parent ring system's position of a carbon.

What a key must mean follows the way ring carbons are estimated by hand — the parent system's shift at
that position plus substituent increments (common practice): carbons at the same position of the same
parent system share the parent key whatever the substituents; the pattern key also tells which
positions are substituted.
"""
import os
import subprocess
import sys

import numpy as np
import pytest
from rdkit import Chem

from shiftrank.prediction.environment import environments
from shiftrank.prediction.ring_systems import KEY_NAMES, RingTables, ring_keys, ring_systems

PARENT, PATTERN, EXO = (KEY_NAMES.index(k) for k in ("parent", "pattern", "exo"))


def keys_of(smiles: str) -> dict[int, np.ndarray]:
    mol = Chem.MolFromSmiles(smiles)
    atoms = [a.GetIdx() for a in mol.GetAtoms()]
    return dict(zip(atoms, ring_keys(mol, atoms)))


def test_every_benzene_ring_carbon_shares_the_parent_key():
    benzene = keys_of("c1ccccc1")[0][PARENT]
    for smi in ("Cc1ccc(C)cc1", "Cc1ccccc1C", "Clc1cccc(Br)c1", "OC(=O)c1ccccc1"):
        mol = Chem.MolFromSmiles(smi)
        ring = [a.GetIdx() for a in mol.GetAtoms() if a.GetIsAromatic()]
        assert {int(k[PARENT]) for k in ring_keys(mol, ring)} == {int(benzene)}, smi


def test_the_pattern_key_sees_which_positions_are_substituted():
    # p-xylene: the four ring CH are alike, the two ring C-CH3 are alike (two pattern keys);
    # o-xylene: C3/C6 and C4/C5 differ (three pattern keys among the ring carbons)
    para = keys_of("Cc1ccc(C)cc1")
    ortho = keys_of("Cc1ccccc1C")
    assert len({int(para[i][PATTERN]) for i in (1, 2, 3, 4, 6, 7)}) == 2
    assert len({int(ortho[i][PATTERN]) for i in range(1, 7)}) == 3
    assert para[2][PATTERN] != ortho[2][PATTERN]


def test_fused_systems_and_positions_are_told_apart():
    quinoline = keys_of("c1ccc2ncccc2c1")
    isoquinoline = keys_of("c1ccc2cnccc2c1")
    assert len({int(k[PARENT]) for i, k in quinoline.items() if i != 4}) == 9   # nine different carbons
    assert not {int(k[PARENT]) for k in quinoline.values()} & {int(k[PARENT]) for k in isoquinoline.values()}
    # spiro rings are two systems, a biaryl two systems of one kind
    assert len(ring_systems(Chem.MolFromSmiles("C1CCC2(C1)CCCC2"))) == 2
    biphenyl = keys_of("c1ccc(-c2ccccc2)cc1")
    assert biphenyl[0][PARENT] == biphenyl[6][PARENT]


def test_an_exocyclic_carbonyl_belongs_to_the_ring():
    # 2-pyridone is not a pyridine with an OH: its ring carbons get keys of their own
    pyridone = keys_of("O=c1cccc[nH]1")
    pyridine = keys_of("c1ccncc1")
    assert not {int(k[PARENT]) for k in pyridone.values()} & {int(k[PARENT]) for k in pyridine.values()}
    assert pyridone[0][PARENT] != 0          # the O is part of the system


def test_exo_keys_for_atoms_bonded_to_a_ring():
    ethyl = keys_of("CCc1ccccc1")
    toluene = keys_of("Cc1ccccc1")
    assert ethyl[1][EXO] != 0 and ethyl[0][EXO] == 0          # benzylic CH2 yes, the CH3 beyond it no
    assert ethyl[1][EXO] != toluene[0][EXO]                    # CH2 and CH3 on benzene differ
    assert ethyl[1][PARENT] == 0 and ethyl[2][EXO] == 0        # ring atoms carry parent keys, not exo


def test_keys_do_not_depend_on_the_process():
    """Keys are stored in the model files: they must not change with Python's per-process hash seed."""
    code = ("from rdkit import Chem; from shiftrank.prediction.ring_systems import ring_keys; "
            "m = Chem.MolFromSmiles('Cc1ccnc2ccccc12'); print(ring_keys(m, range(m.GetNumAtoms())).tolist())")
    outs = {subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True,
                           env={**os.environ, "PYTHONHASHSEED": seed}).stdout for seed in ("1", "2")}
    assert len(outs) == 1


def test_environments_carry_keys_for_13c_only():
    mol = Chem.MolFromSmiles("Cc1ccccc1")
    assert environments(mol).ring_keys.shape == (7, len(KEY_NAMES))
    assert not environments(mol, nucleus="1H").ring_keys.any()


def test_ring_tables_round_trip_and_unknown_keys():
    keys = np.array([[5, 6, 0], [5, 7, 0], [0, 0, 9], [5, 6, 0]], np.uint32)
    t = RingTables().fit(keys, np.array([120.0, 130.0, 20.0, 122.0]), n_h=np.array([1, 0, 3, 1]))
    again = RingTables.from_arrays(t.to_arrays())
    probe = np.array([[5, 6, 0], [0, 0, 0], [8, 8, 0]], np.uint32)
    a, b = t.features(probe), again.features(probe)
    assert np.array_equal(np.isnan(a), np.isnan(b)) and np.allclose(np.nan_to_num(a), np.nan_to_num(b))
    assert np.isnan(a[1, 0]) and a[1, 2] == 0.0        # key 0: no lookup
    assert np.isnan(a[2, 0]) and a[2, 2] == 0.0        # unseen key
    assert a[0, 0] == pytest.approx(122.0)             # parent median of 120, 130, 122
    assert a[0, 9] == pytest.approx(121.0)             # parent from the CH rows only: 120, 122
