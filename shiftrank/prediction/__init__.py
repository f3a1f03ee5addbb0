"""Stage 3, prediction: atom environments, sphere tables and the trained models per nucleus, loaded
only from the package's own ``models/`` after their SHA-256 check.  May call :mod:`shiftrank.inputs`
and :mod:`shiftrank.chem`."""
