"""Self-training: assign unassigned peak lists to centres with the current model, for either nucleus.

13C: each peak-list entry stands for one carbon, with its multiplicity.  Within
each multiplicity the entries are assigned to the carbons by the Hungarian
algorithm (``scipy.optimize.linear_sum_assignment``) on |predicted − observed|;
symmetry-equivalent carbons must receive (nearly) the same value.  A class's
label is kept only when it is confident: small residual against the current
prediction and no other class that could have taken the value almost as well.
A carbon whose environment the model has never seen (no sphere match even one bond
out, e.g. C–I before any iodo compound is labelled: NMRShiftDB2's assigned set has
none, and iodine moves its carbon by about −35 ppm, far outside every window) gets
its value by elimination: its prediction is ignored in the assignment, and it keeps
the entry the others leave when it is the only such class of its multiplicity and
every other class of that multiplicity was labelled confidently.

1H: entries stand for signals (sometimes repeated per proton), without integrals; several proton
classes may share one signal and lists are often partial.  A class of C–H protons takes the
nearest signal when it is close to the prediction and clearly closer than any other signal
(:func:`_assign_1h`); a complete list (one value per C–H class, and at most one per OH/NH/SH class)
is assigned jointly like a 13C list, which labels crowded aromatic regions too (:func:`_joint_1h`);
exchangeable protons are never labelled.
"""
from __future__ import annotations

from collections import defaultdict

import numpy as np
from rdkit import Chem
from scipy.optimize import linear_sum_assignment

from shiftrank.prediction.environment import environments
from shiftrank.inputs.molecules import ORGANIC
from shiftrank.chem.structure import MULTIPLICITY, symmetry_ranks
from shiftrank.prediction.ring_systems import KEY_NAMES
from training.features import RowSet, fold_of

CLASS_SPREAD = 1.0      # ppm: equivalent carbons must get values this close
SWAP_LABEL_GAP = 1.5    # ppm: two labels closer than this are harmless if swapped
SWAP_MARGIN = 1.0       # ppm: a rival class this close to explaining the value makes it ambiguous
FORCED_MAX_ABS = 25.0   # ppm: a label no other class could take is kept unless this far from the prediction
CLEAR_MARGIN = 10.0     # ppm: a far label is kept if every rival class is at least this much farther still
H_MAX_ABS = 0.15        # 1H, ppm: a signal this close to the prediction (or within 2 sigma) may be taken
H_MARGIN = 0.25         # 1H, ppm: ... when the next signal is at least this much (or 1 sigma) farther
H_SOLE_MAX_ABS = 1.5    # 1H, ppm: the only C–H class and the only signal below 10 ppm belong together
H_JOINT_MAX_ABS = 0.6   # 1H, ppm: a complete list assigned jointly: a class keeps a value this close (or 3σ)
NOVEL_MAX_ABS = 80.0    # ppm: a label by elimination (never-seen environment) is refused beyond this


def _prepare(peakmols, nucleus: str = "13C"):
    items = []
    for pm in peakmols:
        mol = Chem.MolFromSmiles(pm.smiles)
        if mol is None or mol.GetNumAtoms() == 0:
            continue
        syms = {a.GetSymbol() for a in mol.GetAtoms()}
        if not syms <= ORGANIC or "C" not in syms or "." in pm.smiles:
            continue
        env = environments(mol, pm.solvent, nucleus)
        if nucleus == "1H":
            if len(env.centres):
                items.append((pm, mol, env))
            continue
        if len(env.centres) != len(pm.peaks):
            ranks = symmetry_ranks(mol)
            if len({ranks[int(a)] for a in env.centres}) != len(pm.peaks):
                continue  # neither one entry per carbon nor one per symmetry class
        items.append((pm, mol, env))
    return items


def match_by_multiplicity(unit_keys, unit_mu, peak_keys, obs, free=None) -> list[tuple[int, int]] | None:
    """(unit, peak) pairs: within each multiplicity (key), the peaks go to the units by the Hungarian
    algorithm on |predicted − observed|; None when the counts per key differ.  Units marked ``free``
    cost nothing anywhere: they take the peaks the others leave."""
    groups_u, groups_p = defaultdict(list), defaultdict(list)
    for k, m in enumerate(unit_keys):
        groups_u[m].append(k)
    for j, m in enumerate(peak_keys):
        groups_p[m].append(j)
    if {m: len(v) for m, v in groups_u.items()} != {m: len(v) for m, v in groups_p.items()}:
        return None
    pairs = []
    for m, ks in groups_u.items():
        js = groups_p[m]
        cost = np.abs(unit_mu[ks][:, None] - obs[js][None, :])
        if free is not None:
            cost[free[ks]] = 0.0   # a never-seen environment takes what the others leave
        r, c = linear_sum_assignment(cost)
        pairs.extend(zip(np.array(ks)[r].tolist(), np.array(js)[c].tolist()))
    return pairs


def _assign_one(mol, env, peaks, mu, sigma, max_z, max_abs, novel=None):
    """Confident (row, label) pairs for one molecule, or None when its peaks cannot be matched.

    Peaks stand either for single carbons (one entry per carbon) or for symmetry
    classes (one entry per class); the Hungarian assignment runs on those units.
    ``novel`` (per centre, optional) marks environments the model has never seen: they are
    labelled by elimination only (see the module text).
    """
    carbons = [int(a) for a in env.centres]
    pos = {a: k for k, a in enumerate(carbons)}
    ranks = symmetry_ranks(mol)
    classes = defaultdict(list)
    for a in carbons:
        classes[ranks[a]].append(pos[a])
    cls_list = list(classes.values())
    units = [[k] for k in range(len(carbons))] if len(peaks) == len(carbons) else cls_list
    unit_mult = [MULTIPLICITY.get(mol.GetAtomWithIdx(carbons[u[0]]).GetTotalNumHs()) for u in units]
    unit_mu = np.array([mu[u].mean() for u in units])
    novel = np.zeros(len(carbons), bool) if novel is None else np.asarray(novel, bool)
    unit_novel = np.array([bool(novel[u].all()) for u in units])
    mults = [m for _, m in peaks]
    if all(m is not None for m in mults):
        key_u, key_p = unit_mult, mults
    elif all(m is None for m in mults):
        key_u, key_p = ["*"] * len(units), ["*"] * len(peaks)
    else:
        return None
    obs = np.array([s for s, _ in peaks])
    pairs = match_by_multiplicity(key_u, unit_mu, key_p, obs, unit_novel)
    if pairs is None:
        return None
    label = np.full(len(carbons), np.nan)
    for uu, jj in pairs:
        label[units[uu]] = obs[jj]
    cls_mult = {ks[0]: MULTIPLICITY.get(mol.GetAtomWithIdx(carbons[ks[0]]).GetTotalNumHs()) for ks in cls_list}
    cls_label = {}
    for ks in cls_list:
        v = label[ks]
        if np.ptp(v) > CLASS_SPREAD:
            continue
        cls_label[ks[0]] = float(v.mean())

    def confident(ks) -> bool:
        L = cls_label.get(ks[0])
        return L is not None and abs(L - float(mu[ks].mean())) <= min(max_abs, max_z * float(sigma[ks].mean()))

    out = []
    for ks in cls_list:
        if ks[0] not in cls_label:
            continue
        L = cls_label[ks[0]]
        p, s = float(mu[ks].mean()), float(sigma[ks].mean())
        err = abs(L - p)
        # the other classes of its multiplicity (all others when the list has none)
        rivals = [o for o in cls_list if o is not ks and (key_u[0] == "*" or cls_mult[o[0]] == cls_mult[ks[0]])]
        if novel[ks].all():
            # by elimination: every rival is labelled confidently and none of them is novel too,
            # so the entry left over is this class's
            if err <= NOVEL_MAX_ABS and all(not novel[o].any() and confident(o) for o in rivals):
                out.extend((k, L) for k in ks)
            continue
        # the only class of its multiplicity (or the only class): its peak cannot belong to another
        # carbon, so the label is right even where the model is far off (tiny molecules, rare rings);
        # these are the labels that teach the model what it does not know yet
        if not rivals:
            if err <= FORCED_MAX_ABS:
                out.extend((k, L) for k in ks)
            continue
        if err > FORCED_MAX_ABS:
            continue
        if err > max_abs or err > max_z * s:
            # far from the prediction: kept only when no rival carbon comes within CLEAR_MARGIN of
            # explaining the peak better (oxetane's OCH2 at 72.6 against its CH2 at 22.9)
            if all(abs(float(mu[o].mean()) - L) >= err + CLEAR_MARGIN for o in rivals):
                out.extend((k, L) for k in ks)
            continue
        ambiguous = False
        for other in rivals:
            if novel[other].all():
                continue   # (a never-seen environment's prediction says nothing about who owns a value)
            Lo = cls_label.get(other[0])
            if Lo is not None and abs(Lo - L) <= SWAP_LABEL_GAP:
                continue
            if abs(float(mu[other].mean()) - L) < err + SWAP_MARGIN:
                ambiguous = True
                break
        if ambiguous:
            continue
        out.extend((k, L) for k in ks)
    return out


def _assign_1h(mol, env, peaks, mu, sigma):
    """Confident (row, label) pairs of C–H classes from a 1H signal list (see the module text)."""
    ranks = symmetry_ranks(mol)
    classes = defaultdict(list)
    exch_classes = set()
    for k, a in enumerate(int(x) for x in env.centres):
        if mol.GetAtomWithIdx(a).GetAtomicNum() == 6:
            classes[ranks[a]].append(k)
        else:
            exch_classes.add(ranks[a])
    obs = np.unique(np.round([s for s, _ in peaks], 4))
    if not len(obs) or not classes:
        return []
    out = []
    if len(classes) == 1:
        ks = next(iter(classes.values()))
        low = obs[obs < 10.0]  # above 10 ppm: acids, aldehydes' rivals, NH/OH of the same compound
        if len(low) == 1 and abs(low[0] - float(mu[ks].mean())) <= H_SOLE_MAX_ABS:
            return [(k, float(low[0])) for k in ks]
    joint = _joint_1h(list(classes.values()), obs, mu, sigma, len(exch_classes))
    for ci, ks in enumerate(classes.values()):
        if ci in joint:
            out.extend((k, joint[ci]) for k in ks)
            continue
        p, s = float(mu[ks].mean()), float(sigma[ks].mean())
        d = np.abs(obs - p)
        order = np.argsort(d)
        d1 = d[order[0]]
        d2 = d[order[1]] if len(order) > 1 else np.inf
        if d1 <= max(H_MAX_ABS, 2 * s) and d2 - d1 >= max(H_MARGIN, s):
            out.extend((k, float(obs[order[0]])) for k in ks)
    return out


def _joint_1h(classes: list[list[int]], obs: np.ndarray, mu, sigma, n_exchangeable: int) -> dict[int, float]:
    """A complete list - one distinct value per C–H class, plus at most one per OH/NH/SH class - is
    assigned to all classes at once (Hungarian algorithm on |predicted − observed|, as for 13C), so
    crowded regions such as aromatic rings get labels their nearest-value rule refuses; a class keeps
    its value when it lies within ``H_JOINT_MAX_ABS`` (or 3σ) of its prediction.  {class: value}."""
    extra = len(obs) - len(classes)
    if extra < 0 or extra > n_exchangeable:
        return {}
    pmu = np.array([float(mu[ks].mean()) for ks in classes])
    psg = np.array([float(sigma[ks].mean()) for ks in classes])
    r, c = linear_sum_assignment(np.abs(pmu[:, None] - obs[None, :]))
    return {int(i): float(obs[j]) for i, j in zip(r, c) if abs(obs[j] - pmu[i]) <= max(H_JOINT_MAX_ABS, 3 * psg[i])}


def pseudo_label(model, peakmols, mol_offset: int = 10**6, max_z: float = 3.0, max_abs: float = 6.0,
                 weight: float = 1.0, stats: dict | None = None) -> RowSet:
    """Confident pseudo-labelled rows from unassigned peak lists (the nucleus is the model's)."""
    stats = {} if stats is None else stats
    nucleus = getattr(model, "nucleus", "13C")
    items = _prepare(peakmols, nucleus)
    stats["molecules_usable"] = len(items)
    feats = np.vstack([e.features for _, _, e in items])
    codes = np.vstack([e.codes for _, _, e in items])
    rkeys = np.vstack([e.ring_keys for _, _, e in items])
    mu_all, sig_all, radius_all, _ = model.predict_arrays(feats, codes, ring_keys=rkeys)
    codes_o, feats_o, ys, mi, ai, fo, rk = [], [], [], [], [], [], []
    k = 0
    n_classes_kept = n_atoms_total = n_mol = 0
    for i, (pm, mol, env) in enumerate(items):
        n = len(env.centres)
        mu, sg, novel = mu_all[k:k + n], sig_all[k:k + n], radius_all[k:k + n] == 0
        k += n
        n_atoms_total += n
        if nucleus == "1H":
            res = _assign_1h(mol, env, pm.peaks, mu, sg)
        else:
            res = _assign_one(mol, env, pm.peaks, mu, sg, max_z, max_abs, novel)
        if not res:
            continue
        n_mol += 1
        for kk, L in res:
            codes_o.append(env.codes[kk]); feats_o.append(env.features[kk]); ys.append(L)
            mi.append(mol_offset + i); ai.append(int(env.centres[kk])); fo.append(fold_of(pm.skeleton))
            rk.append(env.ring_keys[kk])
            n_classes_kept += 1
    stats.update(atoms_considered=n_atoms_total, atoms_labelled=n_classes_kept, molecules_labelled=n_mol)
    return RowSet(np.array(codes_o, np.uint32).reshape(-1, env.codes.shape[1]), np.array(feats_o, np.float32),
                  np.array(ys, np.float32), np.array(mi), np.array(ai), np.array(fo),
                  np.full(len(ys), weight, np.float32), np.array(rk, np.uint32).reshape(-1, len(KEY_NAMES)))
