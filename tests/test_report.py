"""HTML report: self-contained, every candidate, drawings and the stick plot."""
import re
import subprocess
import sys

from shiftrank.chem.inventory import take_inventory
from shiftrank.inputs.peaks import parse_peaks
from shiftrank.score.ranking import rank
from shiftrank.outputs.report import render_report

PARA = "CCOC(=O)c1ccc(C)cc1"
META = "CCOC(=O)c1cccc(C)c1"
# INVENTED peak list shaped like the para ester's spectrum
TEXT = "14.3 CH3\n21.6 CH3\n60.7 CH2\n127.8 C\n129.0 CH\n129.5 CH\n143.4 C\n166.6 C\n77.16\n"


def test_report_has_every_candidate_plot_drawing_and_caution():
    pl = parse_peaks(TEXT, solvent="CDCl3")
    r = rank(pl, [META, PARA, "C1CC("], formula="C10H12O2", solvent="CDCl3", id="S-1")
    html = render_report([r], [pl], [{"formula": "C10H12O2", "solvent": "CDCl3"}], [take_inventory(pl, formula="C10H12O2")])
    for smi in (META, PARA, "C1CC("):
        assert smi in html
    assert html.count("<svg") >= 4          # two structures + two stick plots
    assert "δ 13C (ppm)" in html            # the matplotlib axis label of the stick plot
    assert "evidence, not a certificate of identity" in html
    assert "NMRShiftDB2" in html
    assert not re.search(r"(src|href)=['\"]https?:", html)  # no network resources
    assert "Inventory" in html and "DBE" in html


def test_batch_report_summary_links(tmp_path):
    import json
    cases = [{"id": f"S{i}", "peaks": [{"shift": float(x.split()[0])} for x in TEXT.splitlines()[:8]],
              "candidates": [PARA, META]} for i in range(2)]
    f = tmp_path / "c.jsonl"
    f.write_text("\n".join(json.dumps(c) for c in cases))
    out = tmp_path / "r.html"
    r = subprocess.run([sys.executable, "-m", "shiftrank.cli", "report", "--batch", str(f), "-o", str(out)],
                       capture_output=True, text=True)
    assert r.returncode == 0, r.stderr
    html = out.read_text()
    assert "Summary" in html and "href='#sample-1'" in html and "href='#sample-2'" in html


def test_one_sample_report_takes_the_rank_options(tmp_path):
    # `report` and `rank` share the sample options: generated alternatives and the m/z adduct reach
    # the report as they reach the ranking (INVENTED peak list above; the ion is the para ester's [M+H]+)
    peaks = tmp_path / "s.txt"
    peaks.write_text(TEXT)
    out = tmp_path / "r.html"
    r = subprocess.run([sys.executable, "-m", "shiftrank.cli", "report", "--peaks", str(peaks), "--candidates", PARA,
                        "--with-isomers", "--mz", "165.0910", "--adduct", "M+H", "--solvent", "CDCl3", "-o", str(out)],
                       capture_output=True, text=True)
    assert r.returncode == 0, r.stderr
    html = out.read_text()
    assert "CH3 moved from ring atom 8 to ring atom 7 (now meta to CO2C2H5)" in html   # the meta ester
    assert "measured m/z 165.091 ([M+H]+)" in html


def test_batch_report_lists_the_cases_it_could_not_rank(tmp_path):
    import json
    from shiftrank.cli import main

    good = {"id": "ok", "peaks": [{"shift": 14.1}, {"shift": 22.7}, {"shift": 31.9}, {"shift": 63.1}],
            "candidates": ["CCCCO", "CCC(C)O"]}   # butan-1-ol's four lines (common practice, from memory)
    cases = tmp_path / "c.jsonl"
    cases.write_text(json.dumps(good) + "\n" + json.dumps({"id": "no-peaks", "candidates": ["CCO"]}) + "\n{oops\n")
    out = tmp_path / "r.html"
    assert main(["report", "--batch", str(cases), "-o", str(out)]) == 2   # written, but two cases failed
    page = out.read_text()
    assert "Not ranked (2)" in page and "no-peaks" in page and "line 3: invalid JSON" in page


def test_a_ranking_shows_itself_briefly_as_a_table_and_in_a_notebook():
    # what a script or a notebook cell shows for a result: a short repr, the terminal table as str(), and the
    # report's section with its style kept to itself (a notebook's page is not restyled)
    pl = parse_peaks(TEXT, solvent="CDCl3")
    r = rank(pl, [META, PARA], id="S-1")
    assert repr(r).startswith("<RankResult S-1: 2 candidates, 13C; verdict: ") and len(repr(r)) < 400
    assert repr(r.best).startswith(f"<CandidateResult {r.best.smiles} p=")
    assert "Verdict:" in str(r) and "13C assignment for" in str(r)
    html = r._repr_html_()
    assert r.verdict in html and "evidence, not a certificate of identity" in html
    style = re.search(r"<style>(.*?)</style>", html, re.S).group(1)
    selectors = [sel for group in re.findall(r"(?:^|})([^{}]+)\{", style) for sel in group.split(",")]
    assert selectors and "body{" not in style and all(sel.startswith(".shiftrank-report") for sel in selectors)


def test_beside_generated_alternatives_the_given_structure_is_marked():
    # rank --with-isomers: the table and the report say which row is the structure the chemist gave
    pl = parse_peaks(TEXT, solvent="CDCl3")
    r = rank(pl, [PARA], with_isomers=True)
    assert "(given) " + PARA in str(r)
    assert "<b>given</b> <code>" + PARA in render_report([r])
    assert "(given)" not in str(rank(pl, [META, PARA]))   # no generated alternatives: nothing to tell apart
