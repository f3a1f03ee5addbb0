"""Ranking engine: hand-made regioisomer cases (own molecules, INVENTED shift lists made to look
like typical spectra of the two esters), symmetry and formula checks, probabilities."""
import pytest

from shiftrank.errors import InputError
from shiftrank.score.ranking import rank

PARA = "CCOC(=O)c1ccc(C)cc1"     # ethyl 4-methylbenzoate
META = "CCOC(=O)c1cccc(C)c1"     # ethyl 3-methylbenzoate
# invented peak lists (demo-style), shaped like each isomer's expected spectrum
PARA_PEAKS = [(14.3, "CH3"), (21.6, "CH3"), (60.7, "CH2"), (127.8, "C"), (129.0, "CH"), (129.5, "CH"),
              (143.4, "C"), (166.6, "C")]
META_PEAKS = [(14.3, "CH3"), (21.3, "CH3"), (60.8, "CH2"), (126.7, "CH"), (128.2, "CH"), (130.1, "CH"),
              (130.5, "C"), (133.6, "CH"), (138.1, "C"), (166.7, "C")]


def peaks(lst, with_mult=True):
    return [{"shift": s, "multiplicity": m if with_mult else None} for s, m in lst]


@pytest.mark.parametrize("with_mult", [True, False])
def test_regioisomers_rank_right_one_first_and_swap(with_mult):
    r1 = rank(peaks(PARA_PEAKS, with_mult), [META, PARA])
    assert r1.best.smiles == PARA and r1.best.probability > 0.9
    r2 = rank(peaks(META_PEAKS, with_mult), [META, PARA])
    assert r2.best.smiles == META and r2.best.probability > 0.9


def test_probabilities_sum_to_one_and_order():
    r = rank(peaks(PARA_PEAKS), [META, PARA, "CCOC(=O)c1ccccc1C", "COC(=O)Cc1ccc(C)cc1"])
    total = sum(c.probability for c in r.candidates)
    assert total == pytest.approx(1.0, abs=1e-9)
    probs = [c.probability for c in r.candidates]
    assert probs == sorted(probs, reverse=True)


def test_symmetric_candidate_with_fewer_classes_is_penalised():
    r = rank(peaks(META_PEAKS), [PARA, META])
    para = next(c for c in r.candidates if c.smiles == PARA)
    meta = next(c for c in r.candidates if c.smiles == META)
    assert len(para.classes) == 8 and len(meta.classes) == 10
    assert any("expects 8 signals" in f and "10 observed" in f for f in para.flags)
    assert para.cost > meta.cost
    assert para.assignment.unmatched_peaks  # two peaks the para isomer cannot explain


def test_formula_contradiction_is_flagged_and_ranked_last():
    wrong = "COC(=O)c1ccc(C)cc1"  # methyl ester: C9H10O2
    r = rank(peaks(PARA_PEAKS), [wrong, PARA, META], formula="C10H12O2")
    last = r.candidates[-1]
    assert last.smiles == wrong and last.formula_ok is False and last.probability == 0.0
    assert "contradicts the sample formula C10H12O2" in last.flags[0]
    assert sum(c.probability for c in r.candidates) == pytest.approx(1.0, abs=1e-9)


def test_mass_contradiction_flags():
    r = rank(peaks(PARA_PEAKS), [PARA, "CCCOC(=O)c1ccc(C)cc1"], mass=164.08)
    assert r.candidates[-1].formula_ok is False


def test_invalid_candidate_listed_last_with_error():
    r = rank(peaks(PARA_PEAKS), ["C1CC(", PARA, META])
    assert r.candidates[-1].smiles == "C1CC(" and "cannot read it: unbalanced brackets" in r.candidates[-1].error
    assert r.best.smiles == PARA


def test_solvent_peak_goes_unmatched_for_free():
    with_solvent = peaks(PARA_PEAKS) + [{"shift": 77.16}]
    r = rank(with_solvent, [PARA, META], solvent="CDCl3")
    best = r.best
    assert best.smiles == PARA
    assert best.assignment.parts["extra"] == 0.0
    assert any("CDCl3" in n for n in r.notes)


def test_partial_multiplicity_information():
    partial = [{"shift": s, "multiplicity": m if i % 2 else None} for i, (s, m) in enumerate(PARA_PEAKS)]
    assert rank(partial, [META, PARA]).best.smiles == PARA


def test_assignment_table_has_every_class():
    r = rank(peaks(PARA_PEAKS), [PARA])
    table = r.best.assignment_table()
    assert sorted(a for row in table for a in row["atoms"]) == [0, 1, 3, 5, 6, 7, 8, 9, 10, 11]
    assert all(abs(row["deviation"]) < 8 for row in table if row["deviation"] is not None)


def test_empty_peaks_and_bad_priors_are_clear_errors():
    with pytest.raises(InputError, match="empty"):
        rank([], [PARA])
    with pytest.raises(InputError, match="priors"):
        rank(peaks(PARA_PEAKS), [PARA, META], priors=[1.0])


def test_priors_shift_probability():
    even = rank(peaks(PARA_PEAKS), [PARA, META])
    tilted = rank(peaks(PARA_PEAKS), [PARA, META], priors=[0.01, 0.99])
    p_even = next(c.probability for c in even.candidates if c.smiles == META)
    p_tilt = next(c.probability for c in tilted.candidates if c.smiles == META)
    assert p_tilt > p_even


# PMC9832363: 2-(3-methoxyphenyl)-2,3-dihydroquinazolin-4(1H)-one in DMSO-d6, both paragraphs as printed
# (the '(s, J = 8.11 Hz, 1H)' is the article's); candidates: the three methoxyphenyl positions
QUINAZOLINONE_TEXT = (
    "1H NMR (DMSO-d6, 400 MHz): δ 8.27 (s, 1H), 7.58–7.56 (d, J = 7.70 Hz, 1H), 7.28–7.19 (m, 2H), 7.09 (s, 1H), "
    "7.03 (s, 2H), 6.88–6.86 (d, J = 8.11 Hz, 1H), 6.73–6.71 (s, J = 8.11 Hz, 1H), 6.65–6.62 (m, 1H), 5.68 (s, 1H), "
    "3.71 (s, 3H)\n13C NMR (DMSO-d6, 100 MHz): δ 164.09, 159.75, 148.34, 143.86, 133.85, 129.96, 127.87, 119.46, "
    "117.65, 115.51, 114.94, 114.21, 113.10, 66.81, 55.61")
QUINAZOLINONE = "COc1cccc(C2NC(=O)c3ccccc3N2)c1"
QUINAZOLINONE_ISOMERS = ["COc1ccc(C2NC(=O)c3ccccc3N2)cc1", QUINAZOLINONE, "COc1ccccc1C1NC(=O)c2ccccc2N1"]


def test_each_spectrum_alone_gets_its_own_probabilities_and_a_conflict_is_named():
    from shiftrank.score.ranking import spectra_disagreement

    r = rank(text=QUINAZOLINONE_TEXT, candidates=QUINAZOLINONE_ISOMERS)
    for n in ("13C", "1H"):
        assert sum(c.by_spectrum[n] for c in r.candidates) == pytest.approx(1.0)
    by_13c = max(r.candidates, key=lambda c: c.by_spectrum["13C"])
    assert by_13c.smiles == QUINAZOLINONE          # the printed 13C list alone points to the published structure
    note = spectra_disagreement(r.candidates)
    assert ("the spectra disagree" in r.verdict) == (note is not None)
    if note:
        assert note in r.verdict
    d = r.to_dict()["ranking"][0]
    assert set(d["probability_by_spectrum"]) == {"13C", "1H"}


def test_the_1h_term_beside_13c_uses_the_joint_costs_and_alone_its_own():
    # the calibration may give the 1H term a narrower widening beside a 13C list than alone
    # (training/calibrate_ranking.py, joint step); both paragraphs printed with the article (PMC9832363)
    from dataclasses import replace

    from shiftrank.score.ranking import RankingSettings, ranking_settings

    s = ranking_settings()
    alone_1h = QUINAZOLINONE_TEXT.split("\n")[0]
    both = {c.smiles: c.nuclei["1H"].cost for c in rank(text=QUINAZOLINONE_TEXT, candidates=QUINAZOLINONE_ISOMERS).candidates}
    alone = {c.smiles: c.nuclei["1H"].cost for c in rank(text=alone_1h, candidates=QUINAZOLINONE_ISOMERS).candidates}
    differs = s.costs_for("1H", True) != s.costs["1H"]
    assert differs == any(abs(both[k] - alone[k]) > 1e-9 for k in both)
    wide = replace(s.costs["1H"], t_widen=s.costs["1H"].t_widen * 2)
    t = RankingSettings(s.costs, s.temperature, {"1H": wide}, {"1H": 9.0})
    assert t.costs_for("1H", True) is wide and t.costs_for("1H", False) is s.costs["1H"]
    assert t.view_divisor("1H") == 9.0 and t.view_divisor("13C") == s.temperature["13C"]

def _cand(smiles, **by):
    from shiftrank.score.ranking import CandidateResult

    return CandidateResult(smiles, 0, by_spectrum=by)


@pytest.mark.parametrize("a13, b13, a1h, b1h, conflict", [
    (0.9, 0.1, 0.2, 0.8, True),     # each spectrum favours its own candidate four times over
    (0.9, 0.1, 0.45, 0.55, False),  # 1H barely leans the other way: not a disagreement
    (0.9, 0.1, 0.7, 0.3, False),    # both favour A
    (0.6, 0.3, 0.3, 0.6, True),     # exactly twice over, both ways
])
def test_spectra_disagree_only_when_each_favours_its_candidate_twice_over(a13, b13, a1h, b1h, conflict):
    from shiftrank.score.ranking import spectra_disagreement

    cands = [_cand("A", **{"13C": a13, "1H": a1h}), _cand("B", **{"13C": b13, "1H": b1h})]
    note = spectra_disagreement(cands)
    assert (note is not None) == conflict
    if conflict:
        assert note == f"13C alone favours A (p = {a13:.2f}), 1H alone favours B (p = {b1h:.2f})"


def test_one_spectrum_gives_no_per_spectrum_view():
    r = rank(peaks(PARA_PEAKS), [META, PARA])
    assert all(not c.by_spectrum for c in r.candidates)
    assert "probability_by_spectrum" not in r.to_dict()["ranking"][0]


def test_a_lactim_drawing_is_flagged_and_the_lactam_fits_its_spectrum():
    # 2-pyridone in CDCl3: 165.6 (C2), 141.1 (C4), 135.0 (C6), 120.3 (C3), 106.4 (C5) ppm (from memory);
    # in solution the compound is the lactam (common practice), so the lactim drawing gets a hint
    r = rank([{"shift": v} for v in (165.6, 141.1, 135.0, 120.3, 106.4)], ["Oc1ccccn1", "O=c1cccc[nH]1"],
             solvent="CDCl3")
    lactim = next(c for c in r.candidates if c.smiles == "Oc1ccccn1")
    lactam = next(c for c in r.candidates if c.smiles == "O=c1cccc[nH]1")
    assert any("drawn as the hydroxy tautomer (atom 0)" in f and "oxo N–H form" in f for f in lactim.flags)
    assert not any("tautomer" in f for f in lactam.flags)
    assert r.best.smiles == "O=c1cccc[nH]1"
    # the atom is named in the candidate's own numbering, also when standardisation set a counterion aside
    salt = rank([{"shift": v} for v in (165.6, 141.1, 135.0, 120.3, 106.4)], ["[Na+].[Cl-].Oc1ccccn1"]).best
    assert any("hydroxy tautomer (atom 2)" in f for f in salt.flags)


def test_peaks_given_as_numpy_array_or_text_rank_as_the_list_does():
    import numpy as np
    shifts = [s for s, _ in PARA_PEAKS]
    ref = rank(shifts, [META, PARA])
    for given in (np.array(shifts), np.array(shifts, dtype=np.float32), ", ".join(map(str, shifts))):
        r = rank(given, [META, PARA])
        assert r.best.smiles == PARA and r.best.probability == pytest.approx(ref.best.probability, abs=1e-4)
    # a printed paragraph is read as printed text, with the costs fitted on printed lists
    r = rank("13C NMR (101 MHz, CDCl3) δ " + ", ".join(map(str, shifts)) + ".", [META, PARA])
    assert r.best.smiles == PARA and "read as printed characterisation text" in r.notes[0]
    with pytest.raises(InputError, match="got one string"):
        rank(shifts, PARA)


def test_candidates_differing_only_in_stereochemistry_are_called_so():
    # cis- and trans-4-(4-methoxyphenyl)cyclohexanol (own choice; INVENTED list shaped like their spectra): a
    # model that reads the molecular graph gives both the same shifts, and the verdict says what could tell
    # them apart (coupling constants, NOE: common practice)
    shifts = [158.0, 138.9, 127.7, 113.9, 70.8, 55.3, 43.1, 36.0, 32.6]
    r = rank(shifts, ["COc1ccc([C@H]2CC[C@H](O)CC2)cc1", "COc1ccc([C@H]2CC[C@@H](O)CC2)cc1"])
    assert "indistinguishable" in r.verdict and "differ only in stereochemistry" in r.verdict
    assert "which the predicted shifts do not tell apart" in r.verdict
    r = rank(shifts, ["COc1ccc(C2CCC(O)CC2)cc1", "COc1ccc(C2CCCC(O)C2)cc1"])
    assert "stereochemistry" not in r.verdict
    # a list one line short: the count reservation comes first and the stereo reading is still said
    r = rank(shifts[:-1], ["COc1ccc([C@H]2CC[C@H](O)CC2)cc1", "COc1ccc([C@H]2CC[C@@H](O)CC2)cc1"])
    assert "fit no candidate" in r.verdict and "differ only in stereochemistry" in r.verdict


def test_stereoisomers_whose_predictions_differ_are_said_to_differ_slightly():
    # an E/Z pair of our own whose CH2 beside the double bond is predicted lower in the Z form (the E/Z
    # increment); an INVENTED list halfway between the two predictions leaves them undecided, and the verdict
    # says the predicted shifts separate them only there, not that they cannot
    from shiftrank import predict
    e, z = "CCCC/C=C/C(=O)N1CCOCC1", "CCCC/C=C\\C(=O)N1CCOCC1"
    pe, pz = predict(e).shifts, predict(z).shifts
    listed = sorted({round((pe[i] + pz[i]) / 2, 1) for i in pe})
    r = rank(listed, [e, z])
    assert "differ only in stereochemistry" in r.verdict
    assert "tell apart only by a few carbons beside a double bond" in r.verdict
    assert "do not tell apart" not in r.verdict


def test_e_and_z_alkenes_told_apart_by_the_printed_alkene_j_are_said_so():
    # (E)-N-methylcinnamamide's alkene doublets with J = 15.6 Hz (values from memory); a trans alkene J of
    # 12-18 Hz against 6-12 Hz cis (common practice): the Z drawing's protons cannot show it, the verdict says so
    text = ("1H NMR (400 MHz, CDCl3) δ 7.62 (d, J = 15.6 Hz, 1H), 7.50–7.30 (m, 5H), 6.40 (d, J = 15.6 Hz, 1H), "
            "5.90 (br s, 1H), 2.95 (d, J = 4.9 Hz, 3H)")
    r = rank(text=text, candidates=["CNC(=O)/C=C\\c1ccccc1", "CNC(=O)/C=C/c1ccccc1"])
    assert r.best.smiles == "CNC(=O)/C=C/c1ccccc1"
    assert "the printed coupling constants do" in r.verdict


def test_a_peak_list_given_beside_text_wins_with_a_note():
    # nothing is dropped without a word: the text's 13C section, unused because a list was given, is noted
    text = "13C NMR (101 MHz, CDCl3) δ " + ", ".join(str(s) for s, _ in META_PEAKS) + "."
    r = rank([s for s, _ in PARA_PEAKS], [META, PARA], text=text)
    assert r.best.smiles == PARA and len(r.peaks["13C"]) == len(PARA_PEAKS)
    assert any("13C from 'peaks'; the text's 13C section (10 peaks) was not used" in n for n in r.notes)


def test_one_structure_given_twice_is_named_so_and_counted_once():
    # the para ester written as aromatic and as Kekulé SMILES: the same structure, whose probabilities add up
    kekule = "CCOC(=O)C1=CC=C(C)C=C1"
    r = rank(peaks(PARA_PEAKS), [META, PARA, kekule])
    assert any(n.startswith(f"{PARA} and {kekule} are the same structure written twice") or
               n.startswith(f"{kekule} and {PARA} are the same structure written twice") for n in r.notes)
    assert r.verdict.startswith("clear winner") and "it is the same structure: together p = " in r.verdict


def test_a_given_solvent_that_differs_from_the_printed_one_is_noted():
    text = "13C NMR (101 MHz, DMSO-d6) δ " + ", ".join(str(s) for s, _ in PARA_PEAKS) + "."
    r = rank(text=text, candidates=[META, PARA], solvent="CDCl3")
    assert any("printed in DMSO-d6, but the solvent given is CDCl3: CDCl3 is used" in n for n in r.notes)
    assert not any("printed in" in n for n in rank(text=text, candidates=[META, PARA], solvent="DMSO").notes)


def test_text_with_only_another_nucleus_says_so():
    with pytest.raises(InputError, match="only 19F peaks were read; shiftrank ranks on 13C, 1H and HSQC"):
        rank(text="19F NMR (376 MHz, CDCl3) δ -62.5 (s).", candidates=["FC(F)(F)c1ccccc1"])


def test_an_unknown_solvent_name_is_noted():
    r = rank(peaks(PARA_PEAKS), [META, PARA], solvent="xyz-d9")
    assert any(n.startswith("solvent 'xyz-d9' is not one whose residual lines are known (CDCl3, DMSO-d6") for n in r.notes)
    assert not any("residual lines are known" in n for n in rank(peaks(PARA_PEAKS), [META, PARA], solvent="Unreported").notes)


def test_a_carbon_bound_to_boron_may_go_unlisted():
    # 2-(4-methoxyphenyl)-4,4,5,5-tetramethyl-1,3,2-dioxaborolane, 13C in CDCl3 (values from memory): the
    # carbon bound to boron is broadened by 11B and usually not printed (common practice)
    text = "13C NMR (101 MHz, CDCl3) δ 162.1, 136.5, 113.3, 83.5, 55.1, 24.8."
    true = "COc1ccc(B2OC(C)(C)C(C)(C)O2)cc1"
    r = rank(text=text, candidates=[true, "COc1cccc(B2OC(C)(C)C(C)(C)O2)c1"])
    best = r.candidates[0]
    assert best.smiles == true and best.probability > 0.9
    row = next(x for x in best.nuclei["13C"].assignment_table() if x["observed"] is None)
    assert "bound to boron" in row["notes"][0]
    assert not best.nuclei["13C"].flags                  # one unseen C-B carbon is how such spectra are printed
    assert "fit no candidate" not in r.verdict
    # without boron the same shortfall is a flagged count misfit: an anisole missing its ipso carbon
    r2 = rank(text="13C NMR (101 MHz, CDCl3) δ 129.5, 120.7, 114.0, 55.1.", candidates=["COc1ccccc1"])
    assert any("expects 5 signals" in f for f in r2.candidates[0].nuclei["13C"].flags)


def test_a_carbon_predicted_under_the_solvent_line_is_said_to_be_maybe_hidden():
    # 4-(dimethylamino)benzaldehyde in DMSO-d6 (values from memory): the N(CH3)2 carbons lie at about 39.7 ppm,
    # under the solvent's septet at 39.52 ppm (Fulmer et al. 2010), and are often not printed: the table and the
    # signal count say so (the cost of the missing class is unchanged)
    text = "13C NMR (101 MHz, DMSO-d6) δ 189.9, 154.3, 131.5, 124.9, 111.0."
    true = "CN(C)c1ccc(C=O)cc1"
    r = rank(text=text, candidates=[true])
    res = r.candidates[0].nuclei["13C"]
    row = next(x for x in res.assignment_table() if x["observed"] is None)
    assert row["atoms"] == [0, 2] and "under the DMSO-d6 line" in row["notes"][0]
    assert not res.flags and "fit no candidate" not in r.verdict
    # in CDCl3 (77.16 ppm) nothing hides there: the shortfall is flagged
    r2 = rank(text=text.replace("DMSO-d6", "CDCl3"), candidates=[true])
    res2 = r2.candidates[0].nuclei["13C"]
    assert any("expects 6 signals" in f for f in res2.flags)


def test_one_candidate_string_given_again_is_counted_not_repeated():
    # a candidate file concatenated with itself: the same string four times is "given 4 times" in the verdict
    # and the note, not listed four times (13C values invented for the demo-like check)
    t = "13C NMR (101 MHz, CDCl3) δ 166.5, 155.9, 133.4, 130.6, 122.8, 117.1, 112.2, 56.4, 52.4."
    r = rank(text=t, candidates=["COC(=O)c1ccc(Br)c(OC)c1"] * 4 + ["COC(=O)c1ccc(Br)cc1OC"])
    assert "given 4 times" in r.verdict and r.verdict.count("COC(=O)c1ccc(Br)c(OC)c1") == 1
    assert "COC(=O)c1ccc(Br)c(OC)c1 was given 4 times; together p" in " ".join(r.notes)
    r2 = rank(text=t, candidates=["COC(=O)c1ccc(Br)c(OC)c1"] * 2 + ["O=C(OC)c1ccc(Br)c(OC)c1"])
    assert "COC(=O)c1ccc(Br)c(OC)c1 (given 2 times) and O=C(OC)c1ccc(Br)c(OC)c1 are the same structure, given 3 times" in " ".join(r2.notes)


def test_a_printed_19f_section_is_compared_with_each_candidates_fluorine_environments_by_count():
    # 2,4- against 3,5-difluoroanisole: two fluorine environments against one (symmetry, common practice); the
    # 19F section (format as printed in SI; the values are INVENTED) lists two lines.  A reservation on the
    # candidate whose count differs, named in the notes; no 19F shift is predicted
    text = ("1H NMR (400 MHz, CDCl3) δ 7.45 (m, 1H), 6.95 (m, 1H), 6.85 (m, 1H), 3.90 (s, 3H).\n"
            "19F NMR (376 MHz, CDCl3) δ −110.5 (m, 1F), −113.8 (m, 1F).")
    r = rank(text=text, candidates=["COc1ccc(F)cc1F", "COc1cc(F)cc(F)c1"])
    by = {c.smiles: c for c in r.candidates}
    assert "19F: the text lists 2 signals; the candidate has 1 fluorine environment by symmetry" in by["COc1cc(F)cc(F)c1"].flags
    assert not any(f.startswith("19F") for f in by["COc1ccc(F)cc1F"].flags)
    assert any("19F section (2 signals) used by its count only" in n for n in r.notes)
    # a candidate without fluorine is told so
    r = rank(text=text, candidates=["COc1ccc(Cl)cc1Cl"])
    assert "19F: the text lists 2 signals but the candidate has no fluorine" in r.best.flags


def test_candidates_may_be_a_dict_of_names_and_smiles():
    # diethyl benzylphosphonate's 1H paragraph (values from memory) against an ester without P
    text = "1H NMR (400 MHz, CDCl3) δ 7.35–7.20 (m, 5H), 4.01 (m, 4H), 3.15 (d, J = 21.6 Hz, 2H), 1.24 (t, J = 7.0 Hz, 6H)."
    r = rank(text=text, candidates={"phosphonate": "CCOP(=O)(Cc1ccccc1)OCC", "ester": "CCOC(=O)Cc1ccccc1"})
    assert [c.name for c in r.candidates] == ["phosphonate", "ester"]


def test_a_printed_31p_section_is_counted_like_a_19f_one():
    # diethyl benzylphosphonate: its 1H paragraph and one 31P line (values from memory; only the count is read)
    # against a bisphosphonate with two P environments and an ester without P
    text = ("1H NMR (400 MHz, CDCl3) δ 7.35–7.20 (m, 5H), 4.01 (m, 4H), 3.15 (d, J = 21.6 Hz, 2H), 1.24 (t, J = 7.0 Hz, 6H).\n"
            "31P NMR (162 MHz, CDCl3) δ 26.4.")
    r = rank(text=text, candidates=["CCOP(=O)(Cc1ccccc1)OCC", "CCOP(=O)(Cc1ccc(CP(=O)(OC)OC)cc1)OCC",
                                    "CCOC(=O)Cc1ccccc1"])
    by = {c.smiles: c for c in r.candidates}
    assert not any(f.startswith("31P") for f in by["CCOP(=O)(Cc1ccccc1)OCC"].flags)
    assert ("31P: the text lists 1 signal; the candidate has 2 phosphorus environments by symmetry"
            in by["CCOP(=O)(Cc1ccc(CP(=O)(OC)OC)cc1)OCC"].flags)
    assert "31P: the text lists 1 signal but the candidate has no phosphorus" in by["CCOC(=O)Cc1ccccc1"].flags
    assert any("31P section (1 signal) used by its count only, against phosphorus environments" in n for n in r.notes)
    assert r.best.smiles == "CCOP(=O)(Cc1ccccc1)OCC"


# NMRShiftDB2 13C lists (dev_cases_regio.jsonl.gz, records 20209552 and 20208179): 3,4- and 2,5-difluoroacetophenone
DIFLUORO_34 = [26.3, 117.16, 117.56, 125.5, 134.63, 150.57, 153.78, 195.28]
DIFLUORO_25 = [31.27, 116.43, 118.29, 121.48, 126.69, 158.31, 158.65, 194.51]
DIFLUORO_ISOMERS = ["CC(=O)c1ccc(F)c(F)c1", "CC(=O)c1cccc(F)c1F", "CC(=O)c1cc(F)ccc1F", "CC(=O)c1cc(F)cc(F)c1",
                    "CC(=O)c1ccc(F)cc1F", "CC(=O)c1c(F)cccc1F"]


def test_a_mixture_of_two_isomers_names_the_second_form():
    # the two database lists merged, as a 1:1 mixture's printed list would read: the best candidate is one of the
    # pair and the note names the other as the second form (benchmarks/bench_mixtures.py measures this rule)
    r = rank(DIFLUORO_34 + DIFLUORO_25, DIFLUORO_ISOMERS, mixture=True)
    assert r.best.smiles == "CC(=O)c1ccc(F)c(F)c1"
    note = next(n for n in r.notes if "two isomers" in n)
    assert "fit CC(=O)c1cc(F)ccc1F best as the second" in note
    # a paragraph saying so does the same; rotamers (one compound in two forms) do not ask for a second candidate
    text = "13C NMR (101 MHz, CDCl3, 1:1 mixture of regioisomers) δ " + ", ".join(map(str, DIFLUORO_34 + DIFLUORO_25))
    assert any("fit CC(=O)c1cc(F)ccc1F best" in n for n in rank(text=text, candidates=DIFLUORO_ISOMERS).notes)
    assert not any("two isomers" in n for n in rank(DIFLUORO_34 + DIFLUORO_25, DIFLUORO_ISOMERS, rotamers=True).notes)


def test_the_verdict_of_a_mixture_names_the_second_form_and_raises_no_count_reservation():
    # the difluoroacetophenone pair above: 15 lines for 8-carbon candidates is what a mixture shows
    r = rank(DIFLUORO_34 + DIFLUORO_25, DIFLUORO_ISOMERS, mixture=True)
    assert "fit no candidate" not in r.verdict
    assert r.verdict.endswith("the lines left fit CC(=O)c1cc(F)ccc1F best as the second (see the notes)")


# Ethyl acetate and dichloromethane as residues in CDCl3: Fulmer et al. 2010 (Organometallics 29, 2176), Tables 1
# and 2 (13C 171.36, 60.49, 21.04, 14.19 and 53.52; 1H 4.12 q, 2.05 s, 1.26 t), values recalled from memory.
# The compound's own lines: 1-benzylindole in CDCl3, values from memory.
_RESIDUE_TEXT = ("1H NMR (400 MHz, CDCl3) δ 7.66 (d, J = 7.8 Hz, 1H), 7.32–7.24 (m, 4H), 7.18–7.08 (m, 5H), "
                 "6.56 (d, J = 3.1 Hz, 1H), 5.33 (s, 2H), 4.12 (q, J = 7.1 Hz, 0.4H), 2.05 (s, 0.6H), "
                 "1.26 (t, J = 7.1 Hz, 0.6H). 13C NMR (101 MHz, CDCl3) δ 171.2, 137.6, 136.4, 128.8, 128.7, 128.3, "
                 "127.6, 126.8, 121.7, 121.0, 119.6, 109.7, 101.7, 60.4, 53.5, 50.1, 21.1, 14.2.")


def test_unexplained_lines_of_a_solvent_residue_are_named():
    r = rank(text=_RESIDUE_TEXT, candidates=["c1ccc2c(c1)ccn2Cc1ccccc1", "c1ccc(Cc2c[nH]c3ccccc23)cc1"])
    c13 = next(n for n in r.notes if n.startswith("13C lines the top candidate leaves unexplained"))
    assert "171.2, 60.4, 21.1, 14.2 are where ethyl acetate shows" in c13
    assert "53.5 is where dichloromethane shows in CDCl3" in c13
    # how much: 0.4H over the residue's 2 protons at 4.12, 0.6H over 3 at 2.05 and at 1.26 give 0.2 mol per mol;
    # 0.2 × 88.11 g/mol against the compound's 207.27 is 7.8 % by weight (arithmetic on the printed integrals)
    h1 = next(n for n in r.notes if n.startswith("1H lines"))
    assert ("4.12, 2.05, 1.26 are where ethyl acetate (≈ 0.2 mol per mol of the top candidate, ≈ 7.8 % by weight) "
            "shows") in h1
    # printed integrals are protons: the 0.4H and 0.6H lines of the residue do not turn the list into relative areas
    # (which would make it 73 H), each counts as at least one proton
    assert any("integrals sum to 16 H" in f for f in r.candidates[0].flags)


def test_an_ethyl_ester_explains_the_lines_an_ethyl_acetate_residue_would_have():
    # ethyl 1-benzylindole-3-carboxylate (approximate values from memory): its own OCH2CH3 and C=O take 60.x, 14.x and 165.x, so no
    # residue is named; the lone 53.5 is still pointed at
    text = ("13C NMR (101 MHz, CDCl3) δ 165.0, 137.0, 136.2, 134.9, 129.0, 128.1, 127.1, 126.9, 123.0, 122.0, 121.8, "
            "110.3, 107.9, 59.7, 53.5, 50.8, 14.6.")
    r = rank(text=text, candidates=["CCOC(=O)c1cn(Cc2ccccc2)c2ccccc12", "CCOC(=O)c1cc2ccccc2n1Cc1ccccc1"])
    notes = [n for n in r.notes if "leaves unexplained" in n]
    assert notes and "ethyl acetate" not in notes[0] and "53.5 is where dichloromethane shows" in notes[0]


def test_a_value_printed_twice_may_be_two_carbons():
    """A printed 13C list (PMC7794720, open-access article via the NMRExtractor data set: N-methoxy-N-methyl-
    3-phenylpropanamide) gives 128.5 twice: the phenyl's ortho and meta pairs coincide.  Nine values for nine
    symmetry classes is a fit, not the 'fits no candidate's count' caveat; dropping two values still raises it."""
    text = "13C-NMR (100.6 MHz, CDCl3) δ = 173.8, 141.3, 128.5, 128.5, 126.1, 61.2, 33.8, 32.2, 30.7"
    cands = ["CON(C)C(=O)CCc1ccccc1", "CON(C)C(=O)C(C)c1ccccc1"]
    r = rank(candidates=cands, text=text)
    assert "symmetry-expected count" not in r.verdict
    assert any("128.5 ppm listed 2 times: read as one line of 2 nuclei" in n for n in r.notes)
    truth = next(c for c in r.candidates if c.smiles == cands[0])
    assert not any(f.startswith("expects") for f in truth.flags)
    d = truth.nuclei["13C"].to_dict()
    assert (d["expected_signals"], d["observed_signals"], d["listed_values"]) == (9, 8, 9)
    short = rank(candidates=cands, text="13C-NMR (100.6 MHz, CDCl3) δ = 173.8, 141.3, 128.5, 61.2, 33.8, 32.2, 30.7")
    assert "symmetry-expected count (9)" in short.verdict
    assert "listed_values" not in short.candidates[0].nuclei["13C"].to_dict()


def test_a_line_by_the_solvent_that_a_candidate_takes_counts_as_listed():
    """PMC6332268 (open-access article via the NMRExtractor data set) prints 17 values in CDCl3, one of them at
    76.7 beside the solvent's triplet: the candidate with 17 carbon classes takes it, so its count fits and the
    verdict raises no count caveat (the 15-class para isomer still has one line too many)."""
    text = ("13C-NMR (150 MHz, CDCl3) δ 176.3, 137.0, 131.4, 129.3, 128.7, 127.0, 126.5, 115.2, 76.7, 71.6, 52.4, "
            "52.0, 34.9, 22.6, 22.5, 19.1, 18.3")
    ortho = "COC(=O)C(C)(C)[C@]1(C(C)C)OC[C@@H](c2ccccc2Cl)O1"
    para = "COC(=O)C(C)(C)[C@]1(C(C)C)OC[C@@H](c2ccc(Cl)cc2)O1"
    r = rank(candidates=[ortho, para], text=text)
    assert "symmetry-expected count" not in r.verdict
    res = {c.smiles: c.nuclei["13C"] for c in r.candidates}
    assert (len(res[ortho].classes), res[ortho].observed_signals, res[ortho].listed_signals) == (17, 16, 17)
    assert any(f.startswith("expects 15 signals by symmetry, 16 observed") for f in
               next(c for c in r.candidates if c.smiles == para).flags)
