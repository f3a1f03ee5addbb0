"""Batch and CLI contracts (../shared/GUIDE.md contracts 1 and 2)."""
import json
import subprocess
import sys

import pytest
from rdkit import Chem

PARA = "CCOC(=O)c1ccc(C)cc1"
META = "CCOC(=O)c1cccc(C)c1"
PEAKS = [{"shift": s, "multiplicity": m} for s, m in [(14.3, "CH3"), (21.6, "CH3"), (60.7, "CH2"), (127.8, "C"),
                                                      (129.0, "CH"), (129.5, "CH"), (143.4, "C"), (166.6, "C")]]


def run(*args, stdin=None):
    return subprocess.run([sys.executable, "-m", "shiftrank.cli", *args], capture_output=True, text=True, input=stdin)


def test_batch_order_errors_and_every_candidate_once(tmp_path):
    cases = [
        {"id": "a", "peaks": PEAKS, "candidates": [META, "not_a_smiles((", PARA], "formula": "C10H12O2"},
        {"id": "b", "peaks": [], "candidates": [PARA]},
        {"id": "c", "peaks": PEAKS, "candidates": [PARA, META], "truth": META},
    ]
    f = tmp_path / "cases.jsonl"
    f.write_text("\n".join(json.dumps(c) for c in cases) + "\n{broken json\n")
    r = run("batch", str(f))
    # every case is written; two could not be ranked, which the exit status tells a script
    assert r.returncode == 2 and "2 of 4 cases could not be ranked" in r.stderr and "Traceback" not in r.stderr
    lines = [json.loads(x) for x in r.stdout.splitlines()]
    assert [x["id"] for x in lines[:3]] == ["a", "b", "c"]
    a = lines[0]
    assert sorted(x["smiles"] for x in a["ranking"]) == sorted(cases[0]["candidates"])
    assert a["ranking"][-1]["smiles"] == "not_a_smiles((" and "error" in a["ranking"][-1]
    assert a["ranking"][0]["smiles"] == PARA
    assert abs(sum(x["probability"] for x in a["ranking"]) - 1) < 1e-9
    assert "empty" in lines[1]["error"]
    assert lines[2]["ranking"][0]["smiles"] == PARA  # the 'truth' field is ignored
    assert "invalid JSON" in lines[3]["error"] and "line 4" in lines[3]["error"]


def test_batch_parallel_matches_serial(tmp_path):
    cases = [{"id": str(i), "peaks": PEAKS, "candidates": [META, PARA]} for i in range(70)]
    f = tmp_path / "c.jsonl"
    f.write_text("\n".join(json.dumps(c) for c in cases))
    serial = run("batch", str(f)).stdout
    parallel = run("batch", str(f), "--jobs", "2").stdout
    assert serial == parallel and len(serial.splitlines()) == 70


def test_predict_jsonl_contract(tmp_path):
    smi = tmp_path / "m.smi"
    smi.write_text("OCc1ccccc1 benzyl_alcohol\nC1CC( broken\nN#CCC(=O)OC\n")
    r = run("predict", str(smi), "--jsonl")
    # every record is written, the broken one as an error object; the status says one failed
    assert r.returncode == 2 and "1 of 3 records could not be predicted" in r.stderr and "Traceback" not in r.stderr
    out = [json.loads(x) for x in r.stdout.splitlines()]
    assert [o["id"] for o in out] == ["benzyl_alcohol", "broken", "N#CCC(=O)OC"]
    mol = Chem.MolFromSmiles("OCc1ccccc1")
    carbons = [str(a.GetIdx()) for a in mol.GetAtoms() if a.GetAtomicNum() == 6]
    assert list(out[0]["shifts"]) == carbons
    assert "error" in out[1]


def test_predict_jsonl_marks_measured_values(tmp_path):
    # oxirane is in NMRShiftDB2's peak lists (record 10016036, 40.6 ppm): its values are measured ones
    smi = tmp_path / "m.smi"
    smi.write_text("C1CO1 oxirane\nN#CC1(C(F)(F)F)CC(OC2CC2)C1 unseen\n")
    out = [json.loads(x) for x in run("predict", str(smi), "--jsonl").stdout.splitlines()]
    assert out[0]["measured_in_data"] == ["0", "1"] and out[0]["shifts"]["0"] == 40.6
    assert "measured_in_data" not in out[1]


def test_predict_sdf_keys_follow_file_atom_order(tmp_path):
    mol = Chem.AddHs(Chem.MolFromSmiles("OC(=O)c1ccc(Cl)cc1"))
    mol.SetProp("_Name", "acid-1")
    sdf = tmp_path / "m.sdf"
    w = Chem.SDWriter(str(sdf))
    w.write(mol)
    w.close()
    r = run("predict", str(sdf), "--jsonl")
    o = json.loads(r.stdout.splitlines()[0])
    assert o["id"] == "acid-1"
    assert set(o["shifts"]) == {"1", "3", "4", "5", "6", "8", "9"}
    assert 165 < o["shifts"]["1"] < 180


def test_predict_empty_file_exit_2(tmp_path):
    f = tmp_path / "e.smi"
    f.write_text("")
    r = run("predict", str(f))
    assert r.returncode == 2 and "empty" in r.stderr and "Traceback" not in r.stderr


def test_rank_cli_table_and_json(tmp_path):
    p = tmp_path / "peaks.txt"
    p.write_text("\n".join(f"{x['shift']} {x['multiplicity']}" for x in PEAKS) + "\n77.16\n")
    r = run("rank", "--peaks", str(p), "--candidates", META, PARA, "--formula", "C10H12O2", "--solvent", "CDCl3")
    assert r.returncode == 0, r.stderr
    assert "Verdict:" in r.stdout and "evidence, not a certificate" in r.stdout
    rj = run("rank", "--peaks", str(p), "--candidates", META, PARA, "--json")
    d = json.loads(rj.stdout)
    assert d["ranking"][0]["smiles"] == PARA and "assignment" in d["ranking"][0]["nuclei"]["13C"]


def test_rank_cli_bad_peaks_exit_2(tmp_path):
    p = tmp_path / "peaks.txt"
    p.write_text("12.5\n999\n")
    r = run("rank", "--peaks", str(p), "--candidates", PARA)
    assert r.returncode == 2 and "line 2" in r.stderr


def test_batch_malformed_fields_never_crash(tmp_path):
    lines = [
        {"id": "p", "peaks": PEAKS, "candidates": [PARA, META], "priors": [0.5, "x"]},
        {"id": "q", "peaks": [{"shift": "abc"}], "candidates": [PARA]},
        {"id": "r", "peaks": PEAKS, "candidates": PARA},
        {"id": "s", "peaks": PEAKS, "candidates": [PARA, "[Na+].[Cl-]", ""], "formula": "C10H12O2"},
    ]
    f = tmp_path / "bad.jsonl"
    f.write_text("\n".join(json.dumps(x) for x in lines))
    r = run("batch", str(f))
    assert r.returncode == 2 and "3 of 4 cases could not be ranked" in r.stderr and "Traceback" not in r.stderr
    out = [json.loads(x) for x in r.stdout.splitlines()]
    assert [o["id"] for o in out] == ["p", "q", "r", "s"]
    assert "priors" in out[0]["error"] and "not a number" in out[1]["error"]
    assert "list of SMILES" in out[2]["error"]
    assert out[3]["ranking"][0]["smiles"] == PARA
    assert [x["smiles"] for x in out[3]["ranking"][1:]] == ["[Na+].[Cl-]", ""]
    assert all("error" in x for x in out[3]["ranking"][1:])


@pytest.mark.parametrize("v3000,crlf", [(False, False), (False, True), (True, False)])
def test_predict_sdf_records_without_titles_each_read(tmp_path, v3000, crlf):
    # an SDF record's first line is its title and may be blank (RDKit's SDWriter writes a blank one for an
    # unnamed molecule; CTfile formats, BIOVIA 2020, from memory): the records after it must still be read
    smiles = ["OC(=O)c1ccc(Cl)cc1", "CC(=O)Nc1ccccc1", "N#Cc1ccncc1"]
    sdf = tmp_path / "m.sdf"
    w = Chem.SDWriter(str(sdf))
    w.SetForceV3000(v3000)
    for i, s in enumerate(smiles):
        m = Chem.MolFromSmiles(s)
        if i == 1:
            m.SetProp("_Name", "anilide")
        w.write(m)
    w.close()
    if crlf:
        sdf.write_bytes(sdf.read_bytes().replace(b"\n", b"\r\n"))
    r = run("predict", str(sdf), "--jsonl")
    assert r.returncode == 0, r.stderr
    out = [json.loads(x) for x in r.stdout.splitlines()]
    assert [o.get("error") for o in out] == [None] * 3
    assert [o["id"] for o in out] == ["record 1", "anilide", "record 3"]
    assert [len(o["shifts"]) for o in out] == [7, 8, 6]


def test_named_candidate_objects_and_a_bad_entry_in_one_case(tmp_path):
    # a registry export gives {"smiles": …, "name": …} objects; an entry that is neither is that candidate's
    # error, listed last, while the others are ranked (the same INVENTED peaks as above)
    case = {"id": "named", "peaks": PEAKS, "formula": "C10H12O2",
            "candidates": [{"smiles": META, "name": "meta ester"}, PARA, {"name": "no structure"}, 42]}
    f = tmp_path / "cases.jsonl"
    f.write_text(json.dumps(case) + "\n")
    r = run("batch", str(f))
    assert r.returncode == 0, r.stderr
    out = json.loads(r.stdout)
    rows = out["ranking"]
    assert [x["smiles"] for x in rows[:2]] == [PARA, META] and rows[1].get("name") == "meta ester"
    assert len(rows) == 4 and all("error" in x for x in rows[2:])
    assert "candidate 3: expected a SMILES string or an object with a 'smiles' string" in rows[2]["error"]
    # candidates as an object of names and SMILES (a dict in a script)
    f.write_text(json.dumps({"id": "dict", "peaks": PEAKS, "candidates": {"meta ester": META, "para ester": PARA}}) + "\n")
    rows = json.loads(run("batch", str(f)).stdout)["ranking"]
    assert [(x["name"], x["smiles"]) for x in rows] == [("para ester", PARA), ("meta ester", META)]


def test_a_batch_case_may_name_a_reaction_whose_products_are_its_candidates(tmp_path):
    # methylation of indazole at N1 or N2 (common practice); the 1H list only carries the case (INVENTED values)
    import json as _json
    from shiftrank.score.batch import run_batch
    cases = tmp_path / "c.jsonl"
    cases.write_text(_json.dumps({"id": "r", "peaks_1h": [{"shift": 8.0, "integral": 1}, {"shift": 4.1, "integral": 3}],
                                  "reaction": "n-alkylation", "reactants": "c1ccc2[nH]ncc2c1.CI"}) + "\n"
                     + _json.dumps({"id": "bad", "peaks_1h": [8.0], "reaction": "n-alkylation"}) + "\n")
    out = tmp_path / "o.jsonl"
    with out.open("w") as f:
        run_batch(cases, f)
    first, second = [_json.loads(x) for x in out.read_text().splitlines()]
    assert sorted(c["name"].split(" (")[0] for c in first["ranking"]) == [
        "N-alkylation product at N1 of the indazole", "N-alkylation product at N2 of the indazole"]
    assert "reaction: give a reaction name or SMARTS with 'reactants'" in second["error"]


def test_a_batch_case_asks_for_e_z_alternatives_and_gets_residue_notes(tmp_path):
    # methyl (E)-cinnamate in CDCl3 (values from memory; trans vinyl J 16 Hz, common practice) with the lines of an
    # ethyl acetate residue (Fulmer et al. 2010, Table 1, recalled): the case names the Z form as its candidate
    import json as _json
    from shiftrank.score.batch import run_batch
    text = ("1H NMR (400 MHz, CDCl3) δ 7.69 (d, J = 16.0 Hz, 1H), 7.55–7.50 (m, 2H), 7.41–7.36 (m, 3H), "
            "6.45 (d, J = 16.0 Hz, 1H), 4.12 (q, J = 7.1 Hz, 0.2H), 3.81 (s, 3H), 2.05 (s, 0.3H), 1.26 (t, J = 7.1 Hz, 0.3H).")
    cases = tmp_path / "c.jsonl"
    cases.write_text(_json.dumps({"id": "ez", "text": text, "candidates": ["COC(=O)/C=C\\c1ccccc1"],
                                  "with_isomers": "stereo"}) + "\n")
    out = tmp_path / "o.jsonl"
    with out.open("w") as f:
        run_batch(cases, f)
    (res,) = [_json.loads(x) for x in out.read_text().splitlines()]
    top = res["ranking"][0]
    assert top["smiles"] == Chem.MolToSmiles(Chem.MolFromSmiles("COC(=O)/C=C/c1ccccc1"))
    assert top["generated"] is True and top["relation"] == "C=C (atoms 4 and 5) E instead of Z"
    assert any("4.12, 2.05, 1.26 are where ethyl acetate" in n for n in res["notes"])
