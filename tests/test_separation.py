"""The lines that separate the best candidate from the runner-up.

Spectra: ethyl acetate's HSQC cross peaks from the 1H and 13C of Fulmer et al. 2010 (Organometallics 29, 2176;
from memory, as in test_hsqc.py); 1-methylindazole, 13C in CDCl3 (values from memory: C3 132.7, C3a 124.0, C4 121.0, C5 120.4, C6 126.2,
C7 108.8, C7a 139.8, NCH3 35.4); ethyl 4-methoxybenzoate, 1H and 13C as a printed paragraph (values from memory).
"""
import json

import pytest

from shiftrank import rank
from shiftrank.score.separation import separating_signals

INDAZOLE_13C = [132.7, 124.0, 121.0, 120.4, 126.2, 108.8, 139.8, 35.4]
N1, N2 = "Cn1ncc2ccccc21", "Cn1cc2ccccc2n1"
ANISATE = ("1H NMR (400 MHz, CDCl3) δ 7.95 (d, J = 8.8 Hz, 2H), 6.92 (d, J = 8.8 Hz, 2H), 4.35 (q, J = 7.1 Hz, 2H), "
           "3.86 (s, 3H), 1.38 (t, J = 7.1 Hz, 3H). 13C NMR (101 MHz, CDCl3) δ 166.4, 163.3, 131.6, 122.9, 113.6, 60.7, "
           "55.4, 14.4.")


@pytest.mark.parametrize("kwargs", [
    {"peaks": INDAZOLE_13C, "candidates": [N1, N2]},
    {"text": ANISATE, "candidates": ["CCOC(=O)c1ccc(OC)cc1", "CCOC(=O)c1cccc(OC)c1", "CCOC(=O)c1ccccc1OC"]},
    {"hsqc": [[21.04, 2.05], [60.49, 4.12], [14.19, 1.26]], "peaks": [171.36, 60.49, 21.04, 14.19],
     "candidates": ["CCOC(C)=O", "CCC(=O)OC"]},
])
def test_the_shares_of_all_lines_add_up_to_the_score_difference(kwargs):
    # the probabilities' ratio of #1 and #2 is e to the sum of the shares (no priors given)
    r = rank(**kwargs)
    shares = separating_signals(r.best, r.runner_up, limit=None, min_share=0.0)
    assert {s.nucleus for s in shares} == set(r.nuclei)
    assert sum(s.share for s in shares) == pytest.approx(r.best.score - r.runner_up.score, abs=1e-6)
    assert r.best.probability / r.runner_up.probability == pytest.approx(
        2.718281828 ** sum(s.share for s in shares), rel=1e-4)


def test_n1_against_n2_methylindazole_is_told_by_c3_and_c7():
    # the carbons chemists compare to tell 1- from 2-alkylindazoles: C3 (about 133 against 123 ppm) and C7 (about
    # 109 against 117) (common practice; values from memory)
    r = rank(peaks=INDAZOLE_13C, candidates=[N2, N1])
    assert r.best.smiles == N1
    top = r.separation()
    assert {s.line for s in top[:2]} == {"132.7", "108.8"}
    assert all(s.share > 0 for s in top[:2]) and all(s.nucleus == "13C" and s.kind == "line" for s in top)
    assert "4.1σ" in " ".join(top[0].second + top[1].second)   # the runner-up's misfit is named


def test_separation_is_shown_in_the_table_json_and_report(tmp_path):
    r = rank(peaks=INDAZOLE_13C, candidates=[N1, N2])
    assert f"What separates #1 ({N1}) from #2 ({N2}) most" in str(r)
    d = r.to_dict()
    assert d["separation"]["first"] == N1 and d["separation"]["second"] == N2
    top = d["separation"]["signals"][0]
    assert top["ln_odds"] > 0 and top["first_classes"][0]["atoms"] and top["second_classes"][0]["predicted"] > 100
    json.dumps(d)
    html_text = r._repr_html_()
    assert "What separates #1 from #2 most" in html_text and "a larger disc and * before the number" in html_text
    # one candidate: nothing to separate
    one = rank(peaks=INDAZOLE_13C, candidates=[N1])
    assert one.separation() == [] and "separation" not in one.to_dict()
    assert "What separates" not in str(one)


def test_next_measurement_is_suggested_only_when_the_first_two_stay_close():
    # 1H of 1-methylindazole in CDCl3 (from memory): H3 7.98 s, H4 7.72 d, H6/H7 7.40 m, H5 7.15 m, NCH3 4.07 s
    text = ("1H NMR (400 MHz, CDCl3) δ 7.98 (s, 1H), 7.72 (d, J = 8.1 Hz, 1H), 7.42–7.35 (m, 2H), 7.15 (m, 1H), "
            "4.07 (s, 3H).")
    r = rank(text=text, candidates=[N1, N2])
    r.candidates[0].probability, r.candidates[1].probability = 0.6, 0.4   # as if the 1H lines left them close
    hints = r.next_spectrum()
    # the two differ most at C3 (about 133 against 123 ppm) or C7 (about 109 against 117) (common practice)
    assert len(hints) == 3 and hints[0].startswith("a 13C spectrum would likely tell #1 and #2 apart")
    assert "(predictions)" in hints[0]
    # and an HMBC by the N-methyl's correlations: in the N2 isomer H3 is three bonds from the N-CH3 carbon (H3-C3-N2-C),
    # in the N1 isomer four (common practice: the N-alkyl's HMBC to C3 or to C7a tells N1 from N2)
    assert hints[1].startswith("an HMBC would likely tell #1 and #2 apart: #2 predicts a cross peak")
    assert "(the H on atom 2 to C atom 0, 3 bonds)" in hints[1]
    # and a NOESY by the N-CH3's neighbour in space: H7, a doublet, in the N1 isomer (common practice)
    assert hints[2].startswith("a NOESY or ROESY would likely tell #1 and #2 apart: #1 places the H on atom 0")
    assert "next measurement: a 13C spectrum" in str(r)
    r.candidates[0].probability = 0.95
    assert r.next_spectrum() == []
    # both 1D spectra given and still close: 2D correlations are named (common practice)
    both = rank(peaks=INDAZOLE_13C, peaks_1h=[7.98, 7.72, 7.40, 7.15, 4.07], candidates=[N1, N2])
    both.candidates[0].probability = 0.7
    assert "HMBC" in both.next_spectrum()[0]


def test_a_19f_count_is_suggested_when_the_two_differ_in_fluorine_environments():
    # 3,5- against 2,4-difluoroanisole: one fluorine environment against two (symmetry, common practice); 1H of the
    # 3,5-isomer as a rough list (values from memory); not suggested once a 19F section is printed
    h1 = [{"shift": 6.42, "integral": 3, "multiplicity": "m"}, {"shift": 3.78, "integral": 3, "multiplicity": "s"}]
    r = rank(peaks_1h=h1, candidates=["COc1cc(F)cc(F)c1", "COc1ccc(F)cc1F"])
    r.candidates[0].probability = 0.6
    hints = r.next_spectrum()
    assert any(h.startswith("a 19F spectrum would tell #1 and #2 apart by its count") for h in hints)
    text = "1H NMR (400 MHz, CDCl3) δ 6.42 (m, 3H), 3.78 (s, 3H). 19F NMR (376 MHz, CDCl3) δ −109.5."
    r = rank(text=text, candidates=["COc1cc(F)cc(F)c1", "COc1ccc(F)cc1F"])
    r.candidates[0].probability = 0.6
    assert not any("19F" in h for h in r.next_spectrum())


def test_a_dept_135_is_suggested_when_the_two_differ_in_chn():
    # C- against O-methylation of pentane-2,4-dione: 3-methylpentane-2,4-dione (keto form, 13C from memory: 204.5,
    # 61.5, 28.9, 12.7) has a CH where 4-methoxypent-3-en-2-one has an =CH and one more C and CH3 (common practice)
    r = rank(peaks=[204.5, 61.5, 28.9, 12.7], candidates=["CC(=O)C(C)C(C)=O", "COC(C)=CC(C)=O"])
    r.candidates[0].probability = 0.6
    hints = r.next_spectrum()
    assert hints[0] == ("a DEPT-135 (or an edited HSQC) would tell #1 and #2 apart: #1 has 1 C, 1 CH, 2 CH3 signals, "
                        "#2 2 C, 1 CH, 3 CH3")
    # with multiplicities given there is nothing a DEPT would add
    typed = rank(peaks=[{"shift": 204.5, "multiplicity": "C"}, {"shift": 61.5, "multiplicity": "CH"},
                        {"shift": 28.9, "multiplicity": "CH3"}, {"shift": 12.7, "multiplicity": "CH3"}],
                 candidates=["CC(=O)C(C)C(C)=O", "COC(C)=CC(C)=O"])
    typed.candidates[0].probability = 0.6
    assert not any("DEPT" in h for h in typed.next_spectrum())


def test_the_runner_up_is_another_compound():
    # the 1-methylindazole list (values from memory) with N1 given twice and once as its N2 isomer: #2 in the
    # separation is the N2 isomer, not the second copy of #1
    r = rank(peaks=INDAZOLE_13C, candidates=[N1, "n1(C)ncc2ccccc21", N2])
    assert r.runner_up.smiles == N2
    assert {s.line for s in r.separation()[:2]} == {"132.7", "108.8"}
