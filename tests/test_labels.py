"""Deuterium (and tritium) labels: predicted as the hydrogen they replace, but silent in the 1H spectrum
and invisible to DEPT/HSQC, which edit by attached protons (common practice).

Shifts of anisole in CDCl3 used below: 7.29 (2H, meta), 6.94 (1H, para), 6.90 (2H, ortho), 3.80 (OCH3)
(from memory).  Removing one proton's line and its coupling is the rule of the trade for a 2H label
(common practice); the labelled spectra below are derived from the anisole values by that rule.
"""
from rdkit import Chem

from shiftrank.chem.labels import labelled_hydrogens, proton_counts
from shiftrank.chem.standardise import standardise
from shiftrank.chem.structure import structure_facts
from shiftrank.prediction.api import predict
from shiftrank.score.ranking import rank

D3 = "[2H]C([2H])([2H])Oc1ccc(OC)cc1"        # 1-(trideuteriomethoxy)-4-methoxybenzene


def test_standardise_remembers_which_atoms_carried_the_labels():
    s = standardise(Chem.MolFromSmiles(D3), "d3")
    assert Chem.MolToSmiles(s.mol) == "COc1ccc(OC)cc1"
    assert labelled_hydrogens(s.mol) == {0: 3} and proton_counts(s.mol)[0] == 0
    assert s.atom_map[0] == 1                       # the input's carbon, after its three 2H atoms' first
    assert any("no 1H signal" in n for n in s.notes)
    # a [1H] written out is a plain proton, not a label
    plain = standardise(Chem.MolFromSmiles("[1H]C([1H])([1H])Oc1ccccc1"), "h3")
    assert labelled_hydrogens(plain.mol) == {}


def test_a_cd3_group_has_no_1h_class_and_shows_as_c_in_dept():
    f = structure_facts(D3)
    assert [1] in [c.atoms for c in f.carbon_classes]          # the input's own atom numbers (the 2H atoms count)
    # the ring keeps the symmetry of the unlabelled molecule: one 4H class
    assert sorted(len(g) for g in f.hydrogen_classes) == [1, 4]
    mult = {tuple(c.atoms): c.multiplicity for c in f.carbon_classes}
    assert sorted(mult.values()) == ["C", "C", "CH", "CH3"]     # CD3 as C; the two methyl carbons apart
    partial = structure_facts("[2H]C([2H])Oc1ccc(OC)cc1")         # CHD2: one proton left, a CH in DEPT
    assert sorted(c.multiplicity for c in partial.carbon_classes) == ["C", "CH", "CH", "CH3"]
    assert sorted(len(g) for g in partial.hydrogen_classes) == [1, 1, 4]


def test_1h_prediction_leaves_out_atoms_whose_hydrogens_are_all_labelled():
    p = predict(D3, nucleus="1H")
    assert 1 not in p.shifts and 10 in p.shifts            # input indices: CD3 carbon 1, CH3 carbon 10
    assert set(predict(D3).shifts) >= {1, 10}               # 13C still predicts both methyl carbons


def test_integrals_tell_the_labelled_compound_from_the_unlabelled_one():
    peaks = [{"shift": 6.84, "integral": 4, "multiplicity": "s"}, {"shift": 3.77, "integral": 3, "multiplicity": "s"}]
    r = rank(candidates=["COc1ccc(OC)cc1", D3], peaks_1h=peaks)
    assert r.best.smiles == D3
    one_h = r.best.nuclei["1H"].assignment.parts
    assert one_h["integral"] == 0 and one_h["missing"] == 0


def test_where_the_label_went_is_read_from_the_pattern():
    # anisole-4-d: the para proton's triplet is gone and the ring shows two 2H doublets
    peaks = [{"shift": 7.29, "integral": 2, "multiplicity": "d", "j": [8.6]},
             {"shift": 6.90, "integral": 2, "multiplicity": "d", "j": [8.6]},
             {"shift": 3.80, "integral": 3, "multiplicity": "s"}]
    cands = ["[2H]c1ccc(OC)cc1", "[2H]c1ccccc1OC", "[2H]c1cccc(OC)c1", "COc1ccccc1"]
    r = rank(candidates=cands, peaks_1h=peaks)
    assert r.best.smiles == cands[0]
    # anisole-2-d: 7.29 (m, 2H), 6.94 (t, 1H), 6.90 (d, 1H), 3.80 (s, 3H)
    peaks2 = [{"range": [7.26, 7.32], "integral": 2, "multiplicity": "m"},
              {"shift": 6.94, "integral": 1, "multiplicity": "t", "j": [7.4]},
              {"shift": 6.90, "integral": 1, "multiplicity": "d", "j": [8.2]},
              {"shift": 3.80, "integral": 3, "multiplicity": "s"}]
    r2 = rank(candidates=cands, peaks_1h=peaks2)
    assert r2.best.smiles == cands[1]


def test_generated_alternatives_name_a_labelled_group_with_d():
    from shiftrank.chem.isomers import isomers
    alts = isomers("[2H]c1ccc(OC)cc1")
    assert len(alts) == 2 and all(a.relation.startswith("D moved") for a in alts)


def test_a_cd3_carbon_is_expected_as_a_septet_and_a_chd2_proton_as_a_small_quintet():
    # spin-1 deuterium: n deuterons split a line into 2n + 1 (common practice); 1J(C,D) about 19–22 Hz for
    # a CD3 group and 2J(H,D) about 2 Hz (from memory; the ranges are in chem/couplings.py)
    from shiftrank.chem.couplings import carbon_multiplets, expected_multiplets, fit_cost
    from shiftrank.chem.structure import carbon_classes
    s = standardise(Chem.MolFromSmiles(D3), "d3").mol      # parent atoms: CD3 carbon 0, CH3 carbon 7
    cd3 = next(e for e in carbon_multiplets(s, carbon_classes(s)) if e.atoms == [0])
    assert cd3.letters() == "sept" and fit_cost(cd3, "sept", (21.0,), tolerance=2.0) == (0, 0)
    other = next(e for e in carbon_multiplets(s, carbon_classes(s)) if e.atoms == [7])
    assert fit_cost(other, "sept", (21.0,), tolerance=2.0)[0] == 1
    chd2 = standardise(Chem.MolFromSmiles("[2H]C([2H])Oc1ccccc1"), "d2").mol
    e = next(e for e in expected_multiplets(chd2) if e.atoms == [0])
    assert e.n_h == 1 and fit_cost(e, "p", (1.8,)) == (0, 0) and fit_cost(e, "s", ()) == (0, 0)


def test_a_printed_cd3_septet_points_to_the_labelled_methyl():
    # the 13C paragraph of a 4-methylanisole with one methyl labelled, shifts of 4-methylanisole
    # (from memory); the OCD3 septet (about 0.6 ppm below OCH3: the isotope shift) says which methyl
    text = ("13C NMR (101 MHz, CDCl3) δ 157.6, 129.9, 129.8, 113.8, 54.6 (sept, J = 22.0 Hz), 20.5.")
    r = rank(text=text, candidates=["COc1ccc(C([2H])([2H])[2H])cc1", "[2H]C([2H])([2H])Oc1ccc(C)cc1"])
    assert r.best.smiles == "[2H]C([2H])([2H])Oc1ccc(C)cc1"
    assert not any("against its printed" in f for f in r.best.flags)


def test_sample_history_weighs_the_label():
    # [M+H]+ of C8H7D3O: 122.0732 (C8H10O) + 3 × (2.0141 − 1.0078) + 1.0073 = 126.0993 (masses from memory)
    peaks = [{"shift": 7.08, "integral": 2, "multiplicity": "d", "j": [8.5]},
             {"shift": 6.80, "integral": 2, "multiplicity": "d", "j": [8.5]}, {"shift": 2.28, "integral": 3, "multiplicity": "s"}]
    labelled, plain = "[2H]C([2H])([2H])Oc1ccc(C)cc1", "COc1ccc(C)cc1"
    r = rank(candidates=[plain, labelled], peaks_1h=peaks, formula="C8H7D3O")
    got = {c.smiles: c for c in r.candidates}
    assert got[labelled].facts.formula == "C8H7D3O" and got[labelled].formula_ok and got[plain].formula_ok is False
    text = ("1H NMR (400 MHz, CDCl3) δ 7.08 (d, J = 8.5 Hz, 2H), 6.80 (d, J = 8.5 Hz, 2H), 2.28 (s, 3H). "
            "HRMS (ESI) m/z [M + H]+ calcd for C8H8D3O 126.0993, found 126.0995.")
    got = {c.smiles: c for c in rank(candidates=[plain, labelled], text=text).candidates}
    assert got[labelled].formula_ok and got[plain].formula_ok is False


def test_the_labelled_carbon_is_predicted_with_its_isotope_shift():
    # one-bond 2H isotope shift of 13C about -0.3 ppm per deuteron (from memory; CDCl3 77.16 against CHCl3
    # 77.36 in Fulmer et al. 2010); the other carbons keep their values
    lab, plain = predict(D3), predict("COc1ccc(OC)cc1")
    assert abs((lab.shifts[1] - plain.shifts[0]) - 3 * -0.3) < 1e-6
    assert abs(lab.shifts[10] - plain.shifts[7]) < 1e-6


def test_an_explicit_hydrogen_that_fixes_a_double_bond_is_no_label():
    """'[H]/N=C(/NCC#C)c1cccnc1' (an NMRShiftDB2 structure among the development isomer cases): RDKit keeps an
    explicit H that defines a double bond's stereo when removing hydrogens, so the atoms left were not the heavy
    atoms counted, and the candidate could not be scored (IndexError) until all H were removed."""
    f = structure_facts("[H]/N=C(/NCC#C)c1cccnc1")
    assert f.formula == "C9H9N3"
    r = rank([150.1, 148.0, 135.0, 123.5, 130.0, 80.0, 72.0, 31.0, 160.0],
                       ["[H]/N=C(/NCC#C)c1cccnc1", "N=C(NCC#C)c1ccccn1"])
    assert all(c.error is None for c in r.candidates)
