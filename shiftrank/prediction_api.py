"""Public prediction functions: one molecule or many, from SMILES or RDKit molecules."""
from __future__ import annotations

from typing import Iterable

from rdkit import Chem

from .environment import MolEnvironments, environments
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
        preds = model.predict_envs([env for _, _, env in pending])
        for (slot, rec, _), p in zip(pending, preds):
            out[slot] = (rec, p, None)
        pending.clear()

    for rec in records:
        out.append(None)
        if rec.error or rec.mol is None:
            out[-1] = (rec, None, rec.error or "unreadable record")
            continue
        try:
            env = checked_environments(rec.mol, f"record '{rec.id}'", key)
        except InputError as exc:
            out[-1] = (rec, None, str(exc))
            continue
        pending.append((len(out) - 1, rec, env))
        if len(pending) >= CHUNK:
            flush()
    if pending:
        flush()
    return out
