"""Peak lists and residual solvent signals.

Solvent values: Fulmer, G. R. et al. (2010) Organometallics 29, 2176, Table 1
(1H residual and water) and Table 2 (13C); values from memory of those tables.
"""
import json

import pytest
from hypothesis import given, settings, strategies as st

from shiftrank.errors import InputError
from shiftrank.inputs.peaks import parse_peaks, read_peaks
from shiftrank.inputs.solvents import SOLVENTS, normalise_solvent

FULMER_13C = {"CDCl3": [77.16], "DMSO-d6": [39.52], "CD3OD": [49.00], "acetone-d6": [29.84, 206.26],
              "C6D6": [128.06], "CD3CN": [1.32, 118.26], "D2O": []}
FULMER_1H = {"CDCl3": 7.26, "DMSO-d6": 2.50, "CD3OD": 3.31, "acetone-d6": 2.05, "C6D6": 7.16, "CD3CN": 1.94, "D2O": 4.79}
FULMER_WATER = {"CDCl3": 1.56, "DMSO-d6": 3.33, "CD3OD": 4.87, "acetone-d6": 2.84, "C6D6": 0.40, "CD3CN": 2.13}


@pytest.mark.parametrize("key", list(FULMER_13C))
def test_solvent_table_matches_fulmer_2010(key):
    sol = SOLVENTS[key]
    assert list(sol.carbon_13c) == pytest.approx(FULMER_13C[key])
    assert sol.residual_1h[0] == pytest.approx(FULMER_1H[key])
    if key in FULMER_WATER:
        assert sol.water_1h == pytest.approx(FULMER_WATER[key])


@pytest.mark.parametrize("name,key", [("CDCl3", "CDCl3"), ("Chloroform-D1 (CDCl3)", "CDCl3"),
                                      ("Dimethylsulphoxide-D6 (DMSO-D6, C2D6SO))", "DMSO-d6"),
                                      ("Methanol-D4 (CD3OD)", "CD3OD"), ("Unreported", None), (None, None)])
def test_solvent_names(name, key):
    assert normalise_solvent(name) == key


def test_text_peaks_with_comments_intensity_multiplicity():
    pl = parse_peaks("# header\n128.4 1.0 CH\n21.3  CH3 # methyl\n170.2,s\n", source="p.txt")
    assert [(p.shift, p.multiplicity) for p in pl.peaks] == [(21.3, "CH3"), (128.4, "CH"), (170.2, "C")]
    assert pl.peaks[1].intensity == 1.0


def test_csv_and_json_peaks(tmp_path):
    c = tmp_path / "p.csv"
    c.write_text("shift,multiplicity\n55.1,CH3\n160.0,C\n")
    assert read_peaks(c).shifts == [55.1, 160.0]
    j = tmp_path / "p.json"
    j.write_text(json.dumps({"peaks": [{"shift": 14.1, "multiplicity": "CH3"}, 60.3]}))
    assert read_peaks(j).shifts == [14.1, 60.3]


def test_duplicates_merge_into_one_signal_with_a_note():
    pl = parse_peaks("128.2 CH\n128.2 CH\n128.2 CH\n")
    assert len(pl.peaks) == 1 and pl.peaks[0].count == 3
    assert "3 times" in pl.notes[0]


def test_solvent_peak_set_aside_with_note_unless_dept_says_protonated():
    pl = parse_peaks("77.1\n77.2 CH\n30.0 CH2\n", solvent="CDCl3")
    flagged = [p.shift for p in pl.peaks if p.solvent]
    assert flagged == [77.1]
    assert any("Fulmer" in n for n in pl.notes)
    assert len(pl.sample_peaks()) == 2


def test_a_typed_1h_multiplet_across_the_chloroform_line_is_the_compounds():
    # A monosubstituted benzene printed as one 5H multiplet 7.35–7.20 spans CHCl3's 7.26 (Fulmer 2010);
    # a residual line is a narrow singlet nobody integrates (common practice), so neither the range nor
    # an integrated peak at 7.26 is set aside; an unintegrated singlet there still is.
    from shiftrank.score.ranking import as_peaklist
    typed = as_peaklist([{"range": [7.35, 7.20], "integral": 5, "multiplicity": "m"}, {"shift": 2.35, "integral": 3}],
                        "CDCl3", "1H")
    assert not any(p.solvent for p in typed.peaks)
    bare = as_peaklist([{"range": [7.35, 7.20], "multiplicity": "m"}, {"shift": 7.26}, {"shift": 2.35}], "CDCl3", "1H")
    assert [p.shift for p in bare.peaks if p.solvent] == [7.26]
    listed = parse_peaks("7.26 1H s\n7.35-7.20 m\n2.35 3H s\n", nucleus="1H", solvent="CDCl3")
    assert not any(p.solvent for p in listed.peaks)
    # an instrument's integration that took in the residual DMSO line: 0.4 beside 0.96 for one H is less
    # than half a proton, so the line stays set aside (the demo's QC bottle list)
    raw = parse_peaks("2.50 0.4 m\n3.78 3.1 s\n6.85 2.0 d\n10.31 0.96 br\n", nucleus="1H", solvent="DMSO-d6")
    assert [p.shift for p in raw.peaks if p.solvent] == [2.50]


def test_plain_1h_lines_as_people_type_them():
    # integrals with their unit in any position, 'J =' and 'Hz', a field list in brackets
    pl = parse_peaks("7.45 (dd, J = 8.9, 1.8 Hz, 1H)\n3.40 2 H q J=7.1 Hz\n1.20 t 7.1 3H\n", nucleus="1H")
    got = [(p.shift, p.multiplicity, p.intensity, p.j) for p in pl.peaks]
    assert got == [(1.2, "t", 3.0, (7.1,)), (3.4, "q", 2.0, (7.1,)), (7.45, "dd", 1.0, (8.9, 1.8))]
    with pytest.raises(InputError, match="line 1: expected 'shift-or-range"):
        parse_peaks("7.45 2H 3H d\n", nucleus="1H")


@pytest.mark.parametrize("text,fragment", [
    ("12x.5\n", "line 1: shift '12x.5' is not a number"),
    ("10\n300\n", "line 2: shift 300 ppm is outside"),
    ("10 CH5\n", "multiplicity 'CH5'"),
    ("", "empty"),
    ("nan\n", "not a finite number"),
    ('[{"ppm": 3}]', "no 'shift' field"),
    ("shift,mult\n,CH\n", "line 2: missing shift"),
])
def test_bad_peaks_name_line_and_problem(text, fragment):
    with pytest.raises(InputError, match=fragment):
        parse_peaks(text)


def test_1h_range():
    with pytest.raises(InputError, match="1H range"):
        parse_peaks("20.0\n", nucleus="1H")


@settings(max_examples=300, deadline=None)
@given(st.text(max_size=80))
def test_random_text_never_crashes_peak_parser(text):
    try:
        pl = parse_peaks(text)
    except InputError:
        return
    assert all(-20 <= p.shift <= 250 for p in pl.peaks)


def test_a_bad_record_names_its_field_and_entry():
    from shiftrank.inputs.peaks import peaks_from_records

    with pytest.raises(InputError, match="'peaks_1h' entry 2: expected a number or an object with 'shift'"):
        peaks_from_records([7.26, "x"], "peaks_1h", "1H")


def test_plain_1h_line_takes_br_s_written_with_a_space():
    # 'br s' is how chemists write a broad singlet (common practice); typed with a space in a plain list it is
    # one multiplicity, not two words
    for line in ("1.90 1 br s", "1.90 1 br. s", "1.90 1 broad s"):
        p = parse_peaks(line, nucleus="1H").peaks[0]
        assert (p.multiplicity, p.intensity) == ("br s", 1.0)
    with pytest.raises(InputError, match="line 1"):
        parse_peaks("1.90 1 s d", nucleus="1H")


def test_a_peak_file_holding_a_printed_paragraph_is_read_as_text(tmp_path):
    # the 1H paragraph printed for 2-(2-bromophenyl)-N-methoxy-N-methylacetamide (PMC9033937), saved as a
    # peak file: read by the text reader, not refused as a malformed CSV
    f = tmp_path / "sample.txt"
    f.write_text("1H NMR (400 MHz, chloroform-d) δ 7.56 (d, J = 7.8 Hz, 1H), 7.31–7.22 (m, 2H), 7.16–7.08 (m, 1H), "
                 "3.93 (s, 2H), 3.70 (s, 3H), 3.22 (s, 3H)\n")
    pl = read_peaks(f, "1H")
    assert [p.intensity for p in pl.peaks] == [3, 3, 2, 1, 2, 1] and "printed characterisation text" in pl.notes[0]
    with pytest.raises(InputError, match="without a 13C section \\(it has 1H\\); give it as printed text \\(--text"):
        read_peaks(f, "13C")


def test_a_line_of_shifts_copied_without_its_header_is_one_peak_per_value():
    # a printed 13C list copied from the values on (common practice in notebooks); two numbers stay
    # 'shift intensity', and a value outside the nucleus' range keeps the line the old form
    pl = parse_peaks("166.6, 150.1; 137.6 121.9\n55.6\n", "pasted")
    assert [p.shift for p in pl.peaks] == [55.6, 121.9, 137.6, 150.1, 166.6]
    assert [(p.shift, p.intensity) for p in parse_peaks("128.4, 1200").peaks] == [(128.4, 1200.0)]
    with pytest.raises(InputError, match="line 1: expected 'shift"):
        parse_peaks("20.1 30.2 40.3 CH")


def test_solvents_beyond_fulmer_and_mixtures_set_aside_their_lines():
    # pyridine-d5 13C 150.35, 135.91, 123.87 and DMF-d7 163.15, 34.89, 29.76 as commonly tabulated (from
    # memory); a mixture printed 'CDCl3/CD3OD (9:1)' sets aside both solvents' lines (Fulmer 2010 values)
    assert normalise_solvent("pyridine-d5") == "pyridine-d5" and normalise_solvent("C5D5N") == "pyridine-d5"
    assert normalise_solvent("DMF-d7") == "DMF-d7" and normalise_solvent("CD3SOCD3") == "DMSO-d6"
    pl = parse_peaks("150.4\n135.9\n123.9\n128.7\n", solvent="pyridine-d5")
    assert [p.shift for p in pl.peaks if p.solvent] == [123.9, 135.9, 150.4]
    key = normalise_solvent("CDCl3/CD3OD (9:1)")
    assert key == "CDCl3 + CD3OD" and normalise_solvent("CDCl3 + 1 drop CD3OD") == key
    pl = parse_peaks("170.1\n77.2\n49.0\n21.3\n", solvent=key)
    assert [p.shift for p in pl.peaks if p.solvent] == [49.0, 77.2]


def test_spreadsheet_peak_tables_with_units_in_the_header_and_semicolons():
    # column headers as spreadsheets and instrument exports write them ('Shift (ppm)', 'Integral', 'Mult.'),
    # comma- or (European locale) semicolon-separated (common practice)
    pl = parse_peaks("Shift (ppm),Intensity,Type\n166.6,120,C\n55.6,900,CH3\n")
    assert [(p.shift, p.multiplicity) for p in pl.peaks] == [(55.6, "CH3"), (166.6, "C")]
    h1 = parse_peaks("ppm;Integral;Mult.\n7.28;1;dd\n3.84;3;s\n", nucleus="1H")
    assert [(p.shift, p.intensity, p.multiplicity) for p in h1.peaks] == [(3.84, 3.0, "s"), (7.28, 1.0, "dd")]
    # the same locale writes decimal commas; with semicolons or tabs between cells they are unambiguous
    eu = parse_peaks("ppm;Intensity\n166,6;120\n55,6;900\n")
    assert [(p.shift, p.intensity) for p in eu.peaks] == [(55.6, 900.0), (166.6, 120.0)]
    assert [p.shift for p in parse_peaks("ppm\tIntegral\n7,28\t1\n3,84\t3\n", nucleus="1H").peaks] == [3.84, 7.28]


def test_a_1h_list_given_as_13c_and_the_reverse_are_named_as_such():
    # 13C lines of organic compounds spread over 0-220 ppm, 1H lines over 0-12 (common practice): a list of
    # 1H values given as the 13C peaks is refused with the option to use, not ranked into nonsense
    import shiftrank
    with pytest.raises(shiftrank.InputError, match="is this a 1H list"):
        shiftrank.rank(peaks=[8.05, 6.40, 3.78, 3.65], candidates=["Clc1nccc(N2CCOCC2)n1"])
    with pytest.raises(shiftrank.InputError, match="is this a 13C list"):
        shiftrank.rank(peaks_1h=[162.9, 161.0, 157.5, 101.5], candidates=["Clc1nccc(N2CCOCC2)n1"])
    # two values below 12.5 ppm can be a real 13C list's aliphatic part
    r = shiftrank.rank(peaks=[10.2, 11.9], candidates=["CCC"])
    assert r.candidates[0].error is None


def test_a_13c_list_with_signed_intensities_is_a_dept135_list():
    # DEPT-135: CH2 lines point down, CH and CH3 up, quaternary carbons are absent (common practice); an
    # exported list keeps the signs (values invented for the check)
    pl = parse_peaks("131.5 100\n115.4 95\n66.3 -80\n44.4 -75\n55.3 60\n", "dept.txt")
    got = {p.shift: p.multiplicity for p in pl.peaks}
    assert got == {131.5: "CH/CH3", 115.4: "CH/CH3", 66.3: "CH2", 44.4: "CH2", 55.3: "CH/CH3"}
    assert pl.dept135 and all(p.intensity > 0 for p in pl.peaks) and any("DEPT-135" in n for n in pl.notes)
    # ranked, the quaternary carbons a DEPT-135 list cannot show are not missed: 4-(4-methoxyphenyl)morpholine
    import shiftrank
    r = shiftrank.rank(peaks=[{"shift": 118.0, "intensity": 90}, {"shift": 114.5, "intensity": 95},
                              {"shift": 67.0, "intensity": -80}, {"shift": 50.8, "intensity": -70},
                              {"shift": 55.5, "intensity": 60}], candidates=["COc1ccc(N2CCOCC2)cc1"])
    res = r.candidates[0].nuclei["13C"]
    assert res.assignment.parts["missing"] <= 2.5 and not any("expects" in f for f in res.flags)
    # a negative 1H integral is still an error
    with pytest.raises(InputError, match="negative"):
        parse_peaks("7.26 -2 d\n", "h.txt", "1H")


def test_a_dept135_list_gives_a_13c_list_its_multiplicities(tmp_path):
    # 13C{1H} and DEPT-135 of one sample (common practice: a 13C line without a DEPT-135 line is quaternary,
    # a negative one CH2, a positive one CH or CH3); values invented for the check
    from shiftrank.inputs.peaks import merge_dept135
    c = parse_peaks("170.1\n131.5\n66.3\n21.0\n", "c13.txt")
    d = parse_peaks("131.6 100\n66.3 -80\n21.0 60\n45.0 -20\n", "dept.txt")
    m = merge_dept135(c, d)
    assert [(p.shift, p.multiplicity) for p in m.peaks] == [(21.0, "CH/CH3"), (66.3, "CH2"), (131.5, "CH/CH3"), (170.1, "C")]
    assert any("45" in n and "without a 13C line" in n for n in m.notes)
    # a DEPT-135 list of shifts only: its lines are protonated carbons of unknown kind, the others quaternary
    m2 = merge_dept135(c, parse_peaks("131.6\n66.3\n21.0\n", "d.txt"))
    assert [p.multiplicity for p in m2.peaks] == [None, None, None, "C"]
    # on the command line, --dept135 needs --peaks
    (tmp_path / "c.txt").write_text("170.1\n131.5\n66.3\n21.0\n")
    (tmp_path / "d.txt").write_text("131.6 100\n66.3 -80\n21.0 60\n")
    import subprocess, sys
    run = lambda *a: subprocess.run([sys.executable, "-m", "shiftrank.cli", *a], capture_output=True, text=True)
    ok = run("rank", "--peaks", str(tmp_path / "c.txt"), "--dept135", str(tmp_path / "d.txt"), "--candidates",
             "CC(=O)OCc1ccccc1", "--json")
    assert ok.returncode == 0, ok.stderr
    bad = run("rank", "--dept135", str(tmp_path / "d.txt"), "--candidates", "CCO", "--peaks-1h", str(tmp_path / "d.txt"))
    assert bad.returncode == 2 and "--peaks too" in bad.stderr


def test_the_peaks_command_shows_every_section_of_a_paragraph_and_reads_a_1h_list_as_1h(tmp_path):
    # PMC6268426 (literature_dev.jsonl.gz, dev half): its 1H and 13C paragraphs, 9 and 14 lines as printed
    from shiftrank.inputs.peaks import read_peak_lists
    p = tmp_path / "sample.txt"
    p.write_text("1H-NMR δ: 3.73 (s, 3H, OCH3), 3.74 (s, 3H, OCH3), 5.28 (d, 1H, J = 2.4 Hz, CH), 6.78−6.80 (dd, 1H, "
                 "J = 2.4 Hz, J = 8.0 Hz, H6'), 6.93 (d, 1H, J = 2.0 Hz, H2'), 6.94 (d, 1H, J = 8.4 Hz, H5'), 7.18 (s, 2H, "
                 "NH2), 7.70 (s, 1H, CH, H6), 8.69 (d, 1H, J = 2.4 Hz, NH)\n13C-NMR δ: 53.63, 55.36, 55.43, 55.96, 110.11, "
                 "111.57, 118.13, 118.98, 135.25, 146.93, 148.51, 148.63, 151.72, 153.83\n", encoding="utf-8")
    lists = read_peak_lists(p)
    assert [(pl.nucleus, len(pl.peaks)) for pl in lists] == [("13C", 14), ("1H", 9)]
    assert [pl.nucleus for pl in read_peak_lists(p, "1H")] == ["1H"]
    # a plain list whose values all lie below 12.5 ppm is a 1H list (common practice: 13C spreads over 0-220 ppm)
    q = tmp_path / "h.txt"
    q.write_text("7.68 2 d\n6.81 2 d\n2.89 3 s\n", encoding="utf-8")
    (pl,) = read_peak_lists(q)
    assert pl.nucleus == "1H" and "read as a 1H list" in pl.notes[0]
    assert read_peak_lists(q, "13C")[0].nucleus == "13C"



def test_a_1h_list_typed_shift_multiplicity_integral_reads_the_number_as_the_integral():
    # PMC6268426's lines (literature_dev.jsonl.gz) typed 'shift multiplicity integral': a singlet has no J (common
    # practice), so the one whole number after the letters is the integral
    pl = parse_peaks("3.73 s 3\n5.28 d 1\n6.93 d 1\n7.70 s 1\n", nucleus="1H")
    assert [p.intensity for p in pl.peaks] == [3, 1, 1, 1] and all(p.j == () for p in pl.peaks)
    assert "shift multiplicity integral" in pl.notes[0]
    # without a singlet or multiplet the number after a doublet's letter stays its J (2.4 Hz meta, 8 Hz ortho)
    pl = parse_peaks("6.93 d 2\n6.94 d 8\n", nucleus="1H")
    assert [p.j for p in pl.peaks] == [(2.0,), (8.0,)] and [p.intensity for p in pl.peaks] == [None, None]
