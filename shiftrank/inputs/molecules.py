"""Reading candidate structures: SMILES strings and SDF / molfile / SMILES files.

Every reader yields :class:`MolRecord` objects in input order; a record that
cannot be read carries ``error`` instead of ``mol`` so that one bad entry never
stops a batch.
"""
from __future__ import annotations

import csv
import re
from dataclasses import dataclass
from pathlib import Path
from typing import Iterator

from rdkit import Chem, RDLogger

from ..errors import InputError
from .files import read_user_text

RDLogger.DisableLog("rdApp.*")

#: Longest SMILES string read (far beyond any molecule within the heavy-atom limit).
MAX_SMILES = 5000

#: Elements an organic molecule may contain for prediction.
ORGANIC = frozenset({"H", "B", "C", "N", "O", "F", "Si", "P", "S", "Cl", "Se", "Br", "I", "Ge", "As", "Sn", "Te"})


@dataclass
class MolRecord:
    """One input structure: an id, the RDKit molecule (hydrogens removed) or an error."""

    id: str
    mol: Chem.Mol | None
    source: str  # SMILES string or "file:record"
    error: str | None = None


def to_mol(smiles: str) -> Chem.Mol:
    """Parse a SMILES string (or a standard InChI, see :func:`_from_inchi`) into a sanitised RDKit molecule,
    or raise :class:`InputError`.

    >>> to_mol("c1ccncc1").GetNumAtoms()
    6
    """
    if not isinstance(smiles, str) or not smiles.strip():
        raise InputError("SMILES: empty string")
    if len(smiles) > MAX_SMILES:
        raise InputError(f"SMILES '{smiles[:40]}…': {len(smiles):,} characters; the limit is {MAX_SMILES:,}")
    if smiles.strip().startswith("InChI="):
        return _from_inchi(smiles.strip())
    mol = Chem.MolFromSmiles(smiles.strip())
    if mol is None:
        raise InputError(f"SMILES '{smiles}': RDKit cannot read it: {_smiles_problem(smiles.strip())}")
    if mol.GetNumAtoms() == 0:
        raise InputError(f"SMILES '{smiles}': no atoms")
    return mol


def _looks_like_name(text: str) -> bool:
    """A word of four or more letters outside brackets holding a letter no SMILES atom symbol uses there
    ('4-chloroaniline', 'Methyl 4-hydroxybenzoate'): SMILES letters outside brackets are B C N O P S F I, Cl,
    Br and aromatic b c n o p s."""
    outside = re.sub(r"\[[^\]]*\]", "", text).replace("Cl", "").replace("Br", "")
    return any(re.search(r"[^BCNOPSFIbcnops]", w) for w in re.findall(r"[A-Za-z]{4,}", outside))


def _smiles_problem(smiles: str) -> str:
    """What is wrong with a SMILES RDKit refuses, in a chemist's words where it can be told: an aromatic ring
    that has no Kekulé form (a pyrrole-type N written without its H), an atom over its valence, brackets or a
    ring closure left open.

    >>> _smiles_problem("c1ccnc1")
    'its aromatic ring cannot be written with alternating double bonds (atoms 0 1 2 3 4): an aromatic N that carries H is written [nH], as in c1cc[nH]c1, or give a Kekulé form'
    >>> _smiles_problem("CC(=O")
    "unbalanced brackets: 1 '(' against 0 ')'"
    >>> _smiles_problem("4-chloroaniline")[:40]
    'it reads as a chemical name, not a SMILE'
    """
    if _looks_like_name(smiles):
        return ("it reads as a chemical name, not a SMILES: give the structure as a SMILES, a standard InChI or a "
                "structure file (.sdf, .mol, .smi); names are not converted")
    raw = Chem.MolFromSmiles(smiles, sanitize=False)
    if raw is not None:
        try:
            Chem.SanitizeMol(raw)
        except Chem.KekulizeException as exc:
            m = re.search(r"Unkekulized atoms:\s*([\d ]+)", str(exc))
            where = f" (atoms {m.group(1).strip()})" if m else ""
            return (f"its aromatic ring cannot be written with alternating double bonds{where}: an aromatic N that "
                    "carries H is written [nH], as in c1cc[nH]c1, or give a Kekulé form")
        except Chem.AtomValenceException as exc:
            m = re.search(r"atom # ?(\d+) (\w+), (\d+)", str(exc))
            if m:
                return (f"atom {m.group(1)} ({m.group(2)}) has {m.group(3)} bonds, more than its valence allows: "
                        "check bond orders and charges")
            return "an atom exceeds its valence: check bond orders and charges"
        except Exception as exc:  # noqa: BLE001 - RDKit's own sanitisation message, passed on
            return str(exc).strip() or "RDKit's checks refuse it"
        return "check brackets, ring closures and valences"
    for o, c in ("()", "[]"):
        if smiles.count(o) != smiles.count(c):
            return f"unbalanced brackets: {smiles.count(o)} '{o}' against {smiles.count(c)} '{c}'"
    outside = re.sub(r"\[[^\]]*\]", "", smiles)
    closures = re.findall(r"%\d\d|\d", outside)
    open_ = sorted({d for d in closures if closures.count(d) % 2})
    if open_:
        return f"ring closure {', '.join(open_)} is opened but never closed"
    return "a symbol RDKit does not read as SMILES (check element symbols, bonds and brackets)"


def _from_inchi(inchi: str) -> Chem.Mol:
    """A structure given as a standard InChI (copied from a database entry).  Its mobile-H layer ('(H,9,10)')
    leaves the tautomer open, and RDKit then draws one of them (an amide as its imidic acid): such a structure
    is put in RDKit's canonical tautomer (the amide, the 2-pyridone).  Atoms are numbered as RDKit reads the
    InChI.

    >>> from rdkit import Chem
    >>> Chem.MolToSmiles(to_mol("InChI=1S/C8H9NO2/c1-6(10)9-7-2-4-8(11)5-3-7/h2-5,11H,1H3,(H,9,10)"))
    'CC(=O)Nc1ccc(O)cc1'
    """
    mol = Chem.MolFromInchi(inchi)   # (RDKit's log is off for this module: its errors become ours)
    if mol is None or mol.GetNumAtoms() == 0:
        raise InputError(f"InChI '{inchi[:60]}': RDKit cannot read it (check that it is complete, layers and all)")
    if re.search(r"/h[^/]*\(H", inchi):
        from rdkit.Chem.MolStandardize import rdMolStandardize

        mol = rdMolStandardize.TautomerEnumerator().Canonicalize(mol)
    return mol


def check_organic(mol: Chem.Mol, label: str) -> None:
    """Raise :class:`InputError` when ``mol`` has no carbon or contains a metal."""
    syms = {a.GetSymbol() for a in map(mol.GetAtomWithIdx, range(mol.GetNumAtoms()))}
    other = sorted(syms - ORGANIC)
    if "*" in other:
        raise InputError(f"{label}: contains a wildcard or attachment point (*), as in a fragment or a Markush "
                         "drawing; give the whole compound")
    if other:
        raise InputError(f"{label}: contains {', '.join(other)}; only organic molecules (no metals) are supported")
    if "C" not in syms:
        raise InputError(f"{label}: has no carbon atom")


#: first-line cells that name a SMILES column (a table exported from a spreadsheet or a script)
_SMILES_HEADS = {"smiles", "smi", "smiles_string", "canonical_smiles", "isomeric_smiles", "structure", "inchi"}
_ID_HEADS = ("id", "name", "title", "compound", "compound_id", "mol_id", "label", "identifier")


def _cells(line: str, delim: str | None) -> list[str]:
    """A row's cells: by ``delim`` (quotes honoured) or, for None, the first whitespace run only (an id
    after a SMILES may hold spaces and commas: 'Oc1ccc(Cl)cc1Cl 2,4-dichlorophenol')."""
    if delim is None:
        return line.split(None, 1)
    return [c.strip() for c in next(csv.reader([line], delimiter=delim))]


def _row_delimiter(line: str) -> str | None:
    """Tab, comma or semicolon when the line uses one between its cells; SMILES has none of the three, so
    one inside the first whitespace-separated field is a delimiter."""
    first = line.split(None, 1)[0]
    if "\t" in line:
        return "\t"
    if first.startswith("InChI="):
        return None     # an InChI's layers hold commas and semicolons of their own
    return next((d for d in (",", ";") if d in first), None)


def _smiles_lines(path: Path, text: str) -> Iterator[MolRecord]:
    """One SMILES per line with an optional id after it (whitespace, tab, comma or semicolon between); a
    first line naming the columns ('SMILES<TAB>Name', 'id,smiles') is a header, read for the columns."""
    rows = [(n, ln.strip()) for n, ln in enumerate(text.splitlines(), 1)
            if ln.strip() and not ln.strip().startswith("#")]
    smi_col, id_col, delim = 0, 1, None
    if rows:
        head_delim = _row_delimiter(rows[0][1])
        raw = [c.strip('"') for c in (_cells(rows[0][1], head_delim) if head_delim else rows[0][1].split())]
        head = [c.lower() for c in raw]
        # (a data row whose name happens to be 'structure' is no header: a header has no cell RDKit reads)
        if any(c in _SMILES_HEADS for c in head) and not any(Chem.MolFromSmiles(c) for c in raw if c):
            smi_col = next(i for i, c in enumerate(head) if c in _SMILES_HEADS)
            id_col = next((i for i, c in enumerate(head) if c in _ID_HEADS),
                          1 - smi_col if len(head) == 2 else None)
            delim = head_delim
            rows = rows[1:]
    for lineno, line in rows:
        d = delim if delim is not None else _row_delimiter(line)
        cells = _cells(line, d) if d is not None or (smi_col, id_col) == (0, 1) else line.split()
        smi = cells[smi_col] if smi_col < len(cells) else ""
        rid = cells[id_col].strip() if id_col is not None and id_col < len(cells) and cells[id_col].strip() else smi
        if not smi:
            yield MolRecord(rid or f"line {lineno}", None, smi, f"{path.name} line {lineno}: no SMILES in column {smi_col + 1}")
            continue
        try:
            mol = to_mol(smi)
        except InputError as exc:
            yield MolRecord(rid, None, smi, f"{path.name} line {lineno}: {exc}")
            continue
        yield MolRecord(rid, mol, smi)


def _sdf_blocks(text: str) -> Iterator[tuple[int, str]]:
    """(first line number, molblock) of each record: the lines up to a line that starts with '$$$$'.  A
    record's first line is its title and may be empty, so nothing before it is stripped."""
    lines: list[str] = []
    start = 1
    for lineno, line in enumerate(text.splitlines(), 1):
        if line.startswith("$$$$"):
            yield start, "\n".join(lines) + "\n"
            lines, start = [], lineno + 1
        else:
            lines.append(line)
    if any(ln.strip() for ln in lines):
        yield start, "\n".join(lines) + "\n"


def _sdf_records(path: Path, text: str) -> Iterator[MolRecord]:
    for i, (lineno, block) in enumerate(_sdf_blocks(text)):
        title = block.splitlines()[0].strip() if block.strip() else ""
        rid = title or f"record {i + 1}"
        mol = Chem.MolFromMolBlock(block, sanitize=True, removeHs=True)
        if mol is None:
            yield MolRecord(rid, None, f"{path.name}:{i + 1}",
                            f"{path.name} record {i + 1} (line {lineno}, '{rid}'): RDKit cannot read this molblock")
            continue
        yield MolRecord(rid, mol, f"{path.name}:{i + 1}")


def read_molecules(path: str | Path) -> list[MolRecord]:
    """Read an SDF (.sdf, .sdf.gz), a molfile (.mol) or a SMILES file (.smi, .txt, .smiles, .csv, .tsv).

    SMILES files hold one SMILES per line with an optional id after whitespace (or a tab, comma or
    semicolon); a first line naming the columns (``SMILES<TAB>Name``, ``id,smiles``) is read as a header.
    Raises :class:`InputError` for a missing, empty or unknown file; bad records
    come back with ``error`` set.
    """
    p = Path(path)
    if not p.exists():
        raise InputError(f"{p}: no such file")
    if p.is_dir():
        raise InputError(f"{p}: is a directory, expected a structure file")
    name = p.name.lower()
    text = read_user_text(p, "a structure file")
    if not text.strip():
        raise InputError(f"{p}: file is empty")
    stem = name[:-3] if name.endswith(".gz") else name
    if stem.endswith((".sdf", ".mol", ".sd", ".mdl")):
        records = list(_sdf_records(p, text))
    elif stem.endswith((".smi", ".smiles", ".txt", ".ism", ".can", ".csv", ".tsv")):
        records = list(_smiles_lines(p, text))
    else:
        raise InputError(f"{p}: unknown structure file type; use .sdf, .mol, .smi, .txt or .csv")
    if not records:
        raise InputError(f"{p}: no structures found")
    return records
