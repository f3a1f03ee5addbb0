"""Fuzz suite: nasty inputs through every command line entry point, in-process.

Every input must end with exit status 0 or 2 (never the internal-error status 3), no traceback, and
a few lines on stderr at most; random SMILES-like strings and peak records never raise anything but
InputError.  The corpus is in tests/fuzz/corpus.py (INVENTED structures and values).
"""
from __future__ import annotations

import json

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from shiftrank.cli import INTERNAL_ERROR, main
from shiftrank.errors import InputError
from tests.fuzz.corpus import CORPUS, GOOD_TEXT, META, PARA, case


def _run(argv, tmp_path, capsys):
    args = [a.replace("{tmp}", str(tmp_path)) for a in argv]
    code = main(args)
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("name,argv,files", CORPUS, ids=[c[0] for c in CORPUS])
def test_corpus(name, argv, files, tmp_path, capsys):
    for fname, content in files.items():
        path = tmp_path / fname
        if isinstance(content, bytes):
            path.write_bytes(content)
        else:
            path.write_text(content, encoding="utf-8")
    code, out, err = _run(argv, tmp_path, capsys)
    assert code in (0, 2), (code, err)
    assert code != INTERNAL_ERROR
    assert "Traceback" not in err and "Traceback" not in out
    assert len(err.strip().splitlines()) <= 6, err
    if code == 2:
        assert err.strip() or "\"error\"" in out, "a refusal must say why"
    if "--jsonl" in argv or argv[0] == "batch":
        for line in out.splitlines():
            json.loads(line)  # every output line stays valid JSON


def test_internal_error_is_one_line_and_a_distinct_status(monkeypatch, tmp_path, capsys):
    import shiftrank.cli as cli

    def boom(args):
        raise RuntimeError("simulated failure")
    monkeypatch.setattr(cli, "cmd_formula", boom)
    code, out, err = _run(["formula", "C2H6O"], tmp_path, capsys)
    assert code == INTERNAL_ERROR and "internal error" in err and "Traceback" not in err and len(err.splitlines()) == 1
    with pytest.raises(RuntimeError):
        main(["--debug", "formula", "C2H6O"])


def test_bad_batch_lines_do_not_change_good_ones(tmp_path, capsys):
    good = [case(id=f"g{k}", text=GOOD_TEXT, peaks=None) for k in range(3)]
    bad = [case(id="b1", candidates=5), "not json", case(id="b2", peaks="abc"), "[]"]
    clean = tmp_path / "clean.jsonl"
    clean.write_text("\n".join(good) + "\n")
    mixed = tmp_path / "mixed.jsonl"
    mixed.write_text("\n".join([bad[0], good[0], bad[1], good[1], bad[2], bad[3], good[2]]) + "\n")
    _, out_clean, _ = _run(["batch", str(clean)], tmp_path, capsys)
    code, out_mixed, err = _run(["batch", str(mixed)], tmp_path, capsys)
    assert code == 2 and "4 of 7 cases could not be ranked" in err   # every line written, the status says some failed
    lines = [json.loads(x) for x in out_mixed.splitlines()]
    assert len(lines) == 7
    good_out = [json.dumps(d) for d in lines if str(d.get("id", "")).startswith("g")]
    assert good_out == out_clean.splitlines()
    assert all("error" in d for d in lines if not str(d.get("id", "")).startswith("g"))


@settings(max_examples=60, deadline=None)
@given(st.text(alphabet=st.sampled_from(list("CNOSPFIBrcnos()[]=#@+-123456789%.\\/*$Hl")), min_size=1, max_size=40))
def test_random_smiles_like_strings_rank_or_refuse(smiles):
    from shiftrank.score.ranking import rank
    try:
        r = rank([14.3, 21.6, 60.7, 127.8, 129.0, 129.5, 143.4, 166.6], [PARA, smiles])
    except InputError:
        return
    assert {c.smiles for c in r.candidates} == {PARA, smiles} or len(r.candidates) == 2


_peak = st.one_of(st.floats(allow_nan=True, allow_infinity=True), st.integers(-10**6, 10**6), st.text(max_size=8),
                  st.none(), st.booleans(),
                  st.fixed_dictionaries({"shift": st.one_of(st.floats(allow_nan=True), st.text(max_size=5))},
                                        optional={"multiplicity": st.one_of(st.text(max_size=4), st.integers()),
                                                  "integral": st.one_of(st.floats(), st.text(max_size=3)),
                                                  "j": st.one_of(st.lists(st.floats(), max_size=3), st.text(max_size=3)),
                                                  "range": st.one_of(st.lists(st.floats(), max_size=3), st.none())}))


@settings(max_examples=80, deadline=None)
@given(st.lists(_peak, max_size=12), st.lists(_peak, max_size=8))
def test_random_peak_records_rank_or_refuse(peaks, peaks_1h):
    from shiftrank.score.ranking import rank_many
    out = rank_many([{"id": "x", "peaks": peaks, "peaks_1h": peaks_1h or None, "candidates": [PARA, META]}])
    assert len(out) == 1 and (isinstance(out[0], InputError) or len(out[0].candidates) == 2)


@settings(max_examples=60, deadline=None)
@given(st.binary(max_size=300), st.sampled_from(["x.smi", "x.csv", "x.sdf", "p.txt", "c.jsonl", "h.txt"]))
def test_random_bytes_in_any_user_file_read_or_refuse(tmp_path_factory, raw, name):
    # any bytes (marks, UTF-16, Windows-1252, binary noise) through every file reader: a result or InputError
    from shiftrank.inputs.molecules import read_molecules
    from shiftrank.inputs.peaks import read_hsqc, read_peaks
    from shiftrank.score.batch import read_cases
    f = tmp_path_factory.mktemp("fz") / name
    f.write_bytes(raw)
    reader = {"x.smi": read_molecules, "x.csv": read_molecules, "x.sdf": read_molecules, "p.txt": read_peaks,
              "c.jsonl": read_cases, "h.txt": read_hsqc}[name]
    try:
        reader(f)
    except InputError:
        pass


_pair = st.one_of(st.lists(st.one_of(st.floats(), st.integers(), st.text(max_size=3), st.none()), max_size=4),
                  st.dictionaries(st.sampled_from(["c", "h", "phase", "13C"]), st.one_of(st.floats(), st.text(max_size=3))),
                  st.text(max_size=4), st.integers())


@settings(max_examples=80, deadline=None)
@given(st.sampled_from(["hsqc", "hmbc", "cosy", "noesy"]), st.lists(_pair, max_size=6))
def test_random_cross_peaks_rank_or_refuse(kind, pairs):
    # any cross-peak list of any 2D kind: a ranking of both candidates or InputError, never a traceback
    from shiftrank.score.ranking import rank_many
    out = rank_many([{"id": "x", kind: pairs, "peaks_1h": [7.26, 2.35], "candidates": [PARA, META]}])
    assert len(out) == 1 and (isinstance(out[0], InputError) or len(out[0].candidates) == 2)


@settings(max_examples=40, deadline=None)
@given(st.binary(max_size=200), st.sampled_from(["read_hmbc", "read_cosy", "read_noesy"]))
def test_random_bytes_in_cross_peak_files_read_or_refuse(tmp_path_factory, raw, reader):
    from shiftrank.inputs import peaks
    f = tmp_path_factory.mktemp("fz") / "x.txt"
    f.write_bytes(raw)
    try:
        getattr(peaks, reader)(f)
    except InputError:
        pass
