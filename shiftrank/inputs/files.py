"""A user's file as text: one decoding rule for every reader of stage 1.

Files reach us from notebooks, word processors and instrument PCs.  Windows editors start UTF-8 files
with a byte-order mark and may save "Unicode" text as UTF-16; older ones write Windows-1252, where the
en dash of ``7.20–7.10`` is the single byte 0x96.  Reading all of them as plain UTF-8 put the mark in
front of the first SMILES, broke the first line of a batch file and turned UTF-16 text into noise.

>>> decode_text("\\ufeff7.26 (s, 1H)".encode("utf-8"))
'7.26 (s, 1H)'
>>> decode_text("7.26 (s, 1H)".encode("utf-16"))
'7.26 (s, 1H)'
>>> decode_text(b"7.20\\x967.10 (m, 3H)")      # Windows-1252 en dash
'7.20–7.10 (m, 3H)'
"""
from __future__ import annotations

import codecs
import gzip
import sys
from pathlib import Path

from ..errors import InputError

_BOMS = ((codecs.BOM_UTF32_LE, "utf-32"), (codecs.BOM_UTF32_BE, "utf-32"),
         (codecs.BOM_UTF8, "utf-8-sig"), (codecs.BOM_UTF16_LE, "utf-16"), (codecs.BOM_UTF16_BE, "utf-16"))


def decode_text(raw: bytes, fallback: str = "cp1252") -> str:
    """Text of a user's bytes: a byte-order mark decides (UTF-8/16/32, the mark dropped); UTF-16 without
    a mark is recognised by its zero bytes; otherwise UTF-8, and bytes that are not UTF-8 are read as
    ``fallback`` (Windows-1252; bytes it leaves undefined become U+FFFD)."""
    for bom, codec in _BOMS:
        if raw.startswith(bom):
            return raw.decode(codec, errors="replace")
    head = raw[:2000]
    if len(head) >= 4 and head.count(b"\x00") * 3 > len(head):
        odd, even = head[1::2].count(b"\x00"), head[0::2].count(b"\x00")
        return raw.decode("utf-16-le" if odd > even else "utf-16-be", errors="replace")
    try:
        return raw.decode("utf-8")
    except UnicodeDecodeError:
        return raw.decode(fallback, errors="replace")


def read_user_text(path: str | Path, what: str = "a text file", fallback: str = "cp1252") -> str:
    """The decoded text of ``path`` (``.gz`` unpacked), or an :class:`InputError` naming the file and
    what was expected of it."""
    p = Path(path)
    if not p.exists():
        raise InputError(f"{path}: no such file")
    if p.is_dir():
        raise InputError(f"{path}: is a directory, expected {what}"
                         + (" (or a Bruker data set: a folder with pdata/N/1r)" if what == "a peak list" else ""))
    try:
        raw = gzip.open(p, "rb").read() if p.name.lower().endswith(".gz") else p.read_bytes()
    except (OSError, EOFError) as exc:
        raise InputError(f"{path}: cannot read ({getattr(exc, 'strerror', None) or exc})") from None
    return decode_text(raw, fallback)


def read_stdin_text() -> str:
    """Standard input decoded by the same rule as a file."""
    buffer = getattr(sys.stdin, "buffer", None)
    return decode_text(buffer.read()) if buffer is not None else sys.stdin.read().lstrip("\ufeff")


#: full-width forms (U+FF01–U+FF5E) as ASCII, and the ideographic comma, full stop and space: text typed with an
#: East Asian input method prints '（d，J = 8.4 Hz，2H）'
_FULL_WIDTH = {**{c: c - 0xFEE0 for c in range(0xFF01, 0xFF5F)}, 0x3001: ord(","), 0x3002: ord("."), 0x3000: ord(" ")}


def fold_full_width(text: str) -> str:
    """``text`` with full-width punctuation, digits and letters as their ASCII forms.

    >>> fold_full_width("7.26（d，J = 8.4 Hz，2H）")
    '7.26(d,J = 8.4 Hz,2H)'
    """
    return text.translate(_FULL_WIDTH)

