"""Ranking candidate structures against observed 13C and/or 1H peaks and the sample's history.

For each candidate: structure facts (formula, DBE, symmetry classes), predicted shifts for every
nucleus observed, the optimal peak assignment per nucleus (:mod:`shiftrank.score.evidence`, one
shared matcher in :mod:`shiftrank.score.matching`), and a total cost in nats.  Probabilities across
candidates follow DP4 (Smith & Goodman 2010, J. Am. Chem. Soc. 132, 12946): a product of Student-t
likelihoods over atoms — here together with the signal-count and multiplicity terms — over the
nuclei observed (DP4 combines nuclei the same way), normalised over the candidates with the given
priors (equal by default).  Temperatures fitted on development cases temper each nucleus's product
and the joint one, because errors of atoms in one molecule are correlated; beside another spectrum a
nucleus may also use match costs of its own (:meth:`RankingSettings.costs_for`: printed 1H shifts are
widened less next to a 13C list than alone).

Peaks come as lists (``peaks`` for 13C, ``peaks_1h`` for 1H) or as printed characterisation text
(``text``), which :func:`shiftrank.inputs.text.read_nmr_text` reads; any one is enough.

A candidate whose formula contradicts the sample's formula (or whose mass contradicts the given
mass) is flagged and, by default, ranked last with probability 0 and the reason.

Each candidate's structure facts are computed once per SMILES (:mod:`shiftrank.score.structures`); the
verdict in words comes from :mod:`shiftrank.score.verdicts`, the lines that separate the best two from
:mod:`shiftrank.score.separation`.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field, replace
from functools import lru_cache
from typing import Sequence

import numpy as np
from rdkit import Chem

from ..chem.formula import ADDUCTS, formula_matches, hill, ion_label, sample_formula
from ..chem.inventory import COUNTED_NUCLEI
from ..chem.structure import StructureFacts
from ..errors import InputError
from ..inputs.peaks import (HsqcList, Peak, PeakList, cosy_list, doubled_note, flag_solvent, hmbc_list, mark_doubled, noesy_list,
                            merge_duplicates, dept135_from_signs, looks_like_1h, not_13c_message, peak_text, peaks_from_records)
from ..inputs.solvents import SOLVENTS, normalise_solvent
from ..inputs.mass import MassStatement, ion_fits, nearest_ion, read_analysis_formula, read_mass_statements
from ..inputs.text import NmrText, read_nmr_text
from ..prediction.api import checked_parts, environments_isolated
from ..prediction.environment import MolParts
from ..prediction.model_files import default_manifest, default_model
from . import correlations  # noqa: F401 - registers the HMBC, COSY and NOESY strategies in EVIDENCE
from .evidence import CORRELATIONS, EVIDENCE, MODELS_FOR, ClassMeans, NucleusResult, hsqc_list
from ..words import count
from .matching import MatchCosts, ObservedPeak, assign
from .structures import (candidate_facts, candidate_pi, element_environments, parse_candidate, standardised_candidate,
                         tautomer_notes)
from .verdicts import (ISOMER_MIXTURE, _canonical_of, _compound_of, _tautomer_note, spectra_disagreement,  # noqa: F401 - re-exported
                       impurity_notes, tautomer_groups, verdict)

MASS_TOLERANCE = 0.5  # Da, default window for a neutral molecular mass
MAX_CANDIDATES = 1000  # per case, generated alternatives included
NUCLEI = ("13C", "1H")
#: the kinds of observed spectra: the two nuclei, HSQC and HMBC (which need both models), COSY and NOESY
#: (also ROESY); the 2D correlations come after the 1D spectra, whose assignments they read
SPECTRA = ("13C", "1H", "HSQC", "HMBC", "COSY", "NOESY")
CAUTION = ("A ranking is evidence, not a certificate of identity. Confirm the structure by orthogonal methods "
           "(2D NMR, MS, an authentic reference) and follow local regulations and validated procedures.")


def _r(x, nd):
    return None if x is None or (isinstance(x, float) and not np.isfinite(x)) else round(float(x), nd)


@dataclass
class CandidateResult:
    """How one candidate explains the spectra."""

    smiles: str
    position: int                      # 0-based position in the input list
    name: str | None = None
    error: str | None = None
    facts: StructureFacts | None = None
    nuclei: dict = field(default_factory=dict)   # nucleus -> NucleusResult
    cost: float = float("inf")         # total cost in nats (lower is better)
    score: float = float("-inf")       # −(tempered cost): higher is better
    probability: float = 0.0
    flags: list[str] = field(default_factory=list)
    formula_ok: bool | None = None
    #: with two or more spectra: the probability each spectrum alone gives (its own temperature, no priors)
    by_spectrum: dict = field(default_factory=dict)
    generated: bool = False            # an alternative added by ``with_isomers``; ``name`` is its relation
    divisors: dict = field(default_factory=dict)  # nucleus -> the temperature its cost was divided by

    def __repr__(self) -> str:
        """Short: the structure, its probability and fit (the full record is :meth:`to_dict`)."""
        if self.error:
            return f"<CandidateResult {self.name or self.smiles}: error: {self.error}>"
        fit = ", ".join(f"{n} MAE {r.mae:.2f}" for n, r in self.nuclei.items() if r.mae is not None)
        named = f" ({self.name})" if self.name and self.name != self.smiles else ""
        return f"<CandidateResult {self.smiles}{named} p={self.probability:.3f}; {fit}>"

    @property
    def main(self) -> NucleusResult | None:
        """The 13C result when 13C was observed, else the 1H one."""
        return self.nuclei.get("13C") or self.nuclei.get("1H")

    # single-nucleus views (13C first), for tables and older callers
    @property
    def classes(self):
        return self.main.classes if self.main else []

    @property
    def assignment(self):
        return self.main.assignment if self.main else None

    @property
    def mae(self) -> float | None:
        return self.main.mae if self.main else None

    @property
    def max_abs_deviation(self) -> float | None:
        return self.main.max_abs_deviation if self.main else None

    @property
    def beyond_3sigma(self) -> int:
        return sum(r.beyond_3sigma for r in self.nuclei.values())

    def assignment_table(self, nucleus: str | None = None) -> list[dict]:
        res = self.nuclei.get(nucleus) if nucleus else self.main
        return res.assignment_table() if res else []

    def to_dict(self, detail: bool = False) -> dict:
        d = {"smiles": self.smiles, "score": _r(self.score, 4), "probability": _r(self.probability, 6)}
        if self.name:
            d["name"] = self.name
        if self.generated:
            d["relation"], d["generated"] = self.name, True
        if self.error:
            d["error"] = self.error
            return d
        d.update({"formula": self.facts.formula, "dbe": self.facts.dbe, "formula_ok": self.formula_ok,
                  "cost": _r(self.cost, 3), "flags": self.flags,
                  "nuclei": {n: r.to_dict(detail) for n, r in self.nuclei.items()}})
        if self.by_spectrum:
            d["probability_by_spectrum"] = {n: _r(p, 6) for n, p in self.by_spectrum.items()}
        return d


@dataclass
class RankResult:
    """Ranked candidates (best first) with the verdict and the peaks used, per nucleus."""

    id: str | None
    candidates: list[CandidateResult]
    peaks: dict                        # nucleus -> list[ObservedPeak]
    verdict: str
    notes: list[str] = field(default_factory=list)
    model_version: str | None = None
    solvent: str | None = None          # as given or printed (predictions for a spectrum not given use it)
    counted: dict = field(default_factory=dict)   # printed 19F/31P signals by nucleus (counted, not predicted)

    @property
    def best(self) -> CandidateResult:
        return self.candidates[0]

    def __repr__(self) -> str:
        """Short, for a script or a notebook: candidates, spectra, verdict (``str()`` gives the terminal table,
        :meth:`to_dict` the full record)."""
        return (f"<RankResult {self.id + ': ' if self.id else ''}{len(self.candidates)} candidates, "
                f"{' + '.join(self.nuclei) or 'no spectra'}; verdict: {self.verdict}>")

    def __str__(self) -> str:
        """The ranking as the command line prints it (table, flags, verdict, best candidate's assignment)."""
        import io
        from ..outputs.terminal import print_ranking

        buf = io.StringIO()
        print_ranking(self, {}, buf)
        return buf.getvalue()

    def _repr_html_(self) -> str:
        """The report's section for this case, shown by a notebook."""
        from ..outputs.report import notebook_html

        return notebook_html(self)

    @property
    def nuclei(self) -> list[str]:
        return [n for n in SPECTRA if n in self.peaks]

    @property
    def lone(self) -> bool:
        """One readable candidate: its probability is 1 by construction and says nothing (the tables show a
        dash for it; the verdict says how the spectra fit)."""
        return sum(1 for c in self.candidates if not c.error) == 1

    @property
    def runner_up(self) -> CandidateResult | None:
        """The best readable candidate that is another compound than the best one (a structure given twice, or
        drawn as another NH/OH tautomer, is the same compound); None when there is none."""
        if self.candidates[0].error:
            return None
        best = _compound_of(self.candidates[0].smiles)
        return next((c for c in self.candidates[1:] if not c.error and _compound_of(c.smiles) != best), None)

    def separation(self, limit: int = 4) -> list:
        """The observed lines that separate the best candidate from the runner-up most, in ln odds
        (:func:`shiftrank.score.separation.separating_signals`); empty with fewer than two candidates."""
        from .separation import separating_signals

        second = self.runner_up
        return separating_signals(self.best, second, limit) if second is not None else []

    def next_spectrum(self, geometry: bool = True) -> list[str]:
        """With #1 not clearly ahead, what a 13C or 1H spectrum not given would add (predictions of the two,
        :func:`shiftrank.score.separation.next_spectrum`); ``geometry`` False leaves out the NOE hint, which embeds
        both candidates' conformers (batch lines)."""
        from .separation import next_spectrum

        return next_spectrum(self, self.solvent, geometry)

    def to_dict(self, detail: bool = False, geometry: bool = True) -> dict:
        d = {"id": self.id, "ranking": [c.to_dict(detail) for c in self.candidates], "verdict": self.verdict,
             "nuclei": self.nuclei}
        sep = self.separation()
        if sep:
            d["separation"] = {"first": self.best.smiles, "second": self.runner_up.smiles,
                               "signals": [s.to_dict() for s in sep]}
        if self.notes:
            d["notes"] = self.notes
        if detail:
            d["peaks"] = {n: [_peak_dict(p) for p in ps] for n, ps in self.peaks.items()}
            nxt = self.next_spectrum(geometry)
            if nxt:
                d["next_spectrum"] = nxt
        d["model"] = self.model_version
        return d


def _peak_dict(p: ObservedPeak) -> dict:
    d = {"shift": p.shift, "multiplicity": p.multiplicity, "solvent": p.solvent}
    if p.lo is not None:
        d["range"] = [p.lo, p.hi]
    if p.j:
        d["j"] = list(p.j)
    if p.capacity is not None:
        d["integral"] = p.capacity
    if p.h_lo is not None:
        d["h"] = p.h_lo if p.h_lo == p.h_hi else [p.h_lo, p.h_hi]
    return d


@dataclass(frozen=True)
class RankingSettings:
    costs: dict                 # nucleus -> MatchCosts
    temperature: dict           # nucleus -> T alone; "joint" -> {nucleus: T} when several nuclei are observed
    joint_costs: dict = field(default_factory=dict)   # nucleus -> MatchCosts beside another spectrum, where they differ
    view_temperature: dict = field(default_factory=dict)   # nucleus -> T of its joint-mode costs taken alone

    def divisor(self, nucleus: str, joint: bool) -> float:
        return self.temperature["joint"][nucleus] if joint else self.temperature[nucleus]

    def costs_for(self, nucleus: str, joint: bool) -> MatchCosts:
        """The match costs of ``nucleus`` alone, or beside another spectrum (e.g. a narrower 1H widening)."""
        return self.joint_costs.get(nucleus, self.costs[nucleus]) if joint else self.costs[nucleus]

    def view_divisor(self, nucleus: str) -> float:
        """Temperature of one spectrum's own view when it was scored beside others (its joint-mode costs alone)."""
        return self.view_temperature.get(nucleus, self.temperature[nucleus])

    printed: "RankingSettings | None" = None   # for a case whose 13C list was read from printed text

    def for_peaks(self, peaks: dict) -> "RankingSettings":
        """The settings of a case: the printed-text ones when its 13C list was read from a printed paragraph."""
        obs = peaks.get("13C")
        return self.printed if self.printed is not None and getattr(obs, "printed", False) else self


def ranking_settings() -> RankingSettings:
    """Match costs and temperatures stored with the shipped models (fitted on development data); the
    manifest's ``ranking.printed`` entries (13C costs and temperature, joint temperatures), fitted on printed
    paragraphs, override them for cases whose 13C list was read from printed text."""
    return settings_from_manifest(default_manifest())


def settings_from_manifest(man: dict) -> RankingSettings:
    """:func:`ranking_settings` of a given manifest (``training.calibrate_ranking`` refits a copy's)."""
    r = man.get("ranking", {})
    base = _settings_from(man, r)
    over = r.get("printed")
    if over:
        merged = {**r, **{k: v for k, v in over.items() if k != "joint"},
                  "joint": {**r.get("joint", {}), **over.get("joint", {})}}
        base = replace(base, printed=_settings_from(man, merged))
    return base


def _settings_from(man: dict, r: dict) -> RankingSettings:
    costs, temps = {}, {}
    error_fields = ("t_df", "t_scale", "h_t_df", "h_t_scale")

    def stored_costs(d: dict) -> dict:
        # the fitted cost fields of a manifest entry (the error model comes from the shift models)
        return {k: d[k] for k in MatchCosts.__dataclass_fields__ if k in d and k not in error_fields}

    for n in SPECTRA:
        # the error model of each dimension is its shift model's (HSQC: 13C for the carbon, 1H for the proton)
        us = [man.get("nuclei", {}).get(m, {}).get("uncertainty", {}) for m in MODELS_FOR[n]]
        fixed = {"t_df": us[0].get("t_df", 4.0), "t_scale": us[0].get("t_scale", 1.0)}
        if len(us) > 1:
            fixed.update(h_t_df=us[1].get("t_df", 4.0), h_t_scale=us[1].get("t_scale", 1.0))
        rn = r.get(n, {})
        costs[n] = MatchCosts(**fixed, **stored_costs(rn))
        temps[n] = float(rn.get("temperature", 1.0))
    joint = r.get("joint", {})
    temps["joint"], joint_costs, view = {}, {}, {}
    for n in SPECTRA:
        jn = joint.get(n) if isinstance(joint.get(n), dict) else {}
        temps["joint"][n] = float(jn.get("temperature", temps[n]))
        kw = stored_costs(jn)
        if kw:
            joint_costs[n] = replace(costs[n], **kw)
            view[n] = float(jn.get("temperature_alone", temps[n]))
    return RankingSettings(costs, temps, joint_costs, view)


def as_peaklist(peaks, solvent: str | None = None, nucleus: str = "13C") -> PeakList:
    """Normalise the accepted peak inputs (PeakList, list of Peak, numbers or dicts, a NumPy array, or text as
    :func:`~shiftrank.inputs.peaks.peak_text` reads it) and flag solvent."""
    what = "peaks" if nucleus == "13C" else "peaks_1h"
    if hasattr(peaks, "tolist") and not isinstance(peaks, (list, tuple, str)):
        peaks = peaks.tolist()                # a NumPy array of shifts
    if isinstance(peaks, PeakList):
        pl = peaks
    elif isinstance(peaks, str):
        # a peak list as typed or pasted (one peak per line, comma-separated values, or a printed paragraph)
        pl = peak_text(peaks, what, nucleus)
    else:
        if peaks is None or not isinstance(peaks, (list, tuple)) or len(peaks) == 0:
            raise InputError(f"{what}: the peak list is empty or not a list")
        notes: list[str] = []
        items = list(peaks) if all(isinstance(p, Peak) for p in peaks) else \
            peaks_from_records(list(peaks), what, nucleus, notes)
        dept135 = nucleus == "13C" and dept135_from_signs(items, notes, what)
        if nucleus == "13C":
            items = merge_duplicates(items, notes, nucleus)
        else:
            items = sorted(items, key=lambda p: p.shift)
        pl = PeakList(nucleus, items, "peaks", notes, dept135=dept135)
    if not pl.peaks:
        raise InputError(f"{pl.source}: the peak list is empty")
    if nucleus == "13C" and looks_like_1h(p.shift for p in pl.peaks):
        raise InputError(not_13c_message(pl))
    return flag_solvent(pl, solvent, keep_integrated=True)


def observed_peaks(pl: PeakList) -> list[ObservedPeak]:
    return EVIDENCE[pl.nucleus].observed(pl)


@dataclass
class _Prepared:
    smiles: str
    position: int
    name: str | None
    mol: Chem.Mol | None = None
    parts: dict = field(default_factory=dict)   # nucleus -> MolParts
    error: str | None = None
    preds: dict = field(default_factory=dict)   # nucleus -> (shifts, sigmas) of the centres
    generated: bool = False


@lru_cache(maxsize=32768)
def _describe(smiles: str, solvent: str | None, nucleus: str) -> tuple[MolParts | None, str | None]:
    """RDKit facts of a candidate for the descriptors of ``nucleus`` (cached per SMILES and solvent)."""
    mol, _, err = parse_candidate(smiles)
    if err:
        return None, err
    try:
        return checked_parts(mol, f"SMILES '{smiles}'", solvent, nucleus, candidate_pi(smiles)), None
    except InputError as exc:
        return None, str(exc)


def _prepare(cand, position: int, solvent: str | None, nuclei) -> _Prepared:
    name, generated = None, False
    if isinstance(cand, tuple):
        name, cand, *rest = cand
        if rest and rest[0]:
            return _Prepared(str(cand), position, name, error=str(rest[0]))
        generated = len(rest) > 1 and rest[1] == GENERATED
    if isinstance(cand, Chem.Mol):
        cand = Chem.MolToSmiles(Chem.RemoveHs(cand))
    if not isinstance(cand, str):
        return _Prepared(str(cand), position, name, error=f"candidate {position + 1}: expected a SMILES string, "
                                                            f"got {type(cand).__name__}")
    prep = _Prepared(cand, position, name, generated=generated)
    mol, _, err = parse_candidate(cand)
    if err:
        prep.error = err
        return prep
    prep.mol = mol
    for n in nuclei:
        parts, err = _describe(cand, solvent, n)
        if err:
            prep.error, prep.parts = err, {}
            return prep
        prep.parts[n] = parts
    return prep


def _score_candidate(prep: _Prepared, preds: dict, peaks: dict, settings: RankingSettings) -> CandidateResult:
    res = CandidateResult(prep.smiles, prep.position, prep.name, generated=prep.generated)
    if prep.error:
        res.error = prep.error
        return res
    _, ranks, _ = parse_candidate(prep.smiles)
    std = standardised_candidate(prep.smiles)
    res.facts = candidate_facts(prep.smiles)
    if std.notes:
        only_labels = all("isotope label" in n for n in std.notes)   # the formula keeps D/T (chem/labels.py)
        res.flags.append(f"standardised ({'prediction uses' if only_labels else 'formula and prediction use'} the parent): "
                         + "; ".join(std.notes))
    res.flags.extend(tautomer_notes(prep.smiles))
    identity = std.atom_map == list(range(len(std.atom_map)))
    total = 0.0
    means = {}
    for n in {m for s in peaks for m in MODELS_FOR[s]}:
        parts = prep.parts[n]
        means[n] = getattr(parts, "class_means", None)
        if means[n] is None or means[n].mu is not preds[n][0]:
            means[n] = parts.class_means = ClassMeans(parts.centres, *preds[n])
    for n in sorted(peaks, key=SPECTRA.index):   # (HMBC after the 1D spectra whose assignments it reads)
        obs = peaks[n]
        mu = (means["13C"], means["1H"]) if len(MODELS_FOR[n]) == 2 else means[MODELS_FOR[n][0]]
        kw = {"given": dict(res.nuclei)} if n in CORRELATIONS else {}
        r = EVIDENCE[n].evaluate(prep.mol, ranks, mu, None, obs, settings.costs_for(n, len(peaks) > 1), facts=res.facts, **kw)
        res.nuclei[n] = r
        res.flags.extend(r.flags)
        res.divisors[n] = settings.divisor(n, len(peaks) > 1)
        total += r.cost / res.divisors[n]
    if not identity:  # tables speak of the atoms as the user drew them
        for r in res.nuclei.values():
            for c in r.classes:
                c.atoms = [std.atom_map[a] for a in c.atoms]
                if c.h_atoms is not None:
                    c.h_atoms = [std.atom_map[a] for a in c.h_atoms]
                if c.pair_with is not None:
                    c.pair_with = [std.atom_map[a] for a in c.pair_with]
    res.cost = total
    return res


def _history_checks(res: CandidateResult, formula_counts, mass: float | None, mass_tol: float, charge: int = 0,
                    ions: Sequence[MassStatement] = ()) -> None:
    if res.error:
        return
    if formula_counts is not None:
        res.formula_ok = formula_matches(res.facts.counts, formula_counts, charge)
        if not res.formula_ok:
            res.flags.insert(0, f"formula {res.facts.formula} contradicts the sample formula {hill(formula_counts)}")
    if mass is not None:
        ok = min(abs(res.facts.monoisotopic_mass - mass), abs(res.facts.average_mass - mass)) <= mass_tol
        if not ok:
            res.formula_ok = False
            res.flags.insert(0, f"mass {res.facts.monoisotopic_mass:.3f} (average {res.facts.average_mass:.2f}) "
                                f"contradicts the sample mass {mass:g} ± {mass_tol:g}")
    for st in ions:
        if ion_fits(res.facts.counts, st):
            if res.formula_ok is None:
                res.formula_ok = True
            continue
        res.formula_ok = False
        a, mz = nearest_ion(res.facts.counts, st)
        res.flags.insert(0, f"MS: found m/z {st.found} does not fit {res.facts.formula} ({ion_label(a)} would be m/z {mz:.4f})")


def _probabilities(cands: list[CandidateResult], priors, demote: bool, settings: RankingSettings | None = None,
                   spectra: Sequence[str] = ()) -> None:
    """Probabilities over the candidates from their total tempered costs (and the priors); with two or
    more spectra and ``settings``, also each spectrum's own view (:attr:`CandidateResult.by_spectrum`)."""
    valid = [c for c in cands if not c.error]
    for c in valid:
        c.score = -c.cost
    pool = [c for c in valid if c.formula_ok is not False] if demote else valid
    if not pool:
        pool = valid
    if not pool:
        return
    logp = np.array([c.score + np.log(priors[c.position]) if priors is not None else c.score for c in pool])
    for c, p in zip(pool, _softmax(logp)):
        c.probability = float(p)
    if settings is not None and len(spectra) > 1:
        for n in spectra:
            own = _softmax(np.array([-c.nuclei[n].cost / settings.view_divisor(n) for c in pool]))
            for c, p in zip(pool, own):
                c.by_spectrum[n] = float(p)


def _softmax(logp: np.ndarray) -> np.ndarray:
    w = np.exp(logp - logp.max())
    return w / w.sum()


def _order_key(c: CandidateResult, demote: bool):
    return (c.error is not None, demote and c.formula_ok is False, -c.probability, c.cost, c.position)


def _check_priors(priors, n: int):
    if priors is None:
        return None
    try:
        p = np.asarray(priors, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"priors: need {n} positive numbers, one per candidate") from None
    if p.shape != (n,) or not np.all(np.isfinite(p)) or np.any(p <= 0):
        raise InputError(f"priors: need {n} positive numbers, one per candidate")
    return p / p.sum()


def case_text(case: dict) -> str | None:
    """A case's printed characterisation text (a string, or a list of paragraphs joined by newlines)."""
    text = case.get("text")
    if text is None:
        return None
    if isinstance(text, (list, tuple)) and all(isinstance(t, str) for t in text):
        text = "\n".join(text)
    if not isinstance(text, str):
        raise InputError("text: expected the characterisation paragraph(s) as a string")
    return text


def case_peaklists(case: dict) -> tuple[dict, str | None, list[str]]:
    """Peak lists per nucleus of one case (from ``peaks``, ``peaks_1h`` and/or ``text``), its solvent
    and the notes made while reading them.  Raises :class:`InputError` when no peaks are given."""
    notes: list[str] = []
    solvent = normalise_solvent(case.get("solvent")) if isinstance(case.get("solvent"), str) else None
    if case.get("solvent") is not None and not isinstance(case.get("solvent"), str):
        raise InputError("solvent: expected a solvent name such as CDCl3")
    given_solvent = case.get("solvent").strip() if isinstance(case.get("solvent"), str) else ""
    if given_solvent and solvent is None and given_solvent.lower() not in ("unreported", "unknown", "n/a", "none", "-"):
        known = ", ".join(k for k in SOLVENTS if " + " not in k)
        notes.append(f"solvent '{given_solvent}' is not one whose residual lines are known ({known}, or a mixture of "
                     "them): none set aside")
    text = case_text(case)
    parsed: NmrText | None = None
    if text is not None:
        parsed = read_nmr_text(text, "text")
        notes.extend(f"text: {n}" for n in parsed.notes)
    out: dict = {}
    for nucleus, key in (("13C", "peaks"), ("1H", "peaks_1h")):
        given = case.get(key)
        sec_solvent = solvent
        if parsed is not None and given is None:
            sec = parsed.section(nucleus)
            if sec is not None and sec.peaks:
                sec_solvent = solvent or sec.solvent
                if solvent and sec.solvent and normalise_solvent(sec.solvent) not in (None, solvent):
                    notes.append(f"{nucleus} text: printed in {sec.solvent}, but the solvent given is {solvent}: "
                                 f"{solvent} is used")
                pl = parsed.peaklist(nucleus, sec_solvent, source=f"{nucleus} text")
                out[nucleus] = pl
                notes.extend(pl.notes)
            continue
        if given is None or (isinstance(given, (list, tuple)) and len(given) == 0 and nucleus == "1H"):
            continue
        if parsed is not None and parsed.section(nucleus) is not None and parsed.section(nucleus).peaks:
            # both given: the list wins, and nothing is dropped without a word
            notes.append(f"{nucleus} from '{key}'; the text's {nucleus} section "
                         f"({len(parsed.section(nucleus).peaks)} peaks) was not used")
        pl = as_peaklist(given, sec_solvent, nucleus)
        out[nucleus] = pl
        notes.extend(pl.notes)
    if isinstance(case.get("hsqc"), HsqcList):   # read from a file already, with its notes
        out["HSQC"] = case["hsqc"]
        notes.extend(case["hsqc"].notes)
    elif case.get("hsqc") is not None:
        out["HSQC"] = hsqc_list(case["hsqc"], "hsqc")
    elif parsed is not None:
        hs = parsed.hsqc()   # an HSQC/HMQC section printed with the paragraph: δC/δH pairs
        if hs is not None:
            out["HSQC"] = hs
            notes.extend(f"text: {n}" for n in hs.notes)
    for kind, key, reader in (("HMBC", "hmbc", hmbc_list), ("COSY", "cosy", cosy_list), ("NOESY", "noesy", noesy_list)):
        if isinstance(case.get(key), HsqcList):   # read from a file already, with its notes
            out[kind] = case[key]
            notes.extend(case[key].notes)
        elif case.get(key) is not None:
            out[kind] = reader(case[key], key)
            notes.extend(out[kind].notes)
        elif parsed is not None:
            found = parsed.hsqc(f"{kind} text", kind)   # a section printed with the paragraph, as δ/δ pairs
            if found is not None:
                out[kind] = found
                notes.extend(f"text: {n}" for n in found.notes)
    if not out:
        other = sorted({sec.nucleus for sec in parsed.sections if sec.peaks}) if parsed is not None else []
        if other:
            raise InputError(f"text: only {', '.join(other)} peaks were read; shiftrank ranks on 13C, 1H and HSQC "
                             "(give one of those sections or lists)")
        raise InputError("no peaks: give 'peaks' (13C), 'peaks_1h' (1H), 'hsqc', 'hmbc', 'cosy' or 'noesy' (cross peaks) "
                         "or 'text' (printed characterisation)")
    two, mix = case.get("rotamers"), case.get("mixture")
    if two is not None and not isinstance(two, bool):
        raise InputError("rotamers: expected true or false (the spectra show two forms of the compound)")
    if mix is not None and not isinstance(mix, bool):
        raise InputError("mixture: expected true or false (the sample is a mixture of two isomers)")
    if two or mix:
        said = "mixture of isomers" if mix else "rotamers"
        for nucleus in ("13C", "1H"):
            pl = out.get(nucleus)
            if pl is not None:
                pl.two_forms = said
                n = mark_doubled(pl.peaks, nucleus)
                if n:
                    notes.append(f"{nucleus}: {doubled_note(said, n)}")
    if parsed is not None:
        for sec in parsed.sections:
            if sec.nucleus in COUNTED_NUCLEI and sec.peaks and sec is parsed.section(sec.nucleus):
                word = COUNTED_NUCLEI[sec.nucleus][2]
                notes.append(f"text: {sec.nucleus} section ({count(len(sec.peaks), 'signal')}) used by its count only, "
                             f"against {word} environments ({sec.nucleus} shifts are not predicted)")
            elif sec.nucleus not in NUCLEI and sec.nucleus not in ("HSQC",) + CORRELATIONS + ("ROESY",) and sec.peaks:
                notes.append(f"text: {sec.nucleus} peaks read but not used")
    if solvent is None and parsed is not None and parsed.solvent:
        solvent = parsed.solvent
    return out, solvent, notes


#: nats by which a second candidate must explain the lines the best one leaves, to be named as the second form
SECOND_FORM_GAIN = 2.0


def second_form(results: list[CandidateResult], peaks: dict,
                settings: "RankingSettings") -> tuple[str, CandidateResult | None] | None:
    """For a sample said to be a mixture of isomers: which other candidate best explains, beside the best one,
    the lines of the 13C list: its classes and the best one's matched to the whole list together (the Hungarian
    matching with the case's costs), against leaving those lines unexplained: (the note, that candidate or None
    when none explains them).  None when the case is not such a mixture, has no 13C list or fewer than two
    readable candidates.  (1H was measured on the six pairs the open data has 1H lists for, 2 of 4 right: not
    offered.)"""
    nucleus = "13C"
    obs = peaks.get(nucleus)
    said = getattr(obs, "two_forms", None) if obs is not None else None
    if not said or not ISOMER_MIXTURE.search(said):
        return None
    valid = [c for c in results if not c.error and nucleus in c.nuclei]
    if len(valid) < 2:
        return None
    best = valid[0]
    # (a line no class explains costs in full here: under the mixture, every line is one of the two compounds')
    base_costs = settings.costs_for(nucleus, len(peaks) > 1)
    costs = replace(base_costs, extra_doubled=base_costs.extra)

    def cost(classes) -> float:
        return assign(classes, obs, costs).total_cost

    base = best.nuclei[nucleus].classes
    alone = cost(base)
    key = _canonical_of(best.smiles)
    # (the other candidate's groups of alike classes keep ids of their own)
    scored = sorted(((cost(base + [replace(x, twin_of=None if x.twin_of is None else x.twin_of + 100000)
                                   for x in c.nuclei[nucleus].classes]), k, c)
                     for k, c in enumerate(valid[1:]) if _canonical_of(c.smiles) != key), key=lambda t: t[:2])
    if not scored:
        return None
    head = f"the text says the sample holds two isomers ('{said}')" if said != "mixture of isomers" else \
        "the sample holds two isomers (as said)"
    label = best.name or best.smiles
    u, _, c = scored[0]
    if alone - u < SECOND_FORM_GAIN:
        return (f"{head}: beside {label} as the major form, no other candidate explains the {nucleus} lines it leaves "
                "better than leaving them unexplained (the second may be none of the candidates)"), None
    ahead = f", {scored[1][0] - u:.1f} nats ahead of {scored[1][2].name or scored[1][2].smiles}" if len(scored) > 1 else ""
    return (f"{head}: beside {label} as the major form, the {nucleus} lines it leaves fit {c.name or c.smiles} best as "
            f"the second ({alone - u:.1f} nats better than leaving them unexplained{ahead}); read the two forms' lines "
            "against each other before trusting either"), c


_COUNTED_HEADER = re.compile(r"19\s*F|¹⁹F|31\s*P|³¹P")


def printed_counted_lines(case: dict) -> dict[str, int]:
    """How many signals the case's printed text lists in its 19F and 31P sections ({nucleus: signals}; a
    nucleus without a section with peaks is left out)."""
    text = case_text(case)
    if text is None or not _COUNTED_HEADER.search(text):
        return {}
    try:
        parsed = read_nmr_text(text, "text")
    except InputError:
        return {}
    out = {}
    for nucleus in COUNTED_NUCLEI:
        sec = parsed.section(nucleus)
        if sec is not None and sec.peaks:
            out[nucleus] = len(sec.peaks)
    return out


def _count_checks(res: CandidateResult, lines: dict[str, int]) -> None:
    """Flag a candidate whose fluorine (phosphorus) environments, symmetry classes of the element, differ in
    number from the printed 19F (31P) signals.  A count only (no 19F or 31P shifts are predicted), shown as a
    reservation, not priced: a CF2 beside a stereocentre may show two lines and two environments may coincide."""
    if res.error or not lines:
        return
    for nucleus, n in lines.items():
        z, _, word = COUNTED_NUCLEI[nucleus]
        envs = element_environments(res.smiles, z)
        if envs == 0:
            res.flags.append(f"{nucleus}: the text lists {count(n, 'signal')} but the candidate has no {word}")
        elif envs != n:
            res.flags.append(f"{nucleus}: the text lists {count(n, 'signal')}; the candidate has "
                             f"{count(envs, word + ' environment')} by symmetry")


def case_ions(case: dict) -> list[MassStatement]:
    """The molecular ions a case states: its ``mz`` field (a number, or ``{"found": …, "adduct": "M+H"}``)
    and the mass statements of its printed text (``HRMS (ESI) m/z [M+Na]+ calcd for … found …``)."""
    out = []
    mz = case.get("mz")
    if mz is not None:
        adduct = None
        if isinstance(mz, dict):
            mz, adduct = mz.get("found"), mz.get("adduct")
            if adduct is not None and adduct not in ADDUCTS:
                raise InputError(f"mz: adduct '{adduct}' is not one of {', '.join(ADDUCTS)}")
        if isinstance(mz, bool) or not isinstance(mz, (int, float)) or not np.isfinite(mz) or mz <= 0:
            raise InputError(f"mz: expected a positive number (the measured m/z), got {mz!r}")
        out.append(MassStatement(float(mz), adduct, source="given"))
    text = case_text(case)
    if text is not None:
        out.extend(read_mass_statements(text))
    return out


def rank(peaks=None, candidates: Sequence = (), formula: str | None = None, mass: float | None = None,
         solvent: str | None = None, priors: Sequence[float] | None = None, id: str | None = None,
         demote_history_mismatch: bool = True, mass_tolerance: float = MASS_TOLERANCE,
         peaks_1h=None, text: str | None = None, with_isomers: bool | str = False, hsqc=None, mz=None,
         rotamers: bool = False, mixture: bool = False, reaction: str | None = None,
         reactants: str | None = None, hmbc=None, cosy=None, noesy=None) -> RankResult:
    """Rank candidate structures (SMILES, ``(name, SMILES)`` pairs or RDKit molecules, or a ``{name: SMILES}``
    dict) against peaks.

    ``peaks`` (13C) and ``peaks_1h`` are :class:`~shiftrank.inputs.peaks.PeakList` objects, lists (or NumPy
    arrays) of shifts, lists of ``{"shift": …, "multiplicity": …}`` objects (1H: also ``"integral"``, ``"j"``
    and ``"range": [low, high]``), or a peak list as text (``"166.6, 150.1, 137.6"``, one peak per line, or a
    printed paragraph, whose section of that nucleus is read); ``text`` is a printed characterisation paragraph; ``hsqc`` a list of
    ``[δC, δH]`` cross peaks (or an :class:`~shiftrank.inputs.peaks.HsqcList` from ``read_hsqc``), ``hmbc`` the same for
    the two- and three-bond cross peaks of an HMBC (``read_hmbc``), ``cosy`` and ``noesy`` ``[δH, δH]`` cross peaks of a
    COSY and of a NOESY or ROESY (:mod:`shiftrank.score.correlations`).  Any one is enough.
    ``formula``, ``mass`` (neutral, Da) and ``mz`` (a measured m/z, or ``{"found": …, "adduct": "M+H"}``)
    are sample history, as is a mass statement printed in ``text`` (``HRMS (ESI) m/z [M+H]+ calcd for …,
    found …``): a candidate they contradict is flagged and ranked last.
    ``with_isomers`` (True, or kinds such as ``"positional,ambident"``) adds the alternatives a reaction
    could have given to each candidate (:func:`shiftrank.chem.isomers.isomers`), named by their relation.
    ``rotamers`` says the spectra show two forms of the compound (amide or carbamate rotamers, an isomer
    mixture): a line within a few tenths of a ppm (13C: 2 ppm) of another may be the second form's and
    costs little when no class explains it; a paragraph that says so (``mixture of rotamers``) is read so
    without it.  ``mixture`` says the sample is a mixture of two isomers (a paragraph saying ``3:1 mixture of
    regioisomers`` the same): the lines are read so too, and a note names the candidate that best explains, as
    the second component, the 13C lines the best one leaves (:func:`second_form`).  ``reaction`` (a named reaction
    or a reaction SMARTS) with ``reactants`` (SMILES separated by '.') adds every product as a candidate, named by
    where the reaction acted.
    A ``(name, source, error)`` triple stands for a record that could not be read; it is listed last
    with its error.

    >>> r = rank([{"shift": 14.2, "multiplicity": "CH3"}, {"shift": 60.5, "multiplicity": "CH2"},
    ...           {"shift": 171.1, "multiplicity": "C"}, {"shift": 21.0, "multiplicity": "CH3"}],
    ...          ["CCOC(C)=O", "COC(=O)CC"])
    >>> r.best.smiles
    'CCOC(C)=O'
    """
    result = rank_many([dict(id=id, peaks=peaks, peaks_1h=peaks_1h, text=text, candidates=candidates, formula=formula,
                             mass=mass, solvent=solvent, priors=priors, with_isomers=with_isomers, hsqc=hsqc, mz=mz,
                             rotamers=rotamers, mixture=mixture, reaction=reaction, reactants=reactants, hmbc=hmbc,
                             cosy=cosy, noesy=noesy)],
                       demote_history_mismatch, mass_tolerance)[0]
    if isinstance(result, Exception):
        raise result
    return result


#: marks a candidate tuple ``(relation, SMILES, None, GENERATED)`` as an alternative :func:`expand_with_isomers` added
GENERATED = "generated"


def expand_with_isomers(cands: list, kinds="positional,ambident") -> tuple[list, list[str]]:
    """The candidates followed by the alternatives :func:`shiftrank.chem.isomers.isomers` generates for
    each of them (named by their relation), without duplicates; notes on what was added.  An alternative
    that is only a prototropic tautomer of a given candidate (an NH-azole's other NH form) is the same
    compound: it is ranked (its drawing is predicted differently) under a relation that says so, and the
    ranking's note and verdict add the probabilities of one compound's drawings."""
    from ..chem.isomers import alternative_key, compound_key, isomers, open_shell, stereo_key, structure_key

    if kinds is True:
        kinds = "positional,ambident"
    seen, out, notes = set(), list(cands), []
    given = {}   # the given candidates as compounds (tautomers alike) -> SMILES
    for c in cands:
        smi = c[1] if isinstance(c, tuple) else c
        if not isinstance(smi, str):
            continue
        mol, _, err = parse_candidate(smi)
        if err:
            continue
        seen.update((structure_key(mol), stereo_key(mol)))
        if len(cands) > 1:   # (one candidate: isomers() itself labels its tautomers)
            given.setdefault(compound_key(mol), smi)
    for c in cands:
        smi = c[1] if isinstance(c, tuple) else c
        if not isinstance(smi, str) or parse_candidate(smi)[2]:
            continue
        added, same, radicals = 0, 0, 0
        try:
            alts = isomers(smi, kinds=kinds)
        except InputError as exc:
            if "kind '" in str(exc):
                raise
            notes.append(f"no alternatives generated for {smi[:40]}: {exc}")
            continue
        for alt in alts:
            m = Chem.MolFromSmiles(alt.smiles)
            k = alternative_key(m, alt.kind)
            if k in seen:
                continue
            seen.add(k)
            if open_shell(m):   # the models know closed-shell molecules only
                radicals += 1
                continue
            relation = alt.relation
            twin = given.get(compound_key(m)) if given and alt.kind != "tautomer" else None
            if twin is not None and twin != smi:   # a tautomer of another given candidate
                relation = f"candidate {twin} drawn as another NH/OH tautomer (the same compound)"
            same += bool(alt.same_compound_as or (twin is not None and twin != smi))
            out.append((f"{relation} (from {smi})" if len(cands) > 1 else relation, alt.smiles, None, GENERATED))
            added += 1
        notes.append(f"{added} generated alternatives of {smi} added ({kinds})"
                     + (f", {same} of them a candidate or an alternative drawn as another NH/OH tautomer (the same "
                        "compound: their probabilities add up)" if same else "")
                     + (f"; {radicals} with an unpaired electron (a group moved off a charged ring N) left out"
                        if radicals else ""))
    return out, notes


def _stage(case: dict, nuclei_models) -> tuple:
    cands = case.get("candidates")
    if isinstance(cands, dict):   # {name: SMILES}, as a script or a batch case may hold them
        cands = list(cands.items())
    if case.get("reaction") is not None:   # the products of a named reaction or reaction SMARTS join the candidates
        from ..chem.isomers import isomers

        if not isinstance(case["reaction"], str) or not isinstance(case.get("reactants"), str):
            raise InputError("reaction: give a reaction name or SMARTS with 'reactants' (SMILES separated by '.')")
        products = [(a.relation, a.smiles) for a in isomers(None, kinds=(), reaction=case["reaction"],
                                                             reactants=case["reactants"])]
        cands = list(cands or []) + products if not isinstance(cands, (str, bytes)) else cands
    if isinstance(cands, (str, bytes)):
        raise InputError("candidates: expected a list of SMILES strings, got one string (give [\"SMILES\"] for one candidate)")
    if not isinstance(cands, (list, tuple)):
        raise InputError("candidates: expected a list of SMILES strings (or of [name, SMILES] pairs, or an object "
                         "of names and SMILES)")
    cands = list(cands)
    if not cands:
        raise InputError(f"reaction: {case['reaction']} gives no product on {case['reactants']}"
                         if case.get("reaction") is not None else "candidates: no candidate structures given")
    iso_notes: list[str] = []
    if len(cands) > MAX_CANDIDATES:
        raise InputError(f"candidates: {len(cands):,} given; the limit is {MAX_CANDIDATES:,} per case (split the case)")
    if case.get("with_isomers"):
        kinds = case["with_isomers"]
        if not isinstance(kinds, (bool, str)):
            raise InputError("with_isomers: expected true or a kinds string such as 'positional,ambident'")
        try:
            cands, iso_notes = expand_with_isomers(cands, kinds)
        except InputError as exc:
            raise InputError(f"with_isomers: {exc}") from None
        if len(cands) > MAX_CANDIDATES:
            raise InputError(f"candidates: {len(cands):,} with the generated alternatives; the limit is {MAX_CANDIDATES:,} "
                             "per case (narrow the isomer kinds)")
    lists, solvent, notes = case_peaklists(case)
    notes = iso_notes + notes
    peaks = {n: observed_peaks(pl) for n, pl in lists.items()}
    needed = tuple(n for n in NUCLEI if any(n in MODELS_FOR[s] for s in peaks))
    missing = [n for n in needed if n not in nuclei_models]
    if missing:
        raise InputError(f"no {', '.join(missing)} model is installed")
    f = case.get("formula")
    if f is not None and not isinstance(f, str):
        raise InputError("formula: expected a formula string such as C9H9N3O2")
    fcounts, charge = None, 0
    if not f and case_text(case):
        f = read_analysis_formula(case_text(case))   # 'Anal. Calcd for C9H11NO3: C, 59.66; …'
        if f:
            notes.append(f"sample history from the text: the elemental analysis was calculated for {f}")
    if f:
        fcounts, charge, fnotes = sample_formula(f)
        notes.extend(fnotes)
    mass = case.get("mass")
    if mass is not None:
        if isinstance(mass, bool) or not isinstance(mass, (int, float, str)):
            raise InputError("mass: expected a number (Da)")
        try:
            mass = float(mass)
        except ValueError:
            raise InputError(f"mass: '{mass}' is not a number") from None
        if not np.isfinite(mass) or mass <= 0:
            raise InputError(f"mass: {mass} is not a positive number")
    ions = case_ions(case)
    counted = printed_counted_lines(case)
    notes.extend(f"sample history{' from the text: MS' if st.source == 'text' else ': measured'} {st.describe()}"
                 for st in ions)
    if fcounts is not None:
        for st in ions:
            if st.source == "text" and st.neutral and hill(fcounts) != st.neutral:
                notes.append(f"the formula given ({f}) differs from the molecule of the text's MS statement "
                             f"({st.neutral}): each candidate is checked against both")
    priors = _check_priors(case.get("priors"), len(cands))
    preps = [_prepare(c, i, solvent, needed) for i, c in enumerate(cands)]
    case = {**case, "_solvent": solvent}   # the solvent as read (given, or from the paragraph), for the result
    return case, peaks, notes, (fcounts, charge, ions, counted), mass, priors, preps


def stage_cases(cases: list[dict]) -> list:
    """Read every case (peaks, text, formula, candidates) and predict every candidate with one model call
    per nucleus.  Each item is the case's :class:`InputError` or a tuple
    ``(case, peaks, notes, (formula counts, charge, MS statements, printed 19F lines), mass, priors, preps)`` whose
    preps carry ``preds``."""
    man = default_manifest()
    available = tuple(n for n in NUCLEI if n in man.get("nuclei", {}))
    staged = []
    for case in cases:
        try:
            staged.append(_stage(case, available))
        except InputError as exc:
            staged.append(exc)
        except (TypeError, ValueError, KeyError, AttributeError) as exc:  # malformed fields from JSON input
            staged.append(InputError(f"case has a malformed field ({type(exc).__name__}: {exc})"))
    # one model call per nucleus, each distinct candidate description predicted once for the whole batch
    for n in NUCLEI:
        owners: dict[int, list] = {}
        for s in staged:
            if isinstance(s, Exception) or not any(n in MODELS_FOR[k] for k in s[1]):
                continue
            for p in s[6]:
                if p.error is None:
                    owners.setdefault(id(p.parts[n]), []).append(p)
        if not owners:
            continue
        groups = []
        for g in owners.values():
            cached = getattr(g[0].parts[n], "preds", None)   # predicted earlier in this process (a repeated candidate)
            if cached is not None:
                for p in g:
                    p.preds[n] = cached
            else:
                groups.append(g)
        envs = environments_isolated([g[0].parts[n] for g in groups]) if groups else []
        kept = []
        for g, env in zip(groups, envs):
            if env is None:
                for p in g:
                    p.error = f"SMILES '{p.smiles}': cannot compute atom environments"
            else:
                kept.append((g, env))
        if kept:
            mu, sg, _, _, ez = default_model(n).env_arrays([env for _, env in kept])
            k = 0
            for g, env in kept:
                m = len(env.centres)
                # (shifts, sigmas, the E/Z increments in the shifts or None): the tables say which atoms carry one
                pred = (mu[k:k + m], sg[k:k + m], None if ez is None or not ez[k:k + m].any() else ez[k:k + m])
                _keep_prediction(g[0].parts[n], pred)   # the parts are cached per SMILES, solvent and nucleus
                for p in g:
                    p.preds[n] = pred
                k += m
    return staged


def _keep_prediction(parts: MolParts, pred: tuple) -> None:
    """Store a cached candidate's prediction on its parts and drop what only the descriptors needed
    (distance matrix, codes, atom and bond tables): a long batch keeps many candidates in its cache."""
    parts.preds = pred
    parts.dist = parts.codes = parts.atoms = parts.bonds = parts.ringpos = parts.ring_keys = None
    parts.rings = []


def rank_many(cases: list[dict], demote_history_mismatch: bool = True, mass_tolerance: float = MASS_TOLERANCE,
              client=None) -> list:
    """Rank several cases with one model call per nucleus (the fast path for batches).

    Each case is a dict with keys of :func:`rank`.  A case whose peaks, text, formula or priors are
    invalid comes back as the :class:`InputError` instance (not raised).  With a ``dask.distributed``
    ``client`` the cases are spread over its cluster (:mod:`shiftrank.score.distributed`); the results
    are the same, in the same order.
    """
    if client is not None:
        from .distributed import rank_many_on
        return rank_many_on(client, cases, demote_history_mismatch)
    settings = ranking_settings()
    version = default_manifest().get("version")
    out = []
    for s in stage_cases(cases):
        if isinstance(s, Exception):
            out.append(s)
            continue
        case, peaks, notes, (fcounts, charge, ions, counted), mass, priors, preps = s
        case_settings = settings.for_peaks(peaks)
        results = []
        for p in preps:
            try:
                if p.error is None and any(n not in p.preds for k in peaks for n in MODELS_FOR[k]):
                    p.error = f"SMILES '{p.smiles}': could not be predicted"
                r = _score_candidate(p, p.preds, peaks, case_settings)
                _history_checks(r, fcounts, mass, mass_tolerance, charge, ions)
                _count_checks(r, counted)
            except Exception as exc:  # noqa: BLE001 - one candidate must not stop the case or the batch
                r = CandidateResult(p.smiles, p.position, p.name, generated=p.generated, error=f"could not be scored ({type(exc).__name__}: {exc})")
            results.append(r)
        _probabilities(results, priors, demote_history_mismatch, case_settings, tuple(peaks))
        results.sort(key=lambda c: _order_key(c, demote_history_mismatch))
        notes = notes + [_tautomer_note(g) for g in tautomer_groups(results)]
        notes += impurity_notes(results, case.get("_solvent"))
        second = second_form(results, peaks, case_settings)
        said = verdict(results, tuple(peaks))
        if second:
            note, other = second
            notes.append(note)
            said += (f"; the sample holds two isomers, and the lines left fit {other.name or other.smiles} best as the "
                     "second (see the notes)" if other is not None else
                     "; the sample holds two isomers; no other candidate explains the lines left (see the notes)")
        out.append(RankResult(case.get("id"), results, peaks, said, notes, version, case.get("_solvent"), counted))
    return out
