"""JCAMP-DX files: peak tables and processed 1D spectra read into peak lists.

The files are written here by the rules of the JCAMP-DX standard (McDonald & Wilks 1988, Appl. Spectrosc.
42, 151: labelled data records, AFFN and the compressed SQZ/DIF/DUP forms with the Y check value at each
line start; NMR labels from Davies & Lampen 1993, Appl. Spectrosc. 47, 1093).  The spectra are Lorentzian
lines on Gaussian noise at the shifts of methyl 4-hydroxybenzoate in DMSO-d6 (13C: 166.1, 162.0, 131.5,
120.4, 115.4, 51.8 ppm; from memory) with the solvent's septet (39.52 ppm, Fulmer et al. 2010, 1J(C,D)
≈ 21 Hz from memory), and of 4-ethylanisole in CDCl3 (1H: 7.10 d and 6.83 d, J 8.6 Hz, 2H each; 3.79 s,
3H; 2.59 q and 1.21 t, J 7.6 Hz; from memory) with the residual CHCl3 line (7.26 ppm, Fulmer et al. 2010).
"""
from __future__ import annotations

import subprocess
import sys
from math import comb

import numpy as np
import pytest

import shiftrank
from shiftrank.errors import InputError
from shiftrank.inputs.spectra import read_jcamp

PARABEN = [(166.1, 400), (162.0, 300), (131.5, 900), (120.4, 300), (115.4, 900), (51.8, 700)]
PARABEN_ISOMERS = ["COC(=O)c1ccc(O)cc1", "COC(=O)c1cccc(O)c1", "COC(=O)c1ccccc1O"]
MHZ_H = 400.13
ANISOLE_ISOMERS = ["CCc1ccc(OC)cc1", "CCc1cccc(OC)c1", "CCc1ccccc1OC"]


def _trace(lines, lo, hi, n, width, noise, seed=1):
    x = np.linspace(hi, lo, n)
    y = np.zeros(n)
    for x0, h in lines:
        y += h / (1 + ((x - x0) / (width / 2)) ** 2)
    y += np.random.default_rng(seed).normal(0, noise, n)
    return x, np.round(y).astype(int)


def _header(nucleus, mhz, first, last, n, xunits="PPM", solvent=None):
    out = ["##TITLE= shiftrank test", "##JCAMP-DX= 5.01", "##DATA TYPE= NMR SPECTRUM", f"##.OBSERVE FREQUENCY= {mhz}",
           f"##.OBSERVE NUCLEUS= ^{nucleus}", f"##XUNITS= {xunits}", "##YUNITS= ARBITRARY UNITS", "##XFACTOR= 1",
           "##YFACTOR= 1", f"##FIRSTX= {first:.6f}", f"##LASTX= {last:.6f}", f"##NPOINTS= {n}"]
    return out + ([f"##.SOLVENT NAME= {solvent}"] if solvent else [])


def _affn(x, y, per_line=10):
    return [f"{x[i]:.6f} " + " ".join(str(v) for v in y[i:i + per_line]) for i in range(0, len(y), per_line)]


_SQZ = ("@ABCDEFGHI", "@abcdefghi")
_DIF = ("%JKLMNOPQR", "%jklmnopqr")
_DUP = "STUVWXYZs"


def _pseudo(v, table):
    s = str(abs(int(v)))
    return table[0 if v >= 0 else 1][int(s[0])] + s[1:]


def _difdup(x, y, per_line=40):
    """SQZ first value, DIF differences, DUP runs; each further line repeats the last Y (the Y check)."""
    out, i, n = [], 0, len(y)
    while i < n:
        chunk = y[i:i + per_line]
        toks = [_pseudo(chunk[0], _SQZ)]
        difs = [_pseudo(d, _DIF) for d in np.diff(chunk)]
        k = 0
        while k < len(difs):
            r = k
            while r + 1 < len(difs) and difs[r + 1] == difs[k]:
                r += 1
            run = r - k + 1
            toks.append(difs[k] + ("" if run == 1 else _DUP[int(str(run)[0]) - 1] + str(run)[1:]))
            k = r + 1
        out.append(f"{x[i]:.6f}" + "".join(toks))
        i = i + per_line - 1 if i + per_line < n else n
    return out


def _table_header(nucleus, mhz, xunits="PPM", solvent=None):
    return (["##TITLE= shiftrank test", "##JCAMP-DX= 5.01", "##DATA TYPE= NMR PEAK TABLE", f"##.OBSERVE FREQUENCY= {mhz}",
             f"##.OBSERVE NUCLEUS= ^{nucleus}", f"##XUNITS= {xunits}", "##YUNITS= ARBITRARY UNITS"]
            + ([f"##.SOLVENT NAME= {solvent}"] if solvent else []))


def _write(path, header, data):
    path.write_text("\n".join(header + ["##XYDATA= (X++(Y..Y))"] + data + ["##END="]) + "\n")
    return path


def _paraben_lines():
    septet = [(39.52 + k * 21.0 / 100.6, h) for k, h in zip(range(-3, 4), (40, 120, 240, 300, 240, 120, 40))]
    return PARABEN + septet


def _paraben_file(tmp_path, form="affn", xunits="PPM"):
    x, y = _trace(_paraben_lines(), -5, 220, 32768, 0.012, 3.0)
    xs = x * (100.6 if xunits == "HZ" else 1)
    data = _affn(xs, y) if form == "affn" else _difdup(xs, y)
    return _write(tmp_path / f"paraben_{form}_{xunits}.jdx", _header("13C", 100.6, xs[0], xs[-1], len(y), xunits, "DMSO-d6"),
                  data)


@pytest.mark.parametrize("form,xunits", [("affn", "PPM"), ("difdup", "PPM"), ("affn", "HZ")])
def test_13c_spectrum_is_picked_and_the_solvent_septet_set_aside(tmp_path, form, xunits):
    pl = shiftrank.read_peaks(_paraben_file(tmp_path, form, xunits))
    sample = sorted(p.shift for p in pl.peaks if p.solvent is None)
    assert len(sample) == 6
    assert np.allclose(sample, sorted(s for s, _ in PARABEN), atol=0.02)
    assert sum(1 for p in pl.peaks if p.solvent) == 7   # all seven septet lines, the outer ones too
    assert pl.field_mhz == pytest.approx(100.6)
    r = shiftrank.rank(pl, PARABEN_ISOMERS)
    assert r.best.smiles == PARABEN_ISOMERS[0]


def test_compressed_and_plain_data_give_the_same_peaks(tmp_path):
    a = read_jcamp(_paraben_file(tmp_path, "affn"))
    b = read_jcamp(_paraben_file(tmp_path, "difdup"))
    assert [p.shift for p in a.peaks] == [p.shift for p in b.peaks]


def _multiplet(centre, n_h, couplings):
    pos, hs = [centre * MHZ_H], [1.0]
    for j, n in couplings:
        pos, hs = ([p + (k - n / 2) * j for p in pos for k in range(n + 1)],
                   [h * comb(n, k) for h in hs for k in range(n + 1)])
    hs = np.array(hs) / sum(hs) * n_h * 1000
    return [(p / MHZ_H, h) for p, h in zip(pos, hs)]


def _anisole_file(tmp_path):
    lines = (_multiplet(7.10, 2, [(8.6, 1)]) + _multiplet(6.83, 2, [(8.6, 1)]) + _multiplet(3.79, 3, [])
             + _multiplet(2.59, 2, [(7.6, 3)]) + _multiplet(1.21, 3, [(7.6, 2)]) + _multiplet(7.26, 0.1, []))
    x, y = _trace(lines, -1, 12, 65536, 0.0025, 2.0)
    return _write(tmp_path / "anisole.dx", _header("1H", MHZ_H, x[0], x[-1], len(y), solvent="CDCl3"), _affn(x, y))


def test_1h_spectrum_gives_multiplets_with_letters_j_and_integrals(tmp_path):
    pl = shiftrank.read_peaks(_anisole_file(tmp_path), nucleus="1H")
    got = {round(p.shift, 2): p for p in pl.peaks if p.solvent is None}
    assert sorted(got) == [1.21, 2.59, 3.79, 6.83, 7.10]
    assert [got[s].multiplicity for s in (1.21, 2.59, 3.79, 6.83, 7.10)] == ["t", "q", "s", "d", "d"]
    assert got[2.59].j[0] == pytest.approx(7.6, abs=0.3) and got[7.10].j[0] == pytest.approx(8.6, abs=0.3)
    # areas in the ratio of the protons, 3:2:3:2:2
    ratio = [got[s].intensity / got[6.83].intensity for s in (1.21, 2.59, 3.79, 6.83, 7.10)]
    assert np.allclose(ratio, [1.5, 1.0, 1.5, 1.0, 1.0], atol=0.08)
    assert [p.shift for p in pl.peaks if p.solvent] == [pytest.approx(7.26, abs=0.01)]
    r = shiftrank.rank(None, ANISOLE_ISOMERS, peaks_1h=pl)
    assert r.best.smiles == ANISOLE_ISOMERS[0] and r.best.probability > 0.9


def test_peak_tables(tmp_path):
    rows = "\n".join(f"{s}, {h}" for s, h in _paraben_lines())
    f = tmp_path / "table.jdx"
    f.write_text("\n".join(_table_header("13C", 100.6, solvent="DMSO-d6"))
                 + "\n##PEAK TABLE= (XY..XY)\n" + rows + "\n##END=\n")
    pl = read_jcamp(f)
    assert sorted(p.shift for p in pl.peaks if p.solvent is None) == sorted(s for s, _ in PARABEN)
    # a 1H line list with widths (Hz), grouped into multiplets
    lines = _multiplet(2.59, 2, [(7.6, 3)]) + _multiplet(1.21, 3, [(7.6, 2)])
    g = tmp_path / "lines.jdx"
    g.write_text("\n".join(_table_header("1H", MHZ_H, xunits="HZ"))
                 + "\n##PEAK TABLE= (XYW..XYW)\n" + "; ".join(f"{s * MHZ_H:.2f}, {h:.1f}, 1.0" for s, h in lines)
                 + "\n##END=\n")
    ph = read_jcamp(g, "1H")
    assert [(round(p.shift, 2), p.multiplicity) for p in ph.peaks] == [(1.21, "t"), (2.59, "q")]
    assert ph.peaks[0].intensity / ph.peaks[1].intensity == pytest.approx(1.5, abs=0.05)


@pytest.mark.parametrize("text,nucleus,message", [
    ("hello\n", "13C", "not a JCAMP-DX file"),
    ("##TITLE= x\n##JCAMP-DX= 5.01\n##.OBSERVE NUCLEUS= ^1H\n##PEAK TABLE= (XY..XY)\n7.1, 5\n##END=\n", "13C",
     "holds a 1H spectrum"),
    ("##TITLE= x\n##JCAMP-DX= 5.01\n##XUNITS= HZ\n##PEAK TABLE= (XY..XY)\n700, 5\n##END=\n", "13C",
     "no ##.OBSERVE FREQUENCY"),
    ("##TITLE= x\n##JCAMP-DX= 5.01\n##TITLE2= y\n##END=\n", "13C", "without a peak table"),
    ("##TITLE= x\n##JCAMP-DX= 5.01\n##PEAK TABLE= (XY..XY)\n7.1, abc\n##END=\n", "1H", "not numeric"),
    ("##TITLE= x\n##JCAMP-DX= 5.01\n##PEAK TABLE= 7.1, 5\n##END=\n", "13C", "must start with"),
    ("##TITLE= x\n##JCAMP-DX= 6.0\n##NUM DIM= 2\n##NTUPLES= NMR SPECTRUM\n##PAGE= F1= 100\n"
     "##DATA TABLE= (F2++(Y..Y)), PROFILE\n1 2 3\n##END=\n", "13C", "a 2D spectrum"),
])
def test_bad_files_name_the_problem(tmp_path, text, nucleus, message):
    f = tmp_path / "bad.jdx"
    f.write_text(text)
    with pytest.raises(InputError, match=message):
        read_jcamp(f, nucleus)


def test_noise_only_spectrum_and_cli_exit(tmp_path):
    x, y = _trace([], -5, 220, 4096, 0.01, 3.0)
    f = _write(tmp_path / "noise.jdx", _header("13C", 100.6, x[0], x[-1], len(y)), _affn(x, y))
    with pytest.raises(InputError, match="no 13C peak found above the picking threshold"):
        read_jcamp(f)
    r = subprocess.run([sys.executable, "-m", "shiftrank.cli", "rank", "--peaks", str(f), "--candidates", "CCO"],
                       capture_output=True, text=True)
    assert r.returncode == 2 and "no 13C peak found" in r.stderr and "Traceback" not in r.stderr


def test_batch_cases_name_peak_files(tmp_path):
    import json

    from shiftrank.score.batch import run_batch

    _anisole_file(tmp_path)
    _paraben_file(tmp_path)
    cases = tmp_path / "cases.jsonl"
    cases.write_text("\n".join(json.dumps(c) for c in [
        {"id": "h", "file_1h": "anisole.dx", "candidates": ANISOLE_ISOMERS},
        {"id": "c", "file_13c": "paraben_affn_PPM.jdx", "candidates": PARABEN_ISOMERS},
        {"id": "missing", "file_13c": "nothere.jdx", "candidates": ["CCO"]},
        {"id": "both", "file_13c": "paraben_affn_PPM.jdx", "peaks": [1.0], "candidates": ["CCO"]},
    ]) + "\n")
    out = tmp_path / "out.jsonl"
    with out.open("w") as f:
        run_batch(cases, f)
    lines = [json.loads(x) for x in out.read_text().splitlines()]
    assert lines[0]["ranking"][0]["smiles"] == ANISOLE_ISOMERS[0]
    assert lines[1]["ranking"][0]["smiles"] == PARABEN_ISOMERS[0]
    assert "nothere.jdx: no such file" in lines[2]["error"] and lines[2]["ranking"][0]["smiles"] == "CCO"
    assert "not both" in lines[3]["error"]


def test_ntuples_spectrum_with_real_and_imaginary_pages(tmp_path):
    """The NTUPLES form (JCAMP-DX 5.01; the form instrument software commonly exports): X in Hz from ##FIRST /
    ##LAST of the column ##SYMBOL calls X, the real page is the spectrum."""
    x, y = _trace(_paraben_lines(), -5, 220, 16384, 0.012, 3.0)
    hz = x * 100.6
    imag = np.roll(y, 100)
    head = ["##TITLE= shiftrank test", "##JCAMP-DX= 5.01", "##DATA TYPE= NMR SPECTRUM", "##DATA CLASS= NTUPLES",
            "##.OBSERVE FREQUENCY= 100.6", "##.OBSERVE NUCLEUS= ^13C", "##.SOLVENT NAME= DMSO-d6",
            "##NTUPLES= NMR SPECTRUM", "##VAR_NAME= FREQUENCY, SPECTRUM/REAL, SPECTRUM/IMAG, PAGE NUMBER",
            "##SYMBOL= X, R, I, N", "##VAR_TYPE= INDEPENDENT, DEPENDENT, DEPENDENT, PAGE",
            "##VAR_FORM= AFFN, ASDF, ASDF, AFFN", f"##VAR_DIM= {len(y)}, {len(y)}, {len(y)}, 2",
            "##UNITS= HZ, ARBITRARY UNITS, ARBITRARY UNITS,", f"##FIRST= {hz[0]:.4f}, {y[0]}, {imag[0]}, 1",
            f"##LAST= {hz[-1]:.4f}, {y[-1]}, {imag[-1]}, 2", "##FACTOR= 1, 1, 1, 1"]
    body = (["##PAGE= N=1", "##DATA TABLE= (X++(R..R)), XYDATA"] + _difdup(hz, y)
            + ["##PAGE= N=2", "##DATA TABLE= (X++(I..I)), XYDATA"] + _difdup(hz, imag)
            + ["##END NTUPLES= NMR SPECTRUM", "##END="])
    f = tmp_path / "ntuples.jdx"
    f.write_text("\n".join(head + body) + "\n")
    pl = read_jcamp(f)
    sample = sorted(p.shift for p in pl.peaks if p.solvent is None)
    assert np.allclose(sample, sorted(s for s, _ in PARABEN), atol=0.02)


def test_one_line_with_a_split_top_is_one_line_and_close_lines_stay_two():
    from shiftrank.inputs.spectra import Trace, pick_lines

    x = np.linspace(0, 10, 2001)
    y = np.zeros_like(x) + np.random.default_rng(3).normal(0, 1.0, len(x))
    k = 1000
    y[k - 3:k + 4] = [20, 30, 40, 39, 40, 30, 20]      # one line, noise splits its top into two equal maxima
    y[1500:1507] += [10, 40, 90, 100, 90, 40, 10]      # and two lines 0.1 ppm apart (a C–F doublet at 250 MHz 13C, say)
    y[1520:1527] += [10, 40, 90, 100, 90, 40, 10]
    ppm, height, _ = pick_lines(Trace(x, y, 100.0), "13C")
    assert len(ppm) == 3
    assert ppm[0] == pytest.approx(5.0, abs=0.01) and np.allclose(ppm[1:], [7.515, 7.615], atol=0.005)


def test_an_aromatic_multiplet_around_the_chcl3_line_stays_the_samples(tmp_path):
    """CHCl3 at 7.26 (Fulmer et al. 2010) inside a monosubstituted phenyl's multiplet (7.22–7.34, 5H, the shape
    invented): the multiplet is kept, with a note, and only a free-standing singlet would be set aside."""
    lines = [(7.22 + k * 0.012, 500) for k in range(11)] + [(3.80, 1500)]
    x, y = _trace(lines, -1, 12, 65536, 0.0025, 2.0)
    f = _write(tmp_path / "phenyl.jdx", _header("1H", MHZ_H, x[0], x[-1], len(y), solvent="CDCl3"), _affn(x, y))
    pl = read_jcamp(f, "1H")
    assert not any(p.solvent for p in pl.peaks)
    assert any(p.lo is not None and p.lo <= 7.26 <= p.hi for p in pl.peaks)
    assert any("lies inside the multiplet" in n for n in pl.notes)


def test_report_draws_the_measured_spectrum(tmp_path):
    from shiftrank.outputs.report import render_report

    pl = read_jcamp(_paraben_file(tmp_path))
    assert pl.trace is not None and len(pl.trace[0]) <= 8000
    assert float(np.max(pl.trace[1])) >= 890   # thinning keeps the strongest line's height (900 + noise)
    html = render_report([shiftrank.rank(pl, PARABEN_ISOMERS)], [{"13C": pl}])
    assert "Measured 13C spectrum (paraben_affn_PPM.jdx)" in html and "the 6 peaks picked from it" in html


_LABELS = ["##TITLE= x", "##DATA TYPE= NMR SPECTRUM", "##.OBSERVE FREQUENCY= 100.6", "##.OBSERVE FREQUENCY= abc",
           "##.OBSERVE NUCLEUS= ^13C", "##.OBSERVE NUCLEUS= ^1H", "##XUNITS= HZ", "##XUNITS= PPM", "##XUNITS= SECONDS",
           "##FIRSTX= 200", "##LASTX= 0", "##FIRSTX= nan", "##XYDATA= (X++(Y..Y))", "##PEAK TABLE= (XY..XY)",
           "##PEAK TABLE= (XYW..XYW)", "##PEAK TABLE= (XYM..XYM)", "##XYPOINTS= (XY..XY)", "##XFACTOR= 0",
           "##NTUPLES= NMR SPECTRUM", "##SYMBOL= X, R, I",
           "##FIRST= 1, 2, 3", "##LAST= a, b", "##PAGE= N=1", "##DATA TABLE= (X++(R..R)), XYDATA", "##END=",
           "##.SOLVENT NAME= DMSO", "##.SOLVENT NAME= weird"]


def test_malformed_jcamp_files_give_input_errors_only(tmp_path):
    """Any mix of labels and data lines (values, pseudo-digits, stray characters): a peak list or an InputError,
    never another exception (hypothesis)."""
    from hypothesis import HealthCheck, given, settings
    from hypothesis import strategies as st

    line = st.one_of(st.sampled_from(_LABELS),
                     st.text(alphabet="@ABCDEFGHIabcdefghiJKLMNOPQRjklmnopqr%STUVWXYZs0123456789 .,;-+", max_size=40),
                     st.lists(st.one_of(st.floats(-50, 250), st.just(float("nan"))), min_size=1, max_size=6).map(
                         lambda v: ", ".join(f"{x:.3f}" for x in v)))

    @settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
    @given(st.lists(line, min_size=1, max_size=25), st.sampled_from(["13C", "1H"]))
    def check(lines, nucleus):
        f = tmp_path / "fuzz.jdx"
        f.write_text("##JCAMP-DX= 5.01\n" + "\n".join(lines) + "\n")
        try:
            read_jcamp(f, nucleus)
        except InputError:
            pass

    check()


def test_first_order_multiplets_are_named_from_the_trace(tmp_path):
    """td, ddd and dt patterns (Hoye, Hanson & Vyvyan 1994, J. Org. Chem. 59, 4096: every J is the distance from
    the outermost line to another line) read from a rendered spectrum; J within 0.3 Hz."""
    lines = (_multiplet(7.20, 1, [(7.6, 2), (1.5, 1)]) + _multiplet(6.70, 1, [(8.2, 1), (6.1, 1), (2.4, 1)])
             + _multiplet(5.90, 1, [(10.3, 1), (3.1, 2)]) + _multiplet(3.80, 3, []))
    x, y = _trace(lines, -1, 12, 131072, 0.0012, 1.0)
    f = _write(tmp_path / "fo.jdx", _header("1H", MHZ_H, x[0], x[-1], len(y), solvent="CDCl3"), _affn(x, y))
    got = {round(p.shift, 1): p for p in read_jcamp(f, "1H").peaks}
    assert got[7.2].multiplicity == "td" and np.allclose(got[7.2].j, (7.6, 1.5), atol=0.3)
    assert got[6.7].multiplicity == "ddd" and np.allclose(got[6.7].j, (8.2, 6.1, 2.4), atol=0.3)
    assert got[5.9].multiplicity == "dt" and np.allclose(got[5.9].j, (10.3, 3.1), atol=0.3)
    assert got[3.8].multiplicity == "s"


def test_predicted_spectra_written_as_jcamp_read_back(tmp_path):
    """`predict --jcamp`: 4-ethylanisole's predicted 1H peak table reads back as the first-order patterns a
    para-disubstituted ring and an ethyl group give (two 2H doublets, a 2H quartet, a 3H triplet, a 3H singlet;
    common practice), and the 13C table as one line per symmetry class (7 for C9H12O)."""
    smi = tmp_path / "m.smi"
    smi.write_text("CCc1ccc(OC)cc1 ethylanisole\n")
    r = subprocess.run([sys.executable, "-m", "shiftrank.cli", "predict", str(smi), "--nucleus", "both", "--jcamp",
                        str(tmp_path / "out")], capture_output=True, text=True)
    assert r.returncode == 0, r.stderr
    assert "2 predicted peak tables written" in r.stderr
    h = read_jcamp(tmp_path / "out" / "ethylanisole_1H.jdx", "1H")
    letters = sorted((p.multiplicity, round(p.intensity / min(q.intensity for q in h.peaks), 1)) for p in h.peaks)
    assert letters == [("d", 1.0), ("d", 1.0), ("q", 1.0), ("s", 1.5), ("t", 1.5)]
    c = read_jcamp(tmp_path / "out" / "ethylanisole_13C.jdx", "13C")
    assert len(c.peaks) == 7 and sorted(p.intensity for p in c.peaks) == [1, 1, 1, 1, 1, 2, 2]
    assert "prediction" in (tmp_path / "out" / "ethylanisole_13C.jdx").read_text()


def test_xypoints_spectrum_and_factors(tmp_path):
    """A spectrum tabulated as (X, Y) pairs (##XYPOINTS=, McDonald & Wilks 1988) with ##XFACTOR: the values times
    the factor are the shifts."""
    x, y = _trace(_paraben_lines(), -5, 220, 8192, 0.03, 3.0)
    head = _header("13C", 100.6, x[0], x[-1], len(y), solvent="DMSO-d6")
    head = [h for h in head if not h.startswith("##XFACTOR")] + ["##XFACTOR= 0.001"]
    f = tmp_path / "points.jdx"
    f.write_text("\n".join(head + ["##XYPOINTS= (XY..XY)"] + [f"{round(a * 1000)}, {b}" for a, b in zip(x, y)]
                           + ["##END="]) + "\n")
    pl = read_jcamp(f)
    assert np.allclose(sorted(p.shift for p in pl.peaks if p.solvent is None), sorted(s for s, _ in PARABEN), atol=0.03)


def test_two_close_methoxy_singlets_are_not_read_as_one_wide_doublet(tmp_path):
    # two OCH3 singlets 0.035 ppm (14 Hz at 400 MHz) apart, as in a 3,4-dimethoxyaryl compound (values
    # invented), beside a one-proton trans-alkene doublet of J 15.9 Hz: no H–H doublet wider than about 12 Hz
    # carries more than one proton per line pair (geminal or trans couplings, common practice)
    lines = (_multiplet(7.62, 1, [(15.9, 1)]) + _multiplet(6.85, 1, [(8.2, 1)]) + _multiplet(6.40, 1, [(15.9, 1)])
             + _multiplet(3.870, 3, []) + _multiplet(3.835, 3, []))
    x, y = _trace(lines, -1, 12, 65536, 0.0025, 2.0)
    pl = read_jcamp(_write(tmp_path / "dimethoxy.dx", _header("1H", MHZ_H, x[0], x[-1], len(y), solvent="CDCl3"),
                           _affn(x, y)), "1H")
    got = {round(p.shift, 3): p for p in pl.peaks if p.solvent is None}
    methoxy = [got[s] for s in sorted(got) if 3.8 < s < 3.9]
    assert [m.multiplicity for m in methoxy] == ["s", "s"]
    assert [m.intensity for m in methoxy] == [pytest.approx(3.0, abs=0.2)] * 2   # 3H each against a 1H doublet
    alkene = [got[s] for s in sorted(got) if 6.3 < s < 6.5 or 7.5 < s < 7.7]
    assert [a.multiplicity for a in alkene] == ["d", "d"] and alkene[0].j[0] == pytest.approx(15.9, abs=0.3)
    assert any("read as two singlets" in n for n in pl.notes)


def test_a_2d_file_is_named_as_such_for_peaks_and_for_hsqc(tmp_path):
    # a JCAMP-DX 6 nD NMR header (##NUM DIM= 2, NTUPLES; McDonald & Wilks 1988 labels) without 1D data
    p = tmp_path / "hsqc.jdx"
    p.write_text("\n".join(["##TITLE= hsqc", "##JCAMP-DX= 6.00", "##DATA TYPE= nD NMR SPECTRUM", "##NUM DIM= 2",
                            "##.OBSERVE FREQUENCY= 400.13", "##.OBSERVE NUCLEUS= ^1H", "##NTUPLES= nD NMR SPECTRUM",
                            "##VAR_NAME= FREQUENCY1, FREQUENCY2, SPECTRUM", "##END NTUPLES= nD NMR SPECTRUM", "##END="]) + "\n")
    with pytest.raises(InputError, match="a 2D spectrum"):
        read_jcamp(p, "1H")
    from shiftrank.inputs.peaks import read_hsqc
    with pytest.raises(InputError, match="2D spectra are not read"):
        read_hsqc(p)


def _bruker_set(root, lines, nucleus, mhz, offset, sw_ppm, si, width, noise, solvent="CDCl3", nc=2, seed=3):
    """A Bruker processed 1D data set as the processed-data layout has it: pdata/1/1r (little-endian int32,
    the trace divided by 2**NC_proc) with its procs (OFFSET = ppm of the first point, SW_p in Hz, SF in MHz, SI
    points) and the experiment's acqus (NUC1, SOLVENT)."""
    exp = root / "10"
    pdir = exp / "pdata" / "1"
    pdir.mkdir(parents=True)
    ppm = offset - np.arange(si) * sw_ppm / si
    y = np.zeros(si)
    for x0, h in lines:
        y += h / (1 + ((ppm - x0) / (width / 2)) ** 2)
    y += np.random.default_rng(seed).normal(0, noise, si)
    (pdir / "1r").write_bytes(np.round(y / 2 ** nc).astype("<i4").tobytes())
    (pdir / "procs").write_text("\n".join([
        "##TITLE= Parameter file", "##JCAMPDX= 5.0", "##$BYTORDP= 0", "##$DTYPP= 0", f"##$NC_proc= {nc}",
        f"##$OFFSET= {offset}", f"##$SF= {mhz}", f"##$SI= {si}", f"##$SW_p= {sw_ppm * mhz}", f"##$AXNUC= <{nucleus}>",
        "##END="]) + "\n")
    (exp / "acqus").write_text("\n".join(["##TITLE= Parameter file", "##JCAMPDX= 5.0", f"##$NUC1= <{nucleus}>",
                                          f"##$SOLVENT= <{solvent}>", f"##$SFO1= {mhz}", "##END="]) + "\n")
    return exp


def test_a_bruker_processed_data_set_is_read_like_a_spectrum(tmp_path):
    # 4-ethylanisole's 1H multiplets (module text: from memory) and the CHCl3 line, as a Bruker 1r/procs/acqus set
    lines = (_multiplet(7.10, 2, [(8.6, 1)]) + _multiplet(6.83, 2, [(8.6, 1)]) + _multiplet(3.79, 3, [])
             + _multiplet(2.59, 2, [(7.6, 3)]) + _multiplet(1.21, 3, [(7.6, 2)]) + _multiplet(7.26, 0.1, []))
    exp = _bruker_set(tmp_path, [(x, h * 1000) for x, h in lines], "1H", MHZ_H, 12.0, 14.0, 65536, 0.0025, 2000.0)
    for given in (exp, exp / "pdata" / "1", exp / "pdata" / "1" / "1r"):   # the folder, its pdata/1, or the 1r file
        pl = shiftrank.read_peaks(given, nucleus="1H")
        got = {round(p.shift, 2): p for p in pl.peaks if p.solvent is None}
        assert sorted(got) == [1.21, 2.59, 3.79, 6.83, 7.10]
        assert [got[s].multiplicity for s in (1.21, 2.59, 3.79, 6.83, 7.10)] == ["t", "q", "s", "d", "d"]
        assert [p.shift for p in pl.peaks if p.solvent] == [pytest.approx(7.26, abs=0.01)]   # the acqus solvent
    r = shiftrank.rank(None, ANISOLE_ISOMERS, peaks_1h=pl)
    assert r.best.smiles == ANISOLE_ISOMERS[0]
    # the acqus nucleus is checked, and `peaks` without --nucleus reads it
    with pytest.raises(InputError, match="holds a 1H spectrum"):
        shiftrank.read_peaks(exp, nucleus="13C")
    out = subprocess.run([sys.executable, "-m", "shiftrank.cli", "peaks", str(exp)], capture_output=True, text=True)
    assert out.returncode == 0 and "Bruker 1H spectrum" in out.stdout and " q " in out.stdout
    # a 2D data set and a folder of something else are named
    (tmp_path / "11" / "pdata" / "1").mkdir(parents=True)
    (tmp_path / "11" / "pdata" / "1" / "2rr").write_bytes(b"\0" * 64)
    with pytest.raises(InputError, match="a 2D spectrum"):
        shiftrank.read_peaks(tmp_path / "11", nucleus="13C")
    with pytest.raises(InputError, match="Bruker data set"):
        shiftrank.read_peaks(tmp_path, nucleus="13C")


# 4-ethylanisole's 13C lines (from memory): C 157.7, C 136.4, CH 128.7, CH 113.8, OCH3 55.3, CH2 28.0, CH3 15.9;
# a DEPT-135 spectrum shows the protonated ones, CH2 pointing down (common practice)
ANISOLE_13C = "157.7\n136.4\n128.7\n113.8\n55.3\n28.0\n15.9\n"
ANISOLE_DEPT = [(128.7, 900), (113.8, 900), (55.3, 500), (28.0, -450), (15.9, 400)]


def test_a_dept135_trace_reads_its_downward_ch2_lines(tmp_path):
    from shiftrank.inputs.peaks import merge_dept135, parse_peaks
    # a Bruker set whose pulse program is dept135: read signed without being told
    exp = _bruker_set(tmp_path, ANISOLE_DEPT, "13C", 100.6, 220.0, 230.0, 32768, 0.012, 3.0)
    acqus = exp / "acqus"
    acqus.write_text(acqus.read_text().replace("##END=", "##$PULPROG= <dept135>\n##END="))
    dept = shiftrank.read_peaks(exp, nucleus="13C")
    assert dept.dept135 and {round(p.shift): p.multiplicity for p in dept.peaks} == {
        129: "CH/CH3", 114: "CH/CH3", 55: "CH/CH3", 28: "CH2", 16: "CH/CH3"}
    merged = merge_dept135(parse_peaks(ANISOLE_13C), dept)
    assert {p.shift: p.multiplicity for p in merged.peaks} == {
        157.7: "C", 136.4: "C", 128.7: "CH/CH3", 113.8: "CH/CH3", 55.3: "CH/CH3", 28.0: "CH2", 15.9: "CH/CH3"}
    # a JCAMP-DX trace given as the DEPT-135 list (--dept135) is read signed too; as a plain 13C file it is not
    x, y = _trace(ANISOLE_DEPT, -5, 220, 32768, 0.012, 3.0)
    f = _write(tmp_path / "dept.jdx", _header("13C", 100.6, x[0], x[-1], len(y)), _affn(x, y))
    assert {round(p.shift): p.multiplicity for p in shiftrank.read_peaks(f, dept135=True).peaks}[28] == "CH2"
    assert 28 not in {round(p.shift) for p in shiftrank.read_peaks(f).peaks}


def test_peaks_without_nucleus_reads_an_instrument_file_as_the_nucleus_it_declares(tmp_path):
    f = _anisole_file(tmp_path)   # ##.OBSERVE NUCLEUS= ^1H
    out = subprocess.run([sys.executable, "-m", "shiftrank.cli", "peaks", str(f)], capture_output=True, text=True)
    assert out.returncode == 0 and "JCAMP-DX 1H spectrum" in out.stdout and " q " in out.stdout


def test_compare_reads_an_instrument_file_as_its_declared_nucleus(tmp_path):
    # the 4-ethylanisole 1H file (module text) against its own printed values: compared as 1H without --nucleus
    f = _anisole_file(tmp_path)
    ref = tmp_path / "ref.txt"
    ref.write_text("1H NMR (400 MHz, CDCl3) δ 7.10 (d, J = 8.6 Hz, 2H), 6.83 (d, J = 8.6 Hz, 2H), 3.79 (s, 3H), "
                   "2.59 (q, J = 7.6 Hz, 2H), 1.21 (t, J = 7.6 Hz, 3H).", encoding="utf-8")
    out = subprocess.run([sys.executable, "-m", "shiftrank.cli", "compare", "--sample", str(f), "--reference-text", str(ref)],
                         capture_output=True, text=True)
    assert out.returncode == 0 and "1H: consistent with the reference" in out.stdout
    out = subprocess.run([sys.executable, "-m", "shiftrank.cli", "rank", "--peaks", str(f), "--candidates", "CCO"],
                         capture_output=True, text=True)
    assert out.returncode == 2 and "goes to --peaks-1h" in out.stderr
