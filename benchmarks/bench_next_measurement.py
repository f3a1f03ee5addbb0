"""Does the 'next measurement' hint tell when the other spectrum would settle #1 against #2?

    python benchmarks/bench_next_measurement.py [--part dev|heldout] [--data DIR]

The printed regio cases (``dev_cases_text_regio.jsonl.gz``, one half) are ranked from one paragraph (1H, or
13C); where #1 stays below p 0.9 the hint for the other spectrum says it 'would likely' or 'would hardly'
tell #1 and #2 apart (:func:`shiftrank.score.separation.next_spectrum`, predictions only).  The same cases
are then ranked from both paragraphs: a pair counts as settled when one of the two takes at least 0.9 of
their joint probability, and the truth's rank is noted.  A useful hint settles the 'likely' pairs more often
than the 'hardly' ones.
"""
from __future__ import annotations

import argparse
import collections
import sys
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))
sys.path.insert(0, str(REPO / "benchmarks"))

from bench_text import as_case, load_cases  # noqa: E402
from shiftrank.score.ranking import rank_many  # noqa: E402
from training.data import DEFAULT_DATA  # noqa: E402

SETTLED = 0.9


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--part", choices=["dev", "heldout"], default="dev")
    ap.add_argument("--data", type=Path, default=DEFAULT_DATA)
    args = ap.parse_args(argv)
    cases = load_cases(args.data / "dev_cases_text_regio.jsonl.gz", args.part, None)
    both = [as_case(c, "both") for c in cases]
    ranked_both = rank_many([b for b, _ in both])
    for given, other in (("1H", "13C"), ("13C", "1H")):
        one = [as_case(c, given) for c in cases]
        tally: dict = collections.defaultdict(collections.Counter)
        for (case, t), a, b in zip(one, rank_many([x for x, _ in one]), ranked_both):
            if isinstance(a, Exception) or isinstance(b, Exception) or a.runner_up is None:
                continue
            hints = [h for h in a.next_spectrum(geometry=False) if h.startswith(f"a {other} spectrum")]
            if not hints:
                continue   # #1 at p >= 0.9 already
            kind = "likely" if "would likely" in hints[0] else "hardly"
            p = {c.smiles: c.probability for c in b.candidates}
            p1, p2 = p.get(a.best.smiles, 0.0), p.get(a.runner_up.smiles, 0.0)
            tally[kind]["n"] += 1
            tally[kind]["settled"] += max(p1, p2) >= SETTLED * max(p1 + p2, 1e-12)
            tally[kind]["truth first"] += b.candidates[0].smiles == case["candidates"][t]
        print(f"{args.part}: ranked from {given}, #1 below p 0.9; the hint for a {other} spectrum, then both spectra:")
        for kind in ("likely", "hardly"):
            n = tally[kind]["n"]
            if n:
                print(f"  '{kind}' {n:4d} cases: settled {tally[kind]['settled']:4d} ({100 * tally[kind]['settled'] / n:.0f} %), "
                      f"truth first {tally[kind]['truth first']:4d} ({100 * tally[kind]['truth first'] / n:.0f} %)")
            else:
                print(f"  '{kind}'    0 cases")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
