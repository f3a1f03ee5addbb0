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
    assert r.candidates[-1].smiles == "C1CC(" and "cannot parse" in r.candidates[-1].error
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
