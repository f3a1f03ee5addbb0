"""Stage 6, outputs: the terminal table, JSON, the HTML report, and predictions as JCAMP-DX peak tables.
Reads results of :mod:`shiftrank.score` and :mod:`shiftrank.prediction` (with the symmetry classes and
expected multiplets of :mod:`shiftrank.chem`); computes nothing new."""
