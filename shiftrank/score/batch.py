"""Batch ranking of cases from JSON Lines, streaming results in input order.

Input line: ``{"id", "peaks": [{"shift", "multiplicity"?}], "candidates": [SMILES…],
"formula"?, "mass"?, "solvent"?, "priors"?}``.  Output line: ``{"id", "ranking": [...]}``
best first, every candidate once (invalid ones last with an ``"error"``).
A line that cannot be read becomes an output line with an ``"error"``.
"""
from __future__ import annotations

import gzip
import json
import sys
from pathlib import Path
from typing import Iterator

from ..errors import InputError
from .ranking import rank_many

CHUNK = 64
FIELDS = ("id", "peaks", "candidates", "formula", "mass", "solvent", "priors")


def read_cases(path: str | Path) -> list[tuple[int, dict | InputError]]:
    """(line number, case or error) for every non-blank line of a JSONL file (.jsonl or .jsonl.gz)."""
    p = Path(path)
    if not p.exists():
        raise InputError(f"{p}: no such file")
    opener = gzip.open if p.name.endswith(".gz") else open
    try:
        with opener(p, "rt", encoding="utf-8", errors="replace") as f:
            lines = f.readlines()
    except OSError as exc:
        raise InputError(f"{p}: cannot read ({exc})") from None
    out = []
    for n, line in enumerate(lines, 1):
        if not line.strip():
            continue
        try:
            obj = json.loads(line)
        except json.JSONDecodeError as exc:
            out.append((n, InputError(f"{p.name} line {n}: invalid JSON ({exc.msg})")))
            continue
        if not isinstance(obj, dict):
            out.append((n, InputError(f"{p.name} line {n}: expected a JSON object")))
            continue
        case_id = str(obj["id"]) if obj.get("id") is not None else f"line {n}"
        case = {k: obj.get(k) for k in FIELDS}
        case["id"] = case_id
        cands = case["candidates"]
        if not isinstance(cands, list) or not all(isinstance(c, str) for c in cands):
            exc = InputError(f"{p.name} line {n}: 'candidates' must be a list of SMILES strings")
            exc.case_id = case_id
            out.append((n, exc))
            continue
        out.append((n, case))
    if not out:
        raise InputError(f"{p}: no cases found")
    return out


def _error_line(case, exc: Exception, where: str) -> dict:
    cands = case.get("candidates") if isinstance(case, dict) else None
    cid = case.get("id") if isinstance(case, dict) else None
    msg = f"{where}: {exc}" if where not in str(exc) else str(exc)
    ranking = [{"smiles": c, "score": None, "probability": None, "error": f"case not ranked: {msg}"}
               for c in cands or [] if isinstance(c, str)]
    return {"id": cid, "error": msg, "ranking": ranking}


def _rank_chunk(items, detail: bool) -> list[dict]:
    cases = [c for _, c in items if isinstance(c, dict)]
    results = iter(rank_many(cases))
    out = []
    for n, c in items:
        if not isinstance(c, dict):
            out.append({"id": getattr(c, "case_id", None), "error": str(c), "ranking": []})
            continue
        r = next(results)
        out.append(_error_line(c, r, f"line {n}") if isinstance(r, Exception) else r.to_dict(detail))
    return out


def _chunks(items, size) -> Iterator[list]:
    for i in range(0, len(items), size):
        yield items[i:i + size]


def run_batch(path, out=sys.stdout, jobs: int = 1, detail: bool = False, progress: bool | None = None) -> dict:
    """Rank every case of ``path``, writing one JSON line per case to ``out`` in input order."""
    items = read_cases(path)
    total = len(items)
    show = sys.stderr.isatty() if progress is None else progress
    done = n_err = 0
    chunks = list(_chunks(items, CHUNK))
    if jobs != 1:
        from joblib import Parallel, delayed
        stream = Parallel(n_jobs=jobs, return_as="generator")(delayed(_rank_chunk)(ch, detail) for ch in chunks)
    else:
        stream = (_rank_chunk(ch, detail) for ch in chunks)
    for lines in stream:
        for d in lines:
            n_err += "error" in d
            out.write(json.dumps(d) + "\n")
        out.flush()
        done += len(lines)
        if show:
            width = 30
            fill = int(width * done / total)
            sys.stderr.write(f"\r[{'#' * fill}{'.' * (width - fill)}] {done}/{total} cases")
            sys.stderr.flush()
    if show:
        sys.stderr.write("\n")
    return {"cases": total, "errors": n_err}
