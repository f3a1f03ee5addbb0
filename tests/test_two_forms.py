"""Spectra of two forms: amide/carbamate rotamers and isomer mixtures, whose lists print most signals twice.

The paragraphs are quoted verbatim from PMC6225218 (an N-Boc azacycle whose spectra the authors report
as a 'mixture of rotamers') and PMC6264494 ('from the mixture of isomers', slash pairs), as extracted in
the NMRExtractor data set (eat-sugar/NMRExtractor, MIT licence).  That a carbamate's slow C–N rotation
doubles its 13C and 1H lines a few tenths of a ppm apart is common practice.  The n-butyl, sec-butyl and
isobutyl carbamates are our own alternatives: same formula, fewer equivalent carbons than tert-butyl, so a
doubled list with flat costs for unexplained lines favours them.
"""
from __future__ import annotations

import json

import pytest

import shiftrank
from shiftrank.chem.inventory import take_inventory
from shiftrank.errors import InputError
from shiftrank.inputs.text import read_nmr_text

H1 = ("1H-NMR (CDCl3, 500 MHz, mixture of rotamers) δ 5.51–5.42 (m, 1H), 5.20–5.13 (m, 1H), 3.71 (m, 0.5H), "
      "3.61 (s, 3H), 3.20 (br s, 0.5H), 3.11–3.10 (m, 1H), 2.82 (dd, J = 15.0, 8.8 Hz, 0.5H), 2.53–2.47 (m, 1H), "
      "2.43–2.37 (m, 0.5H), 2.31–2.26 (m, 1.5H), 2.19 (br s, 0.5H), 2.08 (br s, 0.5H), 1.98–1.89 (m, 1.5H), "
      "1.83–1.76 (m, 1H), 1.67–1.62 (m, 1H), 1.45–1.39 (m, 10.5H), 1.36–1.29 (m, 1.5H), 1.27–1.15 (m, 2H), "
      "0.93 (t, J = 12.2 Hz, 1H), 0.82 (t, J = 7.4 Hz, 3H)")
C13 = ("13C-NMR (CDCl3, 150 MHz, mixture of rotamers) δ 173.0, 172.4, 155.3, 155.0, 135.2, 134.6, 131.5, 130.9, "
       "79.6, 78.9, 64.4, 56.0, 51.6, 51.4, 48.3, 48.1, 40.3, 38.5, 35.9, 35.8, 34.4, 34.1, 33.5, 31.6, 30.6, 29.2, "
       "28.6, 28.5, 28.4, 25.6, 22.6, 14.0, 12.2")
TRUTH = "CC[C@@H]1/C=C\\CC[C@@H](CC(=O)OC)N(C(=O)OC(C)(C)C)CCC1"
ALTERNATIVES = ["CC[C@@H]1/C=C\\CC[C@@H](CC(=O)OC)N(C(=O)OCCCC)CCC1",
                "CC[C@@H]1/C=C\\CC[C@@H](CC(=O)OC)N(C(=O)OC(C)CC)CCC1",
                "CC[C@@H]1/C=C\\CC[C@@H](CC(=O)OC)N(C(=O)OCC(C)C)CCC1"]
# PMC6264494, its 13C paragraph (slash pairs of the two forms)
SLASHED = ("13C-NMR from the mixture of isomers (100.6 MHz, CDCl3): δ 171.8, 171.4, 156.3/155.5, 135.6, 134.1, 129.1, "
           "128.1, 81.7 (t-Bu), 63.4 (SiCH2CH2O), 60.7 (α-CH-Pro), 51.7/51.1 (α-CH-Leu), 47.3/ 46.7(β-CH2-Pro), 41.7 "
           "(β-CH2-Leu), 30.9, 28.2, 28.0 (t-Bu), 25.0, 24.6, 23.7, 22.9, 22.2, 14.9")


def _values(text: str) -> list[float]:
    return [p.shift for p in read_nmr_text(text).section("13C").peaks]


def test_reader_finds_what_the_text_says_about_two_forms():
    assert read_nmr_text(C13).section("13C").doubled == "mixture of rotamers"
    assert read_nmr_text(SLASHED).section("13C").doubled == "mixture of isomers"
    # said once, for the paragraph: the other nucleus's section inherits it
    both = read_nmr_text(H1 + "\n" + C13.replace(", mixture of rotamers", ""))
    assert both.section("13C").doubled == "mixture of rotamers"
    # ordinary text says nothing of the kind
    plain = read_nmr_text("13C NMR (101 MHz, CDCl3) δ 170.1, 128.4, 21.3; 1H NMR δ 7.26 (d, J = 8.4 Hz, 2H)")
    assert all(s.doubled is None for s in plain.sections)
    assert read_nmr_text("13C NMR (CDCl3) δ 171.2, 170.9 (rotamers), 52.1").section("13C").doubled == "rotamer"


def test_slash_pairs_and_close_lines_are_marked():
    pl = read_nmr_text(SLASHED).peaklist("13C")
    marked = {p.shift for p in pl.peaks if p.doubled}
    assert {156.3, 155.5, 51.7, 51.1, 47.3, 46.7} <= marked
    assert 81.7 not in marked and 63.4 not in marked and 41.7 not in marked   # nothing within 2 ppm
    assert any("two forms" in n for n in pl.notes)


def test_doubled_carbamate_list_ranks_the_tert_butyl_ester_first():
    r = shiftrank.rank(candidates=[TRUTH] + ALTERNATIVES, text=C13)
    assert r.best.smiles == TRUTH
    # the same values without the authors' statement: flat costs for the extra lines favour a less
    # symmetric butyl ester (this is what the statement changes)
    plain = shiftrank.rank(candidates=[TRUTH] + ALTERNATIVES, text=C13.replace(", mixture of rotamers", ""))
    assert plain.best.smiles != TRUTH
    # typed values with rotamers=True read as the statement does
    typed = shiftrank.rank(_values(C13), [TRUTH] + ALTERNATIVES, rotamers=True)
    assert typed.best.smiles == TRUTH
    assert [c.smiles for c in typed.candidates] == [c.smiles for c in r.candidates]


def test_doubled_paragraph_verdict_counts_pairs():
    r = shiftrank.rank(candidates=[TRUTH] + ALTERNATIVES, text=H1 + "\n" + C13)
    assert r.best.smiles == TRUTH
    assert "fit no candidate" not in r.verdict
    flags = " ".join(r.best.flags)
    assert "beside another line" in flags


def test_inventory_pairs_lines_and_sums_shares():
    parsed = read_nmr_text(H1 + "\n" + C13)
    inv = take_inventory(parsed.peaklist("13C"), parsed.peaklist("1H"), "C19H33NO4")
    text = "\n".join(inv.lines())
    # 33 lines, 14 pairs within 2 ppm: 19 signals for the formula's 19 carbons
    assert "leave 19 signals for 19 carbons: consistent" in text
    # the 1H shares (0.5H, 1.5H, 10.5H …) sum to the formula's 33 H instead of being doubled to 66
    assert "sum to 33 H" in text and "1H integrals sum to the formula's 33 H" in text


def test_rotamers_field_is_checked_in_batch(tmp_path):
    cases = tmp_path / "cases.jsonl"
    cases.write_text(json.dumps({"id": "a", "text": C13, "candidates": [TRUTH], "rotamers": "yes"}) + "\n"
                     + json.dumps({"id": "b", "peaks": _values(C13), "candidates": [TRUTH] + ALTERNATIVES,
                                   "rotamers": True}) + "\n")
    from shiftrank.cli import main
    out = tmp_path / "out.jsonl"
    assert main(["batch", str(cases), "-o", str(out)]) == 2   # a bad case is an error line (status 2), the rest still run
    lines = [json.loads(x) for x in out.read_text().splitlines()]
    assert "rotamers" in lines[0]["error"]
    assert lines[1]["ranking"][0]["smiles"] == TRUTH


def test_rotamers_argument_must_be_a_boolean():
    with pytest.raises(InputError, match="rotamers"):
        shiftrank.rank(_values(C13), [TRUTH], rotamers="yes")


def test_lines_of_the_second_form_alone_raise_no_count_flag():
    # tert-butyl 2-(4-fluorophenyl)pyrrolidine-1-carboxylate, 13C printed with its rotamer pairs (values
    # invented in the pattern such paragraphs print): the true structure explains every line but the second
    # form's, so no signal-count flag; a positional isomer still gets one
    from shiftrank.score.ranking import rank
    text = ("13C NMR (101 MHz, CDCl3, mixture of rotamers) δ 161.5 (d, J = 244 Hz), 154.6, 140.8, 127.2 (d, J = 7.9 Hz), "
            "115.1 (d, J = 21.2 Hz), 79.3, 60.5 and 59.9, 47.1 and 46.8, 36.1 and 34.9, 28.5 and 28.2, 23.5 and 23.1.")
    r = rank(text=text, candidates=["CC(C)(C)OC(=O)N1CCCC1c1ccc(F)cc1", "CC(C)(C)OC(=O)N1CCCC1c1cccc(F)c1"])
    best, other = r.candidates
    assert best.smiles == "CC(C)(C)OC(=O)N1CCCC1c1ccc(F)cc1"
    assert not any("expects" in f for f in best.nuclei["13C"].flags)
    assert any("expects" in f for f in other.nuclei["13C"].flags)


def test_values_in_brackets_beside_values_are_a_second_forms_lines():
    # PMC6268300 (dev paragraphs) prints a benzimidazole's minor tautomer after the major one:
    # '144.63 (142.48), 135.52 (133.60), …': each bracketed value is a line of its own, and two or more such
    # pairs say the spectrum shows two forms
    t = ("13C-NMR: δ 152.55, 144.63 (142.48), 135.52 (133.60), 130.15, 129.56, 128.94, 126.50, 122.53 (122.08), "
         "120.02, 118.18, 112.53 (110.92)")
    sec = read_nmr_text(t).section("13C")
    assert len(sec.peaks) == 15 and sec.doubled
    assert {p.shift for p in sec.peaks if p.twin} == {144.63, 142.48, 135.52, 133.60, 122.53, 122.08, 112.53, 110.92}
    assert any("printed in brackets" in n for n in sec.notes)
    # a bracket holding a value far away, or a count, is no twin
    one = read_nmr_text("13C NMR (CDCl3) δ 128.4 (2C), 55.2").section("13C")
    assert [p.shift for p in one.peaks] == [128.4, 55.2] and one.peaks[0].count == 2 and not one.doubled
