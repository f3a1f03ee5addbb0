"""How the text reader holds up when the same paragraphs are printed in another house style.

    python benchmarks/bench_reader_styles.py [--data DIR] [--show N] [STYLE ...]

Each 1H and 13C paragraph of ``literature_dev.jsonl.gz`` (printed in open-access articles; NMRExtractor,
MIT licence) is rewritten in one style at a time (J printed without 'Hz' or without '=', the integral
before the letters, ranges reversed, 'ppm' after each value, superscript nuclei, unicode solvents, …) and
read again.  A style that only changes how the peaks are printed must give the same peaks (shift, range,
integral, letters, J values, carbon count); the script counts the paragraphs whose peaks changed and
shows the first few.  Paragraphs the reader refuses both ways ('N/A', a reference to a table) are not
counted as changed.

The rewrites are mechanical, so a few changes are artefacts of the rewrite itself (the integral-first
rewrite moves a part of a coupling subscript such as '3J8, 7'); read the examples before calling a change
a fault.  Styles the reader does not take on purpose: a J value printed as a bare number with neither 'J'
nor 'Hz' ('d, 5.4, 2H'), and a decimal comma in a J value without 'Hz' ('J = 21,8'), both ambiguous.
"""
from __future__ import annotations

import argparse
import gzip
import json
import re
import sys
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from shiftrank.inputs.text import read_nmr_text  # noqa: E402
from training.data import DEFAULT_DATA  # noqa: E402


def _signature(text: str, nucleus: str):
    try:
        nt = read_nmr_text(text)
    except Exception as exc:  # noqa: BLE001 - a refusal is a result here, compared like peaks
        return ("refused", type(exc).__name__)
    out = []
    for s in nt.sections:
        if s.nucleus == nucleus:
            for p in s.peaks:
                out.append((round(p.shift, 2), p.lo and round(p.lo, 2), p.hi and round(p.hi, 2), p.integral,
                            p.multiplicity, tuple(round(j, 1) for j in p.j), p.count, p.dept))
    return sorted(out, key=str)


def _integral_first(m: re.Match) -> str:
    parts = [p.strip() for p in m.group(1).split(",")]
    counts = [p for p in parts if re.fullmatch(r"\d+(\.\d+)?\s?H", p)]
    if len(counts) != 1:
        return m.group(0)
    return "(" + ", ".join(counts + [p for p in parts if p is not counts[0]]) + ")"


STYLES = {
    "J without 'Hz'": lambda t: re.sub(r"\s?Hz", "", t),
    "J without '='": lambda t: re.sub(r"J\s*=\s*", "J ", t),
    "J=8.4 (no spaces)": lambda t: re.sub(r"J\s*=\s*", "J=", t),
    "3J = …": lambda t: re.sub(r"(?<!\w)J\s*=", "3J =", t),
    "JHH = …": lambda t: re.sub(r"(?<!\w)J\s*=", "JHH =", t),
    "J1 = …, J2 = …": lambda t: re.sub(r"J\s*=\s*(\d+\.?\d*),\s*(\d+\.?\d*)\s*Hz", r"J1 = \1 Hz, J2 = \2 Hz", t),
    "integral first": lambda t: re.sub(r"\(([^()]*)\)", _integral_first, t),
    "'2 H' with a space": lambda t: re.sub(r"(\d)H\b", r"\1 H", t),
    "letters spelled out": lambda t: re.sub(r"\((s|d|t|q|m),", lambda m: "(" + {
        "s": "singlet", "d": "doublet", "t": "triplet", "q": "quartet", "m": "multiplet"}[m.group(1)] + ",", t),
    "brs": lambda t: re.sub(r"\bbr\.?\s?s\b", "brs", t),
    "ranges with '-'": lambda t: re.sub(r"(\d)\s*[–−—]\s*(\d)", r"\1-\2", t),
    "ranges spaced": lambda t: re.sub(r"(\d)\s*[–−—-]\s*(\d)", r"\1 – \2", t),
    "ranges reversed": lambda t: re.sub(r"(\d+\.\d+)\s*[–−—-]\s*(\d+\.\d+)", r"\2–\1", t),
    "';' between peaks": lambda t: re.sub(r"\),\s", "); ", t),
    "';' inside brackets": lambda t: re.sub(r"\(([^()]*)\)", lambda m: "(" + m.group(1).replace(", ", "; ") + ")", t),
    "a line per peak": lambda t: re.sub(r"\),\s", "),\n", t),
    "double spaces": lambda t: t.replace(", ", ",  "),
    "δ (ppm)": lambda t: t.replace("δ", "δ (ppm)") if "ppm" not in t else t,
    "no δ": lambda t: t.replace("δ", ""),
    "δH / δC header": lambda t: re.sub(r"^1H[ -]NMR\s*(\([^()]*\))[:,]?\s*δ\s*[:=]?", r"δH \1",
                                       re.sub(r"^13C[ -]NMR\s*(\([^()]*\))[:,]?\s*δ\s*[:=]?", r"δC \1", t)),
    "δH: / δC: after the header": lambda t: re.sub(r"^(1H|13C)([ -]NMR\s*\([^()]*\))[:,]?\s*δ\s*[:=]?",
                                                   lambda m: m.group(1) + m.group(2) + " δ" + m.group(1)[-1] + ":", t),
    "ppm after each 13C value": lambda t: re.sub(r"(\d+\.\d+)(?=\s*[,(;])", r"\1 ppm", t) if t.startswith("13C") else t,
    "superscript nuclei": lambda t: (t.replace("1H NMR", "¹H NMR").replace("13C NMR", "¹³C NMR")
                                     .replace("1H-NMR", "¹H-NMR").replace("13C-NMR", "¹³C-NMR")),
    "13C{1H}": lambda t: t.replace("13C NMR", "13C{1H} NMR"),
    "unicode subscripts in solvents": lambda t: t.replace("CDCl3", "CDCl₃").replace("DMSO-d6", "DMSO-d₆"),
    "(2 × C)": lambda t: re.sub(r"\((\d)C\)", r"(\1 × C)", t),
    "final full stop": lambda t: t.rstrip(".") + ".",
    "em dash ranges": lambda t: re.sub(r"(\d)\s*[–−-]\s*(\d)", r"\1—\2", t),
    "J = a and b Hz": lambda t: re.sub(r"J\s*=\s*(\d+\.?\d*),\s*(\d+\.?\d*)\s*Hz", r"J = \1 and \2 Hz", t),
    "J(H,H) = …": lambda t: re.sub(r"(?<!\w)J\s*=", "J(H,H) =", t),
    "no-break and thin spaces": lambda t: t.replace(" = ", "\u2009=\u2009").replace(", ", ",\u00a0"),
    "full-width brackets and commas": lambda t: t.replace("(", "（").replace(")", "）").replace(", ", "，"),
    "J values split by ';'": lambda t: re.sub(r"J\s*=\s*(\d+\.?\d*),\s*(\d+\.?\d*)\s*Hz", r"J = \1; \2 Hz", t),
    "upper-case conditions": lambda t: re.sub(r"\(([^()]*MHz[^()]*)\)", lambda m: "(" + m.group(1).upper() + ")", t),
    "ppm after each 1H value": lambda t: re.sub(r"(\d+\.\d+)(?=\s*\()", r"\1 ppm", t) if t.startswith("1H") else t,
    "hard line breaks (PDF copy)": lambda t: re.sub(r"(\S+ \S+ \S+ \S+ \S+ \S+) ", r"\1\n", t),
}


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    ap.add_argument("--show", type=int, default=2, help="changed paragraphs shown per style")
    ap.add_argument("styles", nargs="*", help="only these styles (names as printed)")
    args = ap.parse_args(argv)
    recs = [json.loads(line) for line in gzip.open(args.data / "literature_dev.jsonl.gz", "rt")]
    styles = {k: v for k, v in STYLES.items() if not args.styles or k in args.styles}
    print(f"{len(recs)} compounds of literature_dev.jsonl.gz; paragraphs rewritten per style, then read again\n")
    print(f"{'style':34s} {'rewritten':>9s} {'1H changed':>10s} {'13C changed':>11s}")
    total_changed = total = 0
    for name, rewrite in styles.items():
        n = c1 = c13 = 0
        shown = []
        for r in recs:
            for key, nuc in (("text_1h", "1H"), ("text_13c", "13C")):
                text = r.get(key)
                if not text:
                    continue
                other = rewrite(text)
                if other == text:
                    continue
                n += 1
                a, b = _signature(text, nuc), _signature(other, nuc)
                if a != b and not (a[:1] == ("refused",) and b[:1] == ("refused",)):
                    c1 += nuc == "1H"
                    c13 += nuc == "13C"
                    if len(shown) < args.show:
                        shown.append(f"    {r['id']} {nuc}: {other[:160]!r}")
        total += n
        total_changed += c1 + c13
        print(f"{name:34s} {n:9d} {c1:10d} {c13:11d}")
        for line in shown:
            print(line)
    print(f"\nall styles: {total_changed} of {total} rewritten paragraphs read differently "
          f"({100 * total_changed / max(total, 1):.1f} %)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
