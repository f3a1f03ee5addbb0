"""The characterisation-text reader against paragraphs printed in open-access articles.

Each paragraph below is quoted verbatim from the article named by its PubMed Central id, as
extracted in the NMRExtractor data set (eat-sugar/NMRExtractor, MIT licence).  The expected peak
counts were counted by hand from the printed text.
"""
from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from shiftrank.errors import InputError
from shiftrank.inputs.text import read_nmr_text

# (source, text, nucleus, printed peaks, solvent, field MHz)
PRINTED = [
    ("PMC10216335 (text mangled by a wrong encoding)",
     "1H-NMR (CDCl3, 400 MHz) Î´ 1.52â€“1.58 (m, 6H), 1.63 (quint, 2H, J = 7.44 Hz), 2.33 (t, 6H, J = 7.24 Hz), "
     "2.65 (brS, 2H), 2.73 (t, 2H, J = 6.76 Hz)", "1H", 5, "CDCl3", 400),
    ("PMC3505905 (integral before the multiplicity, δ=, trailing ppm)",
     "1H\u2005NMR (400\u2005MHz, [D6]DMSO): δ=7.65 (1 H, bs, OH), 7.37 (2 H, d, J=8.2\u2005Hz, Ar-H), 7.33 (2 H, d, "
     "J=8.5\u2005Hz, Ar-H), 7.21 (1 H, bs,=NH), 6.66 (2 H, d, J=8.9\u2005Hz, Ar-H), 6.49 (2 H, d, J=9.0\u2005Hz, Ar-H), "
     "5.44 (1 H, t, J=5.7\u2005Hz, NH), 4.13 (2 H, d, J=5.7\u2005Hz, CH2), 3.88 (2 H, s, CH2), 3.61 (3 H, s, OCH3), "
     "2.39\u2005ppm (3 H, s, CH3)", "1H", 11, "DMSO-d6", 400),
    ("PMC3505905 (13C grouped under DEPT labels)",
     "13C\u2005NMR (100.6\u2005MHz, [D6]DMSO): Cq: δ=168.6, 154.0, 151.2, 150.7, 142.1, 139.7, 130.3; CH: 130.2, "
     "126.8, 114.4, 113.5; CH2: 38.9, 35.9; CH3: 55.3, 20.8\u2005ppm", "13C", 15, "DMSO-d6", 100.6),
    ("PMC9501377 (J1 = …, J2 = …; a 13C list with C–F quartets)",
     "1H NMR (400 MHz, CDCl3) δ 9.60 (s, 1 H), 8.49 (d, J = 1.6 Hz, 1 H), 7.48 (dd, J1 = 9.1 Hz, J2 = 2.1 Hz, 1 H), "
     "7.21–7.13 (m, 2 H), 7.04 (d, J = 9.1 Hz, 1 H), 7.02–6.93 (m, 2 H), 4.15 (t, J = 5.9 Hz, 2 H), 2.95 (t, J = 5.9 Hz, "
     "2 H), 2.67 (t, J = 6.6 Hz, 4 H), 1.84 (h, J = 3.2 Hz, 4 H)", "1H", 10, "CDCl3", 400),
    ("PMC9501377",
     "13C NMR (101 MHz, CDCl3) δ 158.00, 146.47, 131.81 (q, J = 3.1 Hz), 131.40, 130.14, 127.52, 124.93 (d, J = "
     "271.6 Hz), 124.83 (q, J = 4.3 Hz), 118.86 (q, J = 34.4 Hz), 116.64, 116.00, 67.52, 55.14, 54.90, and 23.63",
     "13C", 15, "CDCl3", 101),
    ("PMC8401930 (br. s, δH, trailing ppm)",
     "1H-NMR (600 MHz, CDCl3): δH 7.13 (s, 1H, H-6/9), 7.09 (s, 1H, H-9/6), 7.03 (s, 1H, H-3), 5.50 (br. s, 1H, OH) ppm",
     "1H", 4, "CDCl3", 600),
    ("PMC6958408 (solvent spelled out, carbon counts)",
     "13C NMR (101 MHz, chloroform-d): δ 156.3, 156.1, 136.2, 128.6 (2C), 128.3, 128.1 (2C), 79.5, 71.0, 67.0, 48.0, "
     "37.3, 34.5, 31.8, 28.4 (3C)", "13C", 14, "CDCl3", 101),
    ("PMC6270711 (no field, J without 'J =')",
     "1H-NMR (DMSO-d6): δ = 4.29 (d, 5.4 Hz, 2H, NCH2C=C), 5.56 (s, 2H, ArCH2N), 6.01 (t, 5.4 Hz, 1H, NH), 6.55 (t, "
     "7.8 Hz, 1H, CHar), 6.62 (d, 7.8 Hz, 2H, CHar), 7.05–7.08 (m, 2H, CHar), 7.24 (d, 7.7 Hz, 2H, CHar), 7.56 (d, "
     "7.8 Hz, 2H, CHar), 8.00 (s, 1H, CHtriazole)", "1H", 9, "DMSO-d6", None),
    ("PMC6009891 (assignment notes, a missing integral)",
     "1H NMR (400 MHz, CDCl3) δ: 1.20 (s, 3H, CH3), 2.44 (d, J = 3.0 Hz, 2H, CO-CH2-CH), 4.62 (d, J = 3.0 Hz, 1H, "
     "CO-CH2-CH), 6.13 (d, J = 10.0, 1H, CO-CH=CH), 6.38 (d, J = 10.0, 1H, CO-CH=CH), 7.24 (d, 1H, J = 8.0 Hz, Ar-H), "
     "7.74 (d, J = 8.0 Hz, Ar-H)", "1H", 7, "CDCl3", 400),
    ("PMC10020958 (several conditions, C–F doublets)",
     "13C NMR (126 MHz, DMSO-d6, 294 K): δ (ppm) 166.0, 162.8 (d, J = 249.89 Hz), 152.1, 140.2, 134.8, 130.2 (d, J = "
     "9.05 Hz), 125.1, 124.4 (d, J = 3.02 Hz), 124.2, 122.0, 121.6, 117.0, 114.5 (d, J = 22.33 Hz), 109.1, 44.5, 34.2, "
     "33.7", "13C", 17, "DMSO-d6", 126),
    ("PMC10107124 (J=…, J=… written twice; 'br')",
     "1H NMR (400\u2005MHz, CDCl3): δ=6.81 (dd, J=9.8\u2005Hz, J=4.0\u2005Hz, 1H), 6.05 (dd, J=9.8\u2005Hz, "
     "J=1.3\u2005Hz, 1H), 4.20 (s, 1H), 2.15 (br, 1H), 1.46\u2005ppm (s, 6H)", "1H", 5, "CDCl3", 400),
    ("PMC6271139 (13C frequency quoted as the 1H frequency; DEPT labels inline)",
     "13C-NMR (500 MHz, toluene-d8) δ C, 34.82, CH, 146.7, 138.1, 134.1, 120.4, 118.4; CH3, 29.5", "13C", 7,
     "toluene-d8", 500),
]


@pytest.mark.parametrize("source,text,nucleus,count,solvent,field", PRINTED, ids=[p[0][:11] for p in PRINTED])
def test_printed_paragraphs(source, text, nucleus, count, solvent, field):
    t = read_nmr_text(text)
    sec = t.section(nucleus)
    assert sec is not None and sec.nucleus == nucleus
    assert len(sec.peaks) == count, [p.fragment for p in sec.peaks]
    assert sec.solvent == solvent
    assert sec.field_mhz == field


def test_details_are_read():
    t = read_nmr_text(PRINTED[3][1] + " " + PRINTED[4][1])  # both sections in one string
    h, c = t.section("1H"), t.section("13C")
    dd = h.peaks[2]
    assert (dd.shift, dd.multiplicity, dd.j, dd.integral) == (7.48, "dd", (9.1, 2.1), 1.0)
    m = h.peaks[3]
    assert (m.lo, m.hi, m.integral, m.multiplicity) == (7.13, 7.21, 2.0, "m")
    cf3 = [p for p in c.peaks if p.j and p.j[0] > 200]
    assert len(cf3) == 1 and cf3[0].shift == 124.93 and cf3[0].count == 1  # ONE carbon, printed with its coupling
    # the 13C section's 101 MHz is a 13C frequency; PMC6271139's 500 MHz is the 1H one
    assert c.carbon_mhz == 101
    assert read_nmr_text(PRINTED[-1][1]).section("13C").carbon_mhz == pytest.approx(125.7, abs=0.1)


def test_integral_first_order_and_dept_groups():
    h = read_nmr_text(PRINTED[1][1]).section("1H")
    assert [(p.integral, p.multiplicity) for p in h.peaks[:2]] == [(1.0, "br s"), (2.0, "d")]
    c = read_nmr_text(PRINTED[2][1]).section("13C")
    assert [p.dept for p in c.peaks] == ["C"] * 7 + ["CH"] * 4 + ["CH2"] * 2 + ["CH3"] * 2
    counts = [p.count for p in read_nmr_text(PRINTED[6][1]).section("13C").peaks]
    assert sum(counts) == 18  # 14 printed values standing for 18 carbons (11 + 2 + 2 + 3)


def test_carbon_count_written_after_the_letter():
    # PMC6273472 prints "154.10 (C × 2)": 12 values standing for 16 carbons
    text = ("13C-NMR (CDCl3) δ 167.66, 154.10 (C × 2), 139.64, 134.83, 127.43, 127.34 (C × 2), 126.65, 126.27, "
            "115.65, 114.23 (C × 2), 96.58, 56.15 (C × 2)")
    counts = [p.count for p in read_nmr_text(text).section("13C").peaks]
    assert len(counts) == 12 and sum(counts) == 16


def test_carbon_count_written_as_a_bare_multiplier():
    # PMC10131537 prints "128.4 (2 ×)", PMC10220783 "128.51 (3×)"; "(x2)" is the same count, typed
    text = ("13C NMR (100 MHz, CDCl3) δ 171.3, 128.4 (2 ×), 111.7 (2 ×), 70.5 (2 ×), 70.4 (2 ×), 69.6, 40.1 (2 ×), 31.3")
    assert [p.count for p in read_nmr_text(text).section("13C").peaks] == [1, 2, 2, 2, 2, 1, 2, 1]
    text = "13C NMR (101 MHz, DMSO-d6): δ 146.99, 129.55 (2×), 128.51 (3×), 21.3 (x2), 20.0 (×2)"
    assert [p.count for p in read_nmr_text(text).section("13C").peaks] == [1, 2, 3, 2, 2]


def test_a_carbon_count_with_its_chn_label_gives_both():
    # PMC7527643 prints "131.1 (CH), 130.9 (CH), 127.8 (2xCH), 127.4 (2xCH), ... 55.0 (OCH3)": the doubled
    # lines are CH carbons as much as the single ones (before, only their count was read)
    text = ("13C-NMR (1:1 DMSO-d6/CDCl3, 100 MHz): δ 163.8 (C=O), 157.5 (C-O), 144.0 (N=CH), 133.2 (ArC-C=O), "
            "131.1 (CH), 130.9 (CH), 127.8 (2xCH), 127.4 (2xCH), 126.2 (CH), 122.2 (ArCCH=N), 120.2 (CH), 110.5 (CH), "
            "55.0 (OCH3) ppm")
    peaks = read_nmr_text(text).section("13C").peaks
    assert [(p.count, p.dept) for p in peaks[4:9]] == [(1, "CH"), (1, "CH"), (2, "CH"), (2, "CH"), (1, "CH")]
    assert peaks[0].dept is None and peaks[-1].dept is None   # assignment notes, not DEPT labels
    # PMC5400543 prints "25.36 (2×CH3)" and "121.59 (2×C aro)", PMC6273472 "154.10 (C × 2)" (no H count in
    # either), PMC6257558 "17.88 (2C, 2CH3)"; "(CH2 × 2)" is a typed variant
    text = "13C NMR (CDCl3) δ 25.36 (2×CH3), 30.1 (CH2 × 2), 154.10 (C × 2), 121.59 (2×C aro), 17.88 (2C, 2CH3)"
    assert [(p.count, p.dept) for p in read_nmr_text(text).section("13C").peaks] == [
        (2, "CH3"), (2, "CH2"), (2, None), (2, None), (2, "CH3")]


def test_a_decimal_comma_in_a_j_value_is_one_coupling():
    # PMC9027910 prints shifts with points and J values with commas: "115.67 (d, J = 21,8 Hz, 2C)"
    text = ("13C NMR (101 MHz, DMSO) δ ppm: 115.23, 115.67 (d, J = 21,8 Hz, 2C), 130.34 (d, J = 9,09 Hz, 2C), "
            "133.83 (d, J = 3,03 Hz), 162.20 (d, J = 244.4 Hz)")
    sec = read_nmr_text(text).section("13C")
    assert [p.j for p in sec.peaks] == [(), (21.8,), (9.09,), (3.03,), (244.4,)]
    assert any("decimal comma in a J value" in n for n in sec.notes)
    # two couplings are printed with a space after the comma and stay two
    h = read_nmr_text("1H NMR (400 MHz, CDCl3) δ 7.26 (dd, J = 8.4, 2.1 Hz, 1H)").section("1H")
    assert h.peaks[0].j == (8.4, 2.1)


def test_subscript_and_superscript_digits_are_read():
    # the same paragraph typed with Unicode super- and subscripts (a common rendering of '13C' and 'CDCl3')
    t = read_nmr_text("¹H NMR (400 MHz, CDCl₃) δ 7.26 (d, J = 8.4 Hz, 2H); ¹³C NMR (101 MHz, DMSO-d₆) δ 170.1, 21.3")
    assert (t.section("1H").solvent, t.section("13C").solvent) == ("CDCl3", "DMSO-d6")
    assert len(t.section("13C").peaks) == 2


def test_delta_h_and_delta_c_with_conditions_open_their_sections():
    # the 'δH (400 MHz; CDCl3) …; δC (101 MHz; CDCl3) …' style of some journals (common practice), for methyl
    # 4-methoxybenzoate (values from memory)
    t = read_nmr_text("δH (400 MHz; CDCl3) 7.99 (2 H, d, J 8.9, ArH), 6.91 (2 H, d, J 8.9, ArH), 3.88 (3 H, s), "
                      "3.86 (3 H, s); δC (101 MHz; CDCl3) 166.9 (C), 163.4 (C), 131.6 (CH), 122.6 (C), 113.6 (CH), "
                      "55.4 (CH3), 51.9 (CH3)")
    h, c = t.section("1H"), t.section("13C")
    assert (h.field_mhz, h.solvent, len(h.peaks)) == (400, "CDCl3", 4) and h.peaks[0].j == (8.9,)
    assert (c.field_mhz, len(c.peaks), c.peaks[2].dept) == (101, 7, "CH")
    # a bare 'δH 7.13' inside a section is not a new header (PRINTED: PMC8401930)
    assert [s.nucleus for s in read_nmr_text(PRINTED[5][1]).sections] == ["1H"]


def test_j_written_with_its_coupled_nuclei_in_brackets():
    # PMC6225118 prints "8.73 (d, 3J(H,H) = 8.5 Hz, 1 H)" and "7.96 (t, 3J(H,H) = 7.2, 3J(H,H) = 8.1 Hz, 1 H)"
    text = ("1H-NMR (300 MHz, [D6]DMSO, 25 °C, TMS): δ = 8.73 (d, 3J(H,H) = 8.5 Hz, 1 H), 7.96 (t, 3J(H,H) = 7.2, "
            "3J(H,H) = 8.1 Hz, 1 H)")
    assert [p.j for p in read_nmr_text(text).section("1H").peaks] == [(8.5,), (7.2, 8.1)]


def test_the_missing_integral_stays_missing_and_j_does_not_eat_it():
    h = read_nmr_text(PRINTED[8][1]).section("1H")
    assert h.peaks[3].j == (10.0,) and h.peaks[3].integral == 1.0
    assert h.peaks[-1].integral is None


def test_numbers_of_an_assignment_note_after_the_j_list_are_not_couplings():
    # PMC6268566 (NMRExtractor dev file): "7.20 (d, 2H, J = 7.9 Hz, CH3-Ph-3,5)" is one doublet with one J;
    # the '5' of the ring positions once became a second coupling constant
    h = read_nmr_text("1H-NMR (CDCl3) δ 7.20 (d, 2H, J = 7.9 Hz, CH3-Ph-3,5), 6.90 (d, 1H, J = 6.8 Hz, H-6)").section("1H")
    assert [p.j for p in h.peaks] == [(7.9,), (6.8,)] and "3, 5" in h.peaks[0].note
    # a list continued after 'Hz' with its own unit still is one list
    assert read_nmr_text("1H NMR δ 6.80 (dd, J = 8.4 Hz, 2.0 Hz, 1H)").section("1H").peaks[0].j == (8.4, 2.0)


def test_a_proton_count_printed_without_its_h_after_the_letters():
    # PMC6767028 (NMRExtractor dev file): "(t, 2, J = 7.1 Hz, CH2Cl)"; PMC2839550: "6.1 (2), 5.6 (1)" are
    # atom labels, not integrals (no multiplicity letters before them)
    h = read_nmr_text("1H NMR (600 MHz, (CD3)2CO) δ: 6.76 (d, 1, J = 8.2 Hz, H-6), 3.70 (t, 2, J = 7.1 Hz, CH2Cl)")
    assert [(p.integral, p.j) for p in h.section("1H").peaks] == [(1.0, (8.2,)), (2.0, (7.1,))]
    labels = read_nmr_text("1H NMR (CH3OH-d4): δ = 6.1 (2), 5.6 (1), 1.95 (12) ppm").section("1H")
    assert [p.integral for p in labels.peaks] == [None, None, None]


def test_a_proton_count_run_into_its_neighbour_word():
    # NMRExtractor dev file: PMC7211837 "7.31 (d, J 8.4 Hz, 1H Ar-H)", PMC10005784 "7.90 (1H d, H-3)",
    # PMC6259613 "3.07 (m, 2 x 1H, H-1'a)", PMC7146153 "6.50 (br s 1H, H-4)", PMC3888673 "5.32 (m, IH, H-6)";
    # '1H-pyridine' is a note, not a count
    h = read_nmr_text("1H NMR (400 MHz, DMSO-d6): δ 7.31 (d, J 8.4 Hz, 1H Ar-H), 7.90 (1H d, H-3), "
                      "3.07 (m, 2 x 1H, H-1'a), 6.50 (br s 1H, H-4), 5.32 (m, IH, H-6), 8.23 (s, 1H-pyridine)")
    got = [(p.multiplicity, p.integral, p.note) for p in h.section("1H").peaks]
    assert got == [("d", 1.0, "Ar-H"), ("d", 1.0, "H-3"), ("m", 2.0, "H-1'a"), ("br s", 1.0, "H-4"),
                   ("m", 1.0, "H-6"), ("s", None, "1H-pyridine")]


def test_j_lists_joined_by_and_are_read():
    # PMC8537530 (NMRExtractor dev file): "7.08 (dd, 1H, J = 7.9 and 4.8 Hz, H5)"; PMC6268817: three J values
    # with the last two joined by 'and' and no unit.  The J values were once lost (a number before a word
    # was taken for the '1' of '1H').
    h = read_nmr_text("1H-NMR (CDCl3): 7.08 (dd, 1H, J = 7.9 and 4.8 Hz, H5), "
                      "1.70 (ddd, J = 15.2, 11.7 and 3.5 Hz, 1H, one of CH2-3), 3.81 (s, 3H)").section("1H")
    assert [p.j for p in h.peaks] == [(7.9, 4.8), (15.2, 11.7, 3.5), ()]
    assert [p.integral for p in h.peaks] == [1.0, 1.0, 3.0]


def test_a_dash_for_the_equals_sign_of_j():
    # PMC10057653 (NMRExtractor dev file) prints "6.96 (d, J–8), 7.13 (dd, J1–2, J2–8)"
    h = read_nmr_text("1H NMR (CDCl3, 500 MHz) δ 6.96 (d, J–8), 7.13 (dd, J1–2, J2–8), 7.56 (d, J–2) ppm").section("1H")
    assert [p.j for p in h.peaks] == [(8.0,), (2.0, 8.0), (2.0,)]


def test_peaks_gathered_in_brackets_under_a_label_are_read():
    # PMC6274057 (NMRExtractor dev file) prints its aromatic doublets as "Ar-H [7.39 (d, …), 7.88 (d, …)]"
    h = read_nmr_text("1H-NMR (400 MHz, DMSO-d6) δ, ppm: 2.38 (s, 3H, CH3), 5.12 (s, 2H, CH2), "
                      "Ar-H [7.39 (d, J = 8.1 Hz, 2H), 7.88 (d, J = 8.1 Hz, 2H)]").section("1H")
    assert [(p.shift, p.multiplicity, p.j, p.integral) for p in h.peaks][2:] == [(7.39, "d", (8.1,), 2.0), (7.88, "d", (8.1,), 2.0)]
    assert not h.notes


def test_13c_values_in_brackets_and_lists_with_a_stray_bracket_are_read():
    # PMC6274057 (NMRExtractor dev file): "Ar-C [120.5, 127.1, 130.5, 143.1], (C=N) [163.1, 165.5]";
    # PMC6272449: "9.6, 11.1, 19.2 CH3), 61.2 (CH2), 115.2, 116.3, …" has a ')' without its '(' and once
    # lost 14 of its 18 values
    c = read_nmr_text("13C-NMR (100 MHz, DMSO-d6) δ, ppm: 21.5 (CH3), 33.7 (CH2), Ar-C [120.5, 127.1, 130.5, 143.1], "
                      "(C=N) [163.1, 165.5]").section("13C")
    assert [p.shift for p in c.peaks] == [21.5, 33.7, 120.5, 127.1, 130.5, 143.1, 163.1, 165.5] and not c.notes
    c = read_nmr_text("13C-NMR: δ = 9.6, 11.1, 19.2 CH3), 61.2 (CH2), 115.2, 116.3, 116.4, 117.2, 118.3, 119.2, 120.6, "
                      "120.8, 122.3, 124.4, 126.3, 137.4, 151.2 (Ar-C), 166.3 (CO)").section("13C")
    assert len(c.peaks) == 18 and c.peaks[1].shift == 11.1 and c.peaks[3].dept == "CH2"
    assert any("unbalanced" in n for n in c.notes)


def test_off_resonance_letters_count_attached_h():
    # PMC4120540 (2,5-diazido-1,4-phenylene diacetate, C10H8N6O4): s/d/t/q without any J value are the
    # number of attached H (off-resonance notation, common practice); by the structure: C=O, C–O, C–N
    # quaternary, one CH class, one CH3 class
    text = "13C NMR (CDCl3, 50\u2005MHz): δ 168.3 (s), 140.0 (s), 129.3 (s), 115.3 (d), 20.4 (q)"
    pl = read_nmr_text(text).peaklist("13C")
    assert [(p.shift, p.multiplicity, getattr(p, "coupling", None)) for p in pl.peaks] == [
        (20.4, "CH3", None), (115.3, "CH", None), (129.3, "C", None), (140.0, "C", None), (168.3, "C", None)]
    assert any("off-resonance" in n for n in pl.notes)
    # the same letters beside a printed J (PMC10020958 style C–F doublets) stay splittings
    pl = read_nmr_text("13C NMR (126 MHz, DMSO-d6) δ 166.0 (s), 162.8 (d, J = 249.9 Hz), 130.2 (d), 114.5 (d), "
                       "44.5 (t), 20.1 (q)").peaklist("13C")
    assert all(p.multiplicity is None for p in pl.peaks) and not any("off-resonance" in n for n in pl.notes)
    # a list of singlets says nothing about the H count
    pl = read_nmr_text("13C NMR (CDCl3) δ 168.3 (s), 140.0 (s), 129.3 (s), 115.3 (s)").peaklist("13C")
    assert all(p.multiplicity is None for p in pl.peaks)


def test_peaklists_from_text_set_solvent_aside():
    # the CDCl3 triplet printed among the peaks (PMC10216335's 13C line)
    t = read_nmr_text("13C-NMR (CDCl3, 400 MHz) Î´ 24.2, 25.8, 27.5, 40.9, 54.4, 57.6, 76.8, 77.2, 77.5")
    pl = t.peaklist("13C")
    assert len(pl.peaks) == 9 and len(pl.sample_peaks()) == 6


@pytest.mark.parametrize("text", ["", "N/A", "1H NMR (DMSO-d6, 700 MHz), and 13C NMR (DMSO-d6, 175 MHz), Table 1"])
def test_no_peaks_is_a_clear_error(text):
    with pytest.raises(InputError, match="no NMR peaks could be read"):
        read_nmr_text(text)


def test_unreadable_fragment_is_named_not_dropped():
    t = read_nmr_text("1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), banana, 3.80 (s, 3H)")
    sec = t.section("1H")
    assert len(sec.peaks) == 2
    assert any("banana" in n for n in sec.notes)


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet=st.sampled_from(list("0123456789.,;:()[]-–−δ HzJ=mdtsqbrNMRC1HCDCl3 \n\tµÎ´â€")), max_size=200))
def test_random_text_never_crashes(text):
    try:
        read_nmr_text("1H NMR (400 MHz, CDCl3) δ " + text)
    except InputError:
        pass


@settings(max_examples=200, deadline=None)
@given(st.text(max_size=300))
def test_any_unicode_never_crashes(text):
    try:
        read_nmr_text(text)
    except InputError:
        pass


@pytest.mark.parametrize("source,text", [
    ("PMC6958408", "13C NMR (101 MHz, chloroform-d): δ 156.3, 156.1, 136.2, 128.6 (2C), 128.3, 128.1 (2C), 79.5, 71.0, "
                   "67.0, 48.0, 37.3, 34.5, 31.8, 28.4 (3C)"),
    ("PMC7794720", "1H-NMR (400 MHz, CDCl3) δ = 7.37–7.13 (m, 5H), 3.58 (s, 3H), 3.17 (s, 3H), 2.96 (t, J = 7.9 Hz, 2H), "
                   "2.74 (t, J = 7.9 Hz, 2H)"),
])
def test_a_section_printed_with_decimal_commas_throughout(source, text):
    """Some house styles print every value with a decimal comma and separate values by semicolons (the comma
    is a decimal sign of ISO 80000-1; from memory).  The dev-file paragraph (source) rewritten in that style
    must give the same peaks, with a note; the original has decimal points and gets no such note."""
    comma = text.replace(", ", "; ").replace(".", ",")
    a, b = read_nmr_text(text).sections[0], read_nmr_text(comma).sections[0]
    assert [(p.shift, p.lo, p.hi, p.integral, p.multiplicity, tuple(p.j), p.count) for p in b.peaks] == \
        [(p.shift, p.lo, p.hi, p.integral, p.multiplicity, tuple(p.j), p.count) for p in a.peaks]
    assert any("decimal commas read as decimal points throughout" in n for n in b.notes)
    assert not any("decimal comma" in n for n in a.notes)


def test_the_first_proton_count_of_a_multiplet_is_its_integral():
    # PMC4513202 (NMRExtractor dev file): the total, then its breakdown by group
    h = read_nmr_text("1H NMR (CDCl3, 400 MHz): δ = 3.78–3.63 (m, 8H; 6H, OCH3, 2H, NH2: D2O exchangeable), "
                      "1.06–0.78 (m, 4H; 3H, CH3, 1H, NH: D2O exchangeable)").section("1H")
    assert [p.integral for p in h.peaks] == [8, 4]


def test_j_values_printed_without_hz_stop_before_atom_labels_and_counts():
    # PMC6222382, PMC5098229 and PMC7571065 (NMRExtractor dev file) with each 'Hz' left out, as some house
    # styles print them: the locant after the J list is not a coupling
    h = read_nmr_text("1H-NMR (400 MHz, DMSO-d6) δ 8.26 (d, 1 H, J = 4.0, 5′′-H), 7.66 (d, 1 H, J = 15.6, 3-H), "
                      "7.14 (2H, d, J = 7.4, 2 × CHarom.), 6.92 (2H, d, J = 8.9, 1,4-disubstituted benzene), "
                      "7.20 (2H, d, J = 8.0, H-2,6)").section("1H")
    assert [p.j for p in h.peaks] == [(4.0,), (15.6,), (7.4,), (8.9,), (8.0,)]


def test_j_without_an_equals_sign_keeps_integer_values():
    # PMC7762786 (NMRExtractor dev file) prints 'J = 6, 2'; the same written 'J 6, 2' (no equals sign, a
    # common house style) is the same two couplings, not a subscript '6,' and one J
    for text in ("1H (400 MHz, DMSO-d6): δ 7.52 (1H, td, J = 6, 2)", "1H (400 MHz, DMSO-d6): δ 7.52 (1H, td, J 6, 2)"):
        assert read_nmr_text(text).section("1H").peaks[0].j == (6.0, 2.0)
    assert read_nmr_text("1H NMR δ 7.52 (1H, dd, J3,4 = 8.0, J = 2.0 Hz)").section("1H").peaks[0].j == (8.0, 2.0)


def test_ppm_after_each_value_and_a_mangled_paste_with_real_unicode():
    # PMC6274057 (NMRExtractor dev file) with 'ppm' written after each value, as some articles print it
    c = read_nmr_text("13C-NMR (100 MHz, DMSO-d6) δ, ppm: 21.5 ppm (CH3), 33.7 ppm (CH2), "
                      "Ar-C [120.5 ppm, 127.1 ppm, 130.5 ppm, 143.1], (C=N) [163.1 ppm, 165.5]").section("13C")
    assert [p.shift for p in c.peaks] == [21.5, 33.7, 120.5, 127.1, 130.5, 143.1, 163.1, 165.5]
    # PMC10216335's wrongly decoded text, pasted beside a real superscript: mended run by run
    h = read_nmr_text("¹H-NMR (CDCl3, 400 MHz) Î´ 1.52â€“1.58 (m, 6H), 1.63 (quint, 2H, J = 7.44 Hz)").section("1H")
    assert (h.peaks[0].lo, h.peaks[0].hi, h.peaks[0].integral) == (1.52, 1.58, 6)


def test_a_j_printed_as_a_bare_number_after_splitting_letters():
    # PMC10139140 (NMRExtractor dev file) prints its J values bare, announced in the header ('J Hz'); a bare
    # number after a singlet or a multiplet stays a note
    h = read_nmr_text("1H-NMR (700 MHz, CDCl3, δ ppm, J Hz): 4.33 (q, 1H, C5-H, 7.7), 3.89 (s, 1H, NH), "
                      "1.81 (d, 1H, CH3, 7.7), 7.30 (dd, 8.4, 2.0, 1H), 3.50 (m, 1.5, 2H)").section("1H")
    assert [p.j for p in h.peaks] == [(7.7,), (), (7.7,), (8.4, 2.0), ()]


def test_an_hsqc_section_is_read_as_cross_peaks():
    # 4-methylanisole, shifts in CDCl3 from memory; the HSQC written as chemists print it in a paragraph
    t = read_nmr_text("1H NMR (400 MHz, CDCl3) δ 7.08 (d, J = 8.5 Hz, 2H), 6.80 (d, J = 8.5 Hz, 2H), 3.78 (s, 3H). "
                      "13C NMR (101 MHz, CDCl3) δ 157.6, 129.9. HSQC (CDCl3) δC/δH: 129.9/7.08, 113.8/6.80, "
                      "55.3/3.78, 41.2/2.95-3.10 (CH2).")
    assert [p.shift for p in t.section("13C").peaks] == [157.6, 129.9]   # the pairs stay out of the 13C list
    hs = t.hsqc()
    assert hs.pairs == [(129.9, 7.08), (113.8, 6.80), (55.3, 3.78), (41.2, 2.95), (41.2, 3.10)]
    assert hs.kinds[-1] == "CH2"
    # the proton shift first when the header says so; by size (with a note) when it says nothing
    assert read_nmr_text("1H-13C HSQC (DMSO-d6) δH/δC 7.08/129.9, 0.10/-1.2").hsqc().pairs == [(129.9, 7.08), (-1.2, 0.10)]
    guessed = read_nmr_text("HMQC: 7.08/129.9, 3.78/55.3").hsqc()
    assert guessed.pairs == [(129.9, 7.08), (55.3, 3.78)] and "by size" in guessed.notes[0]


def test_hsqc_named_in_prose_or_in_an_assignment_is_no_section():
    # PMC7672604 (NMRExtractor dev file): 'Carbon signals were observed indirectly, using HSQC or HMBC
    # experiments. δC 162.1 (C-4′), …' is a 13C list
    c = read_nmr_text("13C-NMR (DMSO-d6): solubility was low. Carbon signals were observed indirectly, using HSQC or "
                      "HMBC experiments. δC 162.1 (C-4′), 154.9 (C-6), 143.4 (C-4)")
    assert [p.shift for p in c.section("13C").peaks] == [162.1, 154.9, 143.4] and c.hsqc() is None
    c = read_nmr_text("13C NMR (101 MHz, CDCl3) δ 128.4 (CH, from HSQC), 55.3.")
    assert [p.shift for p in c.section("13C").peaks] == [128.4, 55.3]
    assert [p.shift for p in read_nmr_text("1H NMR (400 MHz, CDCl3) δ 7.26.").section("1H").peaks] == [7.26]


def test_a_value_stated_in_a_sentence_is_read_with_a_note():
    # PMC6651776 (NMRExtractor dev file) describes its 1H spectrum in prose
    h = read_nmr_text("In addition, its 1H NMR spectrum recorded a singlet signal at δ = 13.34 ppm for NH").section("1H")
    assert [(p.shift, p.multiplicity) for p in h.peaks] == [(13.34, "s")]
    assert any("sentence" in n for n in h.notes)


def test_a_spectrum_described_in_sentences_is_read_at_its_delta_mentions():
    # PMC6017864 (NMRExtractor dev file): N-benzylhexadecanamide's spectra described in prose
    h = read_nmr_text("The proton signals at δH 7.17 (2H, d, J = 8.0 Hz) and δH 7.33 (3H, m, overlapped) indicated "
                      "mono-substituted benzene ring. Doublet proton signals at δH 4.45 assigned to benzyl CH2 protons at "
                      "H-1′. Proton signals appeared as triplet at δH 2.20 assigned to H-2 adjacent to the carbonyl carbon "
                      "and at δH 1.65 as multiplet assigned to H-3. The long chain of methylene protons detected by "
                      "signals at δH 1.16–1.29 with high integration number. The terminal methyl appeared at δH 0.88 as "
                      "triplet").section("1H")
    assert [(p.shift, p.multiplicity) for p in h.peaks] == [(7.17, "d"), (7.33, "m"), (4.45, "d"), (2.2, "t"),
                                                          (1.65, "m"), (1.225, None), (0.88, "t")]
    c = read_nmr_text("13C-NMR confirmed presence of carbonyl carbon which appeared at δC 173.0. The benzyl carbon "
                      "appeared at δC 43.62, while the carbon adjacent to carbonyl at δC 36.88. Presence of "
                      "mono-substituted benzene ring was confirmed by five carbon signals from δC 127.55 to δC 138.40. "
                      "The long chain carbons appeared at δC 22.72 to δC 31.95, while terminal methyl signal was at "
                      "δC 14.16").section("13C")
    assert [p.shift for p in c.peaks] == [173.0, 43.62, 36.88, 14.16]      # the two spans are named in notes
    assert sum("span of signals" in n for n in c.notes) == 2


def test_an_hsqc_section_names_what_it_could_not_read_and_sets_a_typo_aside():
    t = read_nmr_text("HSQC (CDCl3) δC/δH: 129.9/, 55.3/3.78/2.1, 300.5/7.10, 113.8/6.82")
    hs = t.hsqc()
    assert hs.pairs == [(55.3, 3.78), (113.8, 6.82)]
    assert any("set aside" in n and "300.5/7.10" in n for n in hs.notes)
    assert any("not read as δC/δH pairs" in n and "129.9/" in n for n in hs.notes)


def test_two_compounds_pasted_together_get_a_note():
    # 4- and 3-methylanisole paragraphs one after the other (shifts from memory): only the first is used, and
    # the reader says so instead of mixing or dropping silently
    t = read_nmr_text("Compound 3a: 1H NMR (400 MHz, CDCl3) δ 7.10 (d, J = 8.5 Hz, 2H), 3.78 (s, 3H). "
                      "Compound 3b: 1H NMR (400 MHz, CDCl3) δ 7.17 (t, J = 7.8 Hz, 1H), 3.79 (s, 3H).")
    assert [p.shift for p in t.section("1H").peaks] == [7.10, 3.78]
    assert any("2 1H sections" in n and "only the first" in n for n in t.notes)


def test_an_assignment_table_pasted_as_text():
    # PMC5811625 (NMRExtractor dev file): a table whose rows were run together, cells separated by tabs
    t = read_nmr_text("Position no.a\tChemical shift (δ ppm)13C NMR\t1H NMR (integration, multiplicity, J value [Hz]) "
                      "1\t172.1\t— 2\t53.8\t4.73\t(1H, dd, 9.8, 6.0) 3\t29.3\t3.39\t(1H, dd, 14.4, 6.0)")
    assert [p.shift for p in t.section("13C").peaks] == [172.1, 53.8, 29.3]
    assert [(p.shift, p.integral, p.multiplicity, p.j) for p in t.section("1H").peaks] == [
        (4.73, 1, "dd", (9.8, 6.0)), (3.39, 1, "dd", (14.4, 6.0))]
    # the same kind of table with one row per line, a caption with the conditions, two protons on one carbon
    t = read_nmr_text("Table 2. NMR data (CDCl3, 400 MHz)\nPosition\tδC\tδH (mult., J in Hz)\n1\t172.1\t—\n"
                      "2\t53.8\t4.73 (dd, 9.8, 6.0)\n3\t29.3\t3.39 (dd, 14.4, 6.0), 3.12 (dd, 14.4, 9.8)\n4\t136.0\t\n")
    h = t.section("1H")
    assert [p.shift for p in h.peaks] == [4.73, 3.39, 3.12] and h.solvent == "CDCl3" and h.field_mhz == 400
    assert [p.shift for p in t.section("13C").peaks] == [172.1, 53.8, 29.3, 136.0]
    # the 1H column before the 13C column, a caption naming both nuclei above the header row
    t = read_nmr_text("Table 1. 1H (400 MHz) and 13C (101 MHz) NMR data in DMSO-d6\nNo.\tδH (J in Hz)\tδC\n1\t\t168.2\n"
                      "2\t7.95 (d, 8.1)\t129.4\n3\t2.39 (s)\t21.1\n")
    assert [(p.shift, p.j) for p in t.section("1H").peaks] == [(7.95, (8.1,)), (2.39, ())]
    assert [p.shift for p in t.section("13C").peaks] == [168.2, 129.4, 21.1] and t.solvent == "DMSO-d6"


def test_prose_with_a_short_word_between_is_still_read_as_sentences():
    h = read_nmr_text("The signal appeared at δH 7.17 (2H, d, J = 8.0 Hz) and the other at δH 3.80 (3H, s).").section("1H")
    assert [(p.shift, p.integral) for p in h.peaks] == [(7.17, 2), (3.80, 3)]


def test_other_2d_correlations_never_join_a_1h_or_13c_list():
    # own example of how SI paragraphs print them: HMBC/NOESY/COSY pairs are a section of their own (read as δ/δ
    # pairs of that experiment); label-only correlations are noted
    t = read_nmr_text("1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H). 13C NMR (101 MHz, CDCl3) δ 128.4, 55.3; "
                      "HMBC correlations: 7.26/128.4, 3.80/159.1. NOESY: 7.26/3.80. COSY: H-2/H-3")
    assert [p.shift for p in t.section("13C").peaks] == [128.4, 55.3]
    assert [p.shift for p in t.section("1H").peaks] == [7.26]
    assert t.hmbc().pairs == [(128.4, 7.26), (159.1, 3.80)] and t.hsqc("x", "NOESY").pairs == [(7.26, 3.80)]
    assert t.hsqc() is None and t.section("COSY").notes and not t.section("COSY").peaks
    # the word in an assignment or in prose opens nothing (PMC7672604's sentence, see above)
    assert [p.shift for p in read_nmr_text("13C NMR δ 128.4 (C-4, HMBC to H-2), 55.3").section("13C").peaks] == [128.4, 55.3]


def test_dept135_phases_printed_beside_the_values():
    # PMC6255254 (NMRExtractor dev file): '(-)' CH2, '(+)' CH or CH3, '(q)' quaternary (DEPT-135, common practice)
    t = read_nmr_text("13C-NMR (CDCl3) δ 38.14 (-), 42.46 (-), 61.37 (-), 64.40 (-), 66.84 (+), 126.99 (+), 127.73 (+), "
                      "129.43 (+), 129.81 (+), 136.31 (q), 142.67 (q), 160.52 (q)")
    pl = t.peaklist("13C")
    assert [p.multiplicity for p in pl.peaks] == ["CH2"] * 4 + ["CH/CH3"] * 5 + ["C"] * 3
    assert all(p.coupling is None for p in pl.peaks)          # 'q' is not a C–F quartet here
    # signs alone, without DEPT in the header or marked quaternary carbons, stay unread (APT pairs C with CH2)
    t = read_nmr_text("13C NMR (APT, 101 MHz, CDCl3) δ 170.1 (-), 128.4 (+), 55.3 (+), 41.2 (-)")
    assert all(p.multiplicity is None for p in t.peaklist("13C").peaks)


def test_a_dept135_list_tells_a_methylene_from_a_methine():
    # 4-ethyltoluene against cumene (both C9H12); 13C of 4-ethyltoluene in CDCl3 from memory
    from shiftrank.score.ranking import rank
    text = "13C NMR (DEPT-135, 101 MHz, CDCl3) δ 141.2 (q), 135.0 (q), 129.0 (+), 127.8 (+), 28.4 (-), 21.0 (+), 15.7 (+)"
    r = rank(text=text, candidates=["CC(C)c1ccccc1", "CCc1ccc(C)cc1"])
    assert r.best.smiles == "CCc1ccc(C)cc1" and r.best.probability > 0.9
    assert not any("against" in f for f in r.best.flags)


def test_second_value_of_a_pair_keeps_the_first_ones_details():
    """'160 and 163 (2CO)' (PMC7179205) and '51.7/51.1 (α-CH-Leu)' (PMC6264494): the second value carries the
    same description as the first (before, its fields were shifted: the printed text landed in its DEPT
    field, so no carbon class could take it without a multiplicity mismatch)."""
    sec = read_nmr_text("13C-NMR (125 MHz, DMSO-d6); 172.0 (C=N, thiazolidine), 160 and 163 (2CO), "
                        "51.7/51.1 (α-CH-Leu), 70.3 (1C, CH2)").section("13C")
    pairs = [p for p in sec.peaks if p.twin]
    assert sorted(p.shift for p in pairs) == [51.1, 51.7, 160.0, 163.0]
    assert all(p.dept is None and p.sign is None and p.shift_h is None for p in pairs)
    assert {p.note for p in pairs} == {"2CO", "α-CH-Leu"}


def test_broad_written_every_way_is_one_broad_multiplicity():
    # house styles seen in open-access SI paragraphs (the dev paragraphs and common practice): 'br s',
    # 's, br', 'broad s', 'broad singlet', 'bs', 's (br)', 'br, d'
    t = ("1H NMR (400 MHz, DMSO-d6) δ 10.2 (s, br, 1H), 9.1 (broad s, 1H), 6.1 (broad singlet, 2H), 5.5 (bs, 1H), "
         "4.1 (s (br), 1H), 3.3 (br, 1H), 2.9 (br, d, J = 4.8 Hz, 3H), 1.2 (1H, s, broad).")
    peaks = read_nmr_text(t).sections[0].peaks
    assert [p.multiplicity for p in peaks] == ["br s", "br s", "br s", "br s", "br s", "br", "br d", "br s"]
    assert all(p.note == "" for p in peaks)


def test_the_delta_c_symbol_with_a_colon_is_no_quaternary_label():
    # '13C NMR (CDCl3) δC: 55.2, …' is the δC symbol (a common house style); 'δ C, 34.8, CH, 146.7' (dev
    # paragraph PMC6271139) labels its first value quaternary
    peaks = read_nmr_text("13C NMR (101 MHz, CDCl3) δC: 170.1, 55.2, 21.0.").sections[0].peaks
    assert [p.dept for p in peaks] == [None, None, None]
    peaks = read_nmr_text("13C-NMR (500 MHz, toluene-d8) δ C, 34.82, CH, 146.7, 118.4; CH3, 29.5").sections[0].peaks
    assert [p.dept for p in peaks] == ["C", "CH", "CH", "CH3"]


def test_full_width_punctuation_of_east_asian_input_reads_as_ascii():
    # text typed with an East Asian input method carries full-width brackets, commas and colons (Unicode
    # Standard, Halfwidth and Fullwidth Forms block U+FF00–U+FFEF); read as their ASCII forms
    t = read_nmr_text("1H NMR（400 MHz，CDCl3）δ 7.26（d，J = 8.4 Hz，2H），3.80（s，3H）。13C NMR（101 MHz，CDCl3）δ 170.1，21.3。")
    h, c = t.sections
    assert h.solvent == "CDCl3" and [(p.shift, p.multiplicity, p.integral, p.j) for p in h.peaks] == [
        (7.26, "d", 2.0, (8.4,)), (3.8, "s", 3.0, ())]
    assert [p.shift for p in c.peaks] == [170.1, 21.3]


def test_a_typo_of_four_digits_before_the_list_is_noted_not_lost():
    # '1666' for 166.6 (a dropped decimal point) stands where the conditions end: it is named in a note
    sec = read_nmr_text("13C NMR (101 MHz, DMSO-d6) δ 1666, 150.1, 137.6.").sections[0]
    assert [p.shift for p in sec.peaks] == [150.1, 137.6]
    assert any("not read as peaks: 1666" in n for n in sec.notes)
    assert not read_nmr_text("13C NMR (101 MHz, DMSO-d6, 298 K) δ 150.1").sections[0].notes


def test_slips_inside_a_value_are_mended_with_a_note():
    # the letter O for a zero ('15O.1', OCR and typing slips), and a value with two decimal points (dev paragraph
    # PMC2267062 prints '5.7.59 (d, 2H, …)'): read as one value each, with a note; 'H2O' is left alone
    sec = read_nmr_text("13C NMR (101 MHz, DMSO-d6) δ 166.6, 15O.1, 137.6, 121.9.1.").sections[0]
    assert [p.shift for p in sec.peaks] == [166.6, 150.1, 137.6, 121.9]
    assert any("letter O" in n for n in sec.notes) and any("'121.9.1' has two decimal points" in n for n in sec.notes)
    sec = read_nmr_text("1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H), 4.79 (s, H2O).").sections[0]
    assert not sec.notes


def test_a_printed_13c_region_is_noted():
    # 'δ 13.9–31.2 (Caliphatic)' (dev paragraph PMC8648852) names a region of several carbons, not one line
    pl = read_nmr_text("13C NMR (75 MHz, DMSO-d6) δ (ppm): 13.9–31.2 (Caliphatic); 42.3; 128.4-128.6.").peaklist("13C")
    assert sum("is a region (13.9–31.2 ppm)" in n for n in pl.notes) == 1 and len(pl.peaks) == 3


def test_short_forms_of_higher_multiplets_from_report_generators():
    # 'p' (pentet), 'h' (hextet), 'hept', 'sep' as automatic report writers and some house styles print them
    # (common practice); an n-butyl ether's chain: p for OCH2CH2, h for CH2CH3
    t = ("1H NMR (400 MHz, CDCl3) δ 4.02 (t, J = 6.5 Hz, 2H), 1.78 (p, J = 6.5 Hz, 2H), 1.47 (h, J = 7.4 Hz, 2H), "
         "0.97 (t, J = 7.4 Hz, 3H), 2.90 (sep, J = 6.9 Hz, 1H), 2.85 (qui, J = 7.0 Hz, 1H).")
    peaks = read_nmr_text(t).sections[0].peaks
    assert [p.multiplicity for p in peaks] == ["t", "p", "sext", "t", "sept", "p"]
    assert [p.j for p in peaks][2] == (7.4,)
    assert all(p.note == "" for p in peaks)


def test_values_separated_by_spaces_or_line_breaks_are_each_a_peak():
    # a list typed or pasted one value per line, or with spaces only (common practice in notebooks): every
    # value is a peak, not only the last one
    for t in ("13C NMR (CDCl3) δ 162.9 161.0 157.5 101.5 66.3 44.4", "13C NMR (CDCl3) δ\n162.9\n161.0\n157.5\n101.5\n66.3\n44.4"):
        sec = read_nmr_text(t).section("13C")
        assert [p.shift for p in sec.peaks] == [162.9, 161.0, 157.5, 101.5, 66.3, 44.4]
        assert sec.notes == []
    plain = read_nmr_text("8.05\n6.40\n3.78\n3.65").sections[0]
    assert plain.nucleus == "1H" and [p.shift for p in plain.peaks] == [8.05, 6.40, 3.78, 3.65]
    # the field in the conditions is no peak
    assert [p.shift for p in read_nmr_text("13C NMR (100.6 MHz, CDCl3) δ 162.9 161.0").section("13C").peaks] == [162.9, 161.0]


def test_a_1h_range_whose_dash_was_lost_in_copying_is_one_multiplet_with_a_note():
    sec = read_nmr_text("1H NMR (CDCl3) δ 7.50 (s, 1H), 7.36 7.28 (m, 4H) 2.35 (s, 3H)").section("1H")
    assert [(p.lo, p.hi, p.integral, p.multiplicity) for p in sec.peaks] == [
        (None, None, 1.0, "s"), (7.28, 7.36, 4.0, "m"), (None, None, 3.0, "s")]
    assert any("dash lost" in n for n in sec.notes)


def test_a_line_the_authors_mark_as_solvent_or_water_is_set_aside():
    # '1.56 (br s, 2H, H2O)' in CDCl3 and '5.30 (s, CH2Cl2)' (water and dichloromethane in CDCl3: Fulmer et al.
    # 2010, Table 1) are printed with their assignment; 'overlapped with CHCl3' and 'exchangeable with D2O'
    # describe the compound's own lines, and a TMS group is a compound's Si(CH3)3
    t = ("1H NMR (400 MHz, CDCl3) δ 7.26 (m, 2H, overlapped with CHCl3), 5.30 (s, 2H, CH2Cl2), 4.9 (br s, 1H, "
         "exchangeable with D2O), 1.56 (br s, 2H, H2O), 0.10 (s, 9H, TMS)")
    pl = read_nmr_text(t).peaklist("1H")
    aside = sorted(p.shift for p in pl.peaks if p.solvent)
    assert aside == [1.56, 5.30]
    assert sum(1 for n in pl.notes if "set aside" in n and "marked as" in n) == 2


def test_carbons_at_one_value_counted_in_words():
    # '42.7 (two overlapping signals)', '128.5 (three overlapping signals)' as printed in PMC6100353 (the dev
    # paragraphs), and '(two C)': carbons printed once at one value
    t = ("13C NMR (50 MHz, DMSO-d6) δ: 42.7 (two overlapping signals), 125.1 (two overlapping signals), 128.3, "
         "128.5 (three overlapping signals), 98.0 (two C), 97.0 (2 overlapped carbons)")
    peaks = read_nmr_text(t).section("13C").peaks
    assert [p.count for p in peaks] == [2, 2, 1, 3, 2, 2]
    assert all(p.note == "" for p in peaks)
    # '146.4 (m, 2 × CF)' (PMC8002371, dev paragraphs): two fluorinated carbons at one value
    cf = read_nmr_text("13C NMR (CDCl3) δ 146.4 (m, 2 × CF)").section("13C").peaks[0]
    assert cf.count == 2 and cf.note == ""


def test_j_values_with_atom_locants_in_brackets_or_with_primes():
    # 'J(5,6) = 8.2 Hz', 'J2',3' = 8 Hz', "3J3′′,2′′ = 7.5 Hz" (PMC10187637) and "J’ = 1.4 Hz" (PMC10144346), as
    # printed in the dev paragraphs: the values are couplings, not notes
    t = ("1H NMR (CDCl3) δ 7.58 (d, J(5,6) = 8.2 Hz, 1H), 7.30 (d, J2',3' = 8 Hz, 2H), 1.44 (tt, 3J3′′,2′′ = 7.5 Hz, "
         "3J3′′,4′′ = 7.5 Hz, 2H), 7.81 (dd, 1H, J = 7.9 Hz, J’ = 1.4 Hz)")
    peaks = read_nmr_text(t).sections[0].peaks
    assert [p.j for p in peaks] == [(8.2,), (8.0,), (7.5, 7.5), (7.9, 1.4)]
    assert all(p.note == "" for p in peaks)
    # a C–F coupling named with a double-primed locant (PMC4413193: '104.7 (d, JC4″-F = 21.6 Hz)')
    c = read_nmr_text("13C NMR (CDCl3) δ 104.7 (d, JC4″-F = 21.6 Hz)").sections[0].peaks[0]
    assert c.j == (21.6,) and c.note == ""


def test_cyrillic_look_alikes_and_russian_letters_are_read():
    # PMC6270984 (dev paragraphs) prints '1Н' and 'СН3' with Cyrillic Н and С; Russian-language papers print
    # с/д/т/к/м and 'уш. с' for s/d/t/q/m and br s, 'Гц' for Hz and 'м.д.' for ppm (common practice)
    t = ("Спектр ЯМР 1H (400 МГц, CDCl3), δ, м.д.: 8.53 (д, J = 2 Гц, 1Н), 2.65 (с, 3Н, СН3), "
         "7.1 (дд, J = 8.0, 2.0 Гц, 1H), 10.2 (уш. с, 1H)")
    peaks = read_nmr_text(t).section("1H").peaks
    assert [(p.shift, p.integral, p.multiplicity, p.j) for p in peaks] == [
        (8.53, 1.0, "d", (2.0,)), (2.65, 3.0, "s", ()), (7.1, 1.0, "dd", (8.0, 2.0)), (10.2, 1.0, "br s", ())]
    # in a Latin paragraph, Cyrillic С and Н standing alone are the DEPT labels C and CH (PMC6270984's 13C line)
    c13 = read_nmr_text("13C-NMR: δ = 197.0 (С, СО), 133.6 (СН), 62.6 (СН3, СО2СН3) ppm").section("13C").peaks
    assert [p.dept for p in c13] == ["C", "CH", "CH3"]


def test_a_j_value_run_into_the_assignment_note_is_read():
    # '1.32 (t, 3H, J = 7.2 CH3)' (PMC6268463) and '7.27 (1H, dd, J 8.0, 2.0 Aryl-H)' (PMC6891769), dev
    # paragraphs: the J values without 'Hz' run into the note
    t = "1H NMR (CDCl3) δ 1.32 (t, 3H, J = 7.2 CH3), 7.27 (1H, dd, J 8.0, 2.0 Aryl-H), 4.35 (q, 2H, JHH = 7.2 CH2)"
    peaks = read_nmr_text(t).sections[0].peaks
    assert [(p.j, p.note) for p in peaks] == [((7.2,), "CH3"), ((8.0, 2.0), "Aryl-H"), ((7.2,), "CH2")]


def test_a_one_value_section_followed_by_the_next_sentence_reads_its_value():
    # a 19F section of one CF3 line followed by the HRMS sentence, as SI paragraphs print them (the format is
    # common practice; the values are INVENTED): the line is read and the mass values are not taken for it
    t = read_nmr_text("19F NMR (376 MHz, CDCl3) δ −65.2. HRMS (ESI) m/z calcd for C8H7F3NO2 [M+H]+ 206.0423, "
                      "found 206.0427.")
    assert [(s.nucleus, [p.shift for p in s.peaks]) for s in t.sections] == [("19F", [-65.2])]


@pytest.mark.parametrize("said", ["a 3:1 mixture of regioisomers", "an inseparable mixture of N1 and N2 isomers",
                                  "mixture of anomers", "a regioisomeric mixture", "mixture of cis/trans isomers"])
def test_a_paragraph_saying_it_shows_a_mixture_of_isomers_marks_two_forms(said):
    # how experimental sections state an isomer mixture (common practice): the lines of the second form may stand
    # beside the first's, as for rotamers
    t = read_nmr_text(f"Obtained as {said}. 1H NMR (400 MHz, CDCl3) δ 7.95 (s, 1H), 7.90 (s, 1H), 4.10 (s, 3H), "
                      "4.05 (s, 3H).")
    assert t.section("1H").doubled


def test_a_solvent_whose_subscripts_a_pdf_set_apart_is_recognised():
    # text copied from a PDF: 'CDCl 3', 'CD 2 Cl 2' (the residual lines are those of Fulmer et al. 2010, Table 2:
    # CDCl3 77.16, so the line at 77.2 is set aside)
    t = read_nmr_text("13 C NMR (101 MHz, CDCl 3 ) δ 165.2, 140.1, 77.2, 52.0")
    assert t.sections[0].solvent == "CDCl3" and not t.sections[0].notes
    pl = t.peaklist("13C")
    assert [p.shift for p in pl.sample_peaks()] == [52.0, 140.1, 165.2]
    assert read_nmr_text("1H NMR (400 MHz, CD 2 Cl 2 ) δ 7.26 (s, 1H)").sections[0].solvent == "CD2Cl2"
