"""Stage 2, structure facts: formula, masses, DBE, symmetry classes, CHn, expected multiplets, the alternatives a
reaction could have given (with ring locants and named reaction templates), the sample-history inventory.
May call :mod:`shiftrank.inputs`; knows nothing of prediction or scoring."""
