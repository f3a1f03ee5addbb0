"""Batch ranking of cases from JSON Lines, streaming results in input order.

Input line: ``{"id", "peaks": [{"shift", "multiplicity"?}], "peaks_1h": [{"shift" or "range",
"integral"?, "multiplicity"?, "j"?}], "text": "<printed paragraph(s)>", "candidates": [SMILES…],
"formula"?, "mass"?, "solvent"?, "priors"?, "with_isomers"?, "rotamers"?}``; any one of ``peaks``, ``peaks_1h``
or ``text`` is enough; ``"with_isomers": true`` (or a kinds string) adds generated alternatives;
``"rotamers": true`` says the spectra show two forms of the compound, ``"mixture": true`` that the sample
holds two isomers (the candidate that best explains the second's lines is named in a note); ``"reaction"`` (a named reaction or a reaction
SMARTS) with ``"reactants"`` adds the reaction's products as candidates; ``"file_13c"``/``"file_1h"`` name
peak files (text, CSV, JSON or JCAMP-DX, relative to the batch file) read in place of ``peaks``/``peaks_1h``.
Output line: ``{"id", "ranking": [...]}`` best first, every candidate once (invalid ones
last with an ``"error"``).  A line that cannot be read becomes an output line with an ``"error"``.
"""
from __future__ import annotations

import json
import sys
from pathlib import Path

from ..errors import InputError
from ..inputs.files import read_user_text
from .ranking import rank_many

CHUNK = 64
MAX_LINE = 5_000_000   # characters in one JSON line (one case)
FIELDS = ("id", "peaks", "peaks_1h", "hsqc", "hmbc", "cosy", "noesy", "text", "candidates", "formula", "mass", "mz", "solvent", "priors", "with_isomers",
          "rotamers", "mixture", "reaction", "reactants")


def read_cases(path: str | Path) -> list[tuple[int, dict | InputError]]:
    """(line number, case or error) for every non-blank line of a JSONL file (.jsonl or .jsonl.gz)."""
    p = Path(path)
    if not p.exists():
        raise InputError(f"{p}: no such file")
    lines = read_user_text(p, "a JSONL file of cases").splitlines()
    out = []
    for n, line in enumerate(lines, 1):
        if not line.strip():
            continue
        if len(line) > MAX_LINE:
            out.append((n, InputError(f"line {n}: {len(line):,} characters; the limit is {MAX_LINE:,} per case")))
            continue
        try:
            obj = json.loads(line)
        except json.JSONDecodeError as exc:
            out.append((n, InputError(f"line {n}: invalid JSON ({exc.msg})")))
            continue
        if not isinstance(obj, dict):
            out.append((n, InputError(f"line {n}: expected a JSON object")))
            continue
        case_id = str(obj["id"]) if obj.get("id") is not None else f"line {n}"
        case = {k: obj.get(k) for k in FIELDS}
        case["id"] = case_id
        cands = case["candidates"]
        if cands is None and case.get("reaction") is not None:
            cands = case["candidates"] = []   # the reaction's products alone
        if isinstance(cands, dict):   # {name: SMILES}
            cands = [{"name": k, "smiles": v} if isinstance(v, str) else v for k, v in cands.items()]
        if isinstance(cands, list):
            cands = case["candidates"] = [_candidate_entry(c, k) for k, c in enumerate(cands, 1)]
        if not isinstance(cands, list):
            exc = InputError(f"line {n}: 'candidates' must be a list of SMILES strings (or of {{\"smiles\": …, "
                             f"\"name\": …}} objects, or an object of names and SMILES)")
            exc.case_id = case_id
            out.append((n, exc))
            continue
        try:
            _read_case_files(obj, case, p.parent)
        except InputError as exc:
            exc = InputError(f"line {n}: {exc}")
            exc.case_id = case_id
            exc.candidates = cands   # listed in the error line, each with the error
            out.append((n, exc))
            continue
        out.append((n, case))
    if not out:
        raise InputError(f"{p}: no cases found")
    return out


def _candidate_entry(c, k: int):
    """One entry of a case's candidate list as the ranking takes it: a SMILES string as given; an object
    ``{"smiles": …, "name": …}`` (a registry export) as a (name, SMILES) pair; anything else as a record that
    could not be read, (label, text, error), listed last with its error while the others are ranked."""
    if isinstance(c, str):
        return c
    if isinstance(c, dict) and isinstance(c.get("smiles"), str):
        name = c.get("name") if c.get("name") is not None else c.get("id")
        return (str(name), c["smiles"]) if name is not None and str(name) else c["smiles"]
    label = str(c.get("name") or c.get("id") or f"candidate {k}") if isinstance(c, dict) else f"candidate {k}"
    return (label, json.dumps(c)[:80], f"candidate {k}: expected a SMILES string or an object with a 'smiles' "
                                       f"string, got {json.dumps(c)[:60]}")


#: case keys naming a peak file (any format ``read_peaks`` reads: text, CSV, JSON, JCAMP-DX), relative to the batch file
FILE_FIELDS = {"file_13c": ("peaks", "13C"), "file_1h": ("peaks_1h", "1H")}


def _read_case_files(obj: dict, case: dict, folder: Path) -> None:
    """Read the peak files a case names (``"file_13c"``, ``"file_1h"``) into its peak lists, here on the
    reading side (workers of a cluster need not see the files)."""
    from ..inputs.peaks import read_peaks

    for key, (field, nucleus) in FILE_FIELDS.items():
        name = obj.get(key)
        if name is None:
            continue
        if not isinstance(name, str) or not name.strip():
            raise InputError(f"'{key}' must be a file name")
        if case.get(field) is not None:
            raise InputError(f"give '{field}' or '{key}', not both")
        path = Path(name) if Path(name).is_absolute() else folder / name
        case[field] = read_peaks(path, nucleus, case.get("solvent") if isinstance(case.get("solvent"), str) else None)


def _error_line(case, exc: Exception, where: str) -> dict:
    cands = case.get("candidates") if isinstance(case, dict) else None
    cid = case.get("id") if isinstance(case, dict) else None
    msg = f"{where}: {exc}" if where not in str(exc) else str(exc)
    ranking = [{"smiles": c, "score": None, "probability": None, "error": f"case not ranked: {msg}"}
               for c in cands or [] if isinstance(c, str)]
    return {"id": cid, "error": msg, "ranking": ranking}


def error_line(n: int, c, exc: Exception) -> dict:
    """The output line of the case read from line ``n`` that could not be ranked: ``c`` is the case dict, or
    the error met while reading it (which carries the case's id and candidates when they were read)."""
    case = c if isinstance(c, dict) else {"id": getattr(c, "case_id", None), "candidates": getattr(c, "candidates", None)}
    return _error_line(case, exc, f"line {n}")


def rank_chunk(items, detail: bool = False) -> list[str]:
    """JSON output lines of a chunk of (line number, case or error) items, in order.  Never raises: a
    case that fails unexpectedly becomes an error line of its own (the others keep their results)."""
    try:
        return _rank_chunk(items, detail)
    except Exception:  # noqa: BLE001 - find the case that failed; the rest still run
        out = []
        for item in items:
            try:
                out.extend(_rank_chunk([item], detail))
            except Exception as exc:  # noqa: BLE001
                n, c = item
                out.append(json.dumps(_error_line(c if isinstance(c, dict) else {}, InputError(
                    f"internal error ({type(exc).__name__}: {exc})"), f"line {n}")))
        return out


def _rank_chunk(items, detail: bool) -> list[str]:
    cases = [c for _, c in items if isinstance(c, dict)]
    results = iter(rank_many(cases))
    out = []
    for n, c in items:
        r = next(results) if isinstance(c, dict) else c
        out.append(json.dumps(error_line(n, c, r) if isinstance(r, Exception) else r.to_dict(detail, geometry=False)))
    return out


def chunks_of(items, size: int = CHUNK) -> list[list]:
    return [items[i:i + size] for i in range(0, len(items), size)]


def run_batch(path, out=None, jobs: int = 1, detail: bool = False, progress: bool | None = None,
              dask: str | None = None) -> dict:
    """Rank every case of ``path``, writing one JSON line per case to ``out`` in input order.

    ``jobs`` > 1 uses joblib worker processes on this machine; ``dask`` ('local', 'local:N' or a
    scheduler address such as 'tcp://host:8786') uses a Dask cluster (:mod:`shiftrank.score.distributed`).
    The output is the same either way."""
    out = out or sys.stdout
    items = read_cases(path)
    total = len(items)
    show = sys.stderr.isatty() if progress is None else progress
    done = n_err = 0
    chunks = chunks_of(items)
    if dask:
        from .distributed import dask_stream
        stream = dask_stream(items, detail, dask)
    elif jobs != 1:
        from joblib import Parallel, delayed
        stream = Parallel(n_jobs=jobs, return_as="generator")(delayed(rank_chunk)(ch, detail) for ch in chunks)
    else:
        stream = (rank_chunk(ch, detail) for ch in chunks)
    bar = _progress(total) if show else None
    for lines in stream:
        for line in lines:
            n_err += '"error": ' in line.split('"ranking"', 1)[0]  # an error key comes before the ranking
            out.write(line + "\n")
        out.flush()
        done += len(lines)
        if bar is not None:
            bar.update(len(lines))
    if bar is not None:
        bar.close()
    return {"cases": total, "errors": int(n_err)}


def _progress(total: int):
    """A progress bar on stderr (tqdm when installed, else a plain one)."""
    try:
        from tqdm import tqdm
        return tqdm(total=total, unit="case", file=sys.stderr, leave=False)
    except ImportError:
        return _PlainBar(total)


class _PlainBar:
    def __init__(self, total: int):
        self.total, self.done = total, 0

    def update(self, n: int) -> None:
        self.done += n
        fill = int(30 * self.done / max(self.total, 1))
        sys.stderr.write(f"\r[{'#' * fill}{'.' * (30 - fill)}] {self.done}/{self.total} cases")
        sys.stderr.flush()

    def close(self) -> None:
        sys.stderr.write("\n")
