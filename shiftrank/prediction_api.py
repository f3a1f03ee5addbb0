"""Public prediction functions: one molecule or many, from SMILES or RDKit molecules."""
from __future__ import annotations

from typing import Iterable

from rdkit import Chem

from .environment import MolEnvironments, MolParts, environments, environments_of, mol_parts
from .errors import InputError
from .model_files import default_model
from .molecules import MolRecord, check_organic, to_mol
from .predictor import MolPrediction
from .solvents import normalise_solvent

CHUNK = 2000


def checked_environments(mol: Chem.Mol, label: str, solvent: str | None = None) -> MolEnvironments:
    """Carbon environments of ``mol`` after the organic check; any failure is an :class:`InputError` naming ``label``."""
    check_organic(mol, label)
    try:
        return environments(mol, solvent)
    except Exception as exc:  # noqa: BLE001 - RDKit can fail on exotic records; report, do not crash
        raise InputError(f"{label}: cannot compute atom environments ({exc})") from None


def checked_parts(mol: Chem.Mol, label: str, solvent: str | None = None) -> MolParts:
    """RDKit facts of ``mol`` for batch descriptors, after the organic check; failures name ``label``."""
    check_organic(mol, label)
    try:
        return mol_parts(mol, solvent)
    except Exception as exc:  # noqa: BLE001 - RDKit can fail on exotic records; report, do not crash
        raise InputError(f"{label}: cannot compute atom environments ({exc})") from None


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


def predict(molecule: str | Chem.Mol, solvent: str | None = None) -> MolPrediction:
    """Predict the 13C shift and uncertainty of every carbon.

    ``molecule`` is a SMILES string or an RDKit molecule; atom indices in the
    result are those of the molecule with hydrogens removed.

    >>> p = predict("CC#N")
    >>> sorted(p.shifts)
    [0, 1]
    """
    mol = to_mol(molecule) if isinstance(molecule, str) else Chem.RemoveHs(molecule)
    label = f"SMILES '{molecule}'" if isinstance(molecule, str) else "molecule"
    return default_model().predict_envs([checked_environments(mol, label, normalise_solvent(solvent))])[0]


def predict_records(records: Iterable[MolRecord], solvent: str | None = None) -> list[tuple[MolRecord, MolPrediction | None, str | None]]:
    """Predict many records in large model calls; bad records come back with an error message."""
    model = default_model()
    key = normalise_solvent(solvent)
    out: list = []
    pending: list = []

    def flush():
        envs = environments_isolated([parts for _, _, parts in pending])
        good = []
        for (slot, rec, _), env in zip(pending, envs):
            if env is None:
                out[slot] = (rec, None, f"record '{rec.id}': cannot compute atom environments")
            else:
                good.append((slot, rec, env))
        for (slot, rec, _), p in zip(good, model.predict_envs([env for _, _, env in good])):
            out[slot] = (rec, p, None)
        pending.clear()

    for rec in records:
        out.append(None)
        if rec.error or rec.mol is None:
            out[-1] = (rec, None, rec.error or "unreadable record")
            continue
        try:
            parts = checked_parts(rec.mol, f"record '{rec.id}'", key)
        except InputError as exc:
            out[-1] = (rec, None, str(exc))
            continue
        pending.append((len(out) - 1, rec, parts))
        if len(pending) >= CHUNK:
            flush()
    if pending:
        flush()
    return out
