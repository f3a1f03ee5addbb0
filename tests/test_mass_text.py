"""Molecular-ion statements in characterisation text, read as sample history (shiftrank.inputs.mass).

The phrasings are the ways chemists print a molecular ion (common practice); every calculated value
below was recomputed from the IUPAC monoisotopic masses the package uses (electron mass included),
so each statement is self-consistent.  The 13C values of methyl benzoate are textbook values, from
memory: 167.1 (C=O), 132.9 (C4), 130.2 (C1), 129.6 (C2/6), 128.4 (C3/5), 52.1 (OCH3).
"""
import json
import subprocess
import sys

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from shiftrank.chem.formula import ion_mz, parse_formula
from shiftrank.errors import InputError
from shiftrank.inputs.mass import ion_fits, read_mass_statements
from shiftrank.score.ranking import rank, rank_many

PRINTED = [
    # text, found, adduct, the molecule's formula (None: no formula printed)
    ("HRMS (ESI) m/z [M + Na]+ calcd for C11H14O4Na 233.0784, found 233.0786.", 233.0786, "M+Na", "C11H14O4"),
    ("HRMS (ESI+): m/z calcd for C15H13N2O [M+H]+ 237.1022; found 237.1025.", 237.1025, "M+H", "C15H12N2O"),
    ("HR-MS (EI) calcd for C10H12O2 (M+) 164.0837, found 164.0839", 164.0839, "M+", "C10H12O2"),
    ("HRMS (ESI-TOF) m/z: [M − H]− Calcd for C7H5O2 121.0295; Found 121.0297.", 121.0297, "M-H", "C7H6O2"),
    ("HRMS m/z (ESI) calcd for C20H22N3O3+ [M + H]+ 352.1656, found 352.1659.", 352.1659, "M+H", "C20H21N3O3"),
    ("HRMS (ESI): m/z calcd for [C17H21N2O3]+ 301.1547, found 301.1541", 301.1541, None, "C17H20N2O3"),
    ("HRMS calcd for C18H17ClN2O2 (M+H)+, 329.1051; found, 329.1048.", 329.1048, "M+H", "C18H17ClN2O2"),
    ("HRMS (ESI) m/z: [M+H]+ 301.1544 (calcd. 301.1547 for C17H21N2O3)", 301.1544, "M+H", "C17H20N2O3"),
    ("MS (ESI) m/z 165 [M+H]+.", 165.0, "M+H", None),
    ("ESI-MS m/z: 165.1 (M+H)+", 165.1, "M+H", None),
]


@pytest.mark.parametrize("text,found,adduct,neutral", PRINTED)
def test_printed_molecular_ions_are_read(text, found, adduct, neutral):
    (s,) = read_mass_statements(text)
    assert s.found == pytest.approx(found)
    assert s.adduct == adduct
    assert s.neutral == neutral


def test_ion_masses_against_reference_values():
    # caffeine C8H10N4O2: [M+H]+ 195.0877, [M+Na]+ 217.0696 (common LC-MS reference values, from memory)
    caffeine = parse_formula("C8H10N4O2")
    assert ion_mz(caffeine, "M+H") == pytest.approx(195.0877, abs=1e-4)
    assert ion_mz(caffeine, "M+Na") == pytest.approx(217.0696, abs=1e-4)
    # the negative ion differs from the neutral by one proton plus nothing else
    assert ion_mz(caffeine, "M-H") == pytest.approx(ion_mz(caffeine, "M+H") - 2 * 1.0072765, abs=1e-6)


def test_nmr_text_and_other_data_yield_no_ion():
    assert read_mass_statements("1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H); 13C NMR δ 170.1, 21.3") == []
    # a low-resolution fragment list without an ion label is not taken for the molecular ion
    assert read_mass_statements("EI-MS m/z (%): 164 (M+, 45), 133 (100), 105 (60).") == []
    assert read_mass_statements("IR (KBr) 1712, 1605 cm-1; mp 121-122 °C") == []


def test_tolerances_high_resolution_and_nominal():
    mb = parse_formula("C8H8O2")     # methyl benzoate: [M+H]+ 137.0597
    (hr,) = read_mass_statements("HRMS (ESI) m/z [M+H]+ found 137.0601")        # +2.9 ppm
    (off,) = read_mass_statements("HRMS (ESI) m/z [M+H]+ found 137.0640")       # +31 ppm
    (nominal,) = read_mass_statements("MS (ESI) m/z 137 [M+H]+")
    assert ion_fits(mb, hr) and not ion_fits(mb, off) and ion_fits(mb, nominal)
    assert not ion_fits(parse_formula("C9H10O2"), nominal)   # the ethyl ester, 14 u heavier


def test_a_typo_in_the_found_value_is_forgiven_by_the_printed_calculation():
    (s,) = read_mass_statements("HRMS (ESI) m/z [M+Na]+ calcd for C8H8O2Na 159.0417, found 159.0471.")
    assert ion_fits(parse_formula("C8H8O2"), s)


@given(st.text(max_size=300))
@settings(max_examples=200, deadline=None)
def test_reader_never_crashes(text):
    for s in read_mass_statements("HRMS (ESI) m/z " + text):
        assert s.found >= 0


BENZOATE_13C = "13C NMR (101 MHz, CDCl3) δ 167.1, 132.9, 130.2, 129.6 (2C), 128.4 (2C), 52.1."
HRMS = " HRMS (ESI) m/z [M+Na]+ calcd for C8H8O2Na 159.0417, found 159.0419."
CANDS = ["COC(=O)c1ccccc1", "CC(=O)Oc1ccccc1", "CCOC(=O)c1ccccc1"]   # methyl benzoate, phenyl acetate, ethyl benzoate


def test_printed_ion_demotes_a_candidate_of_another_formula_only():
    plain = rank(text=BENZOATE_13C, candidates=CANDS)
    with_ms = rank(text=BENZOATE_13C + HRMS, candidates=CANDS)
    assert any("sample history from the text: MS m/z 159.0419" in n for n in with_ms.notes)
    ethyl = next(c for c in with_ms.candidates if c.smiles == "CCOC(=O)c1ccccc1")
    assert ethyl.formula_ok is False and ethyl.probability == 0.0
    assert ethyl.flags[0].startswith("MS: found m/z 159.0419 does not fit C9H10O2")
    assert with_ms.candidates[-1].smiles == "CCOC(=O)c1ccccc1"
    # the two C8H8O2 candidates keep their order and costs
    same = [c for c in with_ms.candidates if c.formula_ok is not False]
    before = {c.smiles: c.cost for c in plain.candidates}
    assert [c.smiles for c in same] == [c.smiles for c in plain.candidates if c.smiles != "CCOC(=O)c1ccccc1"]
    assert all(c.cost == pytest.approx(before[c.smiles]) for c in same)
    assert with_ms.best.smiles == "COC(=O)c1ccccc1"


def test_batch_case_with_a_measured_mz_and_a_bad_one():
    out = rank_many([
        {"id": "ok", "text": BENZOATE_13C, "candidates": CANDS, "mz": {"found": 137.0598, "adduct": "M+H"}},
        {"id": "bad", "text": BENZOATE_13C, "candidates": CANDS, "mz": "137.06x"},
        {"id": "adduct", "text": BENZOATE_13C, "candidates": CANDS, "mz": {"found": 137.0598, "adduct": "M+Cs"}},
    ])
    assert [c.smiles for c in out[0].candidates][-1] == "CCOC(=O)c1ccccc1"
    assert isinstance(out[1], InputError) and "mz" in str(out[1])
    assert isinstance(out[2], InputError) and "M+Cs" in str(out[2])


def _cli(*args):
    return subprocess.run([sys.executable, "-m", "shiftrank.cli", *args], capture_output=True, text=True)


def test_cli_adduct_needs_mz(tmp_path):
    p = tmp_path / "s.txt"
    p.write_text(BENZOATE_13C)
    r = _cli("rank", "--text", str(p), "--candidates", *CANDS, "--adduct", "M+H")
    assert r.returncode == 2 and "--adduct needs --mz" in r.stderr and "Traceback" not in r.stderr


def test_cli_inventory_takes_the_formula_from_the_printed_ion(tmp_path):
    p = tmp_path / "s.txt"
    p.write_text(BENZOATE_13C + HRMS)
    r = _cli("inventory", "--text", str(p), "--json")
    assert r.returncode == 0, r.stderr
    inv = json.loads(r.stdout)
    assert inv["formula"] == "C8H8O2"
    assert any(m["adduct"] == "[M+Na]+" and m["ok"] for m in inv["mass_checks"])


def test_a_matching_formula_does_not_hide_an_ion_that_contradicts_it():
    r = rank(text=BENZOATE_13C + " HRMS (ESI) m/z [M+H]+ found 151.0754.", candidates=CANDS[:2], formula="C8H8O2")
    # 151.0754 is [M+H]+ of C9H10O2, not of the given C8H8O2: every candidate is flagged
    assert all(c.formula_ok is False for c in r.candidates)
    assert all(any(f.startswith("MS: found m/z 151.0754") for f in c.flags) for c in r.candidates)


def test_batch_file_carries_mz(tmp_path):
    from shiftrank.score.batch import read_cases

    p = tmp_path / "cases.jsonl"
    p.write_text(json.dumps({"id": "s1", "text": BENZOATE_13C, "candidates": CANDS, "mz": 159.0419}) + "\n")
    r = _cli("batch", str(p))
    assert r.returncode == 0, r.stderr
    ranking = json.loads(r.stdout)["ranking"]
    assert [x["formula_ok"] for x in ranking] == [True, True, False]
    assert read_cases(p)[0][1]["mz"] == 159.0419


def test_resolution_follows_the_printed_decimals():
    # '137.0600' prints four decimals: high resolution, although the number itself is 137.06
    (s,) = read_mass_statements("HRMS (ESI) m/z [M+H]+ found 137.0600")
    assert s.high_resolution and ion_fits(parse_formula("C8H8O2"), s)          # [M+H]+ 137.0597, +2 ppm
    (s,) = read_mass_statements("HRMS (ESI) m/z [M+H]+ found 137.0700")
    assert not ion_fits(parse_formula("C8H8O2"), s)                             # +75 ppm


@pytest.mark.parametrize("text", [
    "HRMS (ESI) m/z [2M+Na]+ calcd for C16H16O4Na 295.0941, found 295.0944.",   # a dimer ion
    "HRMS (ESI) m/z [M+2H]2+ calcd 69.0335, found 69.0337.",                     # doubly charged
    "HRMS (ESI) m/z [M−H2O+H]+ found 119.0491.",                                 # a fragment
])
def test_ions_other_than_the_molecules_own_are_not_used(text):
    assert read_mass_statements(text) == []


def test_elemental_analysis_and_subscripted_formulas_are_sample_history():
    # 'Anal. Calcd for …' gives the formula the sample was analysed as (a hemihydrate here, read on its organic
    # part); formulas copied from a word processor carry subscript digits.  Methyl 3-amino-4-methoxybenzoate
    # C9H11NO3 (own choice): [M+H]+ 182.0812 from monoisotopic masses (AME2020, CODATA electron mass)
    from shiftrank.chem.inventory import take_inventory
    from shiftrank.inputs.mass import read_analysis_formula, read_mass_statements
    from shiftrank.inputs.peaks import parse_peaks
    from shiftrank.score.ranking import rank

    st = read_mass_statements("HRMS m/z (ESI) calcd for C₉H₁₂NO₃ [M+H]⁺ 182.0812, found 182.0810")[0]
    assert st.formula == "C9H12NO3" and st.neutral == "C9H11NO3"
    analysis = "Anal. Calcd for C9H11NO3·0.5H2O: C, 56.83; H, 6.36; N, 7.36. Found: C, 56.70; H, 6.41; N, 7.30."
    assert read_analysis_formula(analysis) == "C9H11NO3·0.5H2O"
    text = "13C NMR (101 MHz, DMSO-d6) δ 166.6, 150.1, 137.6, 121.9, 119.0, 113.6, 109.9, 55.6, 51.7. " + analysis
    r = rank(text=text, candidates=["COC(=O)c1ccc(OC)c(N)c1", "COC(=O)c1ccc(OC)c(NC)c1"])
    assert any("elemental analysis was calculated for C9H11NO3·0.5H2O" in n for n in r.notes)
    assert r.best.formula_ok and not r.candidates[-1].formula_ok      # the N-methyl amine is C10H13NO3
    inv = take_inventory(parse_peaks("166.6\n150.1\n137.6\n121.9\n119.0\n113.6\n109.9\n55.6\n51.7\n"), None,
                         "C9H11NO3·0.5H2O")
    assert inv.formula == "C9H11NO3" and any("set aside: 0.5H2O" in f for f in inv.findings)


def test_a_given_formula_that_differs_from_the_printed_ms_molecule_is_noted():
    # an HRMS statement printed with its formula (calcd for C8H11ClN3O [M+H]+: the molecule is C8H10ClN3O)
    # beside a formula typed from another sample (invented values)
    from shiftrank.score.ranking import rank
    text = ("1H NMR (400 MHz, CDCl3) δ 8.05 (d, J = 6.2 Hz, 1H), 6.40 (d, J = 6.2 Hz, 1H), 3.78 (m, 4H), 3.65 (m, 4H). "
            "HRMS (ESI) m/z [M+H]+ calcd for C8H11ClN3O 200.0585, found 200.0583.")
    r = rank(text=text, candidates=["Clc1nccc(N2CCOCC2)n1"], formula="C10H13NO3")
    assert any("differs from the molecule of the text's MS statement (C8H10ClN3O)" in n for n in r.notes)
    same = rank(text=text, candidates=["Clc1nccc(N2CCOCC2)n1"], formula="C8H10ClN3O")
    assert not any("differs from" in n for n in same.notes)
