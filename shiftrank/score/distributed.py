"""Batch ranking on a Dask cluster (``dask.distributed``): the same output lines as the serial run.

``--dask local`` or ``local:N`` starts a ``LocalCluster`` of N single-threaded worker processes on
this machine; ``--dask tcp://HOST:PORT`` connects to a running scheduler (start one with
``dask scheduler`` and workers with ``dask worker tcp://HOST:8786 --nthreads 1``).  The cases are
split into chunks; each chunk is one task, whose result is the chunk's JSON lines, so the output
is byte for byte that of the serial path and is written in input order as soon as the chunks
before it are done.  Each worker process loads the models once, after the same SHA-256 check as
everywhere else.  A case that fails becomes an error line inside its chunk (the chunk never fails);
a worker that dies has its tasks re-run by the scheduler (``retries``).  At most ``window`` chunks
are in flight, so memory stays flat however long the batch.
"""
from __future__ import annotations

import sys
from collections import deque
from contextlib import contextmanager
from typing import Iterable, Iterator

import numpy as np

from ..errors import InputError
from .batch import CHUNK, rank_chunk

RETRIES = 3
WINDOW_PER_WORKER = 4
#: chunks' worth of finished lines that may wait for an earlier chunk before no further chunk is started
AHEAD_CHUNKS = 64


def _client(spec: str):
    try:
        from dask.distributed import Client
    except ImportError:
        raise InputError("--dask needs the optional Dask packages: pip install -e '.[dask]'") from None
    if spec == "local" or spec.startswith("local:"):
        n = spec.split(":", 1)[1] if ":" in spec else "2"
        try:
            workers = int(n)
        except ValueError:
            raise InputError(f"--dask {spec}: the number of local workers must be a whole number") from None
        if not 1 <= workers <= 256:
            raise InputError(f"--dask {spec}: use 1 to 256 local workers")
        return local_cluster(workers)
    if "://" not in spec:
        raise InputError(f"--dask {spec}: use local, local:N or a scheduler address such as tcp://host:8786")
    try:
        return Client(spec, timeout="20s"), None
    except (OSError, TimeoutError) as exc:
        raise InputError(f"--dask {spec}: cannot reach the scheduler ({exc})") from None


def local_cluster(workers: int):
    """(client, cluster) of ``workers`` single-threaded worker processes on this machine, models loaded."""
    import dask
    from dask.distributed import Client, LocalCluster

    warm_up()   # loaded and verified here once: the workers are forked from this process with the models in memory
    # the workers' sampling profiler is off: it interrupts the ranking thread every few milliseconds
    # (fork on Linux only; elsewhere the workers start afresh and load the models themselves)
    method = "fork" if sys.platform.startswith("linux") else dask.config.get("distributed.worker.multiprocessing-method")
    with dask.config.set({"distributed.worker.multiprocessing-method": method,
                          "distributed.worker.profile.enabled": False}):
        cluster = LocalCluster(n_workers=workers, threads_per_worker=1, processes=True, dashboard_address=None)
    client = Client(cluster)
    client.run(warm_up)   # a no-op in forked workers; verifies the models where a worker was started afresh
    return client, cluster


@contextmanager
def dask_local(workers: int):
    """:func:`local_cluster` as a context manager (closed on exit)."""
    client, cluster = local_cluster(workers)
    try:
        yield client, cluster
    finally:
        client.close()
        cluster.close()


def warm_up() -> str:
    """Load and verify the shipped models in this worker process; returns the model set's version."""
    from ..prediction.model_files import default_manifest, default_model, has_model

    for n in ("13C", "1H"):
        if has_model(n):
            m = default_model(n)
            # the compiled tree walk is loaded once here too, so forked workers inherit it
            m.sigma_regressor.predict(np.zeros((1, m.sigma_regressor.n_features_in_)))
    return str(default_manifest().get("version"))


#: cases planned together: chunks are formed within a block, so memory stays bounded however long the batch
BLOCK = 4096


def _affinity(case) -> str | None:
    """Cases with the same key tend to share candidates (same-formula isomers, the same proposals): they
    go to the same worker, whose per-process caches then parse and predict each structure once."""
    if not isinstance(case, dict):
        return None
    f = case.get("formula")
    if isinstance(f, str) and f.strip():
        return f.strip()
    cands = case.get("candidates")
    return cands[0] if isinstance(cands, list) and cands and isinstance(cands[0], str) else None


def plan(items: list, n_workers: int, size: int) -> Iterator[tuple[int, list[int]]]:
    """(worker index, positions in ``items``) of each chunk, in submission order.

    Within each :data:`BLOCK` of items, items of one affinity key stay on one worker (largest groups
    first, each to the least-loaded worker, load = candidates); each worker's items keep input order
    and are cut into chunks of ``size``; chunks are interleaved across workers.  One worker: plain
    consecutive chunks."""
    for b0 in range(0, len(items), BLOCK):
        block = range(b0, min(b0 + BLOCK, len(items)))
        if n_workers <= 1:
            for i in range(block.start, block.stop, size):
                yield 0, list(range(i, min(i + size, block.stop)))
            continue
        groups: dict = {}
        for i in block:
            key = _affinity(items[i][1])
            groups.setdefault(key if key is not None else ("line", i), []).append(i)

        def weight(ix):
            return sum(max(1, len(items[i][1].get("candidates") or []) if isinstance(items[i][1], dict) else 1) for i in ix)
        load = [0] * n_workers
        mine: list[list[int]] = [[] for _ in range(n_workers)]
        for ix in sorted(groups.values(), key=lambda ix: (-weight(ix), ix[0])):
            w = load.index(min(load))
            load[w] += weight(ix)
            mine[w].extend(ix)
        per_worker = [[sorted(m)[i:i + size] for i in range(0, len(m), size)] for m in mine]
        for k in range(max(len(c) for c in per_worker)):
            for w, cs in enumerate(per_worker):
                if k < len(cs):
                    yield w, cs[k]


def stream_on(client, items: list, detail: bool = False, size: int = CHUNK) -> Iterator[list[str]]:
    """Output lines of ``items`` ((line number, case or error), as read), in input order, computed on
    ``client``'s cluster; each yielded list continues where the previous one ended.

    Each worker keeps up to :data:`WINDOW_PER_WORKER` of its planned chunks in flight and is refilled
    as soon as one of its own chunks finishes, so a fast worker does not wait for a slow one's chunk
    to be collected.  Finished lines wait for earlier ones before they are written; while more than
    :data:`AHEAD_CHUNKS` chunks' worth wait, no further chunk is started (memory stays bounded)."""
    from dask.distributed import as_completed

    workers = sorted(client.scheduler_info().get("workers", {}))
    n_workers = max(1, len(workers))
    chunks = plan(items, n_workers, size)
    queued: list[deque] = [deque() for _ in range(n_workers)]   # planned chunks not yet submitted
    in_flight = [0] * n_workers
    owner: dict = {}
    done: dict[int, str] = {}
    nxt = 0
    running = as_completed()

    def next_for(w: int):
        while not queued[w]:
            item = next(chunks, None)
            if item is None:
                return None
            queued[item[0]].append(item[1])
        return queued[w].popleft()

    def top_up(w: int) -> None:
        # the look-ahead bound applies only while something runs: the chunk holding the next line to
        # write is always the first of its worker's queue, so it is started when nothing else is
        while in_flight[w] < WINDOW_PER_WORKER and (running.is_empty() or -(-len(done) // size) < AHEAD_CHUNKS):
            pos = next_for(w)
            if pos is None:
                return
            # a preference, not a requirement: a worker that died has its chunks run elsewhere
            where = {"workers": [workers[w]], "allow_other_workers": True} if len(workers) > 1 else {}
            fut = client.submit(rank_chunk, [items[i] for i in pos], detail, pure=False, retries=RETRIES, **where)
            owner[fut.key] = (w, pos)
            in_flight[w] += 1
            running.add(fut)

    for w in range(n_workers):
        top_up(w)
    while not running.is_empty():
        fut = next(running)
        w, pos = owner.pop(fut.key)
        in_flight[w] -= 1
        done.update(zip(pos, fut.result()))
        out = []
        while nxt in done:
            out.append(done.pop(nxt))
            nxt += 1
        if out:
            yield out
        for k in [w] + [x for x in range(n_workers) if x != w]:
            top_up(k)


def dask_stream(items: list, detail: bool, spec: str) -> Iterable[list[str]]:
    """Like :func:`stream_on`, on a cluster described by ``spec`` (closed when the stream ends)."""
    client, cluster = _client(spec)
    try:
        yield from stream_on(client, items, detail)
    finally:
        client.close()
        if cluster is not None:
            cluster.close()


def rank_many_on(client, cases: list[dict], demote_history_mismatch: bool = True, chunk: int = 64) -> list:
    """:func:`shiftrank.score.ranking.rank_many` with the cases spread over a Dask ``client``: the same
    results (RankResult or InputError per case), in order."""
    from .ranking import rank_many

    parts = [cases[i:i + chunk] for i in range(0, len(cases), chunk)]
    futures = [client.submit(rank_many, p, demote_history_mismatch, pure=False, retries=RETRIES) for p in parts]
    out = []
    for f in futures:
        out.extend(f.result())
    return out
