"""Inventory arithmetic, integral normalisation and the mass check.

Monoisotopic masses: AME2020 (Wang et al. 2021, Chin. Phys. C 45, 030003) — 1H 1.00782503,
12C 12, 16O 15.99491462, 23Na 22.98976928; electron 0.00054858 u (CODATA 2018); from memory.
Shift ranges are common practice.
"""
import pytest

from shiftrank.errors import InputError
from shiftrank.chem.inventory import integer_ratio, region_hint, take_inventory
from shiftrank.inputs.peaks import parse_peaks


def test_integral_normalisation_small_integers():
    assert integer_ratio([2.0, 3.1, 0.98]) == [2, 3, 1]
    assert integer_ratio([1.0, 1.5]) == [2, 3]       # needs the ×2 multiplier
    assert integer_ratio([0.66, 1.0, 0.33]) == [2, 3, 1]
    with pytest.raises(InputError):
        integer_ratio([1.0, 0.0])


def test_two_fold_symmetric_diester_inventory():
    # diethyl succinate-like pieces, own choice: EtO2C-CH2CH2-CO2Et, C8H14O4: 4 signals for 8 carbons
    c13 = parse_peaks("14.2 CH3\n29.0 CH2\n60.6 CH2\n172.3 C\n")
    inv = take_inventory(c13, formula="C8H14O4")
    assert inv.signals_by_type == {"CH3": 1, "CH2": 2, "CH": 0, "C": 1}
    assert inv.carbons_observed == 4 and inv.h_on_carbon_observed == 7
    dup = [f for f in inv.findings if "formula needs" in f][0]
    assert "needs 4 more C" in dup
    first = dup.split("possible duplicated pieces: ")[1].split("; or ")[0]
    assert first == "1 more CH3 and 2 more CH2 and 1 more C (no H on O/N): a 2-fold symmetric molecule"


def test_three_fold_symmetric_inventory():
    # 1,3,5-trimethoxybenzene-type pieces (own choice), C9H12O3: 3 signals
    c13 = parse_peaks("55.3 CH3\n93.0 CH\n161.6 C\n")
    inv = take_inventory(c13, formula="C9H12O3")
    assert any("3-fold symmetric" in f for f in inv.findings)


def test_extra_peaks_reported_when_formula_has_fewer_carbons():
    c13 = parse_peaks("14.1 CH3\n60.9 CH2\n171.0 C\n21.0 CH3\n30.9 CH3\n")
    inv = take_inventory(c13, formula="C4H8O2")
    assert any("1 more carbon signals than the formula" in f for f in inv.findings)


def test_alternatives_with_heteroatom_h_are_listed():
    # a para-disubstituted phenol ester (own choice), C8H8O3: 6 signals for 8 carbons
    c13 = parse_peaks("51.8 CH3\n115.3 CH\n120.2 C\n131.4 CH\n162.1 C\n166.2 C\n")
    dup = [f for f in take_inventory(c13, formula="C8H8O3").findings if "formula needs" in f][0]
    assert "2 more CH (1 H on O/N)" in dup


def test_dbe_hint_and_exchangeable_h():
    c13 = parse_peaks("115.4 CH\n122.0 C\n132.0 CH\n160.8 C\n167.5 C\n")
    inv = take_inventory(c13, formula="C7H6O3")
    assert inv.dbe == 5
    assert any("aromatic ring" in f and "common practice" in f for f in inv.findings)
    assert any("2 more CH (2 H on O/N)" in f for f in inv.findings)


def test_1h_integrals_hint_symmetry():
    c13 = parse_peaks("14.2 CH3\n29.0 CH2\n60.6 CH2\n172.3 C\n")
    h1 = parse_peaks("1.25 3.0\n2.62 2.1\n4.14 1.95\n", nucleus="1H")
    inv = take_inventory(c13, h1, formula="C8H14O4")
    assert inv.h_ratio == [3, 2, 2]
    assert any("scale ×2" in f for f in inv.findings)


def test_mass_check_against_monoisotopic_masses():
    # C8H8O3: M = 8*12 + 8*1.00782503 + 3*15.99491462 = 152.04734; [M+H]+ = 153.05462 (AME2020)
    c13 = parse_peaks("51.8 CH3\n115.3 CH\n120.2 C\n131.4 CH\n162.1 C\n166.2 C\n")
    inv = take_inventory(c13, formula="C8H8O3", mz=153.0549)
    checks = {m.adduct: m for m in inv.mass_checks}
    assert checks["[M+H]+"].expected_mz == pytest.approx(153.05462, abs=2e-5)
    assert checks["[M+H]+"].ok and not checks["[M]+"].ok and not checks["[M+Na]+"].ok
    assert checks["[M+Na]+"].expected_mz == pytest.approx(152.04734 + 22.98976928 - 0.00054858, abs=2e-5)
    assert any(line.startswith("mass check: consistent with [M+H]+") for line in inv.lines())
    # an m/z 1 Da off fits no ion: the line names the nearest and its error
    off = take_inventory(c13, formula="C8H8O3", mz=154.0549)
    line = next(x for x in off.lines() if x.startswith("mass check"))
    assert "fits none of [M]+, [M+H]+, [M+Na]+; nearest [M+H]+" in line


def test_inferences_are_marked():
    inv = take_inventory(parse_peaks("25.0 CH3\n207.0 C\n45.0 CH2\n"))
    assert any("inference" in i for i in inv.inferences)


@pytest.mark.parametrize("shift,mult,fragment", [
    (14.0, "CH3", "alkyl"), (55.5, "CH3", "O- or N-methyl"), (128.0, "CH", "aromatic"),
    (118.5, "C", "nitrile"), (119.1, None, "nitrile"), (119.1, "CH", "alkene/aromatic"), (172.0, "C", "carboxyl"), (200.0, "CH", "aldehyde"), (208.0, "C", "ketone"),
])
def test_region_hints_common_practice(shift, mult, fragment):
    assert fragment in region_hint(shift, mult)


def test_1h_patterns_allow_an_n_ethyl_or_n_methyl_azole():
    # ethyl 1-methylpyrazole-4-carboxylate-like pieces (own choice): an OCH2CH3 quartet near 4.3 and an
    # N-CH3 singlet near 3.9 ppm; N-ethyl and N-methyl azoles print there too (common practice), so the
    # hints must not claim O alone
    h1 = parse_peaks("7.90 1 s\n7.85 1 s\n4.28 2 q\n3.92 3 s\n1.33 3 t\n", nucleus="1H")
    lines = take_inventory(None, h1).h_patterns
    assert any("ethyl group" in x and "on O or an aromatic N" in x for x in lines)
    assert any("3H singlet at 3.92" in x and "NCH3 of an azole" in x for x in lines)


def test_chn_pieces_from_hsqc_and_1h_integrals():
    # 4-methylanisole in CDCl3, shifts from memory; the hand procedure (common practice): a 13C peak with no
    # cross peak carries no H, a cross peak's 1H integral counts the H (at most one per aromatic carbon)
    from shiftrank.inputs.peaks import hsqc_list
    c13 = parse_peaks("157.6\n129.9\n129.8\n113.8\n55.3\n20.5\n")
    h1 = parse_peaks("7.08 2 d\n6.80 2 d\n3.78 3 s\n2.28 3 s\n", nucleus="1H")
    hs = hsqc_list([[129.9, 7.08], [113.8, 6.80], [55.3, 3.78], [20.5, 2.28]])
    inv = take_inventory(c13, h1, formula="C8H10O", hsqc=hs)
    assert inv.signals_by_type == {"CH3": 2, "CH2": 0, "CH": 4, "C": 2} and inv.unknown_type_signals == 0
    assert inv.carbons_observed == 8 and inv.h_on_carbon_observed == 10
    assert "carbon and hydrogen counts match the formula exactly" in inv.findings
    # without the cross peaks the 13C list alone says nothing about CHn
    assert take_inventory(c13, h1, formula="C8H10O").unknown_type_signals == 6


def test_hsqc_reading_of_methyl_groups_methylenes_and_an_alkene():
    # own example: a tert-butyl (9H on one 13C peak), an isopropyl's methyls (6H), a ring CH2 with two proton
    # shifts, a terminal =CH2 (2H below 6.3 ppm on a carbon near 115 ppm) and a shared 1H multiplet that
    # counts nothing (common practice)
    from shiftrank.chem.inventory import chn_from_hsqc
    from shiftrank.inputs.peaks import hsqc_list
    c13 = parse_peaks("29.8\n22.1\n38.4\n114.6\n138.2\n25.0\n26.0\n")
    h1 = parse_peaks("1.28 9 s\n1.05 6 d\n2.10 1 m\n2.45 1 m\n5.02 2 m\n5.80 1 ddt\n1.40-1.55 4 m\n", nucleus="1H")
    hs = hsqc_list([[29.8, 1.28], [22.1, 1.05], [38.4, 2.10], [38.4, 2.45], [114.6, 5.02], [138.2, 5.80],
                    [25.0, 1.45], [26.0, 1.50]])
    got = {p.shift: m[:2] for p, m in zip(c13.sample_peaks(), chn_from_hsqc(c13.sample_peaks(), hs, h1))}
    assert got == {29.8: ("CH3", 3), 22.1: ("CH3", 2), 38.4: ("CH2", 1), 114.6: ("CH2", 1), 138.2: ("CH", 1),
                   25.0: (None, 1), 26.0: (None, 1)}


def test_dept135_plus_peaks_above_90_ppm_are_methines():
    # a DEPT-135 '+' phase is CH or CH3; no methyl carbon lies above 90 ppm (common practice)
    c13 = parse_peaks("141.2 C\n129.0 CH/CH3\n28.4 CH2\n21.0 CH/CH3\n")
    inv = take_inventory(c13)
    assert inv.signals_by_type["CH"] == 1 and inv.unknown_type_signals == 1
    assert any("counted as CH" in i for i in inv.inferences)


def test_1h_patterns_of_a_4_fluorophenyl_and_a_lone_azole_singlet():
    # 4-fluorobenzyl alcohol in CDCl3, from memory: 7.32 (dd, J = 8.5, 5.5 Hz, 2H), 7.03 (t, J = 8.7 Hz, 2H),
    # 4.64 (s, 2H), 1.9 (br s, 1H); the dd/t pair of a 4-fluorophenyl is common practice
    h1 = parse_peaks("7.32 2 dd 8.5 5.5\n7.03 2 t 8.7\n4.64 2 s\n1.9 1 br s\n", nucleus="1H")
    lines = take_inventory(None, h1).h_patterns
    assert any("4-fluorophenyl" in x for x in lines) and not any("monosubstituted" in x for x in lines)
    # the same ring beside an azole CH singlet (2-aryl-imidazole-type pieces, own choice): five aromatic H in
    # three signals, but a 1H singlet has no ortho neighbour, so no monosubstituted benzene is claimed
    h1 = parse_peaks("8.02 2 dd 8.8 5.5\n7.85 1 s\n7.31 2 t 8.8\n3.78 3 s\n", nucleus="1H")
    lines = take_inventory(None, h1).h_patterns
    assert any("4-fluorophenyl" in x for x in lines) and not any("monosubstituted" in x for x in lines)
    # a monosubstituted ring's 2H/2H/1H (d, t, t) still is one (common practice)
    h1 = parse_peaks("7.95 2 d 7.5\n7.55 1 t 7.4\n7.45 2 t 7.6\n2.60 3 s\n", nucleus="1H")
    assert any("monosubstituted" in x for x in take_inventory(None, h1).h_patterns)


def test_broad_signals_are_named_exchangeable():
    # 4-aminobenzamide-like pieces in DMSO-d6 (own choice; shifts from memory): an amide NH2 printed as two
    # broad 1H singlets near 7.6 and 6.9, an aniline NH2 as a broad 2H singlet near 5.6; broad NH/OH
    # signals that D2O exchange removes are common practice
    h1 = parse_peaks("7.62 1 br s\n7.58 2 d 8.6\n6.92 1 br s\n6.52 2 d 8.6\n5.58 2 br s\n", nucleus="1H")
    lines = [x for x in take_inventory(None, h1).h_patterns if x.startswith("broad")]
    assert len(lines) == 3 and all("exchangeable" in x and "D2O" in x for x in lines)
    assert "NH2 (aniline or amide)" in lines[0] and "5.58" in lines[0]


def test_1h_integrals_pick_which_pieces_symmetry_doubles():
    # diethyl terephthalate (own choice; shifts from memory, CDCl3): 13C 165.8 C, 134.1 C, 129.6 CH, 61.5 CH2,
    # 14.3 CH3 for C12H14O4, and 1H 8.10 (s, 4H), 4.41 (q, 4H), 1.41 (t, 6H).  From 13C alone two ways of
    # doubling fit the formula; the integrals 6:4:4 leave the one a para-disubstituted ring gives: four CH,
    # two CH2, two CH3 (common practice: integrals count protons)
    c13 = parse_peaks("165.8 C\n134.1 C\n129.6 CH\n61.5 CH2\n14.3 CH3\n")
    h1 = parse_peaks("8.10 4 s\n4.41 4 q\n1.41 6 t\n", nucleus="1H")
    dup = [f for f in take_inventory(c13, h1, "C12H14O4").findings if "formula needs" in f][0]
    assert "that the 1H integrals (6:4:4) fit: 1 more CH3 and 1 more CH2 and 3 more CH and 2 more C" in dup
    assert "; or " not in dup
    alone = [f for f in take_inventory(c13, None, "C12H14O4").findings if "formula needs" in f][0]
    assert "integrals" not in alone and "; or " in alone


def test_printed_proton_counts_are_kept_and_read_for_symmetry():
    # diethyl terephthalate (own choice; 1H from memory): printed as whole protons 4H, 4H, 6H, they are kept (a
    # ratio 2:2:3 would hide that they match the formula), a 6H t with a 4H q reads as two equivalent ethyls and
    # a 4H aromatic singlet as equivalent ring protons (common practice); tert-butyl 9H s likewise
    h1 = parse_peaks("8.10 4 s\n4.41 4 q\n1.41 6 t\n", nucleus="1H")
    inv = take_inventory(None, h1, "C12H14O4")
    assert inv.h_ratio == [6, 4, 4] and inv.h_as_printed
    assert any("2 equivalent ethyl groups" in x for x in inv.h_patterns)
    assert any(x.startswith("4H singlet at 8.1 among the aromatic signals") for x in inv.h_patterns)
    assert any("sum to the formula's 14 H" in f for f in inv.findings)
    boc = take_inventory(None, parse_peaks("4.60 1 br s\n3.10 2 q\n1.44 9 s\n1.10 3 t\n", nucleus="1H"))
    assert any("tert-butyl" in x for x in boc.h_patterns) and any("an ethyl group" in x for x in boc.h_patterns)


def test_a_boron_formula_names_the_carbon_on_boron_as_a_likely_missing_line():
    # an aryl pinacol boronate printed without its C-B line (values from memory; the C-B carbon is often not
    # seen, common practice)
    from shiftrank.inputs.text import read_nmr_text
    pl = read_nmr_text("13C NMR (101 MHz, CDCl3) δ 162.1, 136.5, 113.3, 83.5, 55.1, 24.8.").peaklist("13C")
    inv = take_inventory(pl, formula="C13H19BO3")
    assert any("bound to boron" in f for f in inv.findings)


def test_1h_integrals_account_for_carbons_the_13c_list_shows_once():
    # ethyl 4-methoxybenzoate, C10H12O3, 8 printed 13C lines (values from memory): the two aromatic 2H doublets
    # are two pairs of equivalent CH, which is the two carbons the count lacks (symmetry reading, common practice)
    from shiftrank.inputs.text import read_nmr_text
    t = read_nmr_text("1H NMR (400 MHz, CDCl3) δ 7.92 (d, J = 8.8 Hz, 2H), 6.90 (d, J = 8.8 Hz, 2H), 4.34 (q, J = 7.1 Hz, "
                      "2H), 3.85 (s, 3H), 1.37 (t, J = 7.1 Hz, 3H). 13C NMR (101 MHz, CDCl3) δ 166.4, 163.3, 131.5, 122.9, "
                      "113.5, 60.6, 55.4, 14.4.")
    inv = take_inventory(t.peaklist("13C"), t.peaklist("1H"), formula="C10H12O3")
    line = next(f for f in inv.findings if "more carbons than the signals" in f)
    assert "the 1H integrals account for all 2" in line and "2H d at 7.92" in line
    # a 4-morpholinopyrimidine-like list (invented): two 4H multiplets of CH2 next to N and O
    t2 = read_nmr_text("1H NMR (400 MHz, CDCl3) δ 8.05 (d, J = 6.2 Hz, 1H), 6.40 (d, J = 6.2 Hz, 1H), 3.78 (m, 4H), "
                       "3.65 (m, 4H). 13C NMR (101 MHz, CDCl3) δ 162.9, 161.0, 157.5, 101.5, 66.3, 44.4.")
    inv2 = take_inventory(t2.peaklist("13C"), t2.peaklist("1H"), formula="C8H10ClN3O")
    assert any("account for all 2" in f and "two equivalent CH2" in f for f in inv2.findings)


def test_protons_missing_from_the_integrals_in_cd3od_are_said_to_be_exchanged():
    # PMC10155833 (literature_dev.jsonl.gz): C15H16N2O2 printed in CD3OD with 14 H, its NH and COOH not seen
    from shiftrank.inputs.text import read_nmr_text
    t = ("1H NMR (400 MHz, CD3OD) δ 0.97 (t, 3H, J = 7.3 Hz), 1.68 (tq, 2H, J = 7.3, 7.3 Hz), 2.66 (t, 2H, "
         "J = 7.3 Hz), 7.26 (dd, 1H, J = 2.3, 7.3 Hz), 7.32 (d, 2H, J = 8.2 Hz), 7.37 (d, 2H, J = 8.2 Hz), "
         "7.48 (d, 1H, J = 2.3 Hz), 8.32 (d, 1H, J = 7.3 Hz)")
    inv = take_inventory(None, read_nmr_text(t).peaklist("1H"), formula="C15H16N2O2")
    assert "2 H not seen, as expected in CD3OD" in " ".join(inv.findings)
    inv2 = take_inventory(None, read_nmr_text(t.replace("CD3OD", "DMSO-d6")).peaklist("1H"), formula="C15H16N2O2")
    assert "2 H not seen, likely OH/NH exchanging" in " ".join(inv2.findings)


@pytest.mark.parametrize("lines, n_f, words", [
    # symmetry reading of a 19F count against the formula's F (common practice)
    (1, 3, "three equivalent F, a CF3 group"),
    (1, 2, "1 F equivalent to others by symmetry"),
    (2, 2, "each F in an environment of its own"),
    (3, 2, "more signals than F atoms"),
    (1, 0, "the formula has no F"),
    (2, None, "at least 2 fluorine environments"),
])
def test_a_19f_count_is_read_against_the_formulas_fluorine(lines, n_f, words):
    from shiftrank.chem.inventory import counted_finding
    assert words in counted_finding("19F", lines, n_f)


def test_a_31p_count_is_read_against_the_formulas_phosphorus():
    # two P printed as one signal: equivalent by symmetry (common practice), as in a symmetric bisphosphonate
    from shiftrank.chem.inventory import counted_finding
    assert "1 P equivalent to others by symmetry" in counted_finding("31P", 1, 2)
    assert "the formula has no P" in counted_finding("31P", 1, 0)


def test_inventory_of_a_paragraph_with_a_19f_section_reads_its_count():
    # PMC8622415 (literature_dev.jsonl.gz, dev half): a 3-CF3-benzylamine, C21H19F3N2O2, its 13C paragraph; one
    # 19F line (as a CF3 shows; the paragraph prints none, so the count is given here)
    from shiftrank.inputs.text import read_nmr_text
    c13 = read_nmr_text("13C NMR (CDCl3, 100 MHz) δ 158.9, 149.9, 149.7, 149.2, 148.6, 140.6, 131.7, 131.1, 130.8, 129.1, "
                        "125.5, 124.2, 124.1, 124.1, 119.4, 112.2, 111.3, 109.9, 104.5, 56.0, 55.9, 45.9").peaklist("13C")
    inv = take_inventory(c13, formula="C21H19F3N2O2", counted_lines={"19F": 1})
    assert any(f.startswith("19F: 1 signal for 3 F") for f in inv.findings)


def test_cosy_spin_systems_and_carbons_only_the_hmbc_shows():
    # the N-ethyl indazole paragraph of the demo scenario's kind (own example): the ethyl's CH2/CH3 and the ring's
    # H6/H7 are two spin systems (common practice); C7a at 141.2 is missing from a 13C list that left it out and
    # is named from the HMBC (quaternary carbons are weak in 1D; common practice)
    from shiftrank.chem.inventory import take_inventory
    from shiftrank.inputs.peaks import cosy_list, hmbc_list, peak_text
    h1 = peak_text("1H NMR (400 MHz, CDCl3) δ 8.06 (dd, J = 8.9, 1.5 Hz, 1H), 7.43 (d, J = 8.9 Hz, 1H), "
                   "4.46 (q, J = 7.3 Hz, 2H), 1.54 (t, J = 7.3 Hz, 3H).", nucleus="1H")
    c13 = peak_text("167.5, 134.9, 127.1, 124.3, 123.6, 122.5, 108.7, 52.1, 44.1, 15.0")
    inv = take_inventory(c13, h1, cosy=cosy_list([[8.06, 7.43], [4.46, 1.54], [1.54, 4.46]]),
                         hmbc=hmbc_list([[141.2, 4.46], [141.3, 8.06], [15.0, 4.46]]))
    assert "COSY spin systems (coupled 1H signals): 8.06, 7.43 (2H); 4.46, 1.54 (5H)" in inv.findings
    assert any(f.startswith("HMBC: a carbon at δC 141.2 that the 13C list does not have (2 cross peaks") for f in inv.findings)


# Methyl 4-hydroxybenzoate 1H in DMSO-d6 (from memory): 10.31 (br, OH), 7.82 (d, 2H), 6.85 (d, 2H), 3.78 (s, 3H),
# integrated as an instrument gives relative areas; the residual DMSO-d6 line 2.50 (Fulmer et al. 2010, Table 1) taken
# into the integration; a trace of acetone at 2.09 (Fulmer et al. 2010, Table 1, recalled from memory).
_TRACE_LIST = "2.09 0.12 s\n2.50 0.4 m\n3.78 3.1 s\n6.85 2.0 d\n7.82 2.05 d\n10.31 0.96 br\n"


def test_a_residue_trace_does_not_set_the_scale_of_the_integrals():
    pl = parse_peaks(_TRACE_LIST, nucleus="1H", solvent="DMSO-d6")
    # the residual DMSO line is still set aside: the trace (0.12) is not taken as the list's proton
    assert [p.shift for p in pl.peaks if p.solvent] == [2.5]
    inv = take_inventory(None, pl, formula="C8H8O3")
    assert inv.h_ratio == [3, 2, 2, 1] and inv.h_total_from_integrals == 8
    assert any("2.09 (integral 0.12) set apart: a trace where acetone" in f for f in inv.findings)
