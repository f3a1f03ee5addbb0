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
    with pytest.raises(InputError, match=r"entry 1: δH 139.9 ppm is outside .* join two protons"):
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


def _bruker_2d(root, peaks, f1, f2, pulprog, noise=2000.0, seed=1):
    """A Bruker processed 2D data set as the processed-data layout has it: pdata/1/2rr (little-endian int32, one
    submatrix: XDIM = SI in each dimension) with procs (F2) and proc2s (F1): OFFSET, SW_p, SF, SI; acqus NUC1/NUC2.
    ``peaks``: (δ1, δ2, height) Gaussian cross peaks; ``f1``/``f2``: (nucleus, offset ppm, width ppm, MHz, points)."""
    exp = root / "20"
    pdir = exp / "pdata" / "1"
    pdir.mkdir(parents=True)
    (n1, o1, w1, m1, s1), (n2, o2, w2, m2, s2) = f1, f2
    x1 = o1 - np.arange(s1) * w1 / s1
    x2 = o2 - np.arange(s2) * w2 / s2
    data = np.random.default_rng(seed).normal(0, noise, (s1, s2))
    for d1, d2, h in peaks:
        # (Gaussian lines, as apodised 2D spectra show them)
        data += h * np.exp(-0.5 * ((x1[:, None] - d1) / (1.5 * w1 / s1)) ** 2 - 0.5 * ((x2[None, :] - d2) / (1.5 * w2 / s2)) ** 2)
    (pdir / "2rr").write_bytes(np.round(data).astype("<i4").tobytes())

    def par(d):
        return "\n".join(["##TITLE= Parameter file", "##JCAMPDX= 5.0"] + [f"##${k}= {v}" for k, v in d.items()] + ["##END="]) + "\n"

    common = {"BYTORDP": 0, "DTYPP": 0, "NC_proc": 0}
    (pdir / "procs").write_text(par({**common, "OFFSET": o2, "SF": m2, "SI": s2, "SW_p": w2 * m2, "XDIM": s2, "AXNUC": f"<{n2}>"}))
    (pdir / "proc2s").write_text(par({**common, "OFFSET": o1, "SF": m1, "SI": s1, "SW_p": w1 * m1, "XDIM": s1, "AXNUC": f"<{n1}>"}))
    (exp / "acqus").write_text(par({"NUC1": f"<{n2}>", "NUC2": f"<{n1}>", "PULPROG": f"<{pulprog}>", "SOLVENT": "<CDCl3>"}))
    return exp


def test_cross_peaks_are_picked_from_a_bruker_2d_data_set(tmp_path):
    from shiftrank.inputs.peaks import read_hmbc, read_hsqc
    # an HMBC of 1-methylindazole (values from memory, as above): the N-CH3 and H3 to C7a, H3 to C3a
    c13 = ("13C", 170.0, 160.0, 100.6, 256)
    h1 = ("1H", 10.0, 10.0, 400.1, 1024)
    exp = _bruker_2d(tmp_path / "a", [(139.9, 4.07, 1e6), (139.9, 7.98, 6e5), (124.0, 7.98, 8e5)], c13, h1, "hmbcgp")
    hm = read_hmbc(exp)
    assert len(hm.pairs) == 3 and "3 cross peaks picked" in hm.notes[0]
    got = sorted(hm.pairs)
    assert all(abs(a - b) <= 0.35 and abs(c - d) <= 0.01 for (a, c), (b, d) in zip(got, [(124.0, 7.98), (139.9, 4.07), (139.9, 7.98)]))
    assert rank(peaks_1h=[7.98, 7.72, 7.40, 7.15, 4.07], hmbc=hm, candidates=[N2, N1]).best.smiles == N1
    # an edited HSQC: peaks of both signs carry their phases (negative CH2, positive CH/CH3; common practice)
    ed = _bruker_2d(tmp_path / "b", [(60.5, 4.12, -9e5), (21.0, 2.05, 9e5), (14.2, 1.26, 9e5)], c13, h1, "hsqcedetgp")
    hs = read_hsqc(ed)
    assert dict(zip(hs.pairs, hs.kinds))[min(hs.pairs, key=lambda p: abs(p[0] - 60.5))] == "CH2"
    # a COSY's dimensions are both 1H: an HMBC data set given as one is refused
    with pytest.raises(InputError, match="correlates 13C .F1. with 1H .F2.; COSY spectra have 1H in F1"):
        read_hsqc(exp, "COSY")


def test_a_candidate_without_protons_cannot_make_cross_peaks():
    # tetrachloromethane has no proton: every cross peak is one it cannot make, said in a flag, not an internal error
    for kw in (dict(hmbc=[[96.0, 7.2]]), dict(cosy=[[7.2, 3.1]]), dict(noesy=[[7.2, 3.1]])):
        r = rank(candidates=["ClC(Cl)(Cl)Cl", "CC(Cl)(Cl)Cl"], **kw)
        ccl4 = next(c for c in r.candidates if c.smiles == "ClC(Cl)(Cl)Cl")
        assert ccl4.error is None and any("has no protons" in f for f in ccl4.flags)


def test_the_two_protons_of_a_diastereotopic_ch2_make_their_own_cross_peak():
    # 1-phenylpropan-1-ol (own example; shifts from memory): the CH2 beside the stereocentre shows two lines, 1.82 and
    # 1.73, whose geminal coupling gives a COSY cross peak (common practice): the candidate's own, not a misfit
    h1 = [{"shift": 7.33, "integral": 5, "multiplicity": "m"}, {"shift": 4.58, "integral": 1, "multiplicity": "t"},
          {"shift": 1.82, "integral": 1, "multiplicity": "m"}, {"shift": 1.73, "integral": 1, "multiplicity": "m"},
          {"shift": 0.91, "integral": 3, "multiplicity": "t"}]
    r = rank(peaks_1h=h1, cosy=[[1.82, 1.73], [4.58, 1.82], [1.73, 0.91]], candidates=["CCC(O)c1ccccc1"])
    rows = r.best.nuclei["COSY"].assignment_table()
    gem = next(row for row in rows if {row["observed"], row["observed_h"]} == {1.82, 1.73})
    assert gem["bonds"] == 2 and gem["atoms"] == gem["h_atoms"] and not r.best.nuclei["COSY"].far_cross_peaks


def test_a_noe_weighs_two_stereoisomers_the_shifts_cannot_tell_apart():
    # (E)- against (Z)-methyl 3-phenylbut-2-enoate (own example, shifts from memory): the shift model sees the same
    # graph; the NOE between the phenyl's ortho protons and the vinyl proton is the E isomer's (they are cis there;
    # common practice), and the verdict says the NOESY leans to it
    e, z = "COC(=O)/C=C(\\C)c1ccccc1", "COC(=O)/C=C(/C)c1ccccc1"
    h1 = [{"shift": 7.45, "integral": 2, "multiplicity": "m"}, {"shift": 7.38, "integral": 3, "multiplicity": "m"},
          {"shift": 6.15, "integral": 1, "multiplicity": "q"}, {"shift": 3.76, "integral": 3, "multiplicity": "s"},
          {"shift": 2.58, "integral": 3, "multiplicity": "d"}]
    alone = rank(peaks_1h=h1, candidates={"E": e, "Z": z})
    assert abs(alone.candidates[0].probability - 0.5) < 0.01
    r = rank(peaks_1h=h1, noesy=[[7.45, 6.15]], candidates={"E": e, "Z": z})
    assert r.best.name == "E" and "the NOESY given leans to E" in r.verdict
