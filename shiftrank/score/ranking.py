"""Ranking candidate structures against an observed 13C peak list.

For each candidate: structure facts (formula, DBE, symmetry classes), predicted
shifts per class, the optimal peak assignment (:mod:`shiftrank.score.matching`), and
a total cost in nats.  Probabilities across candidates follow DP4 (Smith &
Goodman 2010, J. Am. Chem. Soc. 132, 12946): a product of Student-t
likelihoods over carbons, here together with the overlap/missing/extra terms,
normalised over the candidates with the given priors (equal by default).  A
temperature fitted on development cases tempers the product, because errors of
carbons in one molecule are correlated.

A candidate whose formula contradicts the sample's formula (or whose mass
contradicts the given mass) is flagged and, by default, ranked last with
probability 0 and the reason.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from functools import lru_cache
from typing import Sequence

import numpy as np
from rdkit import Chem

from ..prediction.environment import MolParts
from ..errors import InputError
from ..chem.formula import hill, parse_formula
from .matching import Assignment, MatchCosts, ObservedPeak, SignalClass, assign
from ..prediction.model_files import default_manifest, default_model
from ..inputs.molecules import to_mol
from ..prediction.api import checked_parts, environments_isolated
from ..inputs.peaks import Peak, PeakList, flag_solvent, merge_duplicates, peaks_from_records
from ..inputs.solvents import normalise_solvent
from ..chem.structure import StructureFacts, facts_from_mol

MASS_TOLERANCE = 0.5  # Da, default window for a neutral molecular mass
CAUTION = ("A ranking is evidence, not a certificate of identity. Confirm the structure by orthogonal methods "
           "(2D NMR, MS, an authentic reference) and follow local regulations and validated procedures.")


@dataclass
class CandidateResult:
    """How one candidate explains the spectrum."""

    smiles: str
    position: int                      # 0-based position in the input list
    name: str | None = None
    error: str | None = None
    facts: StructureFacts | None = None
    classes: list[SignalClass] = field(default_factory=list)
    assignment: Assignment | None = None
    cost: float = float("inf")         # total cost in nats (lower is better)
    score: float = float("-inf")       # −cost/temperature: higher is better
    probability: float = 0.0
    flags: list[str] = field(default_factory=list)
    formula_ok: bool | None = None

    @property
    def deviations(self) -> list[float]:
        if not self.assignment:
            return []
        return [p.deviation for p in self.assignment.pairings if p.deviation is not None]

    @property
    def mae(self) -> float | None:
        d = self.deviations
        return float(np.mean(np.abs(d))) if d else None

    @property
    def max_abs_deviation(self) -> float | None:
        d = self.deviations
        return float(np.max(np.abs(d))) if d else None

    @property
    def beyond_3sigma(self) -> int:
        if not self.assignment:
            return 0
        return sum(1 for p in self.assignment.pairings if p.z is not None and abs(p.z) > 3)

    def to_dict(self, detail: bool = False) -> dict:
        d = {"smiles": self.smiles, "score": _r(self.score, 4), "probability": _r(self.probability, 6)}
        if self.name:
            d["name"] = self.name
        if self.error:
            d["error"] = self.error
            return d
        d.update({"formula": self.facts.formula, "dbe": self.facts.dbe, "formula_ok": self.formula_ok,
                  "expected_signals": len(self.classes), "mae": _r(self.mae, 3),
                  "max_deviation": _r(self.max_abs_deviation, 2), "beyond_3sigma": self.beyond_3sigma,
                  "cost": _r(self.cost, 3), "cost_parts": {k: _r(v, 3) for k, v in self.assignment.parts.items()},
                  "flags": self.flags})
        if detail:
            d["assignment"] = self.assignment_table()
            d["unmatched_peaks"] = self.assignment.unmatched_peaks
        return d

    def assignment_table(self) -> list[dict]:
        """One row per symmetry class, with the notes a reader needs (unobserved, shared peak, >3σ, DEPT)."""
        rows = []
        for p in self.assignment.pairings:
            c = self.classes[p.cls]
            notes = (["unobserved"] if p.peak is None else []) + (["shares a peak"] if p.shared else []) \
                + ([">3σ"] if p.z is not None and abs(p.z) > 3 else []) + ([] if p.multiplicity_ok else ["DEPT mismatch"])
            rows.append({"atoms": c.atoms, "class": p.cls, "multiplicity": c.multiplicity,
                         "predicted": _r(c.shift, 2), "sigma": _r(c.sigma, 2),
                         "peak": p.peak, "deviation": _r(p.deviation, 2), "z": _r(p.z, 2),
                         "shared_peak": p.shared, "multiplicity_ok": p.multiplicity_ok, "notes": notes})
        return rows


@dataclass
class RankResult:
    """Ranked candidates (best first) with the verdict and the peaks used."""

    id: str | None
    candidates: list[CandidateResult]
    peaks: list[ObservedPeak]
    verdict: str
    notes: list[str] = field(default_factory=list)
    model_version: str | None = None

    @property
    def best(self) -> CandidateResult:
        return self.candidates[0]

    def to_dict(self, detail: bool = False) -> dict:
        d = {"id": self.id, "ranking": [c.to_dict(detail) for c in self.candidates], "verdict": self.verdict}
        if self.notes:
            d["notes"] = self.notes
        if detail:
            d["peaks"] = [{"shift": p.shift, "multiplicity": p.multiplicity, "solvent": p.solvent} for p in self.peaks]
        d["model"] = self.model_version
        return d


def _r(x, nd):
    return None if x is None or (isinstance(x, float) and not np.isfinite(x)) else round(float(x), nd)


def ranking_settings() -> tuple[MatchCosts, float]:
    """Match costs and temperature stored with the shipped model (fitted on development data)."""
    man = default_manifest()
    u = man.get("nuclei", {}).get("13C", {}).get("uncertainty", {})
    r = man.get("ranking", {})
    costs = MatchCosts(t_df=u.get("t_df", 4.0), t_scale=u.get("t_scale", 1.0),
                       **{k: r[k] for k in ("overlap", "missing", "extra", "multiplicity_mismatch") if k in r})
    return costs, float(r.get("temperature", 1.0))


def as_peaklist(peaks, solvent: str | None = None) -> PeakList:
    """Normalise the accepted peak inputs (PeakList, list of Peak, numbers or dicts) and flag solvent."""
    if isinstance(peaks, PeakList):
        pl = peaks
    else:
        if peaks is None or len(peaks) == 0:
            raise InputError("peaks: the peak list is empty")
        items = list(peaks) if all(isinstance(p, Peak) for p in peaks) else peaks_from_records(list(peaks))
        notes: list[str] = []
        pl = PeakList("13C", merge_duplicates(items, notes, "13C"), "peaks", notes)
    if not pl.peaks:
        raise InputError(f"{pl.source}: the peak list is empty")
    return flag_solvent(pl, solvent)


def observed_peaks(pl: PeakList) -> list[ObservedPeak]:
    return [ObservedPeak(p.shift, p.multiplicity, p.solvent is not None) for p in pl.peaks]


@dataclass
class _Prepared:
    smiles: str
    position: int
    name: str | None
    mol: Chem.Mol | None = None
    parts: MolParts | None = None
    error: str | None = None


@lru_cache(maxsize=4096)
def _describe(smiles: str, solvent: str | None) -> tuple[Chem.Mol | None, MolParts | None, str | None]:
    """Molecule and its RDKit facts for descriptors, from a SMILES (cached: batches often repeat candidates)."""
    try:
        mol = to_mol(smiles)
        return mol, checked_parts(mol, f"SMILES '{smiles}'", solvent), None
    except InputError as exc:
        return None, None, str(exc)


def _prepare(cand, position: int, solvent: str | None) -> _Prepared:
    name = None
    if isinstance(cand, tuple):
        name, cand, *rest = cand
        if rest and rest[0]:
            return _Prepared(str(cand), position, name, error=str(rest[0]))
    if isinstance(cand, Chem.Mol):
        cand = Chem.MolToSmiles(Chem.RemoveHs(cand))
    smi = str(cand)
    mol, parts, err = _describe(smi, solvent)
    return _Prepared(smi, position, name, mol, parts, err)


def _candidate(prep: _Prepared, pred, peaks, costs) -> CandidateResult:
    res = CandidateResult(prep.smiles, prep.position, prep.name)
    if prep.error:
        res.error = prep.error
        return res
    facts = facts_from_mol(prep.mol, prep.smiles, hydrogens=False)
    res.facts = facts
    mu = dict(zip(prep.parts.centres.tolist(), pred[0]))
    sg = dict(zip(prep.parts.centres.tolist(), pred[1]))
    res.classes = [SignalClass(c.atoms, c.multiplicity, float(np.mean([mu[a] for a in c.atoms])),
                               float(np.mean([sg[a] for a in c.atoms]))) for c in facts.carbon_classes]
    res.assignment = assign(res.classes, peaks, costs)
    res.cost = res.assignment.total_cost
    n_obs = sum(1 for p in peaks if not p.solvent)
    a = res.assignment
    n_unexplained = sum(1 for j in a.unmatched_peaks if not peaks[j].solvent)
    if len(res.classes) != n_obs:
        n_shared = sum(1 for p in a.pairings if p.shared)
        n_missing = sum(1 for p in a.pairings if p.peak is None)
        res.flags.append(f"expects {len(res.classes)} signals by symmetry, {n_obs} observed"
                         + (f"; {n_shared} classes share peaks" if n_shared else "")
                         + (f"; {n_missing} classes unobserved" if n_missing else "")
                         + (f"; {n_unexplained} peaks unexplained" if n_unexplained else ""))
    elif n_unexplained:
        res.flags.append(f"{n_unexplained} peaks unexplained")
    if res.beyond_3sigma:
        res.flags.append(f"{res.beyond_3sigma} carbons deviate by more than 3σ")
    n_mm = sum(1 for p in res.assignment.pairings if not p.multiplicity_ok)
    if n_mm:
        res.flags.append(f"{n_mm} peaks assigned against their DEPT multiplicity")
    return res


def _history_checks(res: CandidateResult, formula_counts, mass: float | None, mass_tol: float) -> None:
    if res.error:
        return
    if formula_counts is not None:
        res.formula_ok = dict(res.facts.counts) == dict(formula_counts)
        if not res.formula_ok:
            res.flags.insert(0, f"formula {res.facts.formula} contradicts the sample formula {hill(formula_counts)}")
    if mass is not None:
        ok = min(abs(res.facts.monoisotopic_mass - mass), abs(res.facts.average_mass - mass)) <= mass_tol
        if not ok:
            res.formula_ok = False
            res.flags.insert(0, f"mass {res.facts.monoisotopic_mass:.3f} (average {res.facts.average_mass:.2f}) "
                                f"contradicts the sample mass {mass:g} ± {mass_tol:g}")


def _probabilities(cands: list[CandidateResult], temperature: float, priors, demote: bool) -> None:
    valid = [c for c in cands if not c.error]
    for c in valid:
        c.score = -c.cost / temperature
    pool = [c for c in valid if c.formula_ok is not False] if demote else valid
    if not pool:
        pool = valid
    if not pool:
        return
    logp = np.array([c.score + np.log(priors[c.position]) if priors is not None else c.score for c in pool])
    w = np.exp(logp - logp.max())
    w /= w.sum()
    for c, p in zip(pool, w):
        c.probability = float(p)


def _order_key(c: CandidateResult, demote: bool):
    return (c.error is not None, demote and c.formula_ok is False, -c.probability, c.cost, c.position)


def verdict(cands: list[CandidateResult]) -> str:
    """One line on the best candidate: clear winner, indistinguishable pair, leaning, or no fit."""
    valid = [c for c in cands if not c.error]
    if not valid:
        return "no candidate could be evaluated"
    best = valid[0]
    label = best.name or best.smiles
    if best.formula_ok is False:
        return "no candidate fits the sample history (formula/mass)"
    n = max(len(best.classes), 1)
    poor = (best.mae is not None and best.mae > 4.0) or best.beyond_3sigma > max(1, 0.25 * n) \
        or len(best.assignment.unmatched_peaks) > max(2, 0.3 * n)
    if poor:
        return f"no candidate fits well: the best ({label}) has MAE {best.mae:.1f} ppm and {best.beyond_3sigma} carbons beyond 3σ"
    if best.probability >= 0.9:
        return f"clear winner: {label} (p = {best.probability:.2f})"
    second = valid[1] if len(valid) > 1 else None
    if second is not None and best.probability + second.probability >= 0.9 and second.probability >= 0.2:
        return (f"two candidates indistinguishable from 13C alone: {label} (p = {best.probability:.2f}) and "
                f"{second.name or second.smiles} (p = {second.probability:.2f})")
    return f"leaning to {label} (p = {best.probability:.2f}); not decisive"


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


def rank(peaks, candidates: Sequence, formula: str | None = None, mass: float | None = None,
         solvent: str | None = None, priors: Sequence[float] | None = None, id: str | None = None,
         demote_history_mismatch: bool = True, mass_tolerance: float = MASS_TOLERANCE) -> RankResult:
    """Rank candidate structures (SMILES, ``(name, SMILES)`` pairs or RDKit molecules) against peaks.

    A ``(name, source, error)`` triple stands for a record that could not be read;
    it is listed last with its error.

    ``peaks`` is a :class:`~shiftrank.inputs.peaks.PeakList`, or a list of shifts or of
    ``{"shift": …, "multiplicity": …}`` objects.

    >>> r = rank([{"shift": 14.2, "multiplicity": "CH3"}, {"shift": 60.5, "multiplicity": "CH2"},
    ...           {"shift": 171.1, "multiplicity": "C"}, {"shift": 21.0, "multiplicity": "CH3"}],
    ...          ["CCOC(C)=O", "COC(=O)CC"])
    >>> r.best.smiles
    'CCOC(C)=O'
    """
    result = rank_many([dict(id=id, peaks=peaks, candidates=candidates, formula=formula, mass=mass, solvent=solvent,
                             priors=priors)], demote_history_mismatch, mass_tolerance)[0]
    if isinstance(result, Exception):
        raise result
    return result


def rank_many(cases: list[dict], demote_history_mismatch: bool = True, mass_tolerance: float = MASS_TOLERANCE) -> list:
    """Rank several cases with one model call (the fast path for batches).

    Each case is a dict with keys of :func:`rank`.  A case whose peaks, formula or
    priors are invalid comes back as the :class:`InputError` instance (not raised).
    """
    model = default_model()
    costs, temperature = ranking_settings()
    version = default_manifest().get("version")
    staged = []
    for case in cases:
        try:
            cands = list(case.get("candidates") or [])
            if not cands:
                raise InputError("candidates: no candidate structures given")
            solvent = normalise_solvent(case.get("solvent"))
            pl = as_peaklist(case.get("peaks"), solvent)
            peaks, notes = observed_peaks(pl), list(pl.notes)
            fcounts = parse_formula(case["formula"]) if case.get("formula") else None
            mass = case.get("mass")
            if mass is not None:
                mass = float(mass)
                if not np.isfinite(mass) or mass <= 0:
                    raise InputError(f"mass: {mass} is not a positive number")
            priors = _check_priors(case.get("priors"), len(cands))
            preps = [_prepare(c, i, solvent) for i, c in enumerate(cands)]
            staged.append((case, peaks, notes, fcounts, mass, priors, preps))
        except InputError as exc:
            staged.append(exc)
        except (TypeError, ValueError, KeyError, AttributeError) as exc:  # malformed fields from JSON input
            staged.append(InputError(f"case has a malformed field ({type(exc).__name__}: {exc})"))
    preps_ok = [p for s in staged if not isinstance(s, Exception) for p in s[6] if p.parts is not None]
    envs = []
    for p, env in zip(preps_ok, environments_isolated([p.parts for p in preps_ok])):
        if env is None:
            p.parts, p.error = None, f"SMILES '{p.smiles}': cannot compute atom environments"
        else:
            envs.append(env)
    if envs:
        mu, sg, _, _ = model.predict_env_arrays(envs)
    out, k = [], 0
    for s in staged:
        if isinstance(s, Exception):
            out.append(s)
            continue
        case, peaks, notes, fcounts, mass, priors, preps = s
        results = []
        for p in preps:
            if p.parts is not None:
                n = len(p.parts.centres)
                pred = (mu[k:k + n], sg[k:k + n])
                k += n
            else:
                pred = None
            try:
                r = _candidate(p, pred, peaks, costs)
                _history_checks(r, fcounts, mass, mass_tolerance)
            except Exception as exc:  # noqa: BLE001 - one candidate must not stop the case or the batch
                r = CandidateResult(p.smiles, p.position, p.name, error=f"could not be scored ({type(exc).__name__}: {exc})")
            results.append(r)
        _probabilities(results, temperature, priors, demote_history_mismatch)
        results.sort(key=lambda c: _order_key(c, demote_history_mismatch))
        out.append(RankResult(case.get("id"), results, peaks, verdict(results), notes, version))
    return out
