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

from collections import deque
from typing import Iterable, Iterator

from ..errors import InputError
from .batch import rank_chunk

RETRIES = 3
WINDOW_PER_WORKER = 4


def _client(spec: str):
    try:
        from dask.distributed import Client, LocalCluster
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
        cluster = LocalCluster(n_workers=workers, threads_per_worker=1, processes=True, dashboard_address=None)
        client = Client(cluster)
        client.run(warm_up)   # every worker loads (and verifies) the models before the first chunk arrives
        return client, cluster
    if "://" not in spec:
        raise InputError(f"--dask {spec}: use local, local:N or a scheduler address such as tcp://host:8786")
    try:
        return Client(spec, timeout="20s"), None
    except (OSError, TimeoutError) as exc:
        raise InputError(f"--dask {spec}: cannot reach the scheduler ({exc})") from None


def warm_up() -> str:
    """Load and verify the shipped models in this worker process; returns the model set's version."""
    from ..prediction.model_files import default_manifest, default_model, has_model

    for n in ("13C", "1H"):
        if has_model(n):
            default_model(n)
    return str(default_manifest().get("version"))


def stream_on(client, chunks: list, detail: bool = False) -> Iterator[list[str]]:
    """Output lines of each chunk, in order, computed on ``client``'s cluster."""
    n_workers = max(1, len(client.scheduler_info().get("workers", {})))
    window = WINDOW_PER_WORKER * n_workers
    pending: deque = deque()
    it = iter(chunks)
    for ch in it:
        pending.append(client.submit(rank_chunk, ch, detail, pure=False, retries=RETRIES))
        if len(pending) >= window:
            break
    while pending:
        fut = pending.popleft()
        yield fut.result()
        nxt = next(it, None)
        if nxt is not None:
            pending.append(client.submit(rank_chunk, nxt, detail, pure=False, retries=RETRIES))


def dask_stream(chunks: list, detail: bool, spec: str) -> Iterable[list[str]]:
    """Like :func:`stream_on`, on a cluster described by ``spec`` (closed when the stream ends)."""
    client, cluster = _client(spec)
    try:
        yield from stream_on(client, chunks, detail)
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
