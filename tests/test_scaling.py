"""DP4-style scaled shifts (Smith & Goodman 2010): each candidate's 13C predictions are moved along a line fitted
to its assigned pairs (offset and slope, with a prior towards no change) before the final assignment.

Values from memory: methyl 4-hydroxybenzoate 13C in DMSO-d6 166.1, 162.0, 131.5, 120.4, 115.4, 51.8 ppm.  A list
referenced 1.5 ppm high (the DMSO-d6 line set at 41.0 instead of 39.52, Fulmer et al. 2010) is the slip the
scaling absorbs.
"""
from __future__ import annotations

from dataclasses import replace

import pytest

import shiftrank
from shiftrank.score.ranking import ranking_settings

PARA = [166.1, 162.0, 131.5, 120.4, 115.4, 51.8]
CANDIDATES = ["COC(=O)c1ccc(O)cc1", "COC(=O)c1cccc(O)c1", "COC(=O)c1ccccc1O"]


def _scaling(values):
    r = shiftrank.rank(values, CANDIDATES)
    d = r.to_dict()
    best = d["ranking"][0]
    return best["smiles"], best["nuclei"]["13C"]["scaling"], best["nuclei"]["13C"]["mae"]


def test_the_shipped_13c_settings_scale_and_1h_does_not():
    s = ranking_settings()
    assert s.costs["13C"].scale_prior and s.costs["1H"].scale_prior is None


def test_a_referencing_slip_is_absorbed_by_the_offset():
    smi0, sc0, mae0 = _scaling(PARA)
    smi1, sc1, mae1 = _scaling([x + 1.5 for x in PARA])
    assert smi0 == smi1 == CANDIDATES[0]
    # the fitted offset follows the slip (shrunk by the prior towards no change), the slope stays near 1
    assert 0.2 < sc1["offset"] - sc0["offset"] < 1.5
    assert abs(sc1["slope"] - 1) < 0.02
    assert mae1 < mae0 + 1.5 - 0.2


def test_scaling_lowers_the_truths_cost_on_a_shifted_list():
    from shiftrank.score import ranking as R

    shifted = [x + 1.5 for x in PARA]
    with_scaling = shiftrank.rank(shifted, CANDIDATES).best.nuclei["13C"].cost
    orig = R.ranking_settings

    def unscaled():
        s = orig()
        return R.RankingSettings({**s.costs, "13C": replace(s.costs["13C"], scale_prior=None)}, s.temperature,
                                 s.joint_costs, s.view_temperature)

    R.ranking_settings = unscaled
    try:
        without = shiftrank.rank(shifted, CANDIDATES)
    finally:
        R.ranking_settings = orig
    assert without.best.smiles == CANDIDATES[0]
    assert with_scaling < without.best.nuclei["13C"].cost
    assert without.to_dict()["ranking"][0]["nuclei"]["13C"].get("scaling") is None


def test_printed_text_has_settings_of_its_own():
    """Lists read from a printed paragraph are scored with the costs fitted with printed paragraphs (ranking.printed
    in the manifest); typed lists keep the database-fitted ones."""
    from shiftrank.inputs.peaks import parse_peaks
    from shiftrank.inputs.text import read_nmr_text
    from shiftrank.score.evidence import EVIDENCE

    s = ranking_settings()
    assert s.printed is not None and s.printed.costs["13C"] != s.costs["13C"]
    assert s.printed.costs["1H"] == s.costs["1H"]
    text = "13C NMR (101 MHz, DMSO-d6) δ " + ", ".join(f"{x:.1f}" for x in PARA)
    printed = EVIDENCE["13C"].observed(read_nmr_text(text).peaklist("13C"))
    typed = EVIDENCE["13C"].observed(parse_peaks("\n".join(map(str, PARA))))
    assert s.for_peaks({"13C": printed}) is s.printed and s.for_peaks({"13C": typed}) is s
    a = shiftrank.rank(candidates=CANDIDATES, text=text).best
    b = shiftrank.rank(PARA, CANDIDATES).best
    assert a.smiles == b.smiles == CANDIDATES[0]
    assert a.nuclei["13C"].cost != pytest.approx(b.nuclei["13C"].cost)
