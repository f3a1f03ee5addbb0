"""Formula parsing, masses and DBE.

Sources:
- IUPAC CIAAW standard atomic weights, conventional values (Prohaska et al. 2022,
  Pure Appl. Chem. 94, 573): H 1.008, C 12.011, N 14.007, O 15.999, Cl 35.45, Br 79.904.
- Monoisotopic masses from the Atomic Mass Evaluation AME2020 (Wang et al. 2021,
  Chin. Phys. C 45, 030003): 1H 1.00782503, 12C 12 exactly, 14N 14.00307401,
  16O 15.99491462, 35Cl 34.96885268, 79Br 78.9183376 (values from memory).
- DBE worked cases: the general formula DBE = 1 + 1/2 sum n_i (v_i - 2) (common practice).
"""
import pytest
from hypothesis import given, settings, strategies as st

from shiftrank.errors import InputError
from shiftrank.chem.formula import (average_weight, dbe, dbe_note, formula_matches, hill, ion_mz, monoisotopic_weight,
                                    parse_formula)

IUPAC_WEIGHT = {"H": 1.008, "C": 12.011, "N": 14.007, "O": 15.999, "Cl": 35.45, "Br": 79.904}
AME_MASS = {"H": 1.00782503, "C": 12.0, "N": 14.00307401, "O": 15.99491462, "Cl": 34.96885268, "Br": 78.9183376}


@pytest.mark.parametrize("formula", ["C9H9N3O2", "C6H5Br", "C2H6O", "C7H5ClO", "CH4N2O"])
def test_masses_match_published_tables(formula):
    counts = parse_formula(formula)
    avg = sum(IUPAC_WEIGHT[s] * n for s, n in counts.items())
    mono = sum(AME_MASS[s] * n for s, n in counts.items())
    assert average_weight(counts) == pytest.approx(avg, abs=0.01)
    assert monoisotopic_weight(counts) == pytest.approx(mono, abs=2e-5)


def test_hill_order():
    assert hill(parse_formula("O2N3H9C9")) == "C9H9N3O2"
    assert hill(parse_formula("BrC6H5")) == "C6H5Br"
    assert hill(parse_formula("ClNa")) == "ClNa"  # no carbon: alphabetical
    assert hill(parse_formula("CH3CH2OH")) == "C2H6O"  # repeated symbols are summed


@pytest.mark.parametrize("formula,expected", [
    ("C5H12O", 0),      # acyclic, saturated: 0 (common practice)
    ("C5H10O", 1),      # one ring or one C=O adds 1
    ("C6H6O", 4),       # a benzene ring adds 4
    ("C6H5Cl", 4),      # halogens count like H
    ("C5H5N", 4),       # N adds 1/2 per atom: pyridine
    ("C9H9N3O2", 7),
    ("C2H3N", 2),       # nitrile triple bond
    ("C4H4S", 3),       # thiophene with S counted divalent
    ("C3H9O4P", 0),     # trimethyl phosphate with P counted trivalent: P=O is not counted
])
def test_dbe_worked_cases(formula, expected):
    assert dbe(parse_formula(formula)) == expected


def test_half_integer_dbe_is_flagged():
    d = dbe(parse_formula("C6H7"))
    assert d == 3.5
    assert "half-integer" in dbe_note(d)
    assert dbe_note(4.0) is None


def test_ion_mz_protonated_ethanol():
    # [C2H6O+H]+ = 2*12 + 7*1.00782503 + 15.99491462 - electron 0.00054858 (AME2020, CODATA)
    assert ion_mz(parse_formula("C2H6O"), "M+H") == pytest.approx(47.04914, abs=1e-4)


@pytest.mark.parametrize("bad,fragment", [
    ("", "empty"), ("C6H5Xx", "not an element"), ("c6h6", "cannot read"),
    ("C6H6+", "charge"), ("C6H0", "count 0"), ("(CH3)2O", "brackets"), ("C6 H6 x", "cannot read"),
])
def test_bad_formulas_are_refused_clearly(bad, fragment):
    with pytest.raises(InputError, match=fragment):
        parse_formula(bad)


def test_unknown_symbol_is_refused_without_rdkit_noise(capfd):
    # asking RDKit for the atomic number of an unknown symbol prints a C++ stack dump on stderr: the user must see
    # our one-line message only
    with pytest.raises(InputError, match="'Qq' is not an element symbol"):
        parse_formula("C7H13NO2Qq")
    assert capfd.readouterr().err == ""


@settings(max_examples=300, deadline=None)
@given(st.text(max_size=30))
def test_random_text_never_crashes_formula_parser(text):
    try:
        counts = parse_formula(text)
    except InputError:
        return
    assert all(n > 0 for n in counts.values())


def test_deuterium_and_tritium_are_counted_with_their_own_masses():
    # 2H 2.014101778 u, 3H 3.016049281 u (atomic mass evaluation, via RDKit's isotope table; values from memory)
    f = parse_formula("C2H3D3O")
    assert dict(f) == {"C": 2, "H": 3, "D": 3, "O": 1} and hill(f) == "C2H3D3O" and dbe(f) == 0
    assert abs(monoisotopic_weight(f) - monoisotopic_weight(parse_formula("C2H6O")) - 3 * 1.006276746) < 1e-5
    assert abs(monoisotopic_weight(parse_formula("CH3T")) - monoisotopic_weight(parse_formula("CH4")) - 2.008224) < 1e-5
    # a labelled candidate matches its formula written with D, and with the label counted as H
    assert formula_matches({"C": 2, "H": 3, "D": 3, "O": 1}, f)
    assert formula_matches({"C": 2, "H": 3, "D": 3, "O": 1}, parse_formula("C2H6O"))
    assert not formula_matches({"C": 2, "H": 6, "O": 1}, f)


def test_formula_command_reads_salts_ions_spaces_and_subscripts():
    import subprocess
    import sys

    def run(f):
        return subprocess.run([sys.executable, "-m", "shiftrank.cli", "formula", f], capture_output=True, text=True)
    # caffeine C8H10N4O2: monoisotopic 194.0804, [M+H]+ 195.0877 (PubChem, from memory); the ion's m/z
    # counts the electron's mass (CODATA 2018)
    r = run("[C8H11N4O2]+")
    assert r.returncode == 0 and "[C8H11N4O2]+   ion m/z 195.0877" in r.stdout
    assert "C8H10N4O2   average mass 194.19" in r.stdout and "neutral parent" in r.stdout
    # a hydrochloride: the organic part, and the whole salt's average mass (IUPAC 2021 standard atomic
    # weights, abridged: C 12.011, H 1.008, N 14.007, O 15.999, Cl 35.45 -> 217.649)
    r = run("C9H11NO3·HCl")
    assert r.stdout.startswith("C9H11NO3   average mass 181.19") and "C9H12ClNO3   average mass 217.6" in r.stdout
    for written in ("C8 H10 N4 O2", "C₈H₁₀N₄O₂"):      # elemental-analysis spacing; word-processor subscripts
        assert run(written).stdout.startswith("C8H10N4O2   average mass")
    bad = run("H+")
    assert bad.returncode == 2 and "no neutral parent" in bad.stderr and "Traceback" not in bad.stderr


def test_a_molecular_weight_written_after_the_formula_is_checked_not_refused():
    # formulas copied from a notebook or catalogue with their weight; C8H10ClN3O weighs 199.64 and its
    # hydrochloride 236.10 from the standard atomic weights (IUPAC)
    from shiftrank.chem.formula import sample_formula
    for text in ("C8H10ClN3O (MW 199.6)", "C8H10ClN3O, 199.64 g/mol", "C8H10ClN3O [FW = 199.6]"):
        counts, charge, notes = sample_formula(text)
        assert hill(counts) == "C8H10ClN3O" and charge == 0
        assert any("agrees with C8H10ClN3O" in n for n in notes)
    assert any("differs from" in n for n in sample_formula("C8H10ClN3O (MW 236.1)")[2])
    assert any("agrees with C8H11Cl2N3O" in n for n in sample_formula("C8H10ClN3O·HCl (MW 236.1)")[2])
    assert sample_formula("C6H12")[2] == []          # trailing digits of the formula itself are no weight
