"""Hydrogen isotope labels (2H, 3H) kept as facts of the parent structure.

Standardisation reads a deuterium or tritium atom as a plain hydrogen, so that the shift models, which
know natural-abundance molecules only, predict a CD3 group as the CH3 group it resembles; the one-bond
isotope shift of the carbon that carries the label (about −0.3 ppm per 2H) is then added to its 13C
prediction (:data:`shiftrank.prediction.environment.ISOTOPE_SHIFT_13C`), smaller ones (a few hundredths of
a ppm in 1H, a tenth two bonds away in 13C; from memory) are left out.  What the spectra see changes, and
the labels are remembered for it:

* a 2H or 3H gives no line in a 1H spectrum, so an atom whose hydrogens are all labelled has no 1H
  signal, and a CHD2 group integrates for one proton;
* DEPT and HSQC edit by attached *protons*, so a CD3 carbon shows as a carbon without H;
* H–D couplings are about a sixth of the H–H couplings they replace and are not resolved in routine
  spectra (common practice), so a labelled neighbour does not split a proton's signal;
* otherwise the spectra keep the symmetry of the unlabelled molecule (the ring protons of a
  CD3O/CH3O-dimethoxybenzene stay one 4H signal: isotope shifts two or more bonds away are below what
  routine spectra resolve); only atoms of one symmetry class that carry different labels are told apart
  (:func:`split_by_labels`).

The labels travel as one molecule property (``atom:2H count:3H count``), which RDKit copies with the
molecule.  Formula and masses count them as D and T (``C8H7D3O``; :func:`isotope_totals`).

>>> m = Chem.MolFromSmiles("COc1ccc(OC)cc1")
>>> set_labels(m, {0: 3})
>>> labelled_hydrogens(m), proton_counts(m)[:2], isotope_totals(m)
({0: 3}, [0, 0], {'D': 3})
"""
from __future__ import annotations

from rdkit import Chem

#: molecule property holding the labelled-hydrogen counts of the heavy atoms
LABEL_PROP = "shiftrank_h_isotopes"


def set_labels(mol: Chem.Mol, counts: dict) -> None:
    """Record ``counts`` on ``mol``: heavy-atom index → number of its hydrogens that are 2H, or a pair
    (number of 2H, number of 3H)."""
    pairs = {}
    for i, n in counts.items():
        d, t = (n, 0) if isinstance(n, int) else (int(n[0]), int(n[1]))
        if d + t > 0:
            pairs[int(i)] = (d, t)
    if pairs:
        mol.SetProp(LABEL_PROP, ";".join(f"{i}:{d}:{t}" for i, (d, t) in sorted(pairs.items())))
    elif mol.HasProp(LABEL_PROP):
        mol.ClearProp(LABEL_PROP)


def label_pairs(mol: Chem.Mol) -> dict[int, tuple[int, int]]:
    """Heavy-atom index → (number of its 2H, number of its 3H), as recorded by :func:`set_labels`."""
    if not mol.HasProp(LABEL_PROP):
        return {}
    out = {}
    for item in mol.GetProp(LABEL_PROP).split(";"):
        i, d, t = item.split(":")
        out[int(i)] = (int(d), int(t))
    return out


def labelled_hydrogens(mol: Chem.Mol) -> dict[int, int]:
    """Heavy-atom index → number of its hydrogens that are isotope labels (empty for most molecules)."""
    return {i: d + t for i, (d, t) in label_pairs(mol).items()}


def isotope_totals(mol: Chem.Mol) -> dict[str, int]:
    """How many of the molecule's hydrogens are 2H ('D') and 3H ('T'), e.g. ``{'D': 3}``; empty when none."""
    pairs = label_pairs(mol).values()
    d, t = sum(x for x, _ in pairs), sum(y for _, y in pairs)
    return {k: v for k, v in (("D", d), ("T", t)) if v}


def proton_counts(mol: Chem.Mol) -> list[int]:
    """Number of 1H (natural hydrogen, not 2H or 3H) on each atom of ``mol`` (hydrogens implicit)."""
    counts = [mol.GetAtomWithIdx(i).GetTotalNumHs() for i in range(mol.GetNumAtoms())]
    for i, n in labelled_hydrogens(mol).items():
        if i < len(counts):
            counts[i] = max(0, counts[i] - n)
    return counts


def strip_labelled_hydrogens(mol: Chem.Mol) -> tuple[Chem.Mol, list[int]]:
    """``mol`` with its explicit hydrogens, 2H and 3H included, removed and the labels recorded
    (:func:`set_labels`), and the original index of each remaining atom."""
    mol = Chem.Mol(mol)
    counts: dict[int, list[int]] = {}
    for a in mol.GetAtoms():
        if a.GetAtomicNum() == 1 and a.GetIsotope() > 1:   # 2H, 3H ([1H] is a plain proton)
            for nb in a.GetNeighbors():
                counts.setdefault(nb.GetIdx(), [0, 0])[0 if a.GetIsotope() == 2 else 1] += 1
        if a.GetAtomicNum() == 1:
            a.SetIsotope(0)
    heavy = [a.GetIdx() for a in mol.GetAtoms() if a.GetAtomicNum() > 1]
    new_index = {old: k for k, old in enumerate(heavy)}
    out = Chem.RemoveAllHs(mol, sanitize=True)   # (RemoveHs keeps an H that defines a double bond's stereo: [H]/N=C)
    set_labels(out, {new_index[i]: tuple(n) for i, n in counts.items() if i in new_index})
    return out, heavy


def split_by_labels(atoms: list[int], labels: dict[int, int]) -> list[list[int]]:
    """The atoms of one symmetry class grouped by how many labelled hydrogens each carries (one group,
    ``[atoms]``, when none is labelled)."""
    if not labels or not any(i in labels for i in atoms):
        return [atoms]
    groups: dict[int, list[int]] = {}
    for i in atoms:
        groups.setdefault(labels.get(i, 0), []).append(i)
    return sorted(groups.values(), key=lambda g: g[0])
