"""Public prediction functions: one molecule or many, from SMILES or RDKit molecules, for either nucleus.

``nucleus="13C"`` predicts every carbon; ``nucleus="1H"`` predicts, for every heavy atom that carries
hydrogen, the mean shift of its protons (keys are heavy-atom indices in both cases).
"""
from __future__ import annotations

import gc
from contextlib import contextmanager
from typing import Iterable

from rdkit import Chem

from .environment import MolEnvironments, MolParts, environments_of, mol_parts
from ..errors import InputError
from .model_files import default_model
from ..chem.standardise import standardise
from ..inputs.molecules import MolRecord, check_organic, to_mol
from .model import MolPrediction
from ..inputs.solvents import normalise_solvent

CHUNK = 2000


def checked_parts(mol: Chem.Mol, label: str, solvent: str | None = None, nucleus: str = "13C",
                  pi=None) -> MolParts:
    """RDKit facts of ``mol`` for batch descriptors, after the organic check; failures name ``label``.
    ``pi``: its Hückel columns when already known (:func:`~shiftrank.prediction.environment.mol_parts`)."""
    check_organic(mol, label)
    try:
        return mol_parts(mol, solvent, nucleus, pi)
    except Exception as exc:  # noqa: BLE001 - RDKit can fail on exotic records; report, do not crash
        raise InputError(f"{label}: cannot compute atom environments ({exc})") from None


def standardised_parts(mol: Chem.Mol, label: str, solvent: str | None = None, nucleus: str = "13C") -> MolParts:
    """:func:`checked_parts` of the standardised parent of ``mol`` (largest organic fragment, neutralised,
    isotopes read as elements; :mod:`shiftrank.chem.standardise`), remembering how to map its atoms back
    to the input's atom order and what was done."""
    std = standardise(mol, label)
    parts = checked_parts(std.mol, label, solvent, nucleus)
    if std.atom_map != list(range(len(std.atom_map))):
        parts.atom_map = std.atom_map
    parts.notes = std.notes
    return parts


def environments_isolated(parts: list[MolParts]) -> list[MolEnvironments | None]:
    """Descriptors of many molecules in one batch; should the batch fail, each molecule on its own,
    with ``None`` for one that cannot be described (so one bad record never stops the others)."""
    try:
        return environments_of(parts)
    except Exception:  # noqa: BLE001
        out: list[MolEnvironments | None] = []
        for p in parts:
            try:
                out.append(environments_of([p])[0])
            except Exception:  # noqa: BLE001
                out.append(None)
        return out


def _own_copy(molecule: Chem.Mol) -> Chem.Mol:
    """A copy of a caller's molecule with hydrogens implicit (a plain copy when there are none to remove);
    descriptors write atom properties, which must not land on the caller's object."""
    return Chem.Mol(molecule) if molecule.GetNumAtoms() == molecule.GetNumHeavyAtoms() else Chem.RemoveHs(molecule)


def _check_nucleus(nucleus: str) -> str:
    if nucleus not in ("13C", "1H"):
        raise InputError(f"nucleus '{nucleus}': use 13C or 1H")
    return nucleus


def predict(molecule: str | Chem.Mol, solvent: str | None = None, nucleus: str = "13C") -> MolPrediction:
    """Predict the shift and uncertainty of every carbon (13C) or of the protons on every heavy atom (1H).

    ``molecule`` is a SMILES string or an RDKit molecule; atom indices in the
    result are those of the molecule with hydrogens removed.

    >>> p = predict("CC#N")
    >>> sorted(p.shifts)
    [0, 1]
    >>> sorted(predict("OCC#N", nucleus="1H").shifts)
    [0, 1]
    """
    _check_nucleus(nucleus)
    if not isinstance(molecule, (str, Chem.Mol)):
        hint = " (for many molecules use predict_many)" if isinstance(molecule, (list, tuple)) else ""
        raise InputError(f"expected a SMILES string or an RDKit molecule, got {type(molecule).__name__}{hint}")
    mol = to_mol(molecule) if isinstance(molecule, str) else _own_copy(molecule)
    label = f"SMILES '{molecule}'" if isinstance(molecule, str) else "molecule"
    pred = _predict_parts([standardised_parts(mol, label, normalise_solvent(solvent), nucleus)])[0]
    if pred is None:
        raise InputError(f"{label}: cannot compute atom environments")
    return pred


def predict_many(molecules: Iterable[str | Chem.Mol], solvent: str | None = None,
                 nucleus: str = "13C") -> list[MolPrediction | InputError]:
    """Predict many molecules (SMILES strings or RDKit molecules) in large batches, the fast path.

    The result has one entry per input, in order: a :class:`MolPrediction`, or the
    :class:`InputError` that says why that molecule could not be predicted.

    >>> out = predict_many(["CC#N", "not a smiles"])
    >>> sorted(out[0].shifts), type(out[1]).__name__
    ([0, 1], 'InputError')
    """
    key = normalise_solvent(solvent)
    _check_nucleus(nucleus)
    out: list = []
    for i, molecule in enumerate(molecules):
        try:
            if isinstance(molecule, str):
                mol, label = to_mol(molecule), f"input {i} (SMILES '{molecule}')"
            elif isinstance(molecule, Chem.Mol):
                mol, label = _own_copy(molecule), f"input {i}"
            else:
                raise InputError(f"input {i}: expected a SMILES string or an RDKit molecule, got {type(molecule).__name__}")
            out.append(standardised_parts(mol, label, key, nucleus))
        except InputError as exc:
            out.append(exc if str(exc).startswith("input ") else InputError(f"input {i}: {exc}"))
        except Exception as exc:  # noqa: BLE001 - RDKit refusing a molecule is that input's error
            out.append(InputError(f"input {i}: {exc}"))
    slots = [k for k, item in enumerate(out) if isinstance(item, MolParts)]
    for start in range(0, len(slots), CHUNK):
        chunk = slots[start:start + CHUNK]
        for k, pred in zip(chunk, _predict_parts([out[k] for k in chunk])):
            out[k] = pred if pred is not None else InputError(f"input {k}: cannot compute atom environments")
    return out


@contextmanager
def _gc_paused():
    """Pause Python's cycle collector for one batch: the batch makes many small objects and no
    cycles, and collections triggered halfway through cost about a tenth of the time."""
    was = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was:
            gc.enable()


def _predict_parts(parts: list[MolParts]) -> list[MolPrediction | None]:
    """Predictions for a batch of molecules' RDKit facts, all of one nucleus (None where descriptors failed)."""
    if not parts:
        return []
    with _gc_paused():
        envs = environments_isolated(parts)
        preds = iter(default_model(parts[0].nucleus).predict_envs([e for e in envs if e is not None]))
        out = [None if e is None else next(preds) for e in envs]
    for p, pred in zip(parts, out):
        if pred is None:
            continue
        pred.notes = list(p.notes)
        if p.guessed_twins:
            _unguess_twins(pred, p.guessed_twins, p.atom_map)
        if p.atom_map is not None:  # keys in the input's own atom order
            for a in pred.atoms:
                a.atom = p.atom_map[a.atom]
    return out


def _unguess_twins(pred: MolPrediction, pairs, atom_map=None) -> None:
    """Alike groups across a double bond drawn without coordinates (a SMILES): which one is cis is not stated,
    so each of the two gets the pair's mean, and ``cis_trans_pairs`` keeps both values (the ranking uses them
    as a pair)."""
    by_atom = {a.atom: a for a in pred.atoms}
    for cis, trans in pairs:
        a, b = by_atom.get(cis), by_atom.get(trans)
        if a is None or b is None:
            continue
        low, high = sorted((a.shift, b.shift))
        if high - low < 0.05:   # no increment for this kind of pair: nothing to average
            continue
        mean = round((a.shift + b.shift) / 2, 4)
        a.shift = b.shift = mean
        a.configuration = b.configuration = 0.0
        i, j = sorted(atom_map[k] if atom_map is not None else k for k in (cis, trans))
        pred.cis_trans_pairs.append((i, j, round(low, 2), round(high, 2)))


def predict_records(records: Iterable[MolRecord], solvent: str | None = None,
                    nucleus: str = "13C") -> list[tuple[MolRecord, MolPrediction | None, str | None]]:
    """Predict many records in large model calls; bad records come back with an error message."""
    key = normalise_solvent(solvent)
    _check_nucleus(nucleus)
    out: list = []
    pending: list = []

    def flush():
        for (slot, rec, _), pred in zip(pending, _predict_parts([parts for _, _, parts in pending])):
            out[slot] = (rec, pred, None) if pred is not None else (rec, None, f"record '{rec.id}': cannot compute atom environments")
        pending.clear()

    for rec in records:
        out.append(None)
        if rec.error or rec.mol is None:
            out[-1] = (rec, None, rec.error or "unreadable record")
            continue
        try:
            parts = standardised_parts(rec.mol, f"record '{rec.id}'", key, nucleus)
        except InputError as exc:
            out[-1] = (rec, None, str(exc))
            continue
        pending.append((len(out) - 1, rec, parts))
        if len(pending) >= CHUNK:
            flush()
    if pending:
        flush()
    return out
