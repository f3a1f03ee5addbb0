"""Conventional ring locants (C2, N1, C4a …) of common heteroaromatic and fused parent rings.

Chemists name a regiochemical outcome by the parent ring's numbering ("the ester went to C3 of the
pyridine", "N2- instead of N1-alkylation of the indazole"), not by atom indices.  Each parent below is a
SMARTS whose atom map numbers are its locants (the fusion atoms 4a/8a and 3a/7a written 45/85 and 35/75),
following the fixed numbering of fused and heteroaromatic parents (IUPAC fused-ring nomenclature, common
practice).  Where the parent is symmetric (pyridine's C2 and C6, benzimidazole's N1 and N3, naphthalene
read from either end) the numbering that gives the lowest locants to the given structure's substituted ring
atoms is taken, so the locants are those a chemist would number that compound with (up to the finer IUPAC
priorities of principal groups and indicated hydrogen, which are not applied).

Benzene is not numbered here: ortho/meta/para to the ring's other substituents says more.

>>> from rdkit import Chem
>>> m = Chem.MolFromSmiles("COC(=O)c1cc(C(F)(F)F)ccn1")     # methyl 4-(trifluoromethyl)picolinate
>>> name, loc = ring_locants(m, {4, 5, 6, 11, 12, 13})
>>> name, loc[4], loc[6], loc[13]
('pyridine', 'C2', 'C4', 'N1')
>>> m = Chem.MolFromSmiles("CCn1ncc2ccc(Cl)cc21")           # 6-chloro-1-ethylindazole
>>> name, loc = ring_locants(m, {2, 3, 4, 5, 6, 7, 8, 10, 11})
>>> name, loc[2], loc[3], loc[8]
('indazole', 'N1', 'N2', 'C6')
"""
from __future__ import annotations

from functools import lru_cache

from rdkit import Chem

#: parent name → SMARTS with locants as atom map numbers (45 = 4a, 85 = 8a, 35 = 3a, 75 = 7a).
PARENTS = {
    "pyridine": "[n:1]1[c:2][c:3][c:4][c:5][c:6]1",
    "pyrimidine": "[n:1]1[c:2][n:3][c:4][c:5][c:6]1",
    "pyrazine": "[n:1]1[c:2][c:3][n:4][c:5][c:6]1",
    "pyridazine": "[n:1]1[n:2][c:3][c:4][c:5][c:6]1",
    "1,3,5-triazine": "[n:1]1[c:2][n:3][c:4][n:5][c:6]1",
    "1,2,4-triazine": "[n:1]1[n:2][c:3][n:4][c:5][c:6]1",
    "pyrrole": "[n:1]1[c:2][c:3][c:4][c:5]1",
    "furan": "[o:1]1[c:2][c:3][c:4][c:5]1",
    "thiophene": "[s:1]1[c:2][c:3][c:4][c:5]1",
    "pyrazole": "[n:1]1[n:2][c:3][c:4][c:5]1",
    "imidazole": "[n:1]1[c:2][n:3][c:4][c:5]1",
    "oxazole": "[o:1]1[c:2][n:3][c:4][c:5]1",
    "thiazole": "[s:1]1[c:2][n:3][c:4][c:5]1",
    "isoxazole": "[o:1]1[n:2][c:3][c:4][c:5]1",
    "isothiazole": "[s:1]1[n:2][c:3][c:4][c:5]1",
    "1,2,3-triazole": "[n:1]1[n:2][n:3][c:4][c:5]1",
    "1,2,4-triazole": "[n:1]1[n:2][c:3][n:4][c:5]1",
    "tetrazole": "[n:1]1[n:2][n:3][n:4][c:5]1",
    "1,2,4-oxadiazole": "[o:1]1[n:2][c:3][n:4][c:5]1",
    "1,3,4-oxadiazole": "[o:1]1[c:2][n:3][n:4][c:5]1",
    "1,3,4-thiadiazole": "[s:1]1[c:2][n:3][n:4][c:5]1",
    "naphthalene": "[c:1]1[c:2][c:3][c:4][c:45]2[c:5][c:6][c:7][c:8][c:85]12",
    "quinoline": "[n:1]1[c:2][c:3][c:4][c:45]2[c:5][c:6][c:7][c:8][c:85]12",
    "isoquinoline": "[c:1]1[n:2][c:3][c:4][c:45]2[c:5][c:6][c:7][c:8][c:85]12",
    "quinazoline": "[n:1]1[c:2][n:3][c:4][c:45]2[c:5][c:6][c:7][c:8][c:85]12",
    "quinoxaline": "[n:1]1[c:2][c:3][n:4][c:45]2[c:5][c:6][c:7][c:8][c:85]12",
    "cinnoline": "[n:1]1[n:2][c:3][c:4][c:45]2[c:5][c:6][c:7][c:8][c:85]12",
    "phthalazine": "[c:1]1[n:2][n:3][c:4][c:45]2[c:5][c:6][c:7][c:8][c:85]12",
    "1,8-naphthyridine": "[n:1]1[c:2][c:3][c:4][c:45]2[c:5][c:6][c:7][n:8][c:85]12",
    "indole": "[n:1]1[c:2][c:3][c:35]2[c:4][c:5][c:6][c:7][c:75]12",
    "indazole": "[n:1]1[n:2][c:3][c:35]2[c:4][c:5][c:6][c:7][c:75]12",
    "benzimidazole": "[n:1]1[c:2][n:3][c:35]2[c:4][c:5][c:6][c:7][c:75]12",
    "benzotriazole": "[n:1]1[n:2][n:3][c:35]2[c:4][c:5][c:6][c:7][c:75]12",
    "benzofuran": "[o:1]1[c:2][c:3][c:35]2[c:4][c:5][c:6][c:7][c:75]12",
    "benzothiophene": "[s:1]1[c:2][c:3][c:35]2[c:4][c:5][c:6][c:7][c:75]12",
    "benzoxazole": "[o:1]1[c:2][n:3][c:35]2[c:4][c:5][c:6][c:7][c:75]12",
    "benzothiazole": "[s:1]1[c:2][n:3][c:35]2[c:4][c:5][c:6][c:7][c:75]12",
    "7-azaindole": "[n:1]1[c:2][c:3][c:35]2[c:4][c:5][c:6][n:7][c:75]12",
    "imidazo[1,2-a]pyridine": "[n:1]1[c:2][c:3][n:4]2[c:5][c:6][c:7][c:8][c:85]12",
}

_FUSION = {45: "4a", 85: "8a", 35: "3a", 75: "7a"}


@lru_cache(maxsize=None)
def _patterns() -> list[tuple[str, Chem.Mol, int]]:
    out = []
    for name, smarts in PARENTS.items():
        q = Chem.MolFromSmarts(smarts)
        out.append((name, q, q.GetNumAtoms()))
    return out


def _label(mol: Chem.Mol, i: int, number: int) -> str:
    return mol.GetAtomWithIdx(i).GetSymbol() + _FUSION.get(number, str(number))


def ring_locants(mol: Chem.Mol, system: set[int]) -> tuple[str, dict[int, str]] | None:
    """(parent name, {atom index: locant such as 'C3', 'N1', 'C4a'}) for a ring system (its atom set) that is
    one of :data:`PARENTS`; None for benzene and any other ring system."""
    size = len(system)
    substituted = {i for i in system if any(n.GetIdx() not in system for n in mol.GetAtomWithIdx(i).GetNeighbors())}
    for name, q, n in _patterns():
        if n != size:
            continue
        best = None
        for match in mol.GetSubstructMatches(q, uniquify=False, useChirality=False):
            if set(match) != system:
                continue
            numbers = {i: q.GetAtomWithIdx(k).GetAtomMapNum() for k, i in enumerate(match)}
            # lowest locants to the substituted positions (fusion atoms 4a etc. sort after their number)
            key = sorted(numbers[i] if numbers[i] < 10 else numbers[i] / 10 for i in substituted)
            if best is None or key < best[0]:
                best = (key, numbers)
        if best is not None:
            return name, {i: _label(mol, i, k) for i, k in best[1].items()}
    return None
