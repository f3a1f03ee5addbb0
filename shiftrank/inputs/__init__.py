"""Stage 1, inputs: reading what the chemist gives (peak lists, printed text, instrument files, structures,
batch cases) into checked data with clear errors.  Calls nothing but :mod:`shiftrank.errors` (and the small
wording helpers of :mod:`shiftrank.words`); every later stage may call it."""
