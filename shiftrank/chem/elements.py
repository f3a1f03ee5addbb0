"""Element data: atomic weights, monoisotopic masses and the valences used for DBE.

Masses come from RDKit's periodic table (which follows the IUPAC/CIAAW standard
atomic weights and the atomic mass evaluation); tests check a few of them
against the published tables.
"""
from __future__ import annotations

from functools import lru_cache

from rdkit import Chem

_PT = Chem.GetPeriodicTable()

#: Valence assumed for the degree of unsaturation.  S, Se and P are counted
#: in their lowest common valence (S 2, P 3), as is usual for the formula-level
#: DBE; a sulfone or phosphate then shows its S=O / P=O bonds as extra DBE-free
#: valence, which is the textbook convention.
DBE_VALENCE = {
    "H": 1, "D": 1, "T": 1, "F": 1, "Cl": 1, "Br": 1, "I": 1,
    "Li": 1, "Na": 1, "K": 1, "Rb": 1, "Cs": 1, "Ag": 1,
    "O": 2, "S": 2, "Se": 2, "Te": 2, "Mg": 2, "Ca": 2, "Zn": 2, "Hg": 2, "Cu": 2,
    "N": 3, "P": 3, "As": 3, "Sb": 3, "B": 3, "Al": 3,
    "C": 4, "Si": 4, "Ge": 4, "Sn": 4, "Pb": 4,
}


#: the element symbols RDKit knows (Z 1-118), looked up by number: asking RDKit for the number of an unknown
#: symbol prints a C++ stack dump on stderr before it raises
_SYMBOLS = frozenset(_PT.GetElementSymbol(z) for z in range(1, 119))


@lru_cache(maxsize=None)
def is_element(symbol: str) -> bool:
    """True when ``symbol`` is a chemical element symbol, e.g. ``is_element('Cl')``; ``is_element('Xx')`` is False."""
    return symbol in _SYMBOLS


#: hydrogen isotopes written as symbols of their own in formulas (mass number)
HYDROGEN_ISOTOPES = {"D": 2, "T": 3}


@lru_cache(maxsize=None)
def average_mass(symbol: str) -> float:
    """Standard atomic weight (g/mol), e.g. ``average_mass('C') -> 12.011``; D and T weigh their isotope's mass."""
    if symbol in HYDROGEN_ISOTOPES:
        return float(_PT.GetMassForIsotope(1, HYDROGEN_ISOTOPES[symbol]))
    return float(_PT.GetAtomicWeight(symbol))


@lru_cache(maxsize=None)
def monoisotopic_mass(symbol: str) -> float:
    """Mass of the most abundant isotope (u), e.g. ``monoisotopic_mass('Cl') -> 34.96885``; for D and T, the
    mass of 2H and 3H."""
    if symbol in HYDROGEN_ISOTOPES:
        return float(_PT.GetMassForIsotope(1, HYDROGEN_ISOTOPES[symbol]))
    return float(_PT.GetMostCommonIsotopeMass(symbol))


def dbe_valence(symbol: str) -> int:
    """Valence counted for DBE; elements not in :data:`DBE_VALENCE` use RDKit's default valence."""
    if symbol in DBE_VALENCE:
        return DBE_VALENCE[symbol]
    return int(_PT.GetDefaultValence(symbol))
