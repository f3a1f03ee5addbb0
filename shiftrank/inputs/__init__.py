"""Stage 1, inputs: reading what the chemist gives (peak lists, structures, batch cases) into checked
data with clear errors.  Calls nothing but :mod:`shiftrank.errors`; every later stage may call it."""
