"""A corpus of nasty inputs for every command line entry point (the fuzz suite in test_fuzz.py).

Each entry: a name, the arguments after ``shiftrank`` (``{tmp}`` stands for the test's temporary
folder), and the files to create there first (text, or bytes for binary junk).  All structures and
peak values are INVENTED for testing.
"""
from __future__ import annotations

import json

GOOD_PEAKS = "14.3 CH3\n21.6 CH3\n60.7 CH2\n127.8 C\n129.0 CH\n129.5 CH\n143.4 C\n166.6 C\n"
GOOD_1H = "1.38 3 t 7.1\n2.41 3 s\n4.36 2 q 7.1\n7.24 2 d 8.1\n7.94 2 d 8.1\n"
GOOD_TEXT = ("1H NMR (400 MHz, CDCl3) δ 7.94 (d, J = 8.1 Hz, 2H), 7.24 (d, J = 8.1 Hz, 2H), 4.36 (q, J = 7.1 Hz, 2H), "
             "2.41 (s, 3H), 1.38 (t, J = 7.1 Hz, 3H); 13C NMR (101 MHz, CDCl3) δ 166.6, 143.4, 129.5, 129.0, 127.8, "
             "60.7, 21.6, 14.3.")
PARA, META = "CCOC(=O)c1ccc(C)cc1", "CCOC(=O)c1cccc(C)c1"
LONG_SMILES = "C" * 3000
BIG_MOLECULE = "C" * 300
TEN_THOUSAND_PEAKS = "\n".join(f"{10 + (k % 2000) * 0.1:.2f}" for k in range(10000))


def case(**kw):
    base = {"id": "c", "peaks": [{"shift": 14.3}, {"shift": 166.6}], "candidates": [PARA, META]}
    base.update(kw)
    return json.dumps(base)


CORPUS = [
    # name, argv, files
    ("facts: bad SMILES", ["facts", "C1CC("], {}),
    ("facts: long SMILES on the command line", ["facts", LONG_SMILES], {}),
    ("facts: 3000-character garbage", ["facts", "Q" * 3000], {}),
    ("facts: unicode", ["facts", "CCO→Ω"], {}),
    ("facts: radical", ["facts", "[CH3]"], {}),
    ("facts: metal salt", ["facts", "[Na+].CC(=O)[O-]"], {}),
    ("facts: directory", ["facts", "{tmp}"], {}),
    ("facts: empty file", ["facts", "{tmp}/empty.smi"], {"empty.smi": ""}),
    ("facts: binary file", ["facts", "{tmp}/junk.sdf"], {"junk.sdf": b"\x00\xff\xfe\x89PNG\r\n\x1a\n" * 50}),
    ("formula: junk", ["formula", "C9H9(N3)O2+-"], {}),
    ("formula: huge count", ["formula", "C99999999999999999999"], {}),
    ("peaks: NaN", ["peaks", "{tmp}/nan.txt"], {"nan.txt": "nan\n128.0\n"}),
    ("peaks: inf", ["peaks", "{tmp}/inf.txt"], {"inf.txt": "inf CH\n"}),
    ("peaks: huge", ["peaks", "{tmp}/huge.txt"], {"huge.txt": "1e308\n"}),
    ("peaks: binary", ["peaks", "{tmp}/bin.txt"], {"bin.txt": b"\x00\x01\x02\xff" * 100}),
    ("peaks: 10000 peaks", ["peaks", "{tmp}/many.txt"], {"many.txt": TEN_THOUSAND_PEAKS}),
    ("peaks: JSON of the wrong type", ["peaks", "{tmp}/p.json"], {"p.json": '{"peaks": "none"}'}),
    ("peaks: missing", ["peaks", "{tmp}/nope.txt"], {}),
    ("peaks: 1H range junk", ["peaks", "{tmp}/h.txt", "--nucleus", "1H"], {"h.txt": "7.2-x 2 m\n"}),
    ("predict: 300-atom molecule", ["predict", "{tmp}/big.smi", "--jsonl"], {"big.smi": BIG_MOLECULE + " big\n"}),
    ("predict: metals and radicals", ["predict", "{tmp}/odd.smi", "--jsonl"],
     {"odd.smi": "C[Mg]Br grignard\n[CH3] methyl\n[Fe] iron\nCCO ok\n"}),
    ("predict: isotopes and salts", ["predict", "{tmp}/iso.smi", "--jsonl", "--nucleus", "both"],
     {"iso.smi": "[2H]C([2H])([2H])O methanol-d3\nCC(=O)[O-].[Na+] acetate\nC[NH3+].[Cl-] salt\n"}),
    ("predict: broken SDF", ["predict", "{tmp}/bad.sdf"], {"bad.sdf": "title\n\n\n  2  1  0\nnonsense\n$$$$\n"}),
    ("predict: empty", ["predict", "{tmp}/e.smi"], {"e.smi": "\n\n"}),
    ("predict: unknown extension", ["predict", "{tmp}/x.xyz"], {"x.xyz": "C 0 0 0"}),
    ("rank: radical candidate", ["rank", "--peaks", "{tmp}/p.txt", "--candidates", PARA, "[CH3]"], {"p.txt": GOOD_PEAKS}),
    ("rank: only bad candidates", ["rank", "--peaks", "{tmp}/p.txt", "--candidates", "C1CC(", "[Fe]"], {"p.txt": GOOD_PEAKS}),
    ("rank: long SMILES candidate", ["rank", "--peaks", "{tmp}/p.txt", "--candidates", PARA, LONG_SMILES], {"p.txt": GOOD_PEAKS}),
    ("rank: no peaks at all", ["rank", "--candidates", PARA], {}),
    ("rank: malformed text", ["rank", "--text", "{tmp}/t.txt", "--candidates", PARA, META],
     {"t.txt": "1H NMR (((( δ 7.2 (d, J = , 2H), , ; 13C NMR δ"}),
    ("rank: text of junk", ["rank", "--text", "{tmp}/t.txt", "--candidates", PARA], {"t.txt": "lorem ipsum" * 30}),
    ("rank: binary text", ["rank", "--text", "{tmp}/t.bin", "--candidates", PARA], {"t.bin": b"\xff\xfe\x00" * 300}),
    ("rank: salt candidates", ["rank", "--text", "{tmp}/t.txt", "--candidates", PARA + ".Cl", META + ".O"], {"t.txt": GOOD_TEXT}),
    ("rank: charged formula", ["rank", "--text", "{tmp}/t.txt", "--candidates", PARA, "--formula", "C10H13O2+"], {"t.txt": GOOD_TEXT}),
    ("rank: silly formula", ["rank", "--text", "{tmp}/t.txt", "--candidates", PARA, "--formula", "Xx2"], {"t.txt": GOOD_TEXT}),
    ("rank: 1H file with junk", ["rank", "--peaks-1h", "{tmp}/h.txt", "--candidates", PARA], {"h.txt": "7.2 two d\n"}),
    ("rank: with isomers of a 300-atom molecule", ["rank", "--peaks", "{tmp}/p.txt", "--candidates", BIG_MOLECULE,
                                                   "--with-isomers"], {"p.txt": GOOD_PEAKS}),
    ("inventory: nothing", ["inventory"], {}),
    ("inventory: mz without formula", ["inventory", "--peaks", "{tmp}/p.txt", "--mz", "150"], {"p.txt": GOOD_PEAKS}),
    ("inventory: text only", ["inventory", "--text", "{tmp}/t.txt", "--formula", "C10H12O2"], {"t.txt": GOOD_TEXT}),
    ("isomers: bad", ["isomers", "C1CC("], {}),
    ("isomers: bad reaction", ["isomers", "--reaction", ">>>>", "--reactants", "CC"], {}),
    ("isomers: nothing", ["isomers"], {}),
    ("isomers: unknown kind", ["isomers", "CC", "--kind", "everything"], {}),
    ("report: unwritable", ["report", "--peaks", "{tmp}/p.txt", "--candidates", PARA, "-o", "{tmp}/nodir/r.html"],
     {"p.txt": GOOD_PEAKS}),
    ("batch: wrong JSON types", ["batch", "{tmp}/b.jsonl"], {"b.jsonl": "\n".join([
        case(peaks="abc"), case(candidates=5), case(candidates=[5, None]), case(formula=3), case(mass="x"),
        case(solvent=[]), case(priors="a"), case(text=5), case(peaks_1h={}), case(peaks=[{"shift": "x"}]),
        case(peaks=[{"shift": 1e300}]), '{"id": "n", "peaks": [{"shift": NaN}], "candidates": ["CCO"]}',
        "[1, 2]", "not json", "{}",
        case(with_isomers=7), case(peaks=None, text="N/A"), case(id={"a": 1}),
        case(hsqc=5), case(hsqc=[]), case(hsqc=[[1, 2, 3]]), case(hsqc=[[True, 2.0]]), case(hsqc=[{"c": "x"}]),
        case(peaks=None, hsqc=[[300.0, 2.0]]), '{"id": "h", "hsqc": [[NaN, 1.0]], "candidates": ["CCO"]}'])}),
    ("rank: HSQC file of words", ["rank", "--hsqc", "{tmp}/h.txt", "--candidates", PARA], {"h.txt": "one two\nthree four\n"}),
    ("rank: HSQC odd JSON", ["rank", "--hsqc", "{tmp}/h.json", "--candidates", PARA], {"h.json": '{"c": 1}'}),
    ("batch: empty", ["batch", "{tmp}/e.jsonl"], {"e.jsonl": ""}),
    ("batch: binary", ["batch", "{tmp}/e.jsonl"], {"e.jsonl": b"\x00\xff" * 1000}),
    ("batch: missing", ["batch", "{tmp}/nope.jsonl"], {}),
    ("batch: directory", ["batch", "{tmp}"], {}),
]
