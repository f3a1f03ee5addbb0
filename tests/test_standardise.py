"""Registry-style structures (salts, hydrates, hydrochlorides, zwitterions, isotope labels) are ranked
as their parents, with a note each; what cannot be predicted is refused clearly.

Spectrum: the 13C paragraph of PMC10216335 (NMRExtractor, MIT licence) for
3-(piperidin-1-yl)propan-1-amine, printed with the CDCl3 triplet among its values.
"""
import pytest
from rdkit import Chem

from shiftrank.chem.standardise import standardise
from shiftrank.errors import InputError
from shiftrank.prediction.api import predict
from shiftrank.score.ranking import rank

TEXT = "13C-NMR (CDCl3, 400 MHz) Î´ 24.2, 25.8, 27.5, 40.9, 54.4, 57.6, 76.8, 77.2, 77.5"
PARENT = "NCCCN1CCCCC1"
OTHER = "CCCN1CCC(CN)CC1"     # a same-formula alternative (own choice)


def test_salts_and_hydrates_rank_as_their_parents_with_a_note():
    given = [PARENT + ".Cl.Cl", OTHER + ".O", "[NH3+]CCCN1CCCCC1.[Cl-]"]
    r = rank(text=TEXT, candidates=given, formula="C8H18N2")
    assert {c.smiles for c in r.candidates} == set(given)           # echoed exactly as given
    best = r.best
    assert best.smiles in (given[0], given[2]) and best.formula_ok
    for c in r.candidates:
        assert any(f.startswith("standardised") for f in c.flags)
    assert any("neutralised" in f for f in next(c for c in r.candidates if c.smiles == given[2]).flags)


def test_formula_printed_for_the_salt_is_compared_on_its_parent():
    r = rank(text=TEXT, candidates=[PARENT], formula="C8H18N2·2HCl")
    assert r.best.formula_ok and any("organic part C8H18N2" in n for n in r.notes)


def test_prediction_keys_stay_in_the_input_atom_order():
    # the chloride first: the keys are the input's own carbon indices (2-4 and 6-10), not the parent's
    smi = "[Cl-].[NH3+]CCCN1CCCCC1"
    carbons = [a.GetIdx() for a in Chem.MolFromSmiles(smi).GetAtoms() if a.GetAtomicNum() == 6]
    p = predict(smi)
    assert sorted(p.shifts) == carbons == [2, 3, 4, 6, 7, 8, 9, 10] and p.notes


@pytest.mark.parametrize("smiles,fragment", [("[CH3]", "unpaired"), ("C[Mg]Br", "organometallic"),
                                             ("[Na+].[Cl-]", "no fragment contains carbon"),
                                             # organometallics drawn as ions are not salts (butyllithium, ferrocene)
                                             ("[CH2-]CCC.[Li+]", "carbanion .* beside Li"),
                                             ("[CH-]1C=CC=C1.[CH-]1C=CC=C1.[Fe+2]", "beside Fe"),
                                             # the cyclopentadienide alone: no valid neutral form of that drawing
                                             ("c1cc[cH-]c1", "no neutral form")])
def test_what_cannot_be_predicted_is_refused(smiles, fragment):
    with pytest.raises(InputError, match=fragment):
        standardise(Chem.MolFromSmiles(smiles), smiles)


def test_an_isocyanide_beside_a_counter_ion_is_not_a_carbanion():
    s = standardise(Chem.MolFromSmiles("[C-]#[N+]CC(=O)[O-].[K+]"), "isocyanoacetate")
    assert Chem.MolToSmiles(s.mol) == "[C-]#[N+]CC(=O)O"


def test_deuterium_is_read_as_hydrogen():
    s = standardise(Chem.MolFromSmiles("[2H]C([2H])([2H])Oc1ccccc1"), "anisole-d3")
    assert Chem.MolToSmiles(s.mol) == "COc1ccccc1" and s.atom_map[0] == 1
