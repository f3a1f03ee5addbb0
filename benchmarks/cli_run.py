"""The ``shiftrank`` command run from a benchmark: a fresh process each time, timed by the caller."""
from __future__ import annotations

import subprocess
import sys


def run_shiftrank(*args: str) -> subprocess.CompletedProcess:
    """``python -m shiftrank.cli ARGS``.  Status 0, or 2 when every line was written but some cases or records
    could not be used (its one-line summary is printed); anything else, or a traceback, stops the benchmark."""
    r = subprocess.run([sys.executable, "-m", "shiftrank.cli", *args], capture_output=True, text=True)
    assert r.returncode in (0, 2) and "Traceback" not in r.stderr, r.stderr
    if r.returncode:
        print("  (" + r.stderr.strip().splitlines()[-1] + ")")
    return r
