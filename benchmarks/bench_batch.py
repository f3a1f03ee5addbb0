"""Batch speed: candidates per second on one core (whole process and per stage), the ratio to bare
RDKit parsing, and Dask on a LocalCluster with 1 and 2 workers.

    python benchmarks/bench_batch.py [--data DIR] [--cases N] [--dask-candidates N] [--skip-dask]

Cases: the development isomer cases (``dev_cases_isomers.jsonl.gz``, 13C peak lists with
multiplicities), as a batch file.  The RDKit reference parses the same candidate SMILES, the same
number of times, with ``Chem.AddHs(Chem.MolFromSmiles(s))``.  The per-stage split calls the ranking's
own functions in sequence on a fresh process state; the whole-process figure runs ``shiftrank batch``.
Dask: the same batch repeated to about ``--dask-candidates`` candidates, on ``--dask local:1`` and
``local:2`` (worker processes, one thread each), output compared with the serial run byte for byte,
and each worker's peak resident memory.
"""
from __future__ import annotations

import argparse
import gzip
import json
import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("OMP_NUM_THREADS", "1")

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from training.data import DEFAULT_DATA  # noqa: E402

from cli_run import run_shiftrank  # noqa: E402  (benchmarks/, the script's own folder)

FIELDS = ("id", "peaks", "candidates", "formula", "solvent")


def load(data: Path, n: int | None) -> list[dict]:
    out = []
    with gzip.open(data / "dev_cases_isomers.jsonl.gz", "rt") as f:
        for line in f:
            c = json.loads(line)
            out.append({k: c[k] for k in FIELDS if k in c})
            if n and len(out) >= n:
                break
    return out


def rdkit_reference(smiles: list[str]) -> float:
    from rdkit import Chem
    t = time.perf_counter()
    for s in smiles:
        Chem.AddHs(Chem.MolFromSmiles(s))
    return time.perf_counter() - t


def stages(cases: list[dict]) -> dict:
    """Seconds per stage of ranking ``cases`` in this process (caches cleared first)."""
    from shiftrank.score import ranking as R
    from shiftrank.score import structures as S
    from shiftrank.prediction.api import environments_isolated
    from shiftrank.prediction.model_files import default_model

    S.parse_candidate.cache_clear()
    S.standardised_candidate.cache_clear()
    R._describe.cache_clear()
    default_model("13C")
    settings = R.ranking_settings()
    t = {}
    t0 = time.perf_counter()
    staged = []
    for c in cases:
        lists, solvent, notes = R.case_peaklists(c)
        staged.append((c, {n: R.observed_peaks(pl) for n, pl in lists.items()}, solvent))
    t["peaks"] = time.perf_counter() - t0
    t0 = time.perf_counter()
    for c, _, _ in staged:
        for s in c["candidates"]:
            S.parse_candidate(s)
    t["parse + standardise + symmetry"] = time.perf_counter() - t0
    t0 = time.perf_counter()
    preps = []
    for c, peaks, solvent in staged:
        preps.append([R._prepare(s, i, solvent, tuple(peaks)) for i, s in enumerate(c["candidates"])])
    t["RDKit facts per molecule (mol_parts)"] = time.perf_counter() - t0
    flat = [p for ps in preps for p in ps if p.error is None]
    t0 = time.perf_counter()
    envs = environments_isolated([p.parts["13C"] for p in flat])
    t["descriptors, batch-wide"] = time.perf_counter() - t0
    t0 = time.perf_counter()
    mu, sg, _, _ = default_model("13C").predict_env_arrays(envs)
    t["model (tables + trees)"] = time.perf_counter() - t0
    k = 0
    for p, e in zip(flat, envs):
        n = len(e.centres)
        p.preds["13C"] = (mu[k:k + n], sg[k:k + n])
        k += n
    t0 = time.perf_counter()
    results = []
    for (c, peaks, _), ps in zip(staged, preps):
        res = [R._score_candidate(p, p.preds, peaks, settings) for p in ps]
        R._probabilities(res, None, True)
        res.sort(key=lambda x: R._order_key(x, True))
        results.append(R.RankResult(c.get("id"), res, peaks, R.verdict(res, tuple(peaks)), [], None))
    t["matching and scoring"] = time.perf_counter() - t0
    t0 = time.perf_counter()
    for r in results:
        json.dumps(r.to_dict())
    t["JSON output"] = time.perf_counter() - t0
    return t


def whole_process(path: Path, extra: list[str] = ()) -> tuple[float, bytes]:
    out = path.with_suffix(".out" + str(len(extra)))
    t = time.perf_counter()
    run_shiftrank("batch", str(path), "-o", str(out), *extra)
    dt = time.perf_counter() - t
    return dt, out.read_bytes()


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--cases", type=int, default=None, help="first N isomer cases (default: all)")
    ap.add_argument("--dask-candidates", type=int, default=20000)
    ap.add_argument("--skip-dask", action="store_true")
    args = ap.parse_args()
    cases = load(args.data, args.cases)
    smiles = [s for c in cases for s in c["candidates"]]
    n = len(smiles)
    print(f"{len(cases)} isomer cases, {n} candidates ({len(set(smiles))} distinct)")
    ref = min(rdkit_reference(smiles) for _ in range(3))
    print(f"RDKit reference, Chem.AddHs(Chem.MolFromSmiles(s)) over the same SMILES: {ref:.2f} s ({n / ref:,.0f}/s)")
    with tempfile.TemporaryDirectory() as d:
        path = Path(d) / "cases.jsonl"
        path.write_text("\n".join(json.dumps(c) for c in cases) + "\n")
        runs = [whole_process(path) for _ in range(3)]
        best = min(dt for dt, _ in runs)
        print(f"shiftrank batch, whole process, one core: {best:.2f} s = {n / best:,.0f} candidates/s "
              f"(best of 3; runs {', '.join(f'{dt:.2f}' for dt, _ in runs)} s); {best / ref:.1f}x the RDKit reference")
        if not args.skip_dask:
            # before the in-process stages below, which grow this process (forked workers would inherit it)
            dask_figures(cases, n, args.dask_candidates, Path(d))
        t = stages(cases)
        total = sum(t.values())
        print(f"per stage, in-process ({total:.2f} s, {n / total:,.0f} candidates/s):")
        for k, v in t.items():
            print(f"  {k:<40} {v:6.2f} s  {100 * v / total:5.1f} %  {1e6 * v / n:7.1f} µs/candidate")
    return 0


def dask_figures(cases, n: int, target: int, d: Path) -> None:
    """Whole-process Dask runs with 1 and 2 local workers against the serial run, then the steady state."""
    reps = max(1, target // n)
    big = d / "big.jsonl"
    with open(big, "w") as f:
        for r in range(reps):
            for c in cases:
                f.write(json.dumps({**c, "id": f"{c['id']}#{r}"}) + "\n")
    nb = n * reps
    serial_dt, serial_out = whole_process(big)
    print(f"\nDask, {nb:,} candidates ({reps} copies of the batch); serial whole process {serial_dt:.1f} s "
          f"= {nb / serial_dt:,.0f}/s")
    speeds = {}
    for workers in (1, 2):
        dt, out = whole_process(big, ["--dask", f"local:{workers}"])
        speeds[workers] = nb / dt
        print(f"  LocalCluster {workers} worker(s): {dt:.1f} s = {nb / dt:,.0f} candidates/s (start-up included); "
              f"output identical to serial: {out == serial_out}")
    print(f"  scaling 2 vs 1 worker: {speeds[2] / speeds[1]:.2f}x")
    print(peak_memory(big))


def _worker_memory():
    import resource

    import psutil
    return psutil.Process().memory_info().rss / 2 ** 20, resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def steady_state(path: Path, workers: int) -> tuple[float, dict]:
    """Seconds to rank ``path`` on a LocalCluster whose workers have already loaded the models, and each
    worker's (resident, peak resident) memory in MB afterwards."""
    from shiftrank.score.batch import read_cases
    from shiftrank.score.distributed import dask_local, stream_on

    items = read_cases(path)
    with dask_local(workers) as (client, cluster):
        t = time.perf_counter()
        for _ in stream_on(client, items):
            pass
        dt = time.perf_counter() - t
        return dt, client.run(_worker_memory)


def peak_memory(path: Path) -> str:
    """Steady-state scaling (models loaded first) and each worker's memory."""
    t1, _ = steady_state(path, 1)
    t2, mem = steady_state(path, 2)
    return (f"  steady state (models loaded before timing): 1 worker {t1:.1f} s, 2 workers {t2:.1f} s: {t1 / t2:.2f}x\n"
            "  memory per worker after the batch (resident / peak resident): "
            + ", ".join(f"{a:,.0f} / {b:,.0f} MB" for a, b in mem.values()))


if __name__ == "__main__":
    raise SystemExit(main())
