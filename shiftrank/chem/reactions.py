"""Named reaction templates for ``isomers --reaction NAME``: the regiochemistry questions a chemist asks most,
without writing reaction SMARTS.

Each template is a reaction SMARTS (RDKit's reaction engine runs it on the reactants and every way it can
apply is an outcome), written here from the textbook reaction types (common practice): the leaving groups are
those the reactions usually use, and the nucleophile is any heteroatom that carries an H (for alkylation and
acylation also the ring C-H of an NH-pyrrole or -indole, which such agents take as well).  A template applies
at every matching site; which site a real reaction prefers is the question the spectra answer.  Where the
reacting heteroatom can carry its H on another atom (an NH-azole's N1 or N2, a 2-pyridone's N or O), the
reactants' NH/OH tautomers are run too, so both sites are offered.
"""
from __future__ import annotations

from dataclasses import dataclass

#: a leaving group on carbon: halides and sulfonates (OTf, OMs, OTs)
_LG = "[Cl,Br,I,$(O-S(=O)(=O)[#6])]"
#: an aryl (pseudo)halide's leaving group for cross-couplings
_ARYL_LG = "[Cl,Br,I,$(O-S(=O)(=O)C(F)(F)F)]"
#: a ring C-H of an NH-pyrrole or -indole (a five-membered aromatic ring whose only heteroatom is its NH): the
#: carbon an alkylating or acylating agent can take instead of the N (C3 of an indole first; common practice)
_PYRROLE_CH = "$([cH;r5]1:c:[nH]:c:c:1),$([cH;r5]1:[nH]:c:c:c:1)"


@dataclass(frozen=True)
class NamedReaction:
    smarts: str
    what: str              # one line for the help text
    tautomers: bool = True  # also run on the reactants' NH/OH tautomers
    label: str = ""        # how a product's relation names the reaction ('SNAr product at …'); the key when empty


REACTIONS = {
    "snar": NamedReaction(
        "[c:1]-[F,Cl,Br,I].[#7,#8,#16;!$(*-[C,S,P]=[O,S,N]);!H0:2]>>[c:1]-[*:2]",
        "SNAr: an N-, O- or S-H nucleophile replaces an aryl halide", label="SNAr"),
    "buchwald": NamedReaction(
        f"[c:1]-{_ARYL_LG}.[#7;!$(*-[C,S,P]=[O,S,N]);!H0:2]>>[c:1]-[*:2]",
        "C-N coupling: an N-H amine or azole on an aryl (pseudo)halide", label="C–N coupling"),
    "suzuki": NamedReaction(
        f"[c:1]-{_ARYL_LG}.[#6:2]-[B]>>[c:1]-[#6:2]",
        "C-C coupling: a boronic acid, ester or trifluoroborate on an aryl (pseudo)halide", tautomers=False, label="Suzuki coupling"),
    "sonogashira": NamedReaction(
        f"[c:1]-{_ARYL_LG}.[CH:2]#[C:3]>>[c:1]-[C:2]#[C:3]",
        "C-C coupling: a terminal alkyne on an aryl (pseudo)halide", tautomers=False, label="Sonogashira coupling"),
    "chan-lam": NamedReaction(
        "[#7,#8;!$(*-[C,S]=[O,S]);!H0:1].[c:2]-[B]>>[*:1]-[c:2]",
        "N- or O-arylation by an aryl boronic acid or ester (an NH-azole at either N)", label="Chan–Lam coupling"),
    "mitsunobu": NamedReaction(
        "[#7,#8,#16;!H0:1].[CX4:2]-[OH]>>[*:1]-[*:2]",
        "an alcohol's carbon on an acidic N-, O- or S-H (a 2-pyridone at N or O)", label="Mitsunobu"),
    "alkylation": NamedReaction(
        f"[#7,#8,#16,{_PYRROLE_CH};!H0:1].[CX4:2]-{_LG}>>[*:1]-[*:2]",
        "alkylation of an N-, O- or S-H (or of an NH-pyrrole's or -indole's ring C-H) by an alkyl halide or sulfonate"),
    "n-alkylation": NamedReaction(
        f"[#7;!H0:1].[CX4:2]-{_LG}>>[*:1]-[*:2]",
        "alkylation of an N-H by an alkyl halide or sulfonate", label="N-alkylation"),
    "o-alkylation": NamedReaction(
        f"[#8;!H0:1].[CX4:2]-{_LG}>>[*:1]-[*:2]",
        "alkylation of an O-H by an alkyl halide or sulfonate", label="O-alkylation"),
    "acylation": NamedReaction(
        f"[#7,#8,{_PYRROLE_CH};!H0;!$(*-C=O):1].[C:2](=[O:3])-[Cl,Br,$(O-C=O),$(O-c),OH]>>[*:1]-[C:2]=[O:3]",
        "acylation of an N- or O-H (or of an NH-pyrrole's or -indole's ring C-H) by an acid chloride, anhydride, aryl ester or acid"),
    # electrophilic substitution of an aromatic C-H (one reactant, the substrate): every ring CH a reagent could
    # have taken
    "bromination": NamedReaction("[cH:1]>>[c:1]-Br", "an aromatic C-H brominated (Br2, NBS)", tautomers=False),
    "chlorination": NamedReaction("[cH:1]>>[c:1]-Cl", "an aromatic C-H chlorinated (Cl2, NCS)", tautomers=False),
    "iodination": NamedReaction("[cH:1]>>[c:1]-I", "an aromatic C-H iodinated (I2, NIS)", tautomers=False),
    "nitration": NamedReaction("[cH:1]>>[c:1]-[N+](=O)[O-]", "an aromatic C-H nitrated", tautomers=False),
    "sulfonylation": NamedReaction(
        "[#7,#8;!H0:1].[S:2](=[O:3])(=[O:4])-[F,Cl]>>[*:1]-[S:2](=[O:3])=[O:4]",
        "sulfonylation of an N- or O-H by a sulfonyl chloride or fluoride"),
}


def named_reaction(name: str) -> NamedReaction | None:
    """The template of a reaction name ('SNAr', 'n-alkylation', 'N_alkylation' …), or None."""
    key = name.strip().lower().replace("_", "-").replace(" ", "-")
    return REACTIONS.get(key)


def reaction_names() -> str:
    """The names, for help texts and errors."""
    return ", ".join(REACTIONS)
