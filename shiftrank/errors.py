"""One exception type for everything a user can get wrong.

The command line turns an :class:`InputError` into one line on stderr and
exit status 2; the Python API lets it propagate.
"""


class InputError(ValueError):
    """Bad user input: a file, a field, a SMILES string or a formula.

    The message names the input and the problem, e.g.
    ``peaks.txt line 4: '12x.5' is not a number``.
    """
