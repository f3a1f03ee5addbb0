"""Structures as they come from a compound registry or a vendor's catalogue, made ready to predict.

:func:`standardise` keeps the largest organic fragment (counterions, solvent of crystallisation and
water are set aside), neutralises charges where a neutral form exists (RDKit's ``rdMolStandardize``
uncharger: a carboxylate becomes the acid, an ammonium the amine; a quaternary ammonium or a
nitro group stays as drawn), reads deuterium and other isotope labels as the plain element (remembering
which atoms carried 2H or 3H: :mod:`.labels`), and
says what it did, one note per change.  Radicals and carbenes, metals bound to carbon
(organometallics) and structures past the size limit are refused with a clear message.

Atom indices of the parent are mapped back to the input's own atom order (``atom_map``), so that
predictions and assignment tables keep speaking of the atoms the user drew.

>>> s = standardise(Chem.MolFromSmiles("CC(=O)[O-].[Na+]"), "input")
>>> Chem.MolToSmiles(s.mol), s.notes
('CC(=O)O', ['set aside the fragment(s) [Na+] (counterion, solvent or water); kept CC(=O)[O-]', 'neutralised: CC(=O)[O-] → CC(=O)O'])
"""
from __future__ import annotations

from dataclasses import dataclass, field

from rdkit import Chem
from rdkit.Chem.MolStandardize import rdMolStandardize

from ..errors import InputError
from .labels import label_pairs, set_labels, strip_labelled_hydrogens

#: Largest molecule (heavy atoms) the tool describes and predicts; beyond it the request is refused.
MAX_HEAVY_ATOMS = 250
_METALS = frozenset({3, 4, 11, 12, 13, 19, 20, *range(21, 31), 37, 38, *range(39, 49), 55, 56, *range(57, 81), 81, 82, 83})


@dataclass
class Standardised:
    """The parent structure, the input index of each of its atoms, and what was done."""

    mol: Chem.Mol
    atom_map: list[int]                     # parent atom index -> input atom index
    notes: list[str] = field(default_factory=list)

    @property
    def changed(self) -> bool:
        return bool(self.notes)


def _smiles(m: Chem.Mol) -> str:
    try:
        return Chem.MolToSmiles(m)
    except Exception:  # noqa: BLE001
        return "?"


def check_open_shell(mol: Chem.Mol, label: str) -> None:
    """Refuse radicals and carbenes: the shift models know closed-shell molecules only."""
    bad = [a for a in map(mol.GetAtomWithIdx, range(mol.GetNumAtoms())) if a.GetNumRadicalElectrons()]
    if bad:
        a = bad[0]
        raise InputError(f"{label}: atom {a.GetIdx()} ({a.GetSymbol()}) carries {a.GetNumRadicalElectrons()} unpaired "
                         "electron(s): radicals and carbenes are not supported (write the closed-shell molecule, "
                         "e.g. with its hydrogens)")


def check_organometallic(mol: Chem.Mol, label: str) -> None:
    for b in mol.GetBonds():
        z1, z2 = b.GetBeginAtom().GetAtomicNum(), b.GetEndAtom().GetAtomicNum()
        if (z1 in _METALS and z2 == 6) or (z2 in _METALS and z1 == 6):
            metal = b.GetBeginAtom() if z1 in _METALS else b.GetEndAtom()
            raise InputError(f"{label}: {metal.GetSymbol()} is bonded to carbon: organometallic compounds are not "
                             "supported")
    # the same compounds drawn as ions: a carbanion beside a metal cation (butyllithium as [CH2-]CCC.[Li+],
    # ferrocene as two cyclopentadienides and Fe2+) is not a salt whose counter-ion can be set aside
    metals = [a for a in mol.GetAtoms() if a.GetAtomicNum() in _METALS]
    # (a C− beside a cation, as in an isocyanide R–N+≡C− or an ylide, is a zwitterion, not a carbanion)
    carbanion = next((a for a in mol.GetAtoms() if a.GetAtomicNum() == 6 and a.GetFormalCharge() < 0
                      and not any(n.GetFormalCharge() > 0 for n in a.GetNeighbors())), None)
    if metals and carbanion is not None:
        raise InputError(f"{label}: a carbanion (atom {carbanion.GetIdx()}) beside {metals[0].GetSymbol()}: a metal "
                         "compound drawn as ions (an organometallic or a metal cyanide), which is not supported")


def plain(smiles: str) -> bool:
    """True for a SMILES that standardisation cannot change: one fragment and no bracket atom (charges,
    isotopes, radicals and explicit hydrogens all need brackets), so the parent is the molecule itself."""
    return "." not in smiles and "[" not in smiles


def standardise(mol: Chem.Mol, label: str = "structure") -> Standardised:
    """The organic parent of ``mol`` with notes (see the module text); raises :class:`InputError` for
    what cannot be predicted."""
    if mol.GetNumAtoms() == 0:
        raise InputError(f"{label}: no atoms")
    check_open_shell(mol, label)
    check_organometallic(mol, label)
    notes: list[str] = []
    atom_map = list(range(mol.GetNumAtoms()))
    frag_atoms = Chem.GetMolFrags(mol, asMols=False, sanitizeFrags=False)
    if len(frag_atoms) > 1:
        organic = [f for f in frag_atoms if any(mol.GetAtomWithIdx(i).GetAtomicNum() == 6 for i in f)]
        if not organic:
            raise InputError(f"{label}: no fragment contains carbon")
        keep = max(organic, key=lambda f: (sum(1 for i in f if mol.GetAtomWithIdx(i).GetAtomicNum() > 1), len(f)))
        rest = [f for f in frag_atoms if f is not keep]
        dropped = [Chem.MolFragmentToSmiles(mol, list(f)) for f in rest]
        rw = Chem.RWMol(mol)
        for i in sorted((i for f in rest for i in f), reverse=True):
            rw.RemoveAtom(i)
        parent = rw.GetMol()
        try:
            Chem.SanitizeMol(parent)
        except Exception as exc:  # noqa: BLE001
            raise InputError(f"{label}: the main fragment cannot be sanitised ({exc})") from None
        atom_map = sorted(keep)
        notes.append(f"set aside the fragment(s) {', '.join(dropped)} (counterion, solvent or water); kept "
                     f"{Chem.MolFragmentToSmiles(mol, list(keep))}")
        mol = parent
    if mol.GetNumHeavyAtoms() > MAX_HEAVY_ATOMS:
        raise InputError(f"{label}: {mol.GetNumHeavyAtoms()} heavy atoms; the limit is {MAX_HEAVY_ATOMS}")
    atoms = list(map(mol.GetAtomWithIdx, range(mol.GetNumAtoms())))
    iso = [a for a in atoms if a.GetIsotope()]
    labels: dict[int, tuple[int, int]] = {}
    if iso:
        mol = Chem.Mol(mol)
        deut = [a.GetIdx() for a in mol.GetAtoms() if a.GetAtomicNum() == 1 and a.GetIsotope()]
        for a in mol.GetAtoms():
            if a.GetAtomicNum() > 1:
                a.SetIsotope(0)
        names = sorted({f"{a.GetIsotope()}{a.GetSymbol()}" for a in iso})
        notes.append(f"isotope labels ({', '.join(names)}) read as the plain elements for prediction")
        if deut:
            # explicit [2H]/[3H] atoms become ordinary hydrogens, removed like any explicit H; how many
            # each heavy atom carried is kept (:mod:`.labels`: they give no 1H line and no DEPT/HSQC proton)
            mol, heavy_before = strip_labelled_hydrogens(mol)
            labels = label_pairs(mol)
            atom_map = [atom_map[i] for i in heavy_before]
    charged = any(a.GetFormalCharge() for a in map(mol.GetAtomWithIdx, range(mol.GetNumAtoms())))
    if charged:
        before = _smiles(mol)
        try:
            neutral = rdMolStandardize.Uncharger().uncharge(mol)
        except Exception:  # noqa: BLE001 - keep the molecule as drawn when RDKit cannot neutralise it
            neutral = mol
        after = _smiles(neutral)
        if after != before and neutral.GetNumAtoms() == mol.GetNumAtoms() and Chem.MolFromSmiles(after) is None:
            # (a cyclopentadienide loses its charge but not its aromatic flags: no valid structure)
            raise InputError(f"{label}: {before} has no neutral form that is a valid structure; give the neutral "
                             "compound") from None
        if after != before and neutral.GetNumAtoms() == mol.GetNumAtoms():
            notes.append(f"neutralised: {before} → {after}")
            mol = neutral
    if labels:
        set_labels(mol, labels)   # the uncharger may have made a new molecule
        n_lab = sum(d + t for d, t in labels.values())
        notes.append(f"{n_lab} hydrogen isotope label(s) on atom(s) {', '.join(str(atom_map[i]) for i in sorted(labels))}: "
                     "no 1H signal and no DEPT/HSQC proton there, counted as D/T in formula and mass")
    return Standardised(mol, atom_map, notes)
