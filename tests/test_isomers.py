"""Generated alternatives against hand enumeration (molecules of our own choosing).

Counting rules (common practice): positional isomers of a substituted benzene are the distinct
arrangements of its substituents up to the ring's symmetry; an N-alkyl azole has one alternative per
other ring N that can carry the group; an N-alkyl 2-pyridone has its O-alkyl (2-alkoxypyridine)
alternative, and the other way round.
"""
import gzip
import json

import pytest
from rdkit import Chem

from shiftrank.chem.isomers import compound_key, isomers, structure_key
from shiftrank.errors import InputError


def keys(alts):
    return {structure_key(Chem.MolFromSmiles(a.smiles)) for a in alts}


def key(smi):
    return structure_key(Chem.MolFromSmiles(smi))


def test_trisubstituted_benzene_gives_the_five_other_dichlorotoluenes():
    # 2,4-dichlorotoluene: the six dichlorotoluenes are 2,3-, 2,4-, 2,5-, 2,6-, 3,4- and 3,5- (hand count);
    # one move or one swap reaches each of the other five
    alts = isomers("Cc1ccc(Cl)cc1Cl", kinds=("positional",))
    expected = {key(s) for s in ("Cc1cccc(Cl)c1Cl", "Cc1cc(Cl)ccc1Cl", "Cc1c(Cl)cccc1Cl", "Cc1ccc(Cl)c(Cl)c1",
                                 "Cc1cc(Cl)cc(Cl)c1")}
    assert keys(alts) == expected and len(alts) == 5


def test_n_alkyl_indazole_gives_its_n2_isomer():
    alts = isomers("CCn1ncc2ccccc21")
    assert keys(alts) == {key("CCn1cc2ccccc2n1")}
    assert alts[0].kind == "ambident"
    # named by the indazole's ring numbering (N1 beside the ring fusion C7a, N2 between N1 and C3-H: IUPAC
    # fused-ring numbering, common practice) and by their ring neighbours
    assert alts[0].relation == ("C2H5 on N2 of the indazole (atom 3, between CH and N) instead of N1 (atom 2, "
                                "between N and the ring fusion)")
    # a 1-ethylindazole with no numbering table (a group the locant table lacks: a pyrazolo[3,4-c]pyridine) keeps
    # the neighbour description alone
    alts = isomers("CCn1ncc2ccncc21", kinds=("ambident",))
    assert alts and alts[0].relation.startswith("C2H5 on ring N (atom 3, between CH and N) instead of ring N (atom 2")


def test_benzimidazole_n_sites_named_by_the_substituent_beside_the_fusion():
    # 4-chloro-1-methylbenzimidazole against 7-chloro-1-methylbenzimidazole (hand drawn): the methyl moves to
    # the N whose fusion carbon stands next to C-Cl
    alts = isomers("Cn1cnc2c1cccc2Cl", kinds=("ambident",))
    assert keys(alts) == {key("Cn1cnc2cccc(Cl)c21")}
    assert "on N3 of the benzimidazole (atom 3, between CH and the ring fusion next to C-Cl)" in alts[0].relation


def test_pyridone_n_and_o_alkylation_both_ways():
    assert keys(isomers("Cn1ccccc1=O")) == {key("COc1ccccn1")}
    n_alt = [a for a in isomers("COc1ccccn1") if a.kind == "ambident"]
    assert keys(n_alt) == {key("Cn1ccccc1=O")} and "N-alkyl instead of O-alkyl" in n_alt[0].relation


def test_naphthalene_substituent_visits_the_other_position():
    # 1-methylnaphthalene: 2-methylnaphthalene is the only other methylnaphthalene (hand count)
    assert keys(isomers("Cc1cccc2ccccc12")) == {key("Cc1ccc2ccccc2c1")}


def test_halogen_visits_ring_carbons_but_not_the_indole_nh():
    # 5-chloroindole: Cl at C2, C3, C4, C6 or C7 (hand count: the five other ring CH of indole); an
    # N-chloroindole is a chlorinating reagent, not a ring-substitution product (common practice)
    assert keys(isomers("Clc1ccc2[nH]ccc2c1", kinds=("positional",))) == {
        key(s) for s in ("Clc1cc2ccccc2[nH]1", "Clc1c[nH]c2ccccc12", "Clc1cccc2[nH]ccc12", "Clc1ccc2cc[nH]c2c1",
                         "Clc1cccc2cc[nH]c12")}
    # a carbon group still may move onto it (N- against C-arylation): 5-phenylindole gives 1-phenylindole
    assert key("c1ccc(-n2ccc3ccccc32)cc1") in keys(isomers("c1ccc(-c2ccc3[nH]ccc3c2)cc1", kinds=("positional",)))


def test_relations_name_common_groups_by_condensed_formula():
    # 4-methoxybenzonitrile: CN, OCH3 as chemists write them (common practice); a group without a
    # condensed name keeps its SMILES
    assert [a.relation for a in isomers("N#Cc1ccc(OC)cc1", kinds=("positional",))] == [
        "CN moved from ring atom 2 to ring atom 3 (now meta to OCH3)",
        "CN moved from ring atom 2 to ring atom 4 (now ortho to OCH3)"]
    assert any(a.relation.startswith("OC(C)C moved") for a in isomers("CC(C)Oc1ccc(-c2ccncc2)cc1"))
    # a benzene ring with one named group is named by its position (4-Cl-C6H4); a pyridine by its bond
    rel = [a.relation for a in isomers("Cc1ccc(-c2ccc(Cl)cc2)cc1", kinds=("positional",))]
    assert "CH3 moved from ring atom 1 to ring atom 2 (now meta to 4-Cl-C6H4)" in rel
    assert any(r.startswith("Cl moved") and "4-CH3-C6H4)" in r for r in rel)   # the smaller group moves
    assert any("(now para to 4-pyridyl)" in a.relation for a in isomers("COc1cccc(-c2ccncc2)c1"))
    # methyl 3-amino-4-methoxybenzoate (own choice): where a moved group stands against both others, by hand
    rel = [a.relation for a in isomers("COC(=O)c1ccc(OC)c(N)c1", kinds=("positional",))]
    assert "OCH3 moved from ring atom 7 to ring atom 5 (now ortho to CO2CH3, para to NH2)" in rel
    # a terphenyl's end groups: the ring on a ring named the same way, nested
    assert any("(now meta to 4-(4-F-C6H4)-C6H4)" in a.relation
               for a in isomers("N#Cc1ccc(-c2ccc(-c3ccc(F)cc3)cc2)cc1", kinds=("positional",)))
    # N-linked rings by their usual names (common practice)
    assert [a.relation for a in isomers("Cc1ccc(N2C(=O)C=CC2=O)cc1", kinds=("positional",))] == [
        "CH3 moved from ring atom 1 to ring atom 2 (now meta to maleimido)",
        "CH3 moved from ring atom 1 to ring atom 3 (now ortho to maleimido)"]
    assert any(a.relation.startswith("morpholin-4-yl moved") for a in isomers("O=[N+]([O-])c1ccc(N2CCOCC2)cc1F"))
    # amides, benzoyl and sulfonamide groups by their condensed formulas (common practice)
    rel = [a.relation for a in isomers("O=C(Nc1ccccc1)c1ccc(Br)cn1", kinds=("positional",))]
    assert "CONHC6H5 moved from C2 to C3 of the pyridine (atom 9 to atom 10; now meta to Br)" in rel
    assert any(a.relation.startswith("NHSO2CH3 moved") for a in isomers("CS(=O)(=O)Nc1ccc(C(=O)c2ccccc2)cc1"))


def test_dicarbonyl_c_and_o_alkylation():
    assert keys(isomers("CC(=O)C(C)C(C)=O", kinds=("ambident",))) == {key("COC(C)=CC(C)=O")}


def test_nh_azole_tautomers_are_one_compound():
    # Annular tautomerism (common practice; the mobile-H layer of the standard InChI encodes it): 5- and
    # 6-methyl-1H-benzimidazole are one compound, as are the 4- and 7-methyl drawings.  Hand count for
    # 5-methylbenzimidazole: the methyl at C4 (= C7), at C2 or on N1 - three other compounds; the 6- and
    # 7-methyl drawings are generated too (their predictions differ) but are labelled as the same compounds
    alts = isomers("Cc1ccc2[nH]cnc2c1", kinds=("positional",))
    other = [a for a in alts if a.same_compound_as is None]
    twins = [a for a in alts if a.same_compound_as is not None]
    assert {compound_key(Chem.MolFromSmiles(a.smiles)) for a in other} == {
        compound_key(Chem.MolFromSmiles(s)) for s in ("Cc1cccc2[nH]cnc12", "Cc1nc2ccccc2[nH]1", "Cn1cnc2ccccc21")}
    assert len(other) == 3 and len(twins) == 2
    assert {key(a.smiles) for a in alts} >= {key("Cc1ccc2nc[nH]c2c1"), key("Cc1cccc2nc[nH]c12")}
    for a in twins:
        assert compound_key(Chem.MolFromSmiles(a.smiles)) == compound_key(Chem.MolFromSmiles(a.same_compound_as))
        assert "drawn as another NH/OH tautomer (the same compound)" in a.relation
        assert a.to_dict()["same_compound_as"] == a.same_compound_as
    given_twin = [a for a in twins if a.same_compound_as == "Cc1ccc2[nH]cnc2c1"]
    assert len(given_twin) == 1 and given_twin[0].relation.startswith("the given structure")
    assert "same_compound_as" not in other[0].to_dict()
    # ethyl imidazole-4-carboxylate: "moved to C5" is the same compound; C2 and N1 are other compounds
    alts = isomers("CCOC(=O)c1cnc[nH]1", kinds=("positional",))
    assert {key(a.smiles) for a in alts if a.same_compound_as is None} == {key("CCOC(=O)c1ncc[nH]1"),
                                                                          key("CCOC(=O)n1ccnc1")}
    assert [key(a.smiles) for a in alts if a.same_compound_as] == [key("CCOC(=O)c1c[nH]cn1")]
    # keto and enol forms at carbon are not merged (two compounds on the NMR time scale, common practice)
    assert compound_key(Chem.MolFromSmiles("CC(=O)CC(C)=O")) != compound_key(Chem.MolFromSmiles("CC(O)=CC(C)=O"))
    # asked for on purpose, tautomers are plain tautomers
    taut = isomers("Cc1ccc2[nH]cnc2c1", kinds=("tautomer",))
    assert key("Cc1ccc2nc[nH]c2c1") in keys(taut) and all(a.same_compound_as is None for a in taut)


def test_given_structure_and_duplicates_are_not_repeated():
    alts = isomers("Cc1ccc(C)cc1", kinds=("positional",))   # p-xylene: o- and m-xylene only
    assert keys(alts) == {key("Cc1ccccc1C"), key("Cc1cccc(C)c1")}


def test_reaction_smarts_products_and_errors():
    alts = isomers(None, kinds=(), reaction="[c:1][OH:2].[CH3:3][Br]>>[c:1][O:2][CH3:3]", reactants="Oc1ccc(O)cc1.CBr")
    assert keys(alts) == {key("COc1ccc(O)cc1")}
    with pytest.raises(InputError, match="takes 2 reactant"):
        isomers(None, kinds=(), reaction="[c:1][OH:2].[CH3:3][Br]>>[c:1][O:2][CH3:3]", reactants="Oc1ccccc1")
    with pytest.raises(InputError, match="kind 'regio'"):
        isomers("c1ccccc1C", kinds=("regio",))
    with pytest.raises(InputError, match="more than 3 alternatives"):
        isomers("Cc1ccc(Cl)cc1Br", kinds=("positional",), limit=3)


def test_development_regio_cases_are_reproduced(shared_data):
    """Every candidate of the development regio cases is a one-substituent move of the truth."""
    missing = []
    with gzip.open(shared_data / "dev_cases_regio.jsonl.gz", "rt") as f:
        for n, line in enumerate(f):
            if n >= 300:
                break
            c = json.loads(line)
            alts = [a.smiles for a in isomers(c["truth"], kinds=("positional",))] + [c["truth"]]
            made = {key(s) for s in alts}
            # a candidate that is only an NH tautomer of a generated structure is the same compound
            compounds = {compound_key(Chem.MolFromSmiles(s)) for s in alts}
            missing += [s for s in c["candidates"] if key(s) not in made
                        and compound_key(Chem.MolFromSmiles(s)) not in compounds]
    assert not missing, missing[:5]


def test_ranking_with_isomers_labels_the_candidates_own_tautomer():
    # rank --with-isomers: the 5-carboxylate drawing of ethyl 1H-imidazole-4-carboxylate is the same compound
    # (annular tautomerism, common practice): it is ranked, but its relation must not read as another product
    from shiftrank.score.ranking import expand_with_isomers

    given = "CCOC(=O)c1cnc[nH]1"
    cands, notes = expand_with_isomers([given])
    named = {key(c[1]): c[0] for c in cands if isinstance(c, tuple)}
    assert named[key("CCOC(=O)c1c[nH]cn1")].startswith("the given structure drawn as another NH/OH tautomer")
    assert "moved" in named[key("CCOC(=O)c1ncc[nH]1")]
    assert "1 of them a candidate or an alternative drawn as another NH/OH tautomer" in notes[0]
    # generated from one candidate, the tautomer of another given candidate is labelled as that candidate
    cands, notes = expand_with_isomers(["CCOC(=O)c1ncc[nH]1", "CCOC(=O)c1c[nH]cn1"])
    labels = [c[0] for c in cands if isinstance(c, tuple) and key(c[1]) == key(given)]
    assert labels and labels[0].startswith("candidate CCOC(=O)c1c[nH]cn1 drawn as another NH/OH tautomer")


def test_candidates_drawn_as_tautomers_of_one_compound_are_grouped():
    # the probabilities of one compound's NH tautomer drawings add up (annular tautomerism, common practice);
    # regioisomers and other compounds stay apart, whatever their probabilities
    from shiftrank.score.ranking import CandidateResult, tautomer_groups, verdict

    cands = [CandidateResult("CCOC(=O)c1c[nH]cn1", 0, probability=0.5),
             CandidateResult("CCOC(=O)c1ncc[nH]1", 1, probability=0.2),
             CandidateResult("CCOC(=O)c1cnc[nH]1", 2, probability=0.2),
             CandidateResult("CCOC(=O)c1ccccc1", 3, probability=0.1)]
    groups = tautomer_groups(cands)
    assert [[c.position for c in g] for g in groups] == [[0, 2]]
    v = verdict(cands, ())
    assert v.startswith("leaning to CCOC(=O)c1c[nH]cn1 (p = 0.50; drawn as CCOC(=O)c1cnc[nH]1 it is the same compound")
    assert "together p = 0.70)" in v
    # decided as a compound: two drawings at 0.5 and 0.45 make one clear winner, not an undecided pair
    cands[1].probability, cands[2].probability, cands[3].probability = 0.03, 0.45, 0.02
    assert verdict(cands, ()).startswith("clear winner: CCOC(=O)c1c[nH]cn1 (p = 0.50; drawn as")


def test_large_groups_are_named_by_formula_not_cut_off_smiles():
    # 1-(4-anisoyl)-4-(4-chlorophenyl)piperazine, hand count: Cl to C2 or C3 of its ring, next to the
    # anisoylpiperazinyl group C4H8N2 + C8H7O2 = C12H15N2O2; OCH3 to C2 or C3 of the anisyl ring, next to the
    # (chlorophenyl)piperazine-carbonyl group, C6H4Cl + C4H8N2 + CO = C11H12ClN2O.  Each large group is named
    # by its formula and the atom it is bound through
    labels = [a.relation for a in isomers("Clc1ccc(N2CCN(C(=O)c3ccc(OC)cc3)CC2)cc1", kinds=("positional",))]
    assert len(labels) == 4 and not any("…" in r for r in labels)
    assert sum("Cl moved" in r and "C12H15N2O2 group (bound through atom 5)" in r for r in labels) == 2
    # on the anisyl ring the smaller group, OCH3, is the one named as moved
    assert sum(r.startswith("OCH3 moved") and "C11H12ClN2O group (bound through atom 9)" in r for r in labels) == 2


def test_tautomers_keep_aromatic_rings_and_name_the_moved_h():
    # common practice: phenol's cyclohexadienone forms and an indole's 3H-forms are not proposed as structures;
    # 2-hydroxypyridine's lactam (2-pyridone) is, with the H moved from O (atom 0) to N (atom 6)
    assert isomers("Oc1ccccc1", kinds=("tautomer",)) == []
    alts = isomers("Oc1ccccn1", kinds=("tautomer",))
    assert keys(alts) == {key("O=c1cccc[nH]1")} and alts[0].relation == "tautomer: H moved from O (atom 0) to N1 of the pyridine (atom 6)"
    indole = isomers("CC(=O)c1ccc2[nH]ccc2c1", kinds=("tautomer",))
    assert all(Chem.MolFromSmiles(a.smiles).GetRingInfo().NumRings() == 2 for a in indole)
    assert all(sum(at.GetIsAromatic() for at in Chem.MolFromSmiles(a.smiles).GetAtoms()) == 9 for a in indole)
    # keto/enol of a 1,3-dicarbonyl stays available on request
    assert key("CC(=O)C=C(C)O") in keys(isomers("CC(=O)CC(C)=O", kinds=("tautomer",)))


def test_n_against_o_acylation_of_a_bifunctional_nucleophile():
    # which nucleophile took the acyl group (chemoselectivity, common practice); molecules of our own choosing.
    # 1-acetylpiperidin-4-ol: its one alternative is 4-piperidyl acetate, and back
    alts = isomers("CC(=O)N1CCC(O)CC1", kinds=("ambident",))
    assert keys(alts) == {key("CC(=O)OC1CCNCC1")}
    assert alts[0].relation == "O-acyl instead of N-acyl (COCH3 moved from N atom 3 to O atom 7)"
    assert keys(isomers("CC(=O)OC1CCNCC1", kinds=("ambident",))) == {key("CC(=O)N1CCC(O)CC1")}
    # N-Boc against the O-Boc carbonate of 4-aminophenol
    assert keys(isomers("CC(C)(C)OC(=O)Nc1ccc(O)cc1", kinds=("ambident",))) == {key("CC(C)(C)OC(=O)Oc1ccc(N)cc1")}
    # a diol monoester: the other hydroxy (propane-1,2-diol 1-acetate against 2-acetate)
    alts = isomers("CC(=O)OCC(C)O", kinds=("ambident",))
    assert keys(alts) == {key("CC(=O)OC(C)CO")} and alts[0].relation.startswith("acyl on another O")
    # no free N-H or O-H: nothing to move to; a methyl ester's methyl is not an acyl group; an anilide's
    # N-H is not a free amine
    assert isomers("CC(=O)Nc1ccccc1", kinds=("ambident",)) == []
    assert isomers("COC(=O)c1ccccc1O", kinds=("ambident",)) == []


def test_n_alkylation_of_a_3_5_disubstituted_pyrazole_is_named_as_such():
    # Alkylating ethyl 5-methyl-1H-pyrazole-3-carboxylate gives the 1,3- and the 1,5-isomer (common practice);
    # the other ring N is also what swapping the ester and the methyl gives, and the N-alkyl reading leads
    alts = {a.smiles: a for a in isomers("CCOC(=O)c1cc(C)n(CC2CC2)n1")}
    other_n = alts[Chem.MolToSmiles(Chem.MolFromSmiles("CCOC(=O)c1cc(C)nn1CC1CC1"))]
    assert other_n.kind == "ambident"
    assert other_n.relation.startswith("CH2cPr on N2 of the pyrazole") and "the same as: CO2C2H5 and CH3 swapped" in other_n.relation
    assert len(alts) == 3


def test_a_salt_keeps_its_counter_ion_and_the_given_atom_numbers():
    # sodium 4-methylbenzenesulfonate written with the cation first: the alternatives are the 2- and
    # 3-methyl salts (hand count), labelled in the given SMILES's atom numbers (the methyl is atom 1)
    alts = isomers("[Na+].Cc1ccc(S(=O)(=O)[O-])cc1")
    assert sorted(a.smiles for a in alts) == sorted(["Cc1cccc(S(=O)(=O)[O-])c1.[Na+]", "Cc1ccccc1S(=O)(=O)[O-].[Na+]"])
    assert all(a.relation.startswith("CH3 moved from ring atom 2 to ring atom") and "SO3−" in a.relation for a in alts)


def test_a_group_moved_off_a_charged_ring_n_is_labelled_and_not_ranked():
    # 2-methylpyridine N-oxide: moving the O off the N+ leaves an unpaired electron (not a product); the
    # one-substituent rule still lists it (the development cases were built by that rule)
    alts = isomers("Cc1cccc[n+]1[O-]")
    odd = [a for a in alts if "unpaired electron" in a.relation]
    assert len(alts) == 7 and len(odd) == 4 and all(a.relation.startswith("O− moved from N1 to C") for a in odd)
    from shiftrank.score.ranking import expand_with_isomers
    out, notes = expand_with_isomers(["Cc1cccc[n+]1[O-]"])
    assert len(out) == 1 + 3 and "4 with an unpaired electron" in notes[0]


@pytest.mark.parametrize("smiles,expected", [
    ("C[C@H](N)C(=O)O", set()),                                   # alanine: no enol/imine forms listed
    ("CC(=O)Nc1ccc(O)cc1", {"CC(O)=Nc1ccc(O)cc1"}),              # paracetamol: the imidic acid only
    ("CC(=O)C(C)C(C)=O", {"CC(=O)C(C)=C(C)O"}),                  # a 1,3-diketone: its enol (common practice)
])
def test_listed_tautomers_move_h_between_heteroatoms_or_enolise_a_13_dicarbonyl(smiles, expected):
    assert {a.smiles for a in isomers(smiles, kinds=("tautomer",))} == expected


def test_moved_groups_keep_their_stereocentres():
    # RDKit reads a chiral tag against the order of an atom's bonds: a group moved by re-bonding must keep its
    # configuration (trans-1-aryl-4-methylcyclohexane stays trans; (S)-1-arylethylamine stays (S))
    def canon(s):
        return Chem.MolToSmiles(Chem.MolFromSmiles(s))
    got = {a.smiles for a in isomers("C[C@@H]1CC[C@H](c2ccc(F)cc2)CC1")}
    assert got == {canon("C[C@@H]1CC[C@H](c2cccc(F)c2)CC1"), canon("C[C@@H]1CC[C@H](c2ccccc2F)CC1")}
    got = {a.smiles for a in isomers("C[C@H](N)c1ccc(Cl)cc1")}
    assert got == {canon("C[C@H](N)c1cccc(Cl)c1"), canon("C[C@H](N)c1ccccc1Cl")}
    # N- to O-alkylation of a 2-pyridone by a chiral 1-phenylethyl group: the same spatial arrangement
    (alt,) = [a for a in isomers("O=C1C=CC=CN1[C@@H](C)c1ccccc1") if a.kind == "ambident"]
    assert alt.smiles == canon("C[C@H](Oc1ccccn1)c1ccccc1")


def test_c_against_o_alkylation_moves_the_alkyl_group_not_a_ring_carbon():
    # 2-acetyl-2-methylcyclopentan-1-one: the methyl put on C2 could have gone to either carbonyl O (two enol
    # ethers, hand count; common practice); the ring's own CH2 is no alkylating agent (no ring-expanded ethers)
    alts = isomers("CC(=O)C1(C)CCCC1=O", kinds=("ambident",))
    def canon(s):
        return Chem.MolToSmiles(Chem.MolFromSmiles(s))
    assert {a.smiles for a in alts} == {canon("COC(C)=C1CCCC1=O"), canon("COC1=C(C(C)=O)CCC1")}


def test_generated_alternatives_carry_their_relation_in_json():
    # a script reading batch output tells the given structure from the alternatives added by with_isomers
    from shiftrank.score.ranking import rank

    peaks = [{"shift": s} for s in (166.6, 143.4, 129.5, 129.0, 127.8, 60.7, 21.6, 14.3)]   # as in test_batch_cli
    d = rank(peaks, ["CCOC(=O)c1ccc(C)cc1"], with_isomers=True).to_dict()
    given = [c for c in d["ranking"] if c["smiles"] == "CCOC(=O)c1ccc(C)cc1"]
    added = [c for c in d["ranking"] if c["smiles"] != "CCOC(=O)c1ccc(C)cc1"]
    assert len(given) == 1 and "relation" not in given[0] and "generated" not in given[0]
    assert len(added) == 2 and all(c["generated"] is True and c["relation"] == c["name"]
                                   and c["relation"].startswith(("CH3 moved", "CO2C2H5 moved")) for c in added)


def test_n1_against_n3_alkylation_of_ring_lactams():
    # hand enumeration (common practice: uracils and quinazolin-4-ones alkylate at N1 or N3, or at O):
    # 1-(cyclopropylmethyl)uracil -> its N3 isomer (the H changes places) and the 2- and 4-alkoxy pyrimidinones
    amb = [a for a in isomers("O=c1ccn(CC2CC2)c(=O)[nH]1") if a.kind == "ambident"]
    assert keys(amb) == {key("O=c1cc[nH]c(=O)n1CC1CC1"), key("O=c1ccnc(OCC2CC2)[nH]1"), key("O=c1nccc(OCC2CC2)[nH]1")}
    # uracil numbering (N1 beside C6-H, N3 between the two C=O: common practice)
    assert any(a.relation.startswith("CH2cPr on N3 of the pyrimidine (atom 11, between C=O and C=O) instead of N1")
               for a in amb)
    # 3-ethylquinazolin-4(3H)-one -> 1-ethylquinazolin-4(1H)-one (the double bonds shift) and 4-ethoxyquinazoline
    amb = [a for a in isomers("CCn1cnc2ccccc2c1=O") if a.kind == "ambident"]
    assert keys(amb) == {key("CCn1cnc(=O)c2ccccc21"), key("CCOc1ncnc2ccccc12")}
    # 2-methylpyridazin-3(2H)-one: N1 has no neutral closed-shell form with the methyl, so only O-methyl
    assert keys([a for a in isomers("Cn1ncccc1=O") if a.kind == "ambident"]) == {key("COc1cccnn1")}


def test_4_pyridone_n_and_o_alkylation_both_ways():
    # hand enumeration (common practice: 4-pyridones and 4-quinolones alkylate at N or at O): the C=O is not
    # next to the N, so the amide rule alone missed them; an alkoxy on the benzo ring of a quinoline has no
    # such partner
    assert keys([a for a in isomers("Cn1ccc(=O)cc1") if a.kind == "ambident"]) == {key("COc1ccncc1")}
    back = [a for a in isomers("COc1ccncc1") if a.kind == "ambident"]
    assert keys(back) == {key("Cn1ccc(=O)cc1")} and "N-alkyl instead of O-alkyl" in back[0].relation
    assert not [a for a in isomers("COc1ccc2ncccc2c1") if a.kind == "ambident"]


def test_reaction_outcomes_name_the_reactant_atoms_the_template_acted_on():
    # SNAr of 2,4-dichloropyrimidine with morpholine: substitution at C4 (atom 1 of the SMILES below) or at C2
    # (atom 5) gives the two regioisomers a chemist must tell apart (hand enumeration)
    alts = isomers(None, kinds=(), reaction="[c:1]Cl.[NH1:3]>>[c:1][N:3]", reactants="Clc1ccnc(Cl)n1.C1COCCN1")
    by = {a.smiles: a.relation for a in alts}
    assert set(map(key, by)) == {key("Clc1nccc(N2CCOCC2)n1"), key("Clc1ccnc(N2CCOCC2)n1")}
    c4 = next(r for s, r in by.items() if key(s) == key("Clc1nccc(N2CCOCC2)n1"))
    # named by the pyrimidine's numbering too (C4 against C2; common practice)
    assert "C4 of the pyrimidine (reactant 1 atom 1)" in c4
    c2 = next(r for s, r in by.items() if key(s) == key("Clc1ccnc(N2CCOCC2)n1"))
    assert "C2 of the pyrimidine (reactant 1 atom 5)" in c2
    # morpholine's N takes part in both outcomes, so it tells them apart no more than the chlorine does: not named
    assert "reactant 2" not in c4 + c2


def test_reaction_outcomes_name_a_second_reactants_site_where_outcomes_differ_there():
    # the same SNAr with 3-aminopyrazole: the amino N, ring N1 and (through the NH tautomer) N2 can each attack,
    # so the pyrazole's site is named beside the pyrimidine's (hand enumeration)
    alts = isomers(None, kinds=(), reaction="snar", reactants="Clc1ccnc(Cl)n1.Nc1cc[nH]n1")
    by = {key(a.smiles): a.relation for a in alts if a.same_compound_as is None}
    ring_n1 = by[key("Nc1ccn(-c2ccnc(Cl)n2)n1")]
    assert "C4 of the pyrimidine (reactant 1 atom 1)" in ring_n1 and "N1 of the pyrazole (reactant 2 atom 4)" in ring_n1
    assert "reactant 2 atom 0 (N)" in by[key("Clc1nccc(Nc2cc[nH]n2)n1")]


def test_a_swap_never_puts_a_halogen_on_a_ring_n():
    # 4-chloropyridine N-oxide: trading the O for the Cl would give an N-chloropyridinium olate, a reagent's
    # structure rather than a product (the positional moves already keep halogens off ring N); the Cl's two
    # moves stay (hand enumeration)
    alts = isomers("[O-][n+]1ccc(Cl)cc1", kinds=("positional",))
    assert key("[O-]c1cc[n+](Cl)cc1") not in keys(alts)
    assert {key("[O-][n+]1ccccc1Cl"), key("[O-][n+]1cccc(Cl)c1")} <= keys(alts)


@pytest.mark.parametrize("smiles, expected", [
    # numbering of parent rings (IUPAC fused-ring numbering, common practice), the lowest locants going to the
    # substituted positions; written out by hand
    ("Clc1ccc2ncccc2c1", ("quinoline", {1: "C6", 5: "N1", 9: "C4a", 4: "C8a"})),          # 6-chloroquinoline
    ("Cc1ccc2cccc(C)c2c1", ("naphthalene", {1: "C7", 8: "C1"})),                         # 1,7-dimethylnaphthalene
    ("Clc1ccc2nccn2c1", ("imidazo[1,2-a]pyridine", {1: "C6", 5: "N1", 8: "N4"})),        # 6-chloroimidazo[1,2-a]pyridine
    ("Cn1ccccc1=O", ("pyridine", {1: "N1", 6: "C2"})),                                   # 1-methylpyridin-2-one
    ("CCOC(=O)c1ccc2[nH]ncc2c1", ("indazole", {5: "C5", 9: "N1", 10: "N2"})),           # ethyl 1H-indazole-5-carboxylate
])
def test_ring_positions_carry_their_conventional_locants(smiles, expected):
    from shiftrank.chem.isomers import _ring_systems
    from shiftrank.chem.locants import ring_locants
    mol = Chem.MolFromSmiles(smiles)
    system = next(s for s in _ring_systems(mol) if min(expected[1]) in s)
    name, loc = ring_locants(mol, system)
    assert name == expected[0] and {i: loc[i] for i in expected[1]} == expected[1]
    # benzene is left to ortho/meta/para
    assert ring_locants(Chem.MolFromSmiles("Cc1ccccc1"), {1, 2, 3, 4, 5, 6}) is None


@pytest.mark.parametrize("given, expected, relation", [
    # heterocyclic thiols/thiones alkylate at S or at the ring N next to the C=S (common practice): both ways
    ("CSc1nc2ccccc2[nH]1", "Cn1c(=S)[nH]c2ccccc21", "N-alkyl instead of S-alkyl"),   # 2-(methylthio)benzimidazole
    ("Cn1ccccc1=S", "CSc1ccccn1", "S-alkyl instead of N-alkyl"),                      # 1-methylpyridine-2-thione
    ("CSc1ccncc1", "Cn1ccc(=S)cc1", "N-alkyl instead of S-alkyl"),                    # 4-(methylthio)pyridine
])
def test_s_against_n_alkylation_of_heterocyclic_thiones(given, expected, relation):
    alts = isomers(given, kinds=("ambident",))
    assert key(expected) in keys(alts)
    assert any(a.relation.startswith(relation) for a in alts if key(a.smiles) == key(expected))


def test_acylation_of_an_amino_azole_at_the_ring_nh_instead_of_the_amine():
    # an aminopyrazole or aminoindazole acylates at the exocyclic NH2 or at either ring N (common practice): the
    # acetamide of 3-aminopyrazole against 1-acetyl-3- and 1-acetyl-5-aminopyrazole (hand enumeration), and back
    alts = isomers("CC(=O)Nc1cc[nH]n1", kinds=("ambident",))
    assert keys(alts) == {key("CC(=O)n1ccc(N)n1"), key("CC(=O)n1nccc1N")}
    assert all("instead of the exocyclic N" in a.relation for a in alts)
    back = isomers("CC(=O)n1ccc(N)n1", kinds=("ambident",))
    assert key("CC(=O)Nc1cc[nH]n1") in keys(back)
    assert any(a.relation.startswith("N-acyl instead of acyl on ring N1 of the pyrazole") for a in back)


def test_sulfonyl_groups_move_between_n_and_o_like_acyl_groups():
    # chemoselectivity of a sulfonylation (common practice): 4-aminophenol's N-tosyl against its O-tosylate, and a
    # 2-pyridyl triflate against the N-triflyl pyridone (hand enumeration)
    alts = isomers("Cc1ccc(S(=O)(=O)Nc2ccc(O)cc2)cc1", kinds=("ambident",))
    assert keys(alts) == {key("Cc1ccc(S(=O)(=O)Oc2ccc(N)cc2)cc1")} and alts[0].relation.startswith("O-sulfonyl instead of N-sulfonyl (Ts")
    assert key("O=c1ccccn1S(=O)(=O)C(F)(F)F") in keys(isomers("O=S(=O)(Oc1ccccn1)C(F)(F)F", kinds=("ambident",)))


@pytest.mark.parametrize("name, reactants, products, site", [
    # the regiochemistry questions of textbook reaction types (common practice), by hand enumeration:
    # SNAr of 2,4-dichloropyrimidine with morpholine at C4 or C2
    ("snar", "Clc1ccnc(Cl)n1.C1COCCN1", {"Clc1nccc(N2CCOCC2)n1", "Clc1ccnc(N2CCOCC2)n1"}, "at C4 of the pyrimidine"),
    # Suzuki coupling of 2,4-dibromopyridine at C2 or C4
    ("suzuki", "Brc1ccnc(Br)c1.OB(O)c1ccccc1", {"Brc1cc(-c2ccccc2)ccn1", "Brc1ccnc(-c2ccccc2)c1"}, "at C2 of the pyridine"),
    # methylation of indazole at N1 or (through its 2H tautomer) N2
    ("n-alkylation", "c1ccc2[nH]ncc2c1.CI", {"Cn1ncc2ccccc21", "Cn1cc2ccccc2n1"}, "at N2 of the indazole"),
    # ethylation of 2-pyridone at N or (through 2-hydroxypyridine) O
    ("alkylation", "O=c1cccc[nH]1.CCBr", {"CCn1ccccc1=O", "CCOc1ccccn1"}, "NH/OH tautomer"),
    # acetylation of 4-aminophenol at N or O
    ("acylation", "Nc1ccc(O)cc1.CC(=O)Cl", {"CC(=O)Nc1ccc(O)cc1", "CC(=O)Oc1ccc(N)cc1"}, "acylation product at"),
    # benzylation of indole at N1, C3 or C2; acetylation of pyrrole at N1, C2 or C3 (the ring C-H of an NH-pyrrole or
    # -indole takes such agents too)
    ("alkylation", "c1ccc2[nH]ccc2c1.BrCc1ccccc1",
     {"c1ccc(Cn2ccc3ccccc32)cc1", "c1ccc(Cc2c[nH]c3ccccc23)cc1", "c1ccc(Cc2cc3ccccc3[nH]2)cc1"}, "at C3 of the indole"),
    ("acylation", "c1cc[nH]c1.CC(=O)Cl", {"CC(=O)n1cccc1", "CC(=O)c1ccc[nH]1", "CC(=O)c1cc[nH]c1"}, "at C2 of the pyrrole"),
    # Mitsunobu benzylation of 2-pyridone at N or O; Chan-Lam phenylation of 3-methylpyrazole at either N;
    # Sonogashira coupling of 1-bromo-4-iodobenzene at C-I or C-Br
    ("mitsunobu", "O=c1cccc[nH]1.OCc1ccccc1", {"O=c1ccccn1Cc1ccccc1", "c1ccc(COc2ccccn2)cc1"}, "NH/OH tautomer"),
    ("chan-lam", "Cc1cc[nH]n1.OB(O)c1ccccc1", {"Cc1ccn(-c2ccccc2)n1", "Cc1ccnn1-c1ccccc1"}, "of the pyrazole"),
    ("sonogashira", "Brc1ccc(I)cc1.C#Cc1ccccc1", {"Ic1ccc(C#Cc2ccccc2)cc1", "Brc1ccc(C#Cc2ccccc2)cc1"}, "para to I"),
])
def test_named_reactions_give_every_regiochemical_outcome(name, reactants, products, site):
    alts = isomers(None, kinds=(), reaction=name, reactants=reactants)
    assert keys(alts) == {key(s) for s in products}
    from shiftrank.chem.reactions import named_reaction
    label = named_reaction(name).label or name   # 'SNAr product at …', 'alkylation product at …'
    assert any(site in a.relation for a in alts) and all(a.relation.startswith(f"{label} product at") for a in alts)


def test_an_unknown_reaction_name_lists_the_names():
    with pytest.raises(InputError, match="neither a reaction SMARTS nor a named reaction \\(snar, buchwald, suzuki"):
        isomers(None, kinds=(), reaction="heck", reactants="C.C")


def test_electrophilic_substitution_templates_offer_every_ring_ch_named_by_position():
    # bromination of 5-methoxyindole: C2, C3, C4, C6 or C7 (hand count of its ring CH); nitration of 2-methylbenzoic
    # acid at its four ring CH, named against the ring's substituents (common practice)
    alts = isomers(None, kinds=(), reaction="bromination", reactants="COc1ccc2[nH]ccc2c1")
    assert sorted(a.relation.split(" of the")[0][-2:] for a in alts) == ["C2", "C3", "C4", "C6", "C7"]
    rel = {a.relation for a in isomers(None, kinds=(), reaction="nitration", reactants="Cc1ccccc1C(=O)O")}
    assert "nitration product at reactant 1 atom 4 (C; para to CH3, meta to COOH)" in rel and len(rel) == 4
    # an SNAr on a benzene names the position against the nitro group
    snar = {a.relation for a in isomers(None, kinds=(), reaction="snar", reactants="Fc1ccc([N+](=O)[O-])c(F)c1.C1COCCN1")}
    assert any("(C; para to NO2, meta to F)" in r for r in snar) and any("ortho to NO2" in r for r in snar)


def test_a_reactant_given_with_its_counter_ion_is_named_in_the_error():
    # morpholine written as its hydrochloride: the extra carbon-free fragment is named, not just counted
    with pytest.raises(InputError, match="'Cl' has no carbon: a counter-ion or salt part"):
        isomers(None, kinds=(), reaction="snar", reactants="Clc1ccnc(Cl)n1.C1COCCN1.Cl")


def test_groups_linked_through_ch2_o_or_nh_are_named_by_their_ring():
    # a 2-fluorobenzyl on an indazole N, a 4-chlorobenzyl indole, a pyridylmethyl aryl ether, a phenethyl (names as
    # chemists condense them; common practice)
    rel = [a.relation for a in isomers("COC(=O)c1nn(Cc2ccccc2F)c2ccccc12", kinds=("ambident",))]
    assert rel and rel[0].startswith("CH2(2-F-C6H4) on N2 of the indazole")
    assert any("(now meta to CH2(indol-1-yl))" in a.relation for a in isomers("Clc1ccc(Cn2ccc3ccccc32)cc1"))
    assert any(a.relation.startswith("CH2O(4-F-C6H4) moved from C2 to C3 of the pyridine")
               for a in isomers("Fc1ccc(OCc2ccccn2)cc1"))
    assert any("(now meta to CH2CH2C6H5)" in a.relation for a in isomers("Clc1ccc(CCc2ccccc2)cc1"))


def test_substituted_heteroaryl_and_n_linked_ring_groups_are_named_not_given_as_formulas():
    # a pyrazol-4-yl carrying N-CH3, a 5-fluoroindol-1-ylmethyl, a Boc-piperazinylphenyl beside a substituted
    # benzimidazole (ring names and locants as chemists write them; common practice)
    rel = [a.relation for a in isomers("Cn1cc(-c2ccc(Cl)cc2)cn1", kinds=("positional",))]
    assert "Cl moved from ring atom 7 to ring atom 6 (now meta to 1-CH3-pyrazol-4-yl)" in rel
    assert any("(now ortho to CH2(5-F-indol-1-yl))" in r for r in
               (a.relation for a in isomers("Clc1ccc(Cn2ccc3cc(F)ccc32)cc1", kinds=("positional",))))
    rel = [a.relation for a in isomers("CC(C)(C)OC(=O)N1CCN(c2ccc(-c3nc4cc(F)ccc4n3Cc3ccc(OC)cc3)cc2)CC1",
                                       kinds=("positional",))]
    assert any(r.startswith("4-(4-Boc-piperazin-1-yl)-C6H4 moved from C2 to") for r in rel)
    assert any(r.startswith("4-Boc-piperazin-1-yl moved") and r.endswith("(now meta to 1-PMB-5-F-benzimidazol-2-yl)")
               for r in rel)
    assert not any("group (bound through" in r for r in rel)


def test_amide_and_sulfonamide_links_and_rings_with_several_groups_are_named():
    # an anilide's NHCO(aryl), a sulfonamide's SO2NH(pyridyl) and NHSO2(aryl) with two groups on its ring (names
    # as chemists condense them; common practice)
    rel = [a.relation for a in isomers("COc1ccc(C(=O)Nc2ccc(N3CCOCC3)c(C)c2)cc1", kinds=("positional",))]
    assert "CH3 moved from ring atom 19 to ring atom 10 (now ortho to NHCO(4-OCH3-C6H4), meta to morpholin-4-yl)" in rel
    rel = [a.relation for a in isomers("Cc1ccc(S(=O)(=O)Nc2ccccn2)cc1Cl", kinds=("positional",))]
    assert any(r.startswith("NHSO2(3-Cl-4-CH3-C6H3) moved from C2 to C3 of the pyridine") for r in rel)
    assert any("(now meta to SO2NH(pyridin-2-yl), meta to Cl)" in r for r in rel)


def test_a_reaction_outcome_drawn_as_an_imino_tautomer_is_the_same_compound():
    # 3-aminopyrazole reacting through its imino tautomer at the ring N next to the C=NH gives the 5-imino-2H
    # drawing of 5-amino-1-(pyrimidinyl)pyrazole, which the standard InChI's mobile H does not join to the amino
    # form (the H moves over four bonds); one compound, named once, the amino form leading (hand enumeration)
    alts = isomers(None, kinds=(), reaction="snar", reactants="Clc1ccnc(Cl)n1.Nc1cc[nH]n1")
    by = {key(a.smiles): a for a in alts}
    imino, amino = by[key("N=c1cc[nH]n1-c1ccnc(Cl)n1")], by[key("Nc1ccnn1-c1ccnc(Cl)n1")]
    assert amino.same_compound_as is None
    assert key(imino.same_compound_as) == key(amino.smiles) and "the same compound" in imino.relation
    # six different compounds: C4 or C2 of the pyrimidine, each by the amino N, ring N1 or ring N2
    assert len([a for a in alts if a.same_compound_as is None]) == 6


def test_the_heteroatom_tautomer_check_keeps_keto_and_enol_apart():
    # an H moved onto or off a carbon is not joined (common practice, as for compound_key): pentane-2,4-dione
    # and its enol stay two; 2-hydroxypyridine and 2-pyridone (H between O and N) are one
    from shiftrank.chem.isomers import _heteroatom_tautomer_key as tkey
    assert tkey(Chem.MolFromSmiles("CC(=O)CC(C)=O")) != tkey(Chem.MolFromSmiles("CC(O)=CC(C)=O"))
    assert tkey(Chem.MolFromSmiles("Oc1ccccn1")) == tkey(Chem.MolFromSmiles("O=c1cccc[nH]1"))


def test_c_against_n_alkylation_and_acylation_of_pyrrole_type_rings():
    # an indole anion or a pyrrole alkylates or acylates at N1 or at a ring carbon, C3 first for an indole
    # (common practice): 1-benzylindole -> 3- and 2-benzyl-1H-indole; 1-acetylindole -> 3- and 2-acetylindole;
    # 1-methylpyrrole -> 2- and 3-methylpyrrole (hand count: the free CH of the five-membered ring)
    alts = isomers("c1ccc2c(c1)ccn2Cc1ccccc1", kinds=("ambident",))
    assert keys(alts) == {key("c1ccc(Cc2c[nH]c3ccccc23)cc1"), key("c1ccc(Cc2cc3ccccc3[nH]2)cc1")}
    c3 = next(a for a in alts if "C3 of the indole" in a.relation)
    assert c3.relation == "CH2C6H5 on C3 of the indole (atom 6) instead of N1 (atom 8): C- rather than N-alkylation"
    acyl = isomers("CC(=O)n1ccc2ccccc21", kinds=("ambident",))
    assert keys(acyl) == {key("CC(=O)c1c[nH]c2ccccc12"), key("CC(=O)c1cc2ccccc2[nH]1")}
    assert all(a.relation.endswith("C- rather than N-acylation") for a in acyl)
    assert keys(isomers("Cn1cccc1", kinds=("ambident",))) == {key("Cc1ccc[nH]1"), key("Cc1cc[nH]c1")}
    # a substituted C3 leaves C2 only; an N-aryl group does not go onto a ring carbon; an azole with a second
    # ring N keeps its N1/N2 alternatives instead (1-ethylindazole: N2 only)
    assert keys(isomers("Cc1ccc2c(c1)c(C)cn2C", kinds=("ambident",))) == {key("Cc1ccc2[nH]c(C)c(C)c2c1")}
    assert isomers("c1ccc(cc1)-n1ccc2ccccc21", kinds=("ambident",)) == []
    assert keys(isomers("CCn1ncc2ccccc21", kinds=("ambident",))) == {key("CCn1cc2ccccc2n1")}


def test_e_against_z_of_each_double_bond_the_drawing_states():
    # methyl (E)-cinnamate -> its Z isomer; a Wittig or Horner-Wadsworth-Emmons product is one or the other
    # (common practice); the kind keeps stereochemistry, unlike the others, which remove duplicates without it
    def canon(s):
        return Chem.MolToSmiles(Chem.MolFromSmiles(s))
    (alt,) = isomers("COC(=O)/C=C/c1ccccc1", kinds=("stereo",))
    assert alt.smiles == canon("COC(=O)/C=C\\c1ccccc1") and alt.kind == "stereo"
    assert alt.relation == "C=C (atoms 4 and 5) Z instead of E"
    # a drawing that leaves the bond open claims nothing to test; a ring double bond has no E/Z
    assert isomers("COC(=O)C=Cc1ccccc1", kinds=("stereo",)) == []
    assert isomers("CC1=CCCCC1", kinds=("stereo",)) == []
    # an (E)-alkenyl (Z)-oxime: each bond flipped on its own (hand count: two alternatives)
    alts = isomers("CC(/C=C/C)=N/O", kinds=("stereo",))
    assert {a.smiles for a in alts} == {canon("C/C=C\\C(C)=N/O"), canon("C/C=C/C(C)=N/O")}
    assert {a.relation for a in alts} == {"C=C (atoms 2 and 3) Z instead of E", "C=N (atoms 1 and 5) E instead of Z"}
    # (E,E)-1,4-difluorobutadiene: flipping either bond gives the one (E,Z) compound
    assert len(isomers("F/C=C/C=C/F", kinds=("stereo",))) == 1


def test_ranking_with_e_z_alternatives_reads_the_vinyl_coupling():
    # a trans-vinyl 3J of 16 Hz (common practice: trans 12-18 Hz, cis 6-12 Hz); methyl (E)-cinnamate in CDCl3,
    # values from memory
    from shiftrank.score.ranking import rank

    text = ("1H NMR (400 MHz, CDCl3) δ 7.69 (d, J = 16.0 Hz, 1H), 7.55–7.50 (m, 2H), 7.41–7.36 (m, 3H), "
            "6.45 (d, J = 16.0 Hz, 1H), 3.81 (s, 3H).")
    r = rank(text=text, candidates=["COC(=O)/C=C\\c1ccccc1"], with_isomers="stereo")
    assert len(r.candidates) == 2
    top = r.candidates[0]
    assert top.generated and top.name == "C=C (atoms 4 and 5) E instead of Z" and top.probability > 0.7


def test_e_z_alternative_of_a_salt_keeps_its_configuration_and_the_given_atom_numbers():
    # sodium (E)-cinnamate: the organic part flipped to Z, the counter-ion put back, atoms numbered as given
    (alt,) = isomers("[Na+].[O-]C(=O)/C=C/c1ccccc1", kinds=("stereo",))
    assert alt.smiles == Chem.MolToSmiles(Chem.MolFromSmiles("[O-]C(=O)/C=C\\c1ccccc1")) + ".[Na+]"
    assert alt.relation == "C=C (atoms 4 and 5) Z instead of E"
