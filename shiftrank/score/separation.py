"""Which signals separate the best candidate from the runner-up.

The ranking's score is a sum over spectra of each assignment's cost divided by that spectrum's
temperature, and an assignment's cost is itself a sum over the observed lines: the classes placed on a
line (shift deviation, multiplicity misfit, a shared line), a line no class explains, and classes left
unobserved.  Splitting both candidates' costs line by line over the same observed lines therefore says
where the difference in their scores comes from: the lines whose share differs most are the ones a
chemist should look at (and, with 2D data, confirm).  A share is in natural-log units of the odds
between the two candidates (the probabilities' ratio is e to the sum of the shares); what the assignment
charges without a line of its own (1H integrals a multiplet promises and nobody supplies, a second class in
a resolved multiplet) is kept as one 'rest' share per spectrum.

>>> s = Separator("13C", 133.0, None, 2.3, ["atom 4 CH predicted 133.6 (−0.6)"], ["atom 4 CH predicted 122.1 (+10.9)"])
>>> s.line, round(s.factor, 1)
('133.0', 10.0)
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np

from ..words import count
from .evidence import CORRELATIONS

#: shares smaller than this (ln odds) are not shown: a factor of about 1.35 either way
MIN_SHARE = 0.3
#: spectra whose lines are split (an HSQC or HMBC line is a cross peak, named δC/δH)
NUCLEI = ("13C", "1H", "HSQC") + CORRELATIONS


@dataclass
class Separator:
    """One observed line (``kind`` 'line'), the classes left unobserved ('unobserved') or the rest of a
    spectrum's cost ('rest'), and how much it favours the first candidate over the second (``share``, ln
    odds; negative favours the second)."""

    nucleus: str
    shift: float | None
    range: tuple | None
    share: float
    first: list[str]
    second: list[str]
    kind: str = "line"
    h: float | None = None     # 2D: the cross peak's second dimension (δH; COSY, NOESY: the smaller δH)
    first_classes: list = field(default_factory=list)    # the classes as data: atoms, predicted, deviation, z
    second_classes: list = field(default_factory=list)

    @property
    def factor(self) -> float:
        return math.exp(min(abs(self.share), 50.0))

    @property
    def line(self) -> str:
        if self.kind != "line":
            return {"unobserved": "unobserved classes", "rest": "integrals, shared multiplets"}[self.kind]
        if self.range is not None:
            return f"{_ppm(self.range[1])}–{_ppm(self.range[0])}"
        return _ppm(self.shift) + (f"/{_ppm(self.h)}" if self.h is not None else "")

    def to_dict(self) -> dict:
        d = {"nucleus": self.nucleus, "kind": self.kind, "shift": self.shift, "range": list(self.range) if self.range else None,
             "ln_odds": round(self.share, 3), "first": self.first, "second": self.second,
             "first_classes": self.first_classes, "second_classes": self.second_classes}
        if self.h is not None:
            d["shift_h"] = self.h
        return d


def _ppm(v: float) -> str:
    """A shift as printed: '133.0', '7.26', '121.05' (at least one decimal, at most three)."""
    text = f"{v:.3f}".rstrip("0")
    return text + "0" if text.endswith(".") else text


def _same_lines(a, b) -> bool:
    """The two candidates read the spectrum as the same lines (a C–F multiplet read as one carbon by one of them
    only makes the readings differ)."""
    return len(a.peaks) == len(b.peaks) and all(p.shift == q.shift and p.h_lo == q.h_lo for p, q in zip(a.peaks, b.peaks))


def _row(res, pairing) -> dict:
    """One class placed on (or missing from) a line, as data."""
    c = res.classes[pairing.cls]
    r = lambda x: None if x is None else round(float(x), 3)  # noqa: E731
    if res.nucleus in CORRELATIONS:
        return {"atoms": list(c.atoms), "h_atoms": list(c.h_atoms), "bonds": c.bonds, "distance": r(c.distance)}
    return {"atoms": list(c.atoms), "multiplicity": c.multiplicity, "predicted": r(c.shift), "sigma": r(c.sigma),
            "deviation": r(pairing.deviation), "z": r(pairing.z)}


def _describe(res, pairing) -> str:
    c = res.classes[pairing.cls]
    atoms = ",".join(str(a) for a in c.atoms)
    if res.nucleus in CORRELATIONS:   # which atoms the cross peak joins, and how far apart they are
        h = ",".join(str(a) for a in c.h_atoms)
        if res.nucleus == "HMBC":
            return f"C atom{'s' if len(c.atoms) > 1 else ''} {atoms} – H on {h}: {c.bonds} bonds" + (
                "" if pairing.multiplicity_ok else ", not 2-3")
        if res.nucleus == "COSY":
            return f"H on {atoms} – H on {h}: {c.bonds} bonds" + ("" if pairing.multiplicity_ok else ", not coupled")
        far = "no 3D conformer" if c.distance is None else f"{c.distance:.1f} Å"
        return f"H on {atoms} – H on {h}: {far}" + ("" if pairing.multiplicity_ok else ", too far for an NOE")
    what = f"atom{'s' if len(c.atoms) > 1 else ''} {atoms} {c.multiplicity}"
    nd = 2 if res.nucleus == "1H" else 1
    if pairing.peak is None:
        return f"{what} predicted {c.shift:.{nd}f}, unobserved"
    dev = "" if pairing.deviation is None else f" ({pairing.deviation:+.{nd}f}"
    z = "" if pairing.z is None or abs(pairing.z) < 2 else f", {abs(pairing.z):.1f}σ"
    return f"{what} predicted {c.shift:.{nd}f}{dev}{z})" if dev else f"{what} predicted {c.shift:.{nd}f}"


def _line_costs(res) -> tuple[np.ndarray, float, float]:
    """(cost per observed line, cost of the unobserved classes, the rest) of one spectrum's assignment."""
    a = res.assignment
    per = np.zeros(len(res.peaks))
    unobserved = 0.0
    for p in a.pairings:
        if p.peak is None:
            unobserved += p.cost
        else:
            per[p.peak] += p.cost
    for j in a.unmatched_peaks:
        if j < len(a.extra_costs):
            per[j] += a.extra_costs[j]
    return per, unobserved, a.total_cost - per.sum() - unobserved


def separating_signals(first, second, limit: int | None = 4, min_share: float = MIN_SHARE) -> list[Separator]:
    """The lines whose cost shares differ most between ``first`` and ``second`` (:class:`CandidateResult`
    objects of one ranking), largest first, at most ``limit``; both directions are listed, so a line that
    favours the runner-up is shown beside those that favour the best."""
    out: list[Separator] = []
    for n in NUCLEI:
        a, b = first.nuclei.get(n), second.nuclei.get(n)
        if a is None or b is None or not _same_lines(a, b):
            continue
        t = first.divisors.get(n, 1.0)
        ca, ua, ra = _line_costs(a)
        cb, ub, rb = _line_costs(b)
        on_a = {j: [p for p in a.assignment.pairings if p.peak == j] for j in range(len(a.peaks))}
        on_b = {j: [p for p in b.assignment.pairings if p.peak == j] for j in range(len(b.peaks))}
        for j, pk in enumerate(a.peaks):
            share = float(cb[j] - ca[j]) / t
            rng = (pk.lo, pk.hi) if pk.lo is not None and pk.hi is not None and pk.lo != pk.hi else None
            out.append(Separator(n, pk.shift, rng, share,
                                 [_describe(a, p) for p in on_a[j]] or ["no class (an unexplained line)"],
                                 [_describe(b, p) for p in on_b[j]] or ["no class (an unexplained line)"],
                                 h=pk.h_lo if n in ("HSQC",) + CORRELATIONS else None,
                                 first_classes=[_row(a, p) for p in on_a[j]], second_classes=[_row(b, p) for p in on_b[j]]))
        gone_a = [p for p in a.assignment.pairings if p.peak is None]
        gone_b = [p for p in b.assignment.pairings if p.peak is None]
        if gone_a or gone_b:
            out.append(Separator(n, None, None, float(ub - ua) / t, [_describe(a, p) for p in gone_a] or ["none"],
                                 [_describe(b, p) for p in gone_b] or ["none"], "unobserved",
                                 first_classes=[_row(a, p) for p in gone_a], second_classes=[_row(b, p) for p in gone_b]))
        if abs(rb - ra) / t >= min_share:
            out.append(Separator(n, None, None, float(rb - ra) / t, [f"{ra:.1f} nats"], [f"{rb:.1f} nats"], "rest"))
    out = [s for s in out if abs(s.share) >= min_share]
    out.sort(key=lambda s: -abs(s.share))
    return out[:limit] if limit is not None else out


#: below this probability of the best candidate, a spectrum not given is weighed as the next measurement
NEXT_BELOW = 0.9
#: predicted lines this many combined σ apart would likely be told apart by a measured spectrum
NEXT_Z = 2.0


def _predicted_classes(smiles: str, nucleus: str, solvent: str | None) -> list[tuple[str, float, float]]:
    """(label, mean predicted shift, σ) per symmetry class of ``smiles`` for ``nucleus``."""
    from ..chem.structure import symmetry_ranks
    from ..inputs.molecules import to_mol
    from ..prediction.api import predict

    pred = predict(smiles, solvent, nucleus)
    mol = to_mol(smiles)
    ranks = symmetry_ranks(mol)
    groups: dict[int, list] = {}
    for a in pred.atoms:
        groups.setdefault(ranks[a.atom], []).append(a)
    out = []
    for members in groups.values():
        atom = mol.GetAtomWithIdx(members[0].atom)
        h = atom.GetTotalNumHs()
        kind = ("C" if h == 0 else f"CH{h if h > 1 else ''}") if nucleus == "13C" else f"{h * len(members)}H on {atom.GetSymbol()}"
        where = ",".join(str(m.atom) for m in members)
        out.append((f"{kind}, atom{'s' if len(members) > 1 else ''} {where}",
                    float(np.mean([m.shift for m in members])), float(np.mean([m.sigma for m in members]))))
    return out


def _counted_hints(first: str, second: str, printed=()) -> list[str]:
    """A 19F or 31P spectrum's signal count where #1 and #2 have different numbers of fluorine (phosphorus)
    environments by symmetry (common practice); not for a nucleus whose section was ``printed``."""
    from ..chem.inventory import COUNTED_NUCLEI
    from .structures import element_environments

    out = []
    for nucleus, (z, _, word) in COUNTED_NUCLEI.items():
        if nucleus in printed:
            continue
        envs = [element_environments(first, z), element_environments(second, z)]
        if envs[0] != envs[1]:
            out.append(f"a {nucleus} spectrum would tell #1 and #2 apart by its count: #1 has "
                       f"{envs[0]} {word} environment{'s' if envs[0] != 1 else ''}, #2 {envs[1]} (symmetry)")
    return out


def _dept_hint(result, first, second) -> list[str]:
    """A DEPT-135 (or an edited HSQC) where a 13C list without multiplicities was given and #1 and #2 differ in
    their numbers of C, CH, CH2 and CH3 signals (common practice)."""
    peaks = result.peaks.get("13C")
    a, b = first.nuclei.get("13C"), second.nuclei.get("13C")
    if peaks is None or a is None or b is None or any(p.multiplicity for p in peaks if not p.solvent):
        return []
    kinds = ("C", "CH", "CH2", "CH3")
    ca = {k: sum(1 for c in a.classes if c.multiplicity == k) for k in kinds}
    cb = {k: sum(1 for c in b.classes if c.multiplicity == k) for k in kinds}
    if ca == cb:
        return []
    say = lambda d: ", ".join(f"{d[k]} {k}" for k in kinds if d[k])  # noqa: E731
    return [f"a DEPT-135 (or an edited HSQC) would tell #1 and #2 apart: #1 has {say(ca)} signals, #2 {say(cb)}"]


def next_spectrum(result, solvent: str | None = None, geometry: bool = True) -> list[str]:
    """When #1 is not clearly ahead (p below :data:`NEXT_BELOW`), what a 13C or 1H spectrum not given would add:
    the two candidates' predicted spectra are matched class to class (Hungarian matching on the shift
    difference over the combined σ) and the most separated pair, or a difference in the number of expected
    signals, is named; or it is said that the predictions hardly differ; a 19F or 31P count is named where
    the two have different numbers of F or P environments, a DEPT-135 where a 13C list without multiplicities
    leaves two candidates with different numbers of C, CH, CH2 and CH3 signals; the HMBC cross peak and (with
    ``geometry``: it embeds conformers) the NOE that one candidate predicts and the other cannot, where no such
    spectrum was given.  Predictions, not measurements: a suggestion for the next experiment, not evidence."""
    from scipy.optimize import linear_sum_assignment

    from ..errors import InputError

    first, second = result.best, result.runner_up
    if second is None or first.probability >= NEXT_BELOW:
        return []
    out = _counted_hints(first.smiles, second.smiles, result.counted) + _dept_hint(result, first, second)
    hmbc = ([] if "HMBC" in result.peaks else _hmbc_hint(first.smiles, second.smiles, solvent)) + \
        ([] if "NOESY" in result.peaks or not geometry else _noe_hint(first.smiles, second.smiles, solvent))
    if all(n in result.peaks for n in ("13C", "1H")):
        if hmbc:
            return out + hmbc
        given_2d = [n for n in ("HMBC", "NOESY") if n in result.peaks]
        return out + ["the 13C and 1H spectra given leave #1 and #2 close: 2D correlations across the bonds where they "
                      "differ (HMBC from the nearest CH or CH3 protons, NOE for neighbours in space) would decide (common "
                      "practice)" if not given_2d else
                      f"the spectra given ({', '.join(given_2d)} among them) leave #1 and #2 close: an authentic sample "
                      "or an orthogonal method would decide (common practice)"]
    for n in ("13C", "1H"):
        if n in result.peaks or (n == "13C" and "HSQC" in result.peaks):
            continue
        try:
            a = _predicted_classes(first.smiles, n, solvent)
            b = _predicted_classes(second.smiles, n, solvent)
        except InputError:
            continue
        if not a or not b:
            continue
        z = np.array([[abs(x[1] - y[1]) / math.hypot(x[2], y[2]) for y in b] for x in a])
        rows, cols = linear_sum_assignment(z)
        k = int(np.argmax(z[rows, cols]))
        i, j = rows[k], cols[k]
        nd = 1 if n == "13C" else 2
        counts = (f"; #1 expects {count(len(a), 'signal')}, #2 {len(b)} (symmetry)" if len(a) != len(b) else "")
        if z[i, j] >= NEXT_Z:
            out.append(f"a {n} spectrum would likely tell #1 and #2 apart: #1 predicts {a[i][1]:.{nd}f} ({a[i][0]}) where "
                       f"#2's matching class is at {b[j][1]:.{nd}f} ({b[j][0]}), {z[i, j]:.1f}σ apart{counts} (predictions)")
        else:
            out.append(f"a {n} spectrum would hardly tell #1 and #2 apart by shifts (their predicted classes differ by at "
                       f"most {z[i, j]:.1f}σ){counts + ': its signal count may' if counts else ''} (predictions)")
    return out + hmbc


def _linked_pairs(smiles: str, solvent: str | None) -> list[tuple[str, float, float, float, float]]:
    """(label, δC, σC, δH, σH) predicted for every carbon class and proton class (not on O/N/S) two or three bonds
    apart: the cross peaks an HMBC of ``smiles`` may show."""
    from ..chem.structure import symmetry_ranks
    from ..inputs.molecules import to_mol
    from ..prediction.api import predict
    from .correlations import HMBC_BONDS, hmbc_bonds

    mol = to_mol(smiles)
    pc, ph = predict(smiles, solvent, "13C"), predict(smiles, solvent, "1H")
    ranks = symmetry_ranks(mol)

    def classes(pred, keep):
        groups: dict[int, list] = {}
        for a in pred.atoms:
            if keep(mol.GetAtomWithIdx(a.atom)):
                groups.setdefault(ranks[a.atom], []).append(a)
        return [([m.atom for m in g], float(np.mean([m.shift for m in g])), float(np.mean([m.sigma for m in g])))
                for g in groups.values()]

    cs = classes(pc, lambda at: True)
    hs = classes(ph, lambda at: at.GetAtomicNum() == 6)
    nb = hmbc_bonds(mol, [c[0] for c in cs], [h[0] for h in hs])
    out = []
    for i, (ca, c, sc) in enumerate(cs):
        for k, (ha, h, sh) in enumerate(hs):
            bonds = int(nb[i, k])
            if bonds in HMBC_BONDS:
                label = (f"the H on atom{'s' if len(ha) > 1 else ''} {','.join(map(str, ha))} to C atom"
                         f"{'s' if len(ca) > 1 else ''} {','.join(map(str, ca))}, {bonds} bonds")
                out.append((label, c, sc, h, sh))
    return out


def _hmbc_hint(first: str, second: str, solvent: str | None) -> list[str]:
    """The cross peak an HMBC would most likely show for one of #1 and #2 and not for the other: of each one's
    predicted two- and three-bond pairs, the one farthest (in combined σ of both dimensions) from every pair of
    the other (common practice: a three-bond correlation across the bond that differs decides a regiochemistry)."""
    from ..errors import InputError

    try:
        a, b = _linked_pairs(first, solvent), _linked_pairs(second, solvent)
    except InputError:
        return []
    if not a or not b:
        return []

    def farthest(x, y):
        best = None
        for lab, c, sc, h, sh in x:
            z = min(math.hypot((c - c2) / math.hypot(sc, sc2), (h - h2) / math.hypot(sh, sh2)) for _, c2, sc2, h2, sh2 in y)
            if best is None or z > best[0]:
                best = (z, lab, c, h)
        return best

    fa, fb = farthest(a, b), farthest(b, a)
    which, (z, lab, c, h) = ("#1", fa) if fa[0] >= fb[0] else ("#2", fb)
    if z < NEXT_Z:
        return []
    other = "#2" if which == "#1" else "#1"
    return [f"an HMBC would likely tell #1 and #2 apart: {which} predicts a cross peak near δC {c:.1f} / δH {h:.2f} "
            f"({lab}) that no two- or three-bond pair of {other} gives within {min(z, 5.0):.1f}σ{'+' if z > 5 else ''} "
            "(predictions)"]


@lru_cache(maxsize=256)
def _geometry(smiles: str):
    """:func:`.correlations.proton_distances` of ``smiles`` as :func:`~shiftrank.inputs.molecules.to_mol` numbers it
    (kept: a report asks again for each case a candidate appears in)."""
    from ..inputs.molecules import to_mol
    from .correlations import proton_distances

    return proton_distances(to_mol(smiles))


def _predicted_protons(smiles: str, solvent: str | None):
    """(molecule, proton classes (heavy atoms), their predicted mean shifts, σ and expected first-order pattern
    ('s', 'd', 't' …, the optional small couplings left out)) of ``smiles``."""
    from ..chem.couplings import expected_multiplets
    from ..chem.structure import symmetry_ranks
    from ..inputs.molecules import to_mol
    from ..prediction.api import predict

    mol = to_mol(smiles)
    pred = predict(smiles, solvent, "1H")
    shift = {a.atom: (a.shift, a.sigma) for a in pred.atoms}
    ems = [e for e in expected_multiplets(mol, symmetry_ranks(mol)) if all(x in shift for x in e.atoms)]
    groups = [list(e.atoms) for e in ems]
    mu = [float(np.mean([shift[x][0] for x in g])) for g in groups]
    sg = [float(np.mean([shift[x][1] for x in g])) for g in groups]
    letters = [e.letters().split("(")[0] or "s" for e in ems]
    return mol, groups, mu, sg, letters


def _noe_hint(first: str, second: str, solvent: str | None) -> list[str]:
    """The NOE a NOESY or ROESY would most likely show for one of #1 and #2 and not for the other: of each one's
    proton pairs close in space (RDKit conformers, :func:`.correlations.proton_distances`) whose predicted shifts
    lie apart (a cross peak off the diagonal), the one whose nearest close pair in the other is farthest in
    combined σ (common practice: an N-alkyl's NOE to the ring proton beside it tells N1 from N2)."""
    from ..errors import InputError
    from .correlations import NOE_CLOSE

    try:
        sides = []
        for smi in (first, second):
            mol, groups, mu, sg, letters = _predicted_protons(smi, solvent)
            r = _geometry(smi)
            if r is None:
                return []
            close = []
            for i in range(len(groups)):
                for k in range(i + 1, len(groups)):
                    d = min(r[x, y] for x in groups[i] for y in groups[k])
                    if d <= NOE_CLOSE:
                        close.append((d, (groups[i], mu[i], sg[i], letters[i]), (groups[k], mu[k], sg[k], letters[k])))
            sides.append(close)
    except InputError:
        return []

    def apart(x, y) -> float:
        # one end against another: the shifts in combined σ, and 3σ more where the expected patterns differ (the
        # singlet H3 of an indazole against its doublet H7)
        return abs(x[1] - y[1]) / math.hypot(x[2], y[2]) + (3.0 if x[3] != y[3] else 0.0)

    best = None
    for which, (mine, theirs) in (("#1", sides), ("#2", sides[::-1])):
        for d, a, b in mine:
            if abs(a[1] - b[1]) <= 0.1:   # (a cross peak so near the diagonal would hardly be read)
                continue
            z = min((min(math.hypot(apart(a, c), apart(b, e)), math.hypot(apart(a, e), apart(b, c)))
                     for _, c, e in theirs), default=np.inf)
            if best is None or z > best[0]:
                best = (z, which, d, a, b)
    if best is None or best[0] < NEXT_Z:
        return []
    z, which, d, a, b = best
    other = "#2" if which == "#1" else "#1"
    name = lambda e: f"the H on atom{'s' if len(e[0]) > 1 else ''} {','.join(map(str, e[0]))} (δ ≈ {e[1]:.2f}, {e[3]})"  # noqa: E731
    return [f"a NOESY or ROESY would likely tell #1 and #2 apart: {which} places {name(a)} and {name(b)} {d:.1f} Å "
            f"apart in space, and {other} has no such close pair of protons (predictions; RDKit conformers)"]

