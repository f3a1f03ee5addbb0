"""Stage 2, structure facts: formula, masses, DBE, symmetry classes, CHn, the sample-history inventory.
May call :mod:`shiftrank.inputs`; knows nothing of prediction or scoring."""
