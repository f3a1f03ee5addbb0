"""Expected first-order 1H multiplets of structures of our own choosing.

The patterns are the first-order rules every practitioner applies (common practice): n equivalent
neighbours split a signal into n + 1 lines; protons of one symmetry class do not split each other;
aromatic ortho couplings are large and meta couplings small and often unresolved.
"""
from rdkit import Chem

from shiftrank.chem.couplings import expected_multiplets, fit_cost, observed_pattern


def _by_atom(smiles):
    return {tuple(e.atoms): e for e in expected_multiplets(Chem.MolFromSmiles(smiles))}


def test_para_disubstituted_ring_gives_two_2h_doublets():
    # ethyl 4-methylbenzoate (own choice)
    ex = _by_atom("CCOC(=O)c1ccc(C)cc1")
    ring = [e for e in ex.values() if len(e.atoms) == 2]
    # a doublet each (a small long-range splitting may be resolved, nothing else)
    assert len(ring) == 2 and all(e.n_h == 2 and (2,) in e.patterns() and e.label().startswith("d") for e in ring)
    assert all(not any(p[0] > 2 for p in e.patterns()) for e in ring)


def test_monosubstituted_ring_gives_2h_2h_1h():
    # propiophenone ring (own choice): ortho d (2H), meta t-like (2H), para t (1H)
    ex = _by_atom("CCC(=O)c1ccccc1")
    ring = sorted((e for e in ex.values() if Chem.MolFromSmiles("CCC(=O)c1ccccc1").GetAtomWithIdx(e.atoms[0]).GetIsAromatic()),
                  key=lambda e: e.atoms)
    assert [e.n_h for e in ring] == [2, 2, 1]
    ortho, meta, para = ring
    assert (2,) in ortho.patterns() and (3,) in meta.patterns() and (3,) in para.patterns()


def test_ethyl_group_is_quartet_and_triplet():
    ex = _by_atom("CCOC(=O)c1ccc(C)cc1")
    assert ex[(0,)].patterns() == {(3,)} and ex[(0,)].n_h == 3
    assert ex[(1,)].patterns() == {(4,)} and ex[(1,)].n_h == 2   # no stereocentre: the CH2 protons are alike


def test_equal_couplings_merge_into_a_sextet():
    # butanenitrile's middle CH2: q of t with different J, or a sextet when the J are equal
    ex = _by_atom("CCCC#N")
    assert {(4, 3), (6,)} <= ex[(1,)].patterns()


def test_trans_alkene_and_fluorine_couplings():
    ex = _by_atom("C/C=C/C(=O)OC")   # methyl (E)-but-2-enoate: the CH next to C=O is a d of ~15.5 Hz
    e = ex[(2,)]
    assert fit_cost(e, "d", (15.6,)) == (0, 0)
    assert fit_cost(e, "d", (8.0,)) == (0, 1)     # a J of 8 Hz fits no trans coupling
    f = _by_atom("Fc1ccc(C)cc1")                   # 4-fluorotoluene: H ortho to F couples to F as to H
    ortho_f = f[(2, 7)]
    assert fit_cost(ortho_f, "t", (8.7,)) == (0, 0) and fit_cost(ortho_f, "s") == (1, 0)


def test_printed_letters():
    assert observed_pattern("td") == (3, 2) and observed_pattern("dd") == (2, 2)
    assert observed_pattern("s") == () and observed_pattern("m") is None and observed_pattern("br s") is None
    assert observed_pattern("sept") == (7,)


def test_diastereotopic_ch2_next_to_a_stereocentre_may_show_its_geminal_coupling():
    # 2-amino-3-phenylpropanoic acid's CH2 (own choice): dd (geminal ~14 Hz, vicinal ~7 Hz), common practice
    ex = _by_atom("NC(Cc1ccccc1)C(=O)O")
    assert fit_cost(ex[(2,)], "dd", (14.0, 7.5)) == (0, 0)


def test_printed_j_values_must_belong_to_the_splittings_the_letters_name():
    # Printed 1H paragraph of 4-(4-propylanilino)pyridine-2-carboxylic acid (PMC10155833, CD3OD):
    # δ 7.26 (dd, J = 2.3, 7.3 Hz), 7.48 (d, J = 2.3 Hz), 8.32 (d, J = 7.3 Hz).  A doublet of 2.3 Hz is
    # a proton with only a meta partner (H-3 here); in the 2,6-disubstituted isomer every ring proton
    # has an ortho neighbour (7-9 Hz, common practice), so that doublet fits none of them.
    def pyridine_protons(smiles):
        mol = Chem.MolFromSmiles(smiles)
        ring = next(set(r) for r in mol.GetRingInfo().AtomRings() if any(mol.GetAtomWithIdx(i).GetSymbol() == "N" for i in r))
        return [e for e in _by_atom(smiles).values() if e.atoms[0] in ring]
    t_ring = pyridine_protons("CCCc1ccc(Nc2ccnc(C(=O)O)c2)cc1")
    o_ring = pyridine_protons("CCCc1ccc(Nc2cccc(C(=O)O)n2)cc1")
    assert len(t_ring) == 3 and len(o_ring) == 3
    assert min(sum(fit_cost(e, "d", (2.3,))) for e in t_ring) == 0
    assert min(sum(fit_cost(e, "d", (2.3,))) for e in o_ring) == 1
    # both J of the doublet of doublets are explained in the right structure, one J at a time
    assert min(sum(fit_cost(e, "dd", (2.3, 7.3))) for e in t_ring) == 0
    # the letters fit but the J value does not: counted as an unexplained J, not a letter misfit
    assert fit_cost(o_ring[0], "d", (2.3,)) == (0, 1)


def test_ch_next_to_a_diastereotopic_ch2_may_be_dd_or_t():
    # Methyl 2-amino-3-phenylpropanoate's alpha-CH (own choice): its CH2 neighbour's two protons differ
    # (stereocentre), so the alpha-H is usually printed 'dd, J = 7.8, 5.3 Hz', sometimes 't' when the two J
    # are alike (the ABX pattern of amino-acid esters; common practice, J values from memory).
    ex = _by_atom("COC(=O)C(N)Cc1ccccc1")
    alpha = ex[(4,)]
    assert fit_cost(alpha, "dd", (7.8, 5.3)) == (0, 0)
    assert fit_cost(alpha, "t", (6.6,)) == (0, 0)
    assert fit_cost(alpha, "q", (6.6,))[0] == 1
    # without a stereocentre or ring the CH2 protons are alike: butanenitrile's CH3 stays a plain triplet
    assert _by_atom("CCCC#N")[(0,)].patterns() == {(3,)}


def test_two_nearly_equal_ring_couplings_may_print_as_a_triplet():
    # 1-alkyl-3-hydroxypyridin-2(1H)-one's H-5 (own choice of substituent): couples to H-4 and H-6 with
    # J ~ 7 Hz each (2-pyridone ring, from memory), printed 't, J = 7.0 Hz' in PMC6332087 (DMSO-d6)
    ex = _by_atom("COC(=O)CCn1cccc(O)c1=O")
    h5 = ex[(8,)]
    assert fit_cost(h5, "t", (7.0,)) == (0, 0) and fit_cost(h5, "dd", (7.2, 6.8)) == (0, 0)


def test_exchangeable_protons_split_only_by_neighbours_they_have():
    # N-propylaniline and 4-aminophenol (own choice): an NH next to a CH2 may print as 's', 't' or
    # 'br s' (coupling through N is often lost to exchange); an aryl NH2 or phenol OH has no proton
    # three bonds away, so a clean doublet cannot be it; printed J values are not held against them
    nh = _by_atom("CCCNc1ccccc1")[(3,)]
    assert nh.exchangeable
    assert fit_cost(nh, "t", (5.6,)) == (0, 0) and fit_cost(nh, "s") == (0, 0) and fit_cost(nh, "br s") == (0, 0)
    ex = _by_atom("Nc1ccc(O)cc1")
    nh2, oh = ex[(0,)], ex[(5,)]
    assert fit_cost(nh2, "br s") == (0, 0) and fit_cost(oh, "s") == (0, 0)
    assert fit_cost(nh2, "d", (8.1,)) == (1, 0) and fit_cost(oh, "t") == (1, 0)


def test_imidazole_h4_h5_may_print_as_singlets():
    # 1-phenylimidazole: J(H4,H5) is about 1 Hz (common practice, from memory: 1-methylimidazole ≈ 1.2 Hz)
    # and is usually printed as two singlets (PMC6316537 prints 7.19 (s, 1H), 7.27 (s, 1H)); a resolved
    # small doublet fits too, an ortho-sized J does not.  Thiazole H4–H5 (about 3 Hz) stays resolved.
    ex = _by_atom("c1ccc(-n2ccnc2)cc1")
    for h in ((5,), (6,)):
        assert fit_cost(ex[h], "s") == (0, 0) and fit_cost(ex[h], "d", (1.3,)) == (0, 0)
        assert fit_cost(ex[h], "d", (8.0,)) == (0, 1)
    thiazole = _by_atom("Cc1nccs1")
    assert fit_cost(thiazole[(3,)], "s")[0] == 1 and fit_cost(thiazole[(3,)], "d", (3.3,)) == (0, 0)


def test_ch2_beside_a_stereocentre_shows_anti_and_gauche_couplings():
    # PMC6017890 (CDCl3) prints the CH2NO2 protons of 2,2-dimethyl-3-aryl-4-nitrobutanal as 4.85 (dd,
    # J = 13.1, 11.3 Hz) and 4.69 (dd, J = 13.1, 4.2 Hz) and the CH as 3.70 (dd, J = 11.3, 4.2 Hz): an
    # ABX system with an anti (≈ 11 Hz) and a gauche (≈ 4 Hz) vicinal coupling (common practice)
    ex = _by_atom("COc1cc(C(C[N+](=O)[O-])C(C)(C)C=O)cc(OC)c1OC")
    ch2, ch = ex[(6,)], ex[(5,)]
    assert fit_cost(ch2, "dd", (13.1, 11.3)) == (0, 0) and fit_cost(ch2, "dd", (13.1, 4.2)) == (0, 0)
    assert fit_cost(ch, "dd", (11.3, 4.2)) == (0, 0)
    assert fit_cost(ch, "dd", (16.0, 4.2)) == (0, 1)   # no vicinal coupling reaches 16 Hz


def test_a_j_printed_once_per_coupled_proton_is_one_j():
    # PMC6268139 (DMSO-d6) prints an ethyl ester's CH3 as '1.21 (t, 3JHH = 6.9 Hz, 3JHH = 6.9 Hz, 3H)'
    ex = _by_atom("CCOC(=O)C1C(=O)N(O)C(=O)C1c1ccccc1O")
    assert fit_cost(ex[(0,)], "t", (6.9, 6.9)) == (0, 0)
    assert fit_cost(ex[(0,)], "t", (6.9, 12.0)) == (0, 1)


def test_two_bond_c_f_coupling_of_a_substituted_ring_carbon_is_small():
    # PMC6891391 (CDCl3) prints a 2-fluoroanilino group as 151.74 (d, J = 237.0 Hz, C–F), 135.22 (d, J = 12.0
    # Hz, C–N ortho to F) and 114 (d, J = 19.5 Hz, CH ortho to F): a ring carbon without H next to C–F has
    # ²J ≈ 10–14 Hz, a CH ≈ 20 Hz (from memory: 2-fluoroanisole, 2-fluoroaniline)
    from shiftrank.chem.couplings import carbon_multiplets

    mol = Chem.MolFromSmiles("O=C1C(=O)c2cc(CNc3ccccc3F)oc2-c2ccccc21")

    class C:
        def __init__(self, a):
            self.atoms = [a]

    c_n, c_f, ch = carbon_multiplets(mol, [C(9), C(14), C(13)])
    assert fit_cost(c_n, "d", (12.0,)) == (0, 0) and fit_cost(ch, "d", (19.5,)) == (0, 0)
    assert fit_cost(c_f, "d", (237.0,)) == (0, 0)
    assert fit_cost(ch, "d", (9.0,)) == (0, 1)      # a CH ortho to F does not show ²J of 9 Hz


def test_expected_letters_put_resolved_splittings_before_optional_ones():
    # 4-phenylmorpholine's ring CH2 (own choice): a triplet-like signal from the two vicinal protons;
    # a geminal splitting, should the ring's two faces differ, is optional and printed after it (common practice)
    ex = _by_atom("c1ccc(N2CCOCC2)cc1")
    assert ex[(5, 9)].letters() == "t(d)" and ex[(6, 8)].letters() == "t(d)"
    assert ex[(5, 9)].label().startswith("t(d) (vicinal")


def test_long_range_c_p_couplings_of_a_benzylphosphonate_ring():
    # diethyl 4-methylbenzylphosphonate: its meta and para ring carbons, four and five bonds from P, print
    # 'd, J ≈ 3 Hz' (values from memory); those are allowed, optional, and the CH3 carbons stay singlets
    from rdkit import Chem
    from shiftrank.chem.couplings import carbon_multiplets, fit_cost
    from shiftrank.chem.structure import carbon_classes

    mol = Chem.MolFromSmiles("CCOP(=O)(Cc1ccc(C)cc1)OCC")
    classes = carbon_classes(mol)
    exp = {tuple(c.atoms): e for c, e in zip(classes, carbon_multiplets(mol, classes))}
    para, meta, aryl_ch3 = exp[(9,)], exp[(8, 11)], exp[(10,)]
    assert fit_cost(para, "d", (3.6,), tolerance=2.0) == (0, 0)
    assert fit_cost(meta, "d", (3.0,), tolerance=2.0) == (0, 0)
    assert fit_cost(para, None, (), tolerance=2.0)[0] == 0        # unresolved: fine too
    assert not aryl_ch3.groups                                     # six bonds from P
