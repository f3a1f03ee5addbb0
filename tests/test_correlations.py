"""COSY and NOESY/ROESY cross peaks read as couplings and nearness in space, beside the 1D assignments.

Reference values: 1- and 2-methylindazole in CDCl3 (from memory): 1-methyl 1H 7.98 (H3, s), 7.72 (H4, d), 7.40 (H6,
H7), 7.15 (H5), 4.07 (NCH3); 2-methyl about 7.90 (H3, s), 7.68 (H4, d), 7.65 (H7, d), 7.25 (H6), 7.05 (H5), 4.20
(NCH3).  Which NOE tells N1 from N2 alkylation (the N-CH3 to H7 in the N1 isomer, to H3 in the N2 isomer) is common
practice.
"""
import json

import numpy as np
import pytest
from rdkit import Chem

from shiftrank.cli import main
from shiftrank.errors import InputError
from shiftrank.inputs.peaks import cosy_list, noesy_list, read_noesy
from shiftrank.inputs.text import read_nmr_text
from shiftrank.score.correlations import cosy_bonds, noe_strength, proton_distances
from shiftrank.score.ranking import rank

N1, N2 = "Cn1ncc2ccccc21", "Cn1cc2ccccc2n1"
H1_N2 = [{"shift": 7.90, "multiplicity": "s"}, {"shift": 7.68, "multiplicity": "d"}, {"shift": 7.65, "multiplicity": "d"},
         {"shift": 7.25, "multiplicity": "t"}, {"shift": 7.05, "multiplicity": "t"}, {"shift": 4.20, "multiplicity": "s"}]


def test_proton_pairs_are_read_once_and_the_diagonal_set_aside(tmp_path):
    c = cosy_list([[7.72, 7.15], [7.15, 7.72], [7.40, 7.40]])
    assert c.pairs == [(7.72, 7.15)] and c.nucleus == "COSY"
    assert any("both sides of the diagonal" in n for n in c.notes) and any("diagonal peak" in n for n in c.notes)
    with pytest.raises(InputError, match=r"entry 1: δH 139.9 ppm is outside .* joins two protons"):
        noesy_list([[139.9, 4.07]])
    with pytest.raises(InputError, match="no cross peak off the diagonal"):
        noesy_list([[4.07, 4.07]])
    f = tmp_path / "noesy.txt"
    f.write_text("# dH dH\n4.07 7.40\n")
    assert read_noesy(f).pairs == [(7.40, 4.07)]


def test_couplings_and_distances_of_the_methylindazoles():
    # COSY: H4-H5 vicinal (3 bonds between the protons), H4-H6 meta (4), H4-H7 para (5) (hand count)
    m = Chem.MolFromSmiles(N1)
    b = cosy_bonds(m, [[5], [6], [7], [8]])
    assert (b[0, 1], b[0, 2], b[0, 3]) == (3, 4, 5)
    # NOESY: the N-CH3 protons lie near H7 in the N1 isomer and near H3 in the N2 isomer; the other is far
    # (RDKit conformers; common practice for the diagnostic)
    r1, r2 = proton_distances(m), proton_distances(Chem.MolFromSmiles(N2))
    assert r1[0, 8] < 3.0 < 4.0 < r1[0, 3] and r2[0, 2] < 3.0
    assert np.isinf(r1[0, 1])   # N1 carries no proton
    assert noe_strength(np.array([2.5, 3.75, 6.0])).tolist() == [1.0, 0.5, 0.0]


def test_the_noe_of_the_n_methyl_to_the_singlet_tells_n2():
    # the N2 isomer's 1H list alone leaves N1 and N2 close; its NOE between the N-CH3 (4.20) and the singlet H3
    # (7.90) settles it: in N1 the singlet (H3) is far from the N-CH3
    alone = rank(peaks_1h=H1_N2, candidates=[N1, N2])
    both = rank(peaks_1h=H1_N2, noesy=[[7.90, 4.20]], candidates=[N1, N2])
    p = lambda r: next(c.probability for c in r.candidates if c.smiles == N2)  # noqa: E731
    assert p(both) > p(alone) + 0.1 and both.best.smiles == N2
    row = both.best.nuclei["NOESY"].assignment_table()[0]
    assert row["h_atoms"] == [0] or row["atoms"] == [0]
    assert row["distance"] < 3.0 and not row["notes"]
    other = next(c for c in both.candidates if c.smiles == N1).nuclei["NOESY"]
    assert other.far_cross_peaks == [0]


def test_cosy_reads_the_1h_assignment():
    r = rank(peaks_1h=[7.98, 7.72, 7.40, 7.15, 4.07], cosy=[[7.72, 7.15], [7.40, 7.15]], candidates=[N1])
    rows = r.best.nuclei["COSY"].assignment_table()
    assert all(row["bonds"] in (3, 4) and not row["notes"] for row in rows)
    # a cross peak between the N-CH3 and an aromatic proton is no coupling in this structure
    far = rank(peaks_1h=[7.98, 7.72, 7.40, 7.15, 4.07], cosy=[[7.98, 4.07]], candidates=[N1])
    assert far.best.nuclei["COSY"].far_cross_peaks == [0]


def test_printed_sections_batch_and_cli(tmp_path, capsys):
    text = ("1H NMR (400 MHz, CDCl3) δ 7.90 (s, 1H), 7.68 (d, J = 8.5 Hz, 1H), 7.65 (d, J = 8.8 Hz, 1H), 7.25 (t, J = 7.6 Hz, "
            "1H), 7.05 (t, J = 7.4 Hz, 1H), 4.20 (s, 3H). NOESY (CDCl3): 4.20/7.90. COSY: 7.68/7.05, 7.65/7.25.")
    parsed = read_nmr_text(text)
    assert parsed.hsqc("x", "NOESY").pairs == [(7.90, 4.20)]
    assert parsed.hsqc("x", "COSY").pairs == [(7.68, 7.05), (7.65, 7.25)]
    r = rank(text=text, candidates=[N1, N2])
    assert {"NOESY", "COSY"} <= set(r.nuclei) and r.best.smiles == N2
    cases = tmp_path / "cases.jsonl"
    cases.write_text(json.dumps({"id": "a", "peaks_1h": H1_N2, "noesy": [[7.90, 4.20]], "candidates": [N1, N2]}) + "\n")
    out = tmp_path / "out.jsonl"
    assert main(["batch", str(cases), "-o", str(out)]) == 0
    line = json.loads(out.read_text())
    assert line["ranking"][0]["smiles"] == N2 and "geometry" in line["ranking"][0]["nuclei"]["NOESY"]["cost_parts"]
    f = tmp_path / "noesy.txt"
    f.write_text("4.20 7.90\n")
    h = tmp_path / "h1.json"
    h.write_text(json.dumps(H1_N2))
    assert main(["rank", "--peaks-1h", str(h), "--noesy", str(f), "--candidates", N1, N2]) == 0
    shown = capsys.readouterr().out
    assert "NOESY cross peaks for Cn1cc2ccccc2n1" in shown and "NOESY peaks: " in shown


def test_the_next_measurement_names_the_diagnostic_noe():
    r = rank(peaks=[139.9, 132.7, 126.2, 124.0, 121.0, 120.4, 108.9, 35.5], peaks_1h=[7.98, 7.72, 7.40, 7.15, 4.07],
             candidates=[N1, N2])
    r.candidates[0].probability = 0.6   # as if the 1D spectra left them close
    hints = [h for h in r.next_spectrum() if h.startswith("a NOESY or ROESY")]
    assert hints and "the H on atom 0" in hints[0] and "the H on atom 8" in hints[0] and "(δ ≈" in hints[0]
