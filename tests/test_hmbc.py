"""HMBC cross peaks: reading them, which C–H pairs are two or three bonds apart, and ranking with them beside
the 1D spectra.

Reference values: 1- and 2-methylindazole in CDCl3 (from memory): 1-methyl 1H 7.98 (H3), 7.72 (H4), 7.40 (H6, H7),
7.15 (H5), 4.07 (NCH3); 13C 139.9 (C7a), 132.7 (C3), 126.2 (C6), 124.0 (C3a), 121.0 (C4), 120.4 (C5), 108.9 (C7),
35.5 (NCH3); 2-methyl 13C 149.0 (C7a), 123.6 (C3), 40.3 (NCH3).  Which correlations tell N1 from N2 alkylation
(the N-CH3 protons three bonds from C7a in the N1 isomer, from C3 in the N2 isomer) is common practice.
"""
import json

import numpy as np
import pytest
from rdkit import Chem

from shiftrank.cli import main
from shiftrank.errors import InputError
from shiftrank.inputs.peaks import hmbc_list, read_hmbc
from shiftrank.score.correlations import hmbc_bonds
from shiftrank.score.ranking import rank, rank_many

N1, N2 = "Cn1ncc2ccccc21", "Cn1cc2ccccc2n1"
H1_N1 = [7.98, 7.72, 7.40, 7.15, 4.07]
C13_N1 = [139.9, 132.7, 126.2, 124.0, 121.0, 120.4, 108.9, 35.5]
# the N-CH3 to C7a and H3 to C7a and C3a (three bonds each) of 1-methylindazole; H7 to C5 and C3a
HMBC_N1 = [[139.9, 4.07], [139.9, 7.98], [124.0, 7.98], [120.4, 7.40], [124.0, 7.40]]


def test_cross_peaks_are_read_from_pairs_objects_and_files(tmp_path):
    assert hmbc_list([[139.9, 4.07], {"c": 124.0, "h": 7.98}]).pairs == [(139.9, 4.07), (124.0, 7.98)]
    assert hmbc_list([[139.9, 4.07]]).nucleus == "HMBC"
    with pytest.raises(InputError, match="entry 1: HMBC cross peaks have no phase"):
        hmbc_list([[139.9, 4.07, "CH2"]])
    with pytest.raises(InputError, match="entry 2: δH 40.7 ppm is outside"):
        hmbc_list([[139.9, 4.07], [35.5, 40.7]])
    f = tmp_path / "hmbc.txt"
    f.write_text("# dC dH\n139.9 4.07\n124.0/7.98\n")
    assert read_hmbc(f).pairs == [(139.9, 4.07), (124.0, 7.98)]
    f.write_text("139.9 4.07\n124.0 7.98 CH\n")   # a third column belongs to an edited HSQC, not to an HMBC
    with pytest.raises(InputError, match="line 2: expected δC δH, got"):
        read_hmbc(f)


def test_two_and_three_bond_pairs_are_counted_through_equivalent_atoms():
    # morpholine N-aryl: the N-CH2 protons are one bond from their own carbon and three from the other, equivalent
    # N-CH2 carbon (H-C-N-C), so that class pair is a three-bond pair (hand count)
    mol = Chem.MolFromSmiles("c1ccccc1N1CCOCC1")
    ncl, ocl = [7, 11], [8, 10]
    b = hmbc_bonds(mol, [ncl, ocl, [5]], [ncl, ocl])
    assert b[0, 0] == 3          # N-CH2 protons to the other N-CH2 carbon
    assert b[1, 0] == 2          # N-CH2 protons to the O-CH2 carbon next door
    assert b[2, 0] == 3          # N-CH2 protons to the ipso carbon (H-C-N-C)
    assert b[2, 1] == 4          # O-CH2 protons to the ipso carbon: four bonds, no cross peak expected
    assert hmbc_bonds(Chem.MolFromSmiles("CC"), [[0]], [[0]])[0, 0] == 1   # a carbon's own protons: one bond


def test_the_n_methyl_correlation_tells_n1_from_n2():
    # one cross peak, the N-CH3 protons to C7a: three bonds in the N1 isomer, four in the N2 (common practice)
    r = rank(hmbc=[[139.9, 4.07]], candidates=[N2, N1])
    assert r.best.smiles == N1
    row = r.best.nuclei["HMBC"].assignment_table()[0]
    assert row["bonds"] == 3 and row["h_atoms"] == [0] and not row["notes"]
    other = next(c for c in r.candidates if c.smiles == N2).nuclei["HMBC"]
    assert other.far_cross_peaks == [0] and other.assignment_table()[0]["notes"]
    # the N2 isomer's own: N-CH3 protons to C3 and H3 to the N-CH3 carbon (three bonds each)
    r2 = rank(hmbc=[[123.6, 4.20], [40.3, 7.90]], candidates=[N1, N2])
    assert r2.best.smiles == N2


def test_hmbc_beside_1h_reads_the_1h_assignment_and_raises_the_right_isomer():
    alone = rank(peaks_1h=H1_N1, candidates=[N1, N2])
    both = rank(peaks_1h=H1_N1, hmbc=HMBC_N1, candidates=[N1, N2])
    p = lambda r: next(c.probability for c in r.candidates if c.smiles == N1)  # noqa: E731
    assert p(both) > p(alone) and both.best.smiles == N1
    # the proton end of each cross peak is the 1H line the assignment put a class on: 4.07 is the N-CH3
    rows = both.best.nuclei["HMBC"].assignment_table()
    assert {tuple(r["h_atoms"]) for r in rows if r["observed_h"] == 4.07} == {(0,)}
    # the line that separates the two names the cross peak and what each candidate makes of it
    sep = [s for s in both.separation() if s.nucleus == "HMBC"]
    assert sep and all(s.h is not None for s in sep)
    assert any("not 2-3" in t for s in sep for t in s.second)


def test_hmbc_with_both_1d_lists_and_the_next_measurement():
    r = rank(peaks=C13_N1, peaks_1h=H1_N1, hmbc=HMBC_N1, candidates=[N1, N2])
    assert r.best.smiles == N1 and "HMBC" in r.nuclei
    r.candidates[0].probability = 0.6   # as if still close: an HMBC was given, so it is not suggested again
    assert not any("an HMBC would" in h for h in r.next_spectrum())
    assert np.isfinite(r.best.nuclei["HMBC"].cost)


def test_rank_cli_batch_and_json_take_hmbc(tmp_path, capsys):
    f = tmp_path / "hmbc.txt"
    f.write_text("\n".join(f"{c} {h}" for c, h in HMBC_N1) + "\n")
    assert main(["rank", "--hmbc", str(f), "--peaks-1h", str(_h1(tmp_path)), "--candidates", N1, N2]) == 0
    out = capsys.readouterr().out
    assert f"HMBC peaks: {f}: 5 cross peaks" in out and "HMBC cross peaks for Cn1ncc2ccccc21" in out
    assert main(["rank", "--hmbc", str(f), "--candidates", N1, N2, "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert "connectivity" in d["ranking"][0]["nuclei"]["HMBC"]["cost_parts"]
    assert d["ranking"][0]["nuclei"]["HMBC"]["assignment"][0]["bonds"] in (2, 3)
    cases = tmp_path / "cases.jsonl"
    cases.write_text(json.dumps({"id": "ok", "peaks_1h": H1_N1, "hmbc": HMBC_N1, "candidates": [N2, N1]}) + "\n"
                     + json.dumps({"id": "bad", "hmbc": [[139.9, "x"]], "candidates": [N1]}) + "\n")
    out_path = tmp_path / "out.jsonl"
    main(["batch", str(cases), "-o", str(out_path)])
    ok, bad = [json.loads(x) for x in out_path.read_text().splitlines()]
    assert ok["ranking"][0]["smiles"] == N1 and "HMBC" in ok["ranking"][0]["nuclei"]
    assert "hmbc entry 1" in bad["error"]
    # the same case from Python gives the same probabilities
    py = rank_many([{"peaks_1h": H1_N1, "hmbc": HMBC_N1, "candidates": [N2, N1]}])[0]
    assert [round(c.probability, 6) for c in py.candidates] == [r["probability"] for r in ok["ranking"]]


def test_the_report_shows_the_cross_peaks(tmp_path):
    from shiftrank.outputs.report import write_report

    r = rank(peaks_1h=H1_N1, hmbc=HMBC_N1, candidates=[N1, N2])
    path = tmp_path / "r.html"
    write_report([r], path)
    text = path.read_text()
    assert "HMBC cross peaks" in text and "not two or three bonds apart" in text
    # the cross peaks #1 explains are drawn on its structure as arrows from the protons' atom to the carbon
    from shiftrank.outputs.report import correlation_svg
    svg = correlation_svg(r.best, "HMBC")
    assert svg.startswith("<svg") and "arrows: from the atom carrying the protons" in text


def _h1(tmp_path):
    p = tmp_path / "h1.txt"
    p.write_text("\n".join(map(str, H1_N1)) + "\n")
    return p


def test_an_hmbc_section_printed_with_the_paragraph_is_read_and_used():
    # one proton to several carbons, as papers print it ('δH 7.98 → δC 139.9, 124.0'); label-only correlations
    # ('H-3/C-7a') cannot be placed on a structure and are named as not used
    from shiftrank.inputs.text import read_nmr_text

    text = ("1H NMR (400 MHz, CDCl3) δ 7.98 (s, 1H), 7.72 (d, J = 8.1 Hz, 1H), 7.42–7.35 (m, 2H), 7.15 (m, 1H), "
            "4.07 (s, 3H). HMBC (CDCl3): δH 4.07 → δC 139.9; δH 7.98 → δC 139.9, 124.0.")
    hm = read_nmr_text(text).hmbc()
    assert hm.pairs == [(139.9, 4.07), (139.9, 7.98), (124.0, 7.98)] and hm.nucleus == "HMBC"
    r = rank(text=text, candidates=[N2, N1])
    assert "HMBC" in r.nuclei and r.best.smiles == N1
    labels = read_nmr_text("1H NMR (400 MHz, CDCl3) δ 7.98 (s, 1H), 4.07 (s, 3H). HMBC: H-3/C-7a, NCH3/C-7a.")
    assert labels.hmbc() is None
    assert any("HMBC correlations read as a section of their own and not used" in n for s in labels.sections for n in s.notes)


def test_a_file_written_proton_first_is_read_so_with_a_note(tmp_path):
    # 'δH δC' columns (a natural order for HMBC, read from the proton): every second value larger and some beyond
    # 20 ppm, so the columns are swapped and a note says so; a Python list in the wrong order gets a hint instead
    f = tmp_path / "hmbc.txt"
    f.write_text("4.07 139.9\n7.98 124.0\n")
    hm = read_hmbc(f)
    assert hm.pairs == [(139.9, 4.07), (124.0, 7.98)] and "read as δH δC" in hm.notes[-1]
    with pytest.raises(InputError, match=r"the carbon first"):
        hmbc_list([[4.07, 139.9]])
