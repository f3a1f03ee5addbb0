"""Batch ranking on a Dask cluster gives the serial output, byte for byte (INVENTED peak lists).

The cluster runs in-process (``processes=False``), which exercises the same task code as separate
worker processes: chunks of cases in, JSON lines out, in input order.
"""
import io
import json

import pytest

distributed = pytest.importorskip("dask.distributed")

PARA, META = "CCOC(=O)c1ccc(C)cc1", "CCOC(=O)c1cccc(C)c1"
PEAKS = [14.3, 21.6, 60.7, 127.8, 129.0, 129.5, 143.4, 166.6]


@pytest.fixture(scope="module")
def client():
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=False, dashboard_address=None) as cluster, \
            distributed.Client(cluster) as c:
        yield c


def _batch(tmp_path):
    lines = []
    for k in range(9):
        case = {"id": f"s{k}", "peaks": PEAKS, "candidates": [PARA, META] + (["C1CC("] if k == 4 else [])}
        if k % 2:
            case["formula"] = "C10H12O2"   # two affinity keys: the cases are spread over both workers
        lines.append(json.dumps(case))
    lines.insert(3, json.dumps({"id": "bad", "peaks": "none", "candidates": [PARA]}))
    lines.insert(6, "not json")
    path = tmp_path / "cases.jsonl"
    path.write_text("\n".join(lines) + "\n")
    return path


def test_dask_output_is_byte_identical_to_serial(tmp_path, client, monkeypatch):
    from shiftrank.score import batch, distributed as dist

    path = _batch(tmp_path)
    serial = io.StringIO()
    batch.run_batch(path, serial)
    monkeypatch.setattr(batch, "CHUNK", 3)   # several chunks, so order across tasks is tested
    items = batch.read_cases(path)
    lines = [line for chunk in dist.stream_on(client, items, size=3) for line in chunk]
    assert "\n".join(lines) + "\n" == serial.getvalue()
    out = [json.loads(x) for x in lines]
    assert [d.get("id") for d in out][:4] == ["s0", "s1", "s2", "bad"] and "error" in out[3]
    assert not any(c.get("error") for c in out[4]["ranking"]) and out[6].get("error")
    invalid = next(d for d in out if d.get("id") == "s4")
    assert invalid["ranking"][-1]["smiles"] == "C1CC(" and "error" in invalid["ranking"][-1]


@pytest.mark.parametrize("window,ahead", [(1, 1), (2, 1), (4, 64)])
def test_refilling_per_worker_keeps_input_order(tmp_path, client, monkeypatch, window, ahead):
    """Workers are refilled as their own chunks finish and finished lines wait for earlier ones; with the
    smallest look-ahead nothing may stall or be lost, and the order must still be the serial one."""
    from shiftrank.score import batch, distributed as dist

    path = _batch(tmp_path)
    serial = io.StringIO()
    batch.run_batch(path, serial)
    monkeypatch.setattr(dist, "WINDOW_PER_WORKER", window)
    monkeypatch.setattr(dist, "AHEAD_CHUNKS", ahead)
    items = batch.read_cases(path)
    lines = [line for chunk in dist.stream_on(client, items, size=1) for line in chunk]
    assert "\n".join(lines) + "\n" == serial.getvalue()


def test_rank_many_with_a_client_returns_the_same_results(client):
    from shiftrank.score.ranking import rank_many

    cases = [{"id": f"c{k}", "peaks": PEAKS, "candidates": [META, PARA]} for k in range(5)] + [{"id": "x", "candidates": []}]
    local = rank_many(cases)
    remote = rank_many(cases, client=client)
    assert [type(r).__name__ for r in remote] == [type(r).__name__ for r in local]
    assert [r.to_dict() for r in remote[:5]] == [r.to_dict() for r in local[:5]]


def test_workers_verify_the_model_files(client):
    from shiftrank.score.distributed import warm_up

    versions = client.run(warm_up)
    assert set(versions.values()) == {json.load(open(_manifest()))["version"]}


def _manifest():
    from shiftrank.prediction.model_files import models_dir
    return models_dir() / "manifest.json"


def test_bad_dask_address_is_a_clear_error():
    from shiftrank.errors import InputError
    from shiftrank.score.distributed import _client

    with pytest.raises(InputError, match="local, local:N or a scheduler address"):
        _client("somewhere")
    with pytest.raises(InputError, match="whole number"):
        _client("local:two")


def test_plan_keeps_cases_that_share_candidates_on_one_worker():
    from shiftrank.score.distributed import plan

    keys = ["C7H8O", "C8H10", "C7H8O", "C9H12", "C8H10", "C7H8O", None]
    items = [(n, {"formula": k, "candidates": ["C", "CC"]} if k else ValueError("unreadable")) for n, k in enumerate(keys, 1)]
    chunks = list(plan(items, 2, size=2))
    seen = sorted(p for _, pos in chunks for p in pos)
    assert seen == list(range(len(items)))                      # every case exactly once
    assert all(pos == sorted(pos) for _, pos in chunks)          # input order inside a chunk
    worker_of = {p: w for w, pos in chunks for p in pos}
    for k in set(keys) - {None}:
        assert len({worker_of[i] for i, kk in enumerate(keys) if kk == k}) == 1
    assert {w for w, _ in chunks} == {0, 1}
    assert [pos for _, pos in plan(items, 1, size=3)] == [[0, 1, 2], [3, 4, 5], [6]]
