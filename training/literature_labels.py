"""Training labels from printed characterisation paragraphs (the dev half of the literature set).

``literature_dev.jsonl.gz`` holds drug-like compounds from open-access articles with their 1H and
13C paragraphs as printed (NMRExtractor, MIT licence).  NMRShiftDB2 has fewer such molecules, and
the printed-text ranking is where the predictor is weakest, so the paragraphs of the *dev* half
(:func:`training.data.literature_part`) are turned into labels the way a chemist assigns a
spectrum of a known compound: the structure's peaks are matched to its symmetry classes by the
ranker's own optimal assignment (integrals, multiplets, C–F lines and all, with the shipped model's
predictions), and a class keeps its matched value as a label only when that is unambiguous:

* the peak is one value (1H: or a printed range no wider than ``H_RANGE_MAX``); a 13C value taken
  by several classes gives no label (which carbon is coincident or unlisted is a guess), while 1H
  classes inside one narrow value all lie there and each takes it;
* the value lies within ``MAX_Z`` of the current prediction's σ (a wrong structure annotation or a
  misread paragraph cannot teach the model);
* no other class whose prediction lies almost as close to the value was given a clearly different
  value (two aromatic CH a few tenths apart could be swapped: such pairs give no label);
* 1H: C–H classes only (exchangeable protons depend on concentration and water);
* compounds whose skeleton falls in the predictor's validation or test split (:func:`training.data.split_of`)
  are skipped, so the split figures stay untouched.

The held-out half of the paragraphs never reaches training; the ranking figures measured on it stay clean.
"""
from __future__ import annotations

import gzip
import json
from pathlib import Path

import numpy as np

from shiftrank.chem.couplings import fit_cost
from shiftrank.chem.structure import symmetry_ranks
from shiftrank.prediction.environment import environments
from shiftrank.prediction.ring_systems import KEY_NAMES
from shiftrank.score.evidence import EVIDENCE, ClassMeans
from shiftrank.score.ranking import case_peaklists, ranking_settings, stage_cases
from training.data import literature_part, split_of
from training.features import RowSet, fold_of

MAX_Z = 3.0
SHARED_1H = True          # 1H classes sharing a narrow printed value each take it
H_RANGE_MAX = 0.06        # ppm: a printed 1H range this narrow is one value (its middle)
SWAP_MARGIN = {"13C": 1.0, "1H": 0.1}      # ppm: a rival prediction this much farther still makes the label ambiguous
SWAP_LABEL_GAP = {"13C": 1.0, "1H": 0.05}  # ppm: rivals whose values are this close are harmless if swapped


def literature_records(data: Path, part: str = "dev") -> list[dict]:
    out = []
    with gzip.open(data / "literature_dev.jsonl.gz", "rt") as f:
        for line in f:
            r = json.loads(line)
            skel = r["id"].split(":")[-1]
            if literature_part(skel) == part:
                out.append({**r, "skeleton": skel})
    return out


def _labels(res, nucleus: str) -> list[tuple[list[int], float]]:
    """(atoms, value) of the confident classes of one assignment (see the module text)."""
    classes, peaks, a = res.classes, res.peaks, res.assignment
    on_peak: dict[int, set] = {}
    for p in a.pairings:
        if p.peak is not None:
            on_peak.setdefault(p.peak, set()).add(p.cls)
    value: dict[int, float] = {}
    for p in a.pairings:
        if p.peak is None:
            continue
        pk = peaks[p.peak]
        lo = pk.lo if pk.lo is not None else pk.shift
        hi = pk.hi if pk.hi is not None else pk.shift
        # several 13C classes on one value: which carbon is missing or coincident is a guess; several 1H
        # classes inside one narrow printed value or range all lie there
        if len(on_peak[p.peak]) > 1 and (nucleus == "13C" or not SHARED_1H):
            continue
        if nucleus == "1H" and (hi - lo > H_RANGE_MAX or classes[p.cls].exchangeable):
            continue
        if pk.count > 1:   # '2C' printed: two classes may stand behind it
            continue
        value[p.cls] = (lo + hi) / 2
    peak_of = {p.cls: p.peak for p in a.pairings if p.peak is not None}
    out = []
    for i, L in value.items():
        c = classes[i]
        err = abs(L - c.shift)
        if err > MAX_Z * c.sigma:
            continue
        pk = peaks[peak_of[i]]

        def rival(k: int) -> bool:
            if k == i or (k in value and abs(value[k] - L) <= SWAP_LABEL_GAP[nucleus]):
                return False
            if abs(classes[k].shift - L) >= err + SWAP_MARGIN[nucleus]:
                return False
            # 1H: a class whose neighbours cannot produce the printed multiplet could not take the peak
            return not (nucleus == "1H" and classes[k].expected is not None
                        and sum(fit_cost(classes[k].expected, pk.multiplicity, pk.j)) > 0)

        ambiguous = any(rival(k) for k in range(len(classes)))
        if not ambiguous:
            out.append((list(c.atoms), L))
    return out


def literature_rows(data: Path, nucleus: str, weight: float = 1.0, mol_offset: int = 2 * 10**6,
                    stats: dict | None = None) -> RowSet:
    """Confident labelled rows of ``nucleus`` from the dev half's printed paragraphs."""
    stats = {} if stats is None else stats
    recs = [r for r in literature_records(data, "dev") if split_of(r["skeleton"]) == "train"]
    key = "text_13c" if nucleus == "13C" else "text_1h"
    cases = [{"id": r["id"], "candidates": [r["smiles"]], "text": r[key]} for r in recs]
    staged = stage_cases(cases)
    costs = ranking_settings().costs[nucleus]
    codes_o, feats_o, ys, mi, ai, fo, rk = [], [], [], [], [], [], []
    n_mol = n_classes = 0
    for i, (r, s) in enumerate(zip(recs, staged)):
        if isinstance(s, Exception):
            continue
        _, peaks, _, _, _, _, preps = s
        p = preps[0]
        if p.error or nucleus not in peaks or nucleus not in p.preds:
            continue
        ranks = symmetry_ranks(p.mol)
        mu = ClassMeans(p.parts[nucleus].centres, *p.preds[nucleus])
        res = EVIDENCE[nucleus].evaluate(p.mol, ranks, mu, None, peaks[nucleus], costs)
        labs = _labels(res, nucleus)
        if not labs:
            continue
        env = environments(p.mol, case_peaklists(s[0])[1], nucleus)   # the solvent the ranker predicted for
        pos = {int(a): k for k, a in enumerate(env.centres)}
        n_mol += 1
        for atoms, L in labs:
            for atom in atoms:
                if atom not in pos:
                    continue
                k = pos[atom]
                codes_o.append(env.codes[k]); feats_o.append(env.features[k]); ys.append(L)
                mi.append(mol_offset + i); ai.append(atom); fo.append(fold_of(r["skeleton"])); rk.append(env.ring_keys[k])
            n_classes += 1
    stats.update(compounds=len(recs), compounds_labelled=n_mol, classes_labelled=n_classes, rows=len(ys))
    width = codes_o[0].shape[0] if codes_o else 1
    return RowSet(np.array(codes_o, np.uint32).reshape(-1, width), np.array(feats_o, np.float32).reshape(len(ys), -1),
                  np.array(ys, np.float32), np.array(mi), np.array(ai), np.array(fo),
                  np.full(len(ys), weight, np.float32), np.array(rk, np.uint32).reshape(-1, len(KEY_NAMES)))
