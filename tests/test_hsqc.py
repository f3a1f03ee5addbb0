"""HSQC cross peaks: reading them, reading one CH2's two protons as one carbon, and ranking with both
dimensions.

Reference values: ethyl acetate in CDCl3, Fulmer et al. 2010 (Organometallics 29, 2176), table of
common impurities (from memory): 1H 2.05 (CH3CO), 4.12 (OCH2), 1.26 (CH3); 13C 21.04 (CH3CO),
60.49 (OCH2), 14.19 (CH3).
"""
import json

import pytest

from shiftrank.cli import main
from shiftrank.errors import InputError
from shiftrank.inputs.peaks import hsqc_list, read_hsqc
from shiftrank.score.evidence import EVIDENCE
from shiftrank.score.ranking import rank

ETOAC = "CCOC(C)=O"
MEPROP = "CCC(=O)OC"   # methyl propanoate: same formula, CH2 and CH3O swapped roles
FULMER_ETOAC = [[21.04, 2.05], [60.49, 4.12], [14.19, 1.26]]


def test_cross_peaks_are_read_from_pairs_objects_and_files(tmp_path):
    assert hsqc_list([[21.04, 2.05], {"c": 60.49, "h": 4.12}]).pairs == [(21.04, 2.05), (60.49, 4.12)]
    f = tmp_path / "hsqc.txt"
    f.write_text("dC dH\n21.04 2.05\n60.49, 4.12  # OCH2\n14.19;1.26\n")
    assert read_hsqc(f).pairs == [(21.04, 2.05), (60.49, 4.12), (14.19, 1.26)]
    f.write_text("21.04 2.05\n60.49\n")
    with pytest.raises(InputError, match="line 2: expected δC δH"):
        read_hsqc(f)
    with pytest.raises(InputError, match="entry 2: δH 42 ppm is outside"):
        hsqc_list([[21.0, 2.0], [30.0, 42]])
    with pytest.raises(InputError, match="entry 1: δC and δH must be numbers"):
        hsqc_list([["x", 2.0]])
    j = tmp_path / "hsqc.json"
    j.write_text('[[21.04, 2.05],\n [60.49 4.12]]\n')   # the same wording as a peak list's JSON error
    with pytest.raises(InputError, match=r"hsqc.json line 2: invalid JSON \("):
        read_hsqc(j)


def test_two_protons_at_one_carbon_shift_are_one_carbon():
    # a CH2 next to a stereocentre shows two cross peaks at one δC (common practice)
    obs = EVIDENCE["HSQC"].observed(hsqc_list([[40.10, 2.90], [40.12, 3.10], [128.4, 7.31]]))
    assert len(obs) == 2 and (obs[0].h_lo, obs[0].h_hi) == (2.90, 3.10)
    # two protons 5 ppm apart at one δC are two carbons, not one CH2
    assert len(EVIDENCE["HSQC"].observed(hsqc_list([[40.1, 2.0], [40.1, 7.0]]))) == 2


def test_hsqc_alone_ranks_the_published_compound_first_and_pairs_both_dimensions():
    r = rank(hsqc=FULMER_ETOAC, candidates=[MEPROP, ETOAC])
    assert r.best.smiles == ETOAC and r.best.probability > 0.9
    table = r.best.nuclei["HSQC"].assignment_table()
    by_c = {row["observed"]: row for row in table}
    assert by_c[60.49]["observed_h"] == 4.12 and abs(by_c[60.49]["deviation_h"]) < 0.3
    # the proton dimension counts: the same carbon shifts with the protons swapped between the
    # OCH2 and the CH3CO cost the right structure more
    swapped = [[21.04, 4.12], [60.49, 2.05], [14.19, 1.26]]
    cost = lambda hs: rank(hsqc=hs, candidates=[ETOAC]).best.nuclei["HSQC"].cost
    assert cost(swapped) > cost(FULMER_ETOAC) + 5


def test_rank_cli_and_batch_take_cross_peaks(tmp_path, capsys):
    f = tmp_path / "etoac_hsqc.txt"
    f.write_text("\n".join(f"{c} {h}" for c, h in FULMER_ETOAC) + "\n")
    assert main(["rank", "--hsqc", str(f), "--candidates", ETOAC, MEPROP]) == 0
    out = capsys.readouterr().out
    assert "HSQC assignment for CCOC(C)=O" in out and "δH obs" in out
    assert f"HSQC peaks: {f}: 3 cross peaks" in out      # the line names the file that gave these peaks
    f.write_text("21.0 2.05\nnot numbers here\n")
    assert main(["rank", "--hsqc", str(f), "--candidates", ETOAC]) == 2
    assert "line 2" in capsys.readouterr().err
    cases = tmp_path / "cases.jsonl"
    cases.write_text(json.dumps({"id": "ok", "hsqc": FULMER_ETOAC, "candidates": [MEPROP, ETOAC]}) + "\n"
                     + json.dumps({"id": "bad", "hsqc": [[21.0]], "candidates": [ETOAC]}) + "\n")
    out_path = tmp_path / "out.jsonl"
    main(["batch", str(cases), "-o", str(out_path)])
    ok, bad = [json.loads(x) for x in out_path.read_text().splitlines()]
    assert ok["ranking"][0]["smiles"] == ETOAC and "HSQC" in ok["ranking"][0]["nuclei"]
    assert "hsqc entry 1" in bad["error"]


def test_edited_hsqc_phase_is_checked_against_chn():
    # multiplicity-edited HSQC: CH2 cross peaks have the opposite phase to CH and CH3 (common practice)
    edited = [[21.04, 2.05, "CH/CH3"], [60.49, 4.12, "CH2"], [14.19, 1.26, "CH/CH3"]]
    right = rank(hsqc=edited, candidates=[ETOAC]).best.nuclei["HSQC"]
    assert right.assignment.parts["multiplicity"] == 0
    wrong = [[21.04, 2.05, "CH2"], [60.49, 4.12, "CH/CH3"], [14.19, 1.26, "CH/CH3"]]
    res = rank(hsqc=wrong, candidates=[ETOAC]).best.nuclei["HSQC"]
    assert res.cost > right.cost + 5 and not all(p.multiplicity_ok for p in res.assignment.pairings)
    with pytest.raises(InputError, match="entry 1: phase 'up'"):
        hsqc_list([[21.0, 2.0, "up"]])


def test_phase_column_of_a_file_reaches_the_ranking(tmp_path, capsys):
    f = tmp_path / "edited.txt"
    f.write_text("21.04 2.05 CH2\n60.49 4.12 CH2\n14.19 1.26 CH/CH3\n")   # CH3CO given the wrong phase
    assert read_hsqc(f).records()[0] == [21.04, 2.05, "CH2"]
    assert main(["rank", "--hsqc", str(f), "--candidates", ETOAC, "--json"]) == 0
    res = json.loads(capsys.readouterr().out)["ranking"][0]["nuclei"]["HSQC"]
    assert res["cost_parts"]["multiplicity"] > 0


def test_cross_peaks_printed_in_the_paragraph_are_used():
    # 4-methylanisole against its positional isomers, shifts in CDCl3 from memory
    from shiftrank.score.ranking import rank as rank_text
    text = ("1H NMR (400 MHz, CDCl3) δ 7.10 (d, J = 8.5 Hz, 2H), 6.82 (d, J = 8.5 Hz, 2H), 3.78 (s, 3H), 2.29 (s, 3H).\n"
            "HSQC (CDCl3) δC/δH: 129.9/7.10, 113.8/6.82, 55.3/3.78, 20.5/2.29.")
    r = rank_text(text=text, candidates=["COc1cccc(C)c1", "COc1ccc(C)cc1", "COc1ccccc1C"])
    assert r.best.smiles == "COc1ccc(C)cc1" and set(r.best.nuclei) == {"1H", "HSQC"}
    assert r.best.nuclei["HSQC"].observed_signals == 4


def test_a_cross_peak_file_as_printed_or_slash_written_is_read(tmp_path):
    # δC/δH pairs written with a slash, and a printed HSQC paragraph given to --hsqc, as chemists paste them
    # (common practice in SI paragraphs; the values are invented, of the demo kind)
    slash = tmp_path / "slash.txt"
    slash.write_text("# dC/dH\n119.0/7.28\n113.6/7.22\n")
    assert read_hsqc(slash).pairs == [(119.0, 7.28), (113.6, 7.22)]
    printed = tmp_path / "printed.txt"
    printed.write_text("HSQC (DMSO-d6): δC/δH 119.0/7.28, 113.6/7.22, 55.6/3.84.")
    h = read_hsqc(printed)
    assert sorted(h.pairs) == [(55.6, 3.84), (113.6, 7.22), (119.0, 7.28)] and "printed characterisation text" in h.notes[0]
    # the note reaches the ranking's notes when the file is given to `rank --hsqc`
    r = rank(hsqc=h, candidates=["COC(=O)c1ccc(OC)c(N)c1"])
    assert any("read as printed characterisation text (its HSQC section)" in n for n in r.notes)
    none = tmp_path / "none.txt"
    none.write_text("HSQC was not recorded; 1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H) 3.9/4.0 mix.")
    with pytest.raises(InputError):
        read_hsqc(none)


def test_cross_peaks_printed_with_brackets_tuples_or_arrows():
    # house styles of printed HSQC data (common practice): δC with its protons in brackets, a '(δH, δC)'
    # tuple list, an arrow between the two shifts; the same pairs in each
    from shiftrank.inputs.text import read_nmr_text
    styles = ["1H-13C HSQC (CDCl3): 128.4 (7.26), 55.2 (3.80), 41.2 (2.95, 3.10)",
              "HSQC (CDCl3): (δH, δC) (7.26, 128.4), (3.80, 55.2), (2.95, 41.2), (3.10, 41.2)",
              "HSQC: δC 128.4 ↔ δH 7.26, δC 55.2 ↔ δH 3.80, δC 41.2 ↔ δH 2.95, δC 41.2 ↔ δH 3.10"]
    for t in styles:
        sec = read_nmr_text(t).section("HSQC")
        assert sorted((p.shift, p.shift_h) for p in sec.peaks) == [(41.2, 2.95), (41.2, 3.10), (55.2, 3.80), (128.4, 7.26)], t
    # a bracket after a 13C value outside an HSQC section stays a detail
    assert read_nmr_text("13C NMR (CDCl3) δ 128.4 (CH, from HSQC), 55.2").section("HSQC") is None
