"""A sample's peaks against a reference spectrum (`compare`).

Values from memory: methyl 4-hydroxybenzoate 13C in DMSO-d6 166.1, 162.0, 131.5 (2C), 120.4, 115.4 (2C), 51.8;
its 3-hydroxy isomer 166.4, 157.6, 131.1, 129.8, 120.2, 119.8, 115.7, 52.1; 4-ethylanisole 1H in CDCl3 7.10 (d,
2H), 6.83 (d, 2H), 3.79 (s, 3H), 2.59 (q, 2H), 1.21 (t, 3H).  The tolerances (13C 0.5, 1H 0.05 ppm for spectra in
one solvent) are common practice.
"""
from __future__ import annotations

import json
import subprocess
import sys

import pytest

from shiftrank.errors import InputError
from shiftrank.inputs.peaks import parse_peaks
from shiftrank.inputs.text import read_nmr_text
from shiftrank.score.reference import compare_spectra

PARA = "166.1\n162.0\n131.5\n120.4\n115.4\n51.8\n"
META = "166.4\n157.6\n131.1\n129.8\n120.2\n119.8\n115.7\n52.1\n"
ANISOLE = ("1H NMR (400 MHz, CDCl3) δ 7.10 (d, J = 8.6 Hz, 2H), 6.83 (d, J = 8.6 Hz, 2H), 3.79 (s, 3H), "
           "2.59 (q, J = 7.6 Hz, 2H), 1.21 (t, J = 7.6 Hz, 3H)")


def test_same_compound_with_an_offset_and_an_impurity_is_consistent():
    sample = parse_peaks("\n".join(f"{float(x) + 0.25:.2f}" for x in PARA.split()) + "\n30.9\n")
    c = compare_spectra(sample, parse_peaks(PARA))
    assert c.consistent and c.offset == pytest.approx(0.25, abs=0.01)
    assert c.extra == [30.9] and not c.missing
    assert "consistent with the reference: all 6" in c.verdict() and "1 further sample line" in c.verdict()


def test_positional_isomer_is_not_consistent():
    c = compare_spectra(parse_peaks(META), parse_peaks(PARA))
    # at 0.5 ppm most lines of the 3-hydroxy isomer find a partner: the C–OH carbon (162.0 against 157.6) does
    # not, and three sample lines have none
    assert not c.consistent and c.missing == [162.0] and c.extra == [119.8, 129.8, 157.6]
    assert c.verdict() == ("not consistent with the reference: 1 of 6 reference signals not found within 0.5 ppm; "
                           "3 sample lines without a reference line")


def test_1h_pairs_compare_multiplets_and_integrals():
    ref = read_nmr_text(ANISOLE).peaklist("1H")
    same = read_nmr_text(ANISOLE.replace("7.10", "7.11").replace("3.79", "3.78")).peaklist("1H")
    assert compare_spectra(same, ref).consistent
    odd = read_nmr_text(ANISOLE.replace("1.21 (t, J = 7.6 Hz, 3H)", "1.21 (d, J = 7.6 Hz, 6H)")).peaklist("1H")
    c = compare_spectra(odd, ref)
    assert not c.consistent
    note = next(p.note for p in c.pairs if p.reference == pytest.approx(1.21))
    assert "multiplet d against t" in note and "integral" in note


def test_errors_name_the_problem():
    with pytest.raises(InputError, match="tolerance"):
        compare_spectra(parse_peaks(PARA), parse_peaks(PARA), tolerance=-1)
    with pytest.raises(InputError, match="13C list and the reference a 1H list"):
        compare_spectra(parse_peaks(PARA), read_nmr_text(ANISOLE).peaklist("1H"))


def test_cli_json_and_exit_codes(tmp_path):
    s, r = tmp_path / "s.txt", tmp_path / "r.txt"
    s.write_text(META)
    r.write_text(PARA)
    run = lambda *a: subprocess.run([sys.executable, "-m", "shiftrank.cli", "compare", *a], capture_output=True, text=True)
    out = run("--sample", str(s), "--reference", str(r), "--json")
    assert out.returncode == 0, out.stderr
    obj = json.loads(out.stdout)
    assert obj["consistent"] is False and obj["missing"]
    bad = run("--sample", str(s))
    assert bad.returncode == 2 and "--reference" in bad.stderr and "Traceback" not in bad.stderr


def test_a_broad_nh_line_pairs_within_its_own_tolerance():
    # 4-methoxyaniline-like NH2 (own choice; an NH2 near 4.6 in DMSO-d6 from memory), printed 'br s' in the
    # sample and 's' in the reference, 0.2 ppm apart: exchangeable protons move with concentration and water
    # (common practice), so the pair holds and is no multiplet difference
    ref = read_nmr_text("1H NMR (400 MHz, DMSO-d6) δ 6.64 (d, J = 8.8 Hz, 2H), 6.50 (d, J = 8.8 Hz, 2H), "
                        "4.58 (s, 2H), 3.61 (s, 3H)").peaklist("1H")
    smp = read_nmr_text("1H NMR (400 MHz, DMSO-d6) δ 6.64 (d, J = 8.8 Hz, 2H), 6.51 (d, J = 8.8 Hz, 2H), "
                        "4.78 (br s, 2H), 3.61 (s, 3H)").peaklist("1H")
    c = compare_spectra(smp, ref)
    assert c.consistent and not c.extra
    nh = next(p for p in c.pairs if p.reference == pytest.approx(4.58))
    assert nh.broad and nh.note == "" and "broad NH/OH lines within 0.5 ppm, largest 0.20 ppm" in c.verdict()
    # a sharp CH line 0.2 ppm away is still no pair
    moved = read_nmr_text("1H NMR (400 MHz, DMSO-d6) δ 6.64 (d, J = 8.8 Hz, 2H), 6.51 (d, J = 8.8 Hz, 2H), "
                          "4.58 (br s, 2H), 3.81 (s, 3H)").peaklist("1H")
    assert compare_spectra(moved, ref).missing == [3.61]


def test_cli_compares_each_nucleus_two_printed_texts_hold(tmp_path):
    para_1h = "1H NMR (400 MHz, DMSO-d6) δ 10.3 (br s, 1H), 7.80 (d, J = 8.7 Hz, 2H), 6.85 (d, J = 8.7 Hz, 2H), 3.78 (s, 3H)"
    s, r = tmp_path / "s.txt", tmp_path / "r.txt"
    s.write_text(para_1h + "; 13C NMR (101 MHz, DMSO-d6) δ " + PARA.replace("\n", ", ").rstrip(", ") + ".")
    r.write_text(para_1h.replace("7.80", "7.81") + "; 13C NMR (101 MHz, DMSO-d6) δ " + PARA.replace("\n", ", ").rstrip(", ") + ".")
    run = lambda *a: subprocess.run([sys.executable, "-m", "shiftrank.cli", "compare", *a], capture_output=True, text=True)
    out = run("--sample-text", str(s), "--reference-text", str(r), "--json")
    assert out.returncode == 0, out.stderr
    objs = [json.loads(x) for x in out.stdout.splitlines()]
    assert [(o["nucleus"], o["consistent"]) for o in objs] == [("13C", True), ("1H", True)]
    r.write_text("13C NMR (101 MHz, DMSO-d6) δ " + PARA.replace("\n", ", ").rstrip(", ") + ".")
    out = run("--sample-text", str(s), "--reference-text", str(r))
    assert out.returncode == 0 and out.stdout.startswith("13C: consistent") and "1H: not compared" in out.stderr
    out = run("--sample-text", str(s), "--reference-text", str(r), "--nucleus", "1H")
    assert out.returncode == 2 and "prints no 1H peaks" in out.stderr


def test_cli_two_1h_peak_files_without_a_nucleus_are_compared_as_1h(tmp_path):
    # 1H lines lie within 0-12.5 ppm, 13C lines of organic compounds over 0-220 ppm (common practice): two
    # files of 1H values are compared with the 1H tolerance, a 1H file against a 13C file is refused
    s, r, c = tmp_path / "s.txt", tmp_path / "r.txt", tmp_path / "c.txt"
    s.write_text("8.05\n6.40\n3.78\n3.65\n")
    r.write_text("8.07\n6.41\n3.79\n3.55\n")
    c.write_text("162.9\n161.0\n157.5\n101.5\n")
    run = lambda *a: subprocess.run([sys.executable, "-m", "shiftrank.cli", "compare", *a], capture_output=True, text=True)
    out = run("--sample", str(s), "--reference", str(r), "--json")
    assert out.returncode == 0, out.stderr
    obj = json.loads(out.stdout)
    assert obj["nucleus"] == "1H" and obj["consistent"] is False    # 3.55 against 3.65: beyond the 1H tolerance
    assert "compared as 1H" in out.stderr
    mixed = run("--sample", str(s), "--reference", str(c))
    assert mixed.returncode == 2 and "is this a 1H list" in mixed.stderr and "Traceback" not in mixed.stderr


def test_further_sample_lines_of_a_solvent_residue_are_named():
    # acetone in DMSO-d6: 206.31 and 30.56 ppm (Fulmer et al. 2010, Table 2; values recalled from memory)
    sample = parse_peaks(PARA + "206.3\n30.6\n", solvent="DMSO-d6")
    c = compare_spectra(sample, parse_peaks(PARA, solvent="DMSO-d6"))
    assert c.consistent and c.extra == [30.6, 206.3]
    assert any("206.3, 30.6 are where acetone shows in DMSO-d6" in n for n in c.notes)
    # without a solvent the residue cannot be named
    assert not any("acetone" in n for n in compare_spectra(parse_peaks(PARA + "206.3\n30.6\n"), parse_peaks(PARA)).notes)
