"""Stage 6, outputs: the terminal table, JSON and the HTML report.  Reads results of
:mod:`shiftrank.score`; computes nothing new."""
