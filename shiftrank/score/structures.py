"""The structure facts a ranking needs of each candidate SMILES, computed once (batches repeat candidates):
the standardised parent and its symmetry ranks, the structure facts, the notes on lactim and thiol drawings,
and the Hückel columns.  An unreadable SMILES gives its error instead of raising, so one bad candidate never
stops a case."""
from __future__ import annotations

from functools import lru_cache

import numpy as np
from rdkit import Chem

from ..chem.standardise import MAX_HEAVY_ATOMS, Standardised, plain, standardise
from ..chem.structure import StructureFacts, facts_from_mol, lactim_sites, symmetry_ranks
from ..errors import InputError
from ..inputs.molecules import check_organic, to_mol
from ..prediction.pi_system import pi_descriptors


@lru_cache(maxsize=16384)
def parse_candidate(smiles: str) -> tuple[Chem.Mol | None, tuple | None, str | None]:
    """Standardised parent molecule and its symmetry ranks from a SMILES (cached: batches often repeat
    candidates); the standardisation record is kept in :func:`standardised_candidate`."""
    try:
        std = standardised_candidate(smiles)
        return std.mol, tuple(symmetry_ranks(std.mol)), None
    except InputError as exc:
        return None, None, str(exc)


@lru_cache(maxsize=16384)
def standardised_candidate(smiles: str) -> Standardised:
    mol = to_mol(smiles)
    if plain(smiles):   # nothing to standardise: skip the checks (the batch fast path)
        std = Standardised(mol, list(range(mol.GetNumAtoms())))
    else:
        std = standardise(mol, f"SMILES '{smiles}'")
    check_organic(std.mol, f"SMILES '{smiles}'")
    if std.mol.GetNumHeavyAtoms() > MAX_HEAVY_ATOMS:
        raise InputError(f"SMILES '{smiles[:40]}…': {std.mol.GetNumHeavyAtoms()} heavy atoms; the limit is {MAX_HEAVY_ATOMS}")
    return std


@lru_cache(maxsize=16384)
def candidate_facts(smiles: str) -> StructureFacts:
    mol, ranks, _ = parse_candidate(smiles)
    return facts_from_mol(mol, smiles, hydrogens=False, ranks=ranks)


@lru_cache(maxsize=16384)
def tautomer_notes(smiles: str) -> tuple[str, ...]:
    """A note per OH/SH drawn as the minor tautomer of a lactam or thione (:func:`lactim_sites`), naming the
    atom in the candidate's own numbering; once per SMILES, as the other structure facts."""
    std = standardised_candidate(smiles)
    out = []
    for x, _ in lactim_sites(std.mol):
        hydroxy = std.mol.GetAtomWithIdx(x).GetSymbol() == "O"
        out.append(f"drawn as the {'hydroxy' if hydroxy else 'mercapto'} tautomer (atom {std.atom_map[x]}); in solution such "
                   f"compounds are mostly the {'oxo' if hydroxy else 'thioxo'} N–H form (common practice), and the "
                   "prediction is for the form as drawn: add that tautomer as a candidate (isomers, kind 'tautomer')")
    return tuple(out)


@lru_cache(maxsize=4096)
def candidate_pi(smiles: str):
    """The Hückel columns of a candidate, computed once for both nuclei (and every solvent)."""
    mol, _, err = parse_candidate(smiles)
    if err:
        return None
    try:
        return np.column_stack(pi_descriptors(mol))
    except Exception:  # noqa: BLE001 - left to mol_parts, which reports a failure with the candidate's name
        return None


def element_environments(smiles: str, z: int) -> int:
    """How many symmetry classes the candidate's atoms of element ``z`` fall into (its expected 19F or 31P
    signals); 0 for a SMILES that cannot be read."""
    mol, ranks, err = parse_candidate(smiles)
    if err:
        return 0
    return len({ranks[a.GetIdx()] for a in mol.GetAtoms() if a.GetAtomicNum() == z})
