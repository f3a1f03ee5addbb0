"""shiftrank: rank candidate structures against observed 13C and 1H spectra and the sample's history.

>>> import shiftrank
>>> shiftrank.structure_facts("COc1ccc(OC)cc1").expected_13c_signals
3
"""
__version__ = "0.1.0"

__all__ = ["predict", "predict_many", "rank", "rank_many", "structure_facts", "take_inventory", "read_peaks", "parse_peaks",
           "read_nmr_text", "isomers", "compare_spectra", "InputError", "__version__"]


def __getattr__(name):  # lazy imports keep `import shiftrank` and the CLI start-up light
    if name in ("predict", "predict_many"):
        from .prediction import api
        return getattr(api, name)
    if name in ("rank", "rank_many"):
        from .score import ranking
        return getattr(ranking, name)
    if name == "structure_facts":
        from .chem.structure import structure_facts
        return structure_facts
    if name == "take_inventory":
        from .chem.inventory import take_inventory
        return take_inventory
    if name in ("read_peaks", "parse_peaks"):
        from .inputs import peaks
        return getattr(peaks, name)
    if name == "read_nmr_text":
        from .inputs.text import read_nmr_text
        return read_nmr_text
    if name == "isomers":
        from .chem.isomers import isomers
        return isomers
    if name == "compare_spectra":
        from .score.reference import compare_spectra
        return compare_spectra
    if name == "InputError":
        from .errors import InputError
        return InputError
    raise AttributeError(f"module 'shiftrank' has no attribute {name!r}")


def __dir__():  # tab completion and dir() list the lazy names too
    return sorted(set(globals()) | set(__all__))
