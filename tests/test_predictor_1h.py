"""The shipped 1H model: textbook shifts of small molecules and the prediction interface.

Reference values: residual 1H shifts in CDCl3 from Fulmer, G. R. et al., Organometallics 2010, 29,
2176, Table 1 (CDCl3 column; values as recalled from that table, i.e. from memory).  The model
predicts the mean shift of the protons on each heavy atom; a few tenths of a ppm is its stated
accuracy for compounds it has not seen, and many of these small compounds are in the training data.
"""
import numpy as np
import pytest

from shiftrank.errors import InputError
from shiftrank.prediction.api import predict, predict_many

# (SMILES, heavy-atom index, δH in CDCl3)
FULMER_CDCL3 = [
    ("c1ccccc1", 0, 7.36), ("CC(C)=O", 0, 2.17), ("CC#N", 0, 2.10),
    ("CCOCC", 1, 3.48), ("CCOCC", 0, 1.21), ("CN(C)C=O", 3, 8.02), ("CCOC(C)=O", 1, 4.12),
    ("CCOC(C)=O", 4, 2.05), ("CCOC(C)=O", 0, 1.26), ("CO", 0, 3.49), ("Cc1ccccc1", 0, 2.36),
    ("C1CCOC1", 2, 3.76), ("C1CCOC1", 0, 1.85), ("CCO", 1, 3.72), ("CCO", 0, 1.25),
    ("CCN(CC)CC", 1, 2.53), ("CCN(CC)CC", 0, 1.03), ("CS(C)=O", 0, 2.62), ("c1ccncc1", 2, 8.62),
    ("c1ccncc1", 0, 7.68), ("c1ccncc1", 1, 7.29), ("CC(=O)O", 0, 2.10), ("C[N+](=O)[O-]", 0, 4.33),
    ("CCCCCC", 0, 0.88), ("CCCCCC", 1, 1.26),
]


@pytest.mark.parametrize("smiles,atom,ref", FULMER_CDCL3)
def test_fulmer_table_shifts(smiles, atom, ref):
    p = predict(smiles, solvent="CDCl3", nucleus="1H")
    assert abs(p.shifts[atom] - ref) <= 0.35


DICHLOROMETHANE = ("ClCCl", 1, 5.30)


@pytest.mark.parametrize("smiles,atom,ref", [
    # chlorinated methanes are rare in the training data: chloroform -0.29 ppm with 1H model 1.4.0 (a known
    # miss before: -0.5 with 1.3.0, about -0.9 earlier)
    ("ClC(Cl)Cl", 1, 7.26),
    DICHLOROMETHANE,   # within 0.35 ppm since 1H 1.3.0 (-0.31 ppm with 1.4.0, -0.33 with 1.3.0; -0.41 with 1.1.0)
])
def test_chlorinated_methanes(smiles, atom, ref):
    assert abs(predict(smiles, solvent="CDCl3", nucleus="1H").shifts[atom] - ref) <= 0.35


def test_fulmer_table_mean_error():
    errs = [abs(predict(s, solvent="CDCl3", nucleus="1H").shifts[a] - r) for s, a, r in FULMER_CDCL3 + [DICHLOROMETHANE]]
    assert np.mean(errs) < 0.15


def test_keys_are_heavy_atoms_with_h_and_exchangeables_are_uncertain():
    # 4-hydroxyacetophenone (own choice): OH on atom 7, aromatic CH on atoms 4, 5, 8, 9, CH3 on atom 0
    p = predict("CC(=O)c1ccc(O)cc1", nucleus="1H")
    assert sorted(p.shifts) == [0, 4, 5, 7, 8, 9]
    assert p.sigmas[7] > 3 * p.sigmas[0]   # an OH moves with concentration and water: wide
    assert 6.5 < p.shifts[4] < 8.2 and 2.3 < p.shifts[0] < 2.8  # aromatic and acetyl CH3 regions (common practice)


def test_predict_many_1h_keeps_order_and_errors():
    out = predict_many(["CCO", "not a smiles", "c1ccccc1"], nucleus="1H")
    assert sorted(out[0].shifts) == [0, 1, 2] and isinstance(out[1], InputError) and list(out[2].shifts) == list(range(6))


def test_unknown_nucleus_is_refused():
    with pytest.raises(InputError, match="nucleus"):
        predict("CCO", nucleus="19F")


# Halobenzene ring protons in CDCl3 (from memory): bromobenzene ortho 7.49, meta 7.26, para 7.30;
# iodobenzene ortho 7.68, meta 7.07, para 7.30.  The assigned set holds no Br or I; what the model knows
# of them comes from the joint labels of complete 1H lists (1H 1.2.0; 1.1.0 put the ortho H of
# bromobenzene below its meta H and iodobenzene's ortho H at 7.50).
HALOBENZENES = [("Brc1ccccc1", (7.49, 7.26, 7.30)),
                pytest.param("Ic1ccccc1", (7.68, 7.07, 7.30), marks=pytest.mark.xfail(
                    strict=True, reason="known miss of 1H 1.3.0: iodobenzene's meta and para H are swapped "
                                        "(7.32 and 7.09; the ortho H 7.68 is right); 1H 1.2.0 had them in order"))]


@pytest.mark.parametrize("smiles,ref", HALOBENZENES)
def test_halobenzene_ring_protons(smiles, ref):
    p = predict(smiles, solvent="CDCl3", nucleus="1H")
    got = (p.shifts[2], p.shifts[3], p.shifts[4])   # ortho, meta, para
    assert all(abs(g - r) <= 0.15 for g, r in zip(got, ref))
    assert got[0] == max(got)   # the ortho protons lie lowest field
