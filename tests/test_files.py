"""Files as editors save them: byte-order marks, UTF-16, Windows-1252 and CRLF line ends.

The encodings are defined by the Unicode Standard (chapter 23.8, the byte order mark U+FEFF; UTF-16 and
UTF-32 encoding forms, chapter 3.9) and RFC 3629 (UTF-8, section 6 on a leading BOM); Windows-1252 maps
byte 0x96 to the en dash U+2013 (Microsoft code page table, from memory).  That Windows editors write
UTF-8 with a mark and "Unicode" as UTF-16 LE is common practice."""
import json
import subprocess
import sys

import pytest

from shiftrank.errors import InputError
from shiftrank.inputs.files import decode_text, read_user_text
from shiftrank.inputs.molecules import read_molecules
from shiftrank.inputs.peaks import read_peaks
from shiftrank.inputs.text import read_nmr_text

PARA = "CCOC(=O)c1ccc(C)cc1"
META = "CCOC(=O)c1cccc(C)c1"
TEXT = ("1H NMR (400 MHz, CDCl3) δ 7.94 (d, J = 8.2 Hz, 2H), 7.23 (d, J = 8.2 Hz, 2H), 4.36 (q, J = 7.1 Hz, 2H), "
        "2.40 (s, 3H), 1.38 (t, J = 7.1 Hz, 3H).\n13C NMR (101 MHz, CDCl3) δ 166.7, 143.5, 129.6, 129.1, 127.8, "
        "60.8, 21.7, 14.4.\n")


@pytest.mark.parametrize("codec", ["utf-8-sig", "utf-16", "utf-16-le", "utf-16-be", "utf-32"])
def test_every_unicode_form_reads_as_the_same_text(codec):
    assert decode_text(TEXT.encode(codec)) == TEXT


def test_bytes_that_are_not_utf8_are_read_as_windows_1252():
    assert decode_text("7.20–7.10 (m, 3H), 82 °C".encode("cp1252")) == "7.20–7.10 (m, 3H), 82 °C"
    assert decode_text(TEXT.encode("utf-8")) == TEXT       # plain UTF-8 untouched


def test_missing_file_and_directory_are_named(tmp_path):
    with pytest.raises(InputError, match="nope.txt: no such file"):
        read_user_text(tmp_path / "nope.txt")
    with pytest.raises(InputError, match="is a directory, expected a peak list"):
        read_user_text(tmp_path, "a peak list")


def test_smiles_file_with_mark_and_crlf_keeps_clean_strings(tmp_path):
    f = tmp_path / "cands.smi"
    f.write_bytes(f"{PARA} para\r\n{META} meta\r\n".encode("utf-8-sig"))
    recs = read_molecules(f)
    assert [r.source for r in recs] == [PARA, META] and [r.id for r in recs] == ["para", "meta"]


def test_utf16_text_and_cp1252_peak_list_read_as_written(tmp_path):
    f = tmp_path / "para.txt"
    f.write_text(TEXT, encoding="utf-16")
    sections = read_nmr_text(read_user_text(f)).sections
    assert sorted(len(s.peaks) for s in sections) == [5, 8]
    g = tmp_path / "h1.txt"
    g.write_bytes("7.30\x967.20 m 5H\r\n2.35 s 3H\r\n".replace("\x96", "–").encode("cp1252"))
    pl = read_peaks(g, nucleus="1H")
    assert len(pl.peaks) == 2 and pl.peaks[-1].lo == pytest.approx(7.20) and pl.peaks[-1].hi == pytest.approx(7.30)


def run(*args):
    return subprocess.run([sys.executable, "-m", "shiftrank.cli", *args], capture_output=True, text=True)


def test_batch_file_saved_with_a_mark_and_crlf_ranks_its_first_case(tmp_path):
    case = {"id": "first", "text": TEXT, "candidates": [META, PARA]}
    f = tmp_path / "cases.jsonl"
    f.write_bytes((json.dumps(case) + "\r\n" + json.dumps(dict(case, id="second")) + "\r\n").encode("utf-8-sig"))
    r = run("batch", str(f))
    assert r.returncode == 0, r.stderr
    lines = [json.loads(x) for x in r.stdout.splitlines()]
    assert [x["id"] for x in lines] == ["first", "second"]
    assert all(x["ranking"][0]["smiles"] == PARA for x in lines)


@pytest.mark.parametrize("name,body", [
    ("hdr.smi", "SMILES\tName\nOc1ccc(Cl)cc1Cl\t2,4-dichlorophenol\nc1ccncc1\tpyridine\n"),
    ("t.csv", 'name,smiles\n"2,4-dichlorophenol",Oc1ccc(Cl)cc1Cl\npyridine,c1ccncc1\n'),
    ("plain.smi", "Oc1ccc(Cl)cc1Cl 2,4-dichlorophenol\nc1ccncc1;pyridine\n"),
])
def test_smiles_tables_as_spreadsheets_and_scripts_write_them(tmp_path, name, body):
    # a header naming the columns is no record; SMILES holds no tab, comma or semicolon (Weininger 1988,
    # the SMILES alphabet), so one of them inside the first field separates the id
    f = tmp_path / name
    f.write_text(body)
    recs = read_molecules(f)
    assert [(r.id, r.source, r.error) for r in recs] == [("2,4-dichlorophenol", "Oc1ccc(Cl)cc1Cl", None),
                                                          ("pyridine", "c1ccncc1", None)]


def test_a_first_record_named_like_a_header_word_stays_a_record(tmp_path):
    f = tmp_path / "named.smi"
    f.write_text("CCO structure\nc1ccncc1 pyridine\n")
    assert [(r.id, r.source) for r in read_molecules(f)] == [("structure", "CCO"), ("pyridine", "c1ccncc1")]
