"""Command-line behaviour: help, exit codes, one-line errors."""
import json
import subprocess
import sys


def run(*args):
    return subprocess.run([sys.executable, "-m", "shiftrank.cli", *args], capture_output=True, text=True)


def test_help_lists_commands():
    r = run("--help")
    assert r.returncode == 0
    for cmd in ("facts", "formula", "peaks", "demo"):
        assert cmd in r.stdout


def test_bad_input_is_one_line_exit_2(tmp_path):
    p = tmp_path / "bad.txt"
    p.write_text("12.0\nabc\n")
    r = run("peaks", str(p))
    assert r.returncode == 2
    assert "Traceback" not in r.stderr
    assert r.stderr.strip().count("\n") == 0
    assert "bad.txt line 2" in r.stderr


def test_missing_file_exit_2():
    r = run("peaks", "/nonexistent/peaks.txt")
    assert r.returncode == 2 and "no such file" in r.stderr


def test_a_file_given_without_its_option_is_named_with_where_it_goes(tmp_path):
    p = tmp_path / "c13.txt"
    p.write_text("50.1\n128.8\n")
    r = run("rank", str(p), "--candidates", "CCO")
    assert r.returncode == 2 and r.stderr.strip().count("\n") == 0
    assert "unrecognized arguments" in r.stderr and "--peaks FILE (13C)" in r.stderr
    r = run("rank", "--peaks", str(p), "--candidates", "CCO", "--no-such-option")
    assert r.returncode == 2 and "see shiftrank rank --help" in r.stderr and "usage:" not in r.stderr

def test_formula_command():
    r = run("formula", "C6H5Br")
    assert r.returncode == 0 and "DBE 4" in r.stdout


def test_facts_name_carbons_alike_in_constitution_that_give_two_signals():
    # L-valine methyl ester: the isopropyl methyls beside C2 are two 13C signals (common practice)
    import json

    r = run("facts", "CC(C)[C@H](N)C(=O)OC")
    assert r.returncode == 0
    assert "a signal apart from alike atom 2: diastereotopic" in r.stdout and "6 symmetry classes" in r.stdout
    d = json.loads(run("facts", "CC(C)[C@H](N)C(=O)OC", "--json").stdout)
    assert {"atoms": [0], "multiplicity": "CH3", "twin": {"atoms": [2], "why": "stereo"}} in d["carbon_classes"]
    # N,N-dimethylacetamide: the N-methyls cis and trans to the C=O, 38.0 and 35.0 ppm (common practice, from memory)
    d = json.loads(run("facts", "CC(=O)N(C)C", "--json").stdout)
    assert d["expected_13c_signals"] == 4


def test_facts_list_proton_classes_with_their_expected_multiplets():
    # 1-(4-methoxyphenyl)ethylamine (own choice): CH3 d, CH q, NH2 br s, two 2H ring doublets, OCH3 s; a
    # para-disubstituted benzene gives two 2H doublets (common practice).  A primary benzamide's NH2 may show
    # as two signals (slow C–N rotation; common practice)
    import json

    r = run("facts", "C[C@H](N)c1ccc(OC)cc1")
    assert r.returncode == 0
    assert "1H   3H d        atoms 0" in r.stdout and "1H   1H q" in r.stdout and "1H   3H s        atoms 8" in r.stdout
    d = json.loads(run("facts", "NC(=O)c1ccc(Cl)cc1", "--json").stdout)
    nh2 = next(c for c in d["proton_classes"] if c["atoms"] == [0])
    assert nh2["exchangeable"] and nh2["may_split"] and nh2["h"] == 2
    assert sorted(c["multiplet"] for c in d["proton_classes"] if not c["exchangeable"]) == ["d", "d"]
    assert "up to 4: the two protons of 1 CH2 or NH2 group may show apart" in run("facts", "NC(=O)c1ccc(Cl)cc1").stdout


def test_the_lazy_public_names_are_listed_by_dir_and_each_resolves():
    import shiftrank
    names = dir(shiftrank)
    for name in shiftrank.__all__:
        assert name in names
        assert getattr(shiftrank, name) is not None


def run_in(stdin, *args):
    return subprocess.run([sys.executable, "-m", "shiftrank.cli", *args], capture_output=True, text=True, input=stdin)


def test_peak_lists_and_hsqc_from_standard_input_and_one_reader_of_it():
    r = run_in("9.6 1 s\n2.0 3 s\n", "peaks", "-", "--nucleus", "1H")
    assert r.returncode == 0 and "2 signals" in r.stdout
    r = run_in("1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), 2.35 (s, 3H)\n", "rank", "--candidates",
               "Cc1ccc(Br)cc1", "Cc1cccc(Br)c1", "--peaks-1h", "-")
    assert r.returncode == 0, r.stderr
    two = run_in("9.6 1 s\n", "rank", "--candidates", "CC", "--peaks-1h", "-", "--text", "-")
    assert two.returncode == 2 and "both read standard input" in two.stderr and "Traceback" not in two.stderr


def test_candidates_given_as_standard_inchi(tmp_path):
    # the InChI of 4-hydroxyacetanilide as a database prints it (IUPAC standard InChI; its mobile-H layer
    # '(H,9,10)' leaves the amide/imidic acid tautomer open): read and put in the amide form
    inchi = "InChI=1S/C8H9NO2/c1-6(10)9-7-2-4-8(11)5-3-7/h2-5,11H,1H3,(H,9,10)"
    r = run("facts", inchi)
    assert r.returncode == 0 and "C8H9NO2" in r.stdout
    smi = tmp_path / "c.smi"
    smi.write_text(f"{inchi} para\nCC(=O)Nc1cccc(O)c1 meta\n")
    out = run("predict", str(smi), "--jsonl")
    assert out.returncode == 0 and [json.loads(x)["id"] for x in out.stdout.splitlines()] == ["para", "meta"]
    bad = run("facts", "InChI=1S/garbage")
    assert bad.returncode == 2 and "InChI" in bad.stderr and "Traceback" not in bad.stderr


def test_predict_takes_one_smiles_and_a_chemical_name_is_refused_as_a_name():
    # a structure typed on the command line, as rank and facts take it
    r = run("predict", "Nc1ccc(Cl)cc1", "--jsonl")
    assert r.returncode == 0 and set(json.loads(r.stdout)["shifts"]) == {"1", "2", "3", "4", "6", "7"}
    # a name where a structure belongs: said so, not taken for a SMILES with an open ring closure
    r = run("predict", "4-chloroaniline")
    assert r.returncode == 2 and "reads as a chemical name" in r.stderr and "Traceback" not in r.stderr
    r = run_in("7.90 2\n6.85 2\n3.80 3\n", "rank", "--peaks-1h", "-", "--candidates", "methyl 4-hydroxybenzoate")
    assert "reads as a chemical name" in r.stdout + r.stderr
    # a fragment with its attachment point is not a metal compound
    r = run("predict", "*c1ccc(Cl)cc1")
    assert r.returncode != 0 and "attachment point (*)" in r.stderr and "metal" not in r.stderr


def test_rank_takes_the_products_of_a_named_reaction_as_candidates():
    # SNAr of 2,4-dichloropyrimidine with morpholine (common practice: C4 or C2); the 13C list only carries the
    # case (INVENTED values; which product wins is not asserted): both products are ranked, named by their site
    r = run_in("13C NMR (101 MHz, CDCl3) δ 161.9, 161.0, 156.4, 101.9, 66.4, 44.1.", "rank", "--text", "-",
               "--reaction", "snar", "--reactants", "Clc1ccnc(Cl)n1.C1COCCN1", "--json")
    assert r.returncode == 0, r.stderr
    names = [c["name"] for c in json.loads(r.stdout)["ranking"]]
    assert len(names) == 2 and all(n.startswith("SNAr product at C") for n in names)
    r = run_in("13C NMR δ 161.9, 66.4", "rank", "--text", "-")
    assert r.returncode == 2 and "--reaction NAME --reactants" in r.stderr
    r = run("isomers", "--reaction", "snar", "--reactants", "Clc1ccnc(Cl)n1.C1COCCN1", "--smi")
    assert [ln.split("\t")[1].split(" product")[0] for ln in r.stdout.splitlines()] == ["SNAr", "SNAr"]


def test_isomers_says_why_there_is_no_alternative():
    # toluene: every ring position of a lone methyl is equivalent (symmetry; common practice)
    r = run("isomers", "Cc1ccccc1", "--kind", "positional")
    assert r.returncode == 0 and "0 alternatives" in r.stdout
    assert "equivalent by symmetry" in r.stdout and "--kind ambident,tautomer,stereo" in r.stdout
