"""Structure facts: formula, DBE and symmetry classes from a structure.

Sources: symmetry from RDKit canonical ranking without tie-breaking
(Schneider, Sayle & Landrum 2015, J. Chem. Inf. Model. 55, 2111); the signal
counts below follow from molecular symmetry (common practice).
"""
import pytest
from rdkit import Chem

from shiftrank.errors import InputError
from shiftrank.chem.structure import lactim_sites, structure_facts


def test_mirror_symmetric_chain_has_fewer_signals():
    f = structure_facts("CCCOCCC")  # dipropyl ether: 6 carbons, 3 signals
    assert f.n_carbons == 6
    assert f.expected_13c_signals == 3
    assert sorted(c.multiplicity for c in f.carbon_classes) == ["CH2", "CH2", "CH3"]


def test_para_disubstituted_benzene_two_aromatic_signals():
    f = structure_facts("COc1ccc(OC)cc1")  # 1,4-dimethoxybenzene
    mol = Chem.MolFromSmiles(f.smiles)
    aromatic = [c for c in f.carbon_classes if mol.GetAtomWithIdx(c.atoms[0]).GetIsAromatic()]
    assert len(aromatic) == 2
    assert sorted(c.size for c in aromatic) == [2, 4]
    assert f.expected_13c_signals == 3
    assert f.multiplicity_counts() == {"CH3": 1, "C": 1, "CH": 1}


def test_meta_isomer_has_more_signals_than_para():
    para = structure_facts("Clc1ccc(Cl)cc1")
    meta = structure_facts("Clc1cccc(Cl)c1")
    ortho = structure_facts("Clc1ccccc1Cl")
    assert (para.expected_13c_signals, meta.expected_13c_signals, ortho.expected_13c_signals) == (2, 4, 3)


def test_formula_mass_dbe_from_structure():
    f = structure_facts("NC(=O)c1ccncc1")  # isonicotinamide C6H6N2O
    assert f.formula == "C6H6N2O"
    assert f.dbe == 5
    assert f.average_mass == pytest.approx(6 * 12.011 + 6 * 1.008 + 2 * 14.007 + 15.999, abs=0.01)


def test_hydrogen_classes():
    f = structure_facts("CC(=O)OCC")  # ethyl acetate: 3 H environments
    assert f.expected_1h_signals == 3


def test_bad_smiles():
    with pytest.raises(InputError, match=r"cannot read it: unbalanced brackets: 1 '\(' against 0 '\)'"):
        structure_facts("C1CC(")


@pytest.mark.parametrize("smiles,signals,why", [
    # meso (mirror plane): enantiotopic carbons are isochronous in an achiral solvent (common practice)
    ("OC(=O)[C@H](O)[C@@H](O)C(=O)O", 2, "meso-tartaric acid: 2 13C signals (common practice)"),
    ("C[C@H]1CCC[C@@H](C)N1", 4, "cis-2,6-dimethylpiperidine (meso): CH3, C2/6, C3/5, C4 (common practice)"),
    ("C[C@@H]1CCCC[C@H]1C", 4, "cis-1,2-dimethylcyclohexane (meso): 4 signals (common practice)"),
    # C2 axis: homotopic halves
    ("OC(=O)[C@H](O)[C@H](O)C(=O)O", 2, "(R,R)-tartaric acid: 2 signals (common practice)"),
    ("C[C@H]1CCC[C@H](C)N1", 4, "trans-2,6-dimethylpiperidine (C2): 4 signals (common practice)"),
    # a configuration that repeats by no symmetry: the constitutional halves are diastereotopic
    ("C[C@H](O)[C@H](O)C(=O)O", 4, "one chain, no symmetry to begin with"),
    ("OC[C@H]1O[C@@H](CO)[C@@H](O)[C@H]1O", 3, "a meso 2,5-bis(hydroxymethyl)oxolane-3,4-diol (2R,3S,4R,5S; mirror plane): 3 signals (common practice)"),
    ("OC[C@H]1O[C@H](CO)[C@@H](O)[C@H]1O", 6, "its (2R,3S,4R,5R) diastereomer: no symmetry, 6 signals (common practice)"),
    # diastereotopic groups on a prochiral carbon beside a stereocentre are separate classes
    ("CC(C)[C@H](N)C(=O)O", 5, "L-valine: two methyl signals, about 19.0 and 17.6 ppm in D2O (from memory)"),
    ("CC1(C)C2CCC1(C)C(=O)C2", 10, "camphor: three methyl signals (common practice)"),
    ("CC1(C)CC(O)c2ccccc2O1", 11, "2,2-dimethylchroman-4-ol: the gem-dimethyls differ beside C4 (common practice)"),
    ("CC1(C)CCc2ccccc2O1", 10, "2,2-dimethylchroman, no stereocentre and no other ring carbon with two different groups: one methyl signal (common practice)"),
    ("OC(c1ccccc1)C1CCCCC1", 11, "cyclohexyl(phenyl)methanol: C2/C6 and C3/C5 of the cyclohexyl split (common practice)"),
    ("CC(C)(C)C(O)c1ccccc1", 7, "a tert-butyl: its three methyls rotate into each other, one signal (common practice)"),
    # the same on a phosphorus with four groups
    ("COP(=O)(OC)C(C)NC(=O)C(C)(C)C", 7, "an α-amido phosphonate: two OCH3 signals, printed 53.1 and 52.9 ppm in "
     "PMC6222910 (open-access article via the NMRExtractor data set)"),
    ("CCOP(=O)(OCC)Cc1ccccc1", 7, "diethyl benzylphosphonate, no stereocentre: one OEt set (common practice)"),
    # whole aryl groups: each ring keeps its symmetric pairs, the two rings differ
    ("C[C@H](O)C(c1ccccc1)c1ccccc1", 11, "1,1-diphenylpropan-2-ol: two phenyl sets beside the stereocentre (common practice)"),
    ("O=C(O)CN=C(c1ccccc1)c1ccccc1", 11, "a benzophenone imine of glycine: two phenyl sets, cis and trans across C=N "
     "(common practice)"),
    ("CC(=O)N(Cc1ccccc1)Cc1ccccc1", 12, "N,N-dibenzylacetamide: two benzyl sets, slow amide rotation (common practice)"),
    # slow rotation about bonds to N with double-bond character
    ("CCN(CC)N=O", 4, "N-nitrosodiethylamine: two CH2 and two CH3 signals (slow N–N=O rotation; common practice)"),
    ("CN(C)C(=S)SCC#N", 5, "a dithiocarbamate: two N-methyl signals (common practice)"),
    ("CN(C)C=Nc1ccccc1", 7, "an N,N-dimethylformamidine: two N-methyl signals (common practice)"),
    ("CN(C)C=CC(=O)c1ccccc1", 9, "an enaminone from DMF-DMA: two N-methyl signals, often broad (common practice)"),
    ("CN(C)C(=O)OC", 3, "a carbamate rotates faster: one N-methyl signal (common practice)"),
    ("CN(C)C(=O)N(C)C", 2, "tetramethylurea: one methyl signal (common practice)"),
    ("CN(C)c1ccccc1", 5, "N,N-dimethylaniline: one methyl signal"),
    # geminal groups on a ring atom facing another ring carbon's substituent
    ("CC1(C)CCC(O)CC1", 6, "4,4-dimethylcyclohexanol: one methyl on the OH's face, one opposite (common practice)"),
    ("CC1C(=O)OC(C)(C)OC1=O", 6, "5-methyl Meldrum's acid: two 2,2-methyl signals (common practice)"),
    ("CC(=O)NC1CC(C)(C)NC(C)(C)C1", 7, "a 2,2,6,6-tetramethylpiperidin-4-yl amide: two methyl signals (common practice)"),
    ("CC1(C)CCC(=O)CC1", 5, "4,4-dimethylcyclohexanone: the C=O has no faces, one methyl signal"),
    ("CC1(C)CCCCC1", 5, "1,1-dimethylcyclohexane: one methyl signal"),
])
def test_symmetry_classes_by_hand(smiles, signals, why):
    assert structure_facts(smiles).expected_13c_signals == signals, why


def test_stereo_splits_constitutional_halves_seen_in_the_open_data(shared_data):
    """NMRShiftDB2 regio case 10021165 (a 2,5-diaryl-3,4-bis(methoxymethyl)tetrahydrofuran): its 13C
    list has 22 lines for 22 carbons, although the two halves are alike in constitution; its
    stereocentres do not repeat by symmetry, so every carbon is its own class."""
    import gzip
    import json

    with gzip.open(shared_data / "dev_cases_regio.jsonl.gz", "rt") as f:
        case = next((c for c in map(json.loads, f) if c["id"] == "10021165"), None)
    if case is None:
        pytest.skip("case 10021165 not in this copy of the data")
    facts = structure_facts(case["truth"])
    assert len(case["peaks"]) == 22 == facts.n_carbons == facts.expected_13c_signals


# Alike groups on one atom of a double bond whose other atom carries two different groups are cis and trans
# to them: two signals (common practice).
@pytest.mark.parametrize("smiles,signals,protons,why", [
    ("CC(C)=CCc1ccccc1", 9, [3, 3], "a prenyl group: methyls about 17.9 and 25.8 ppm, 1H 1.68 and 1.75 (from memory)"),
    ("CC(C)=NO", 3, [3, 3], "acetone oxime: methyls about 15 and 22 ppm (from memory)"),
    ("CC(=O)C=C(C)C", 6, [3, 3, 3], "mesityl oxide: its two C=C methyls differ (from memory: about 20.7 and 27.7 ppm)"),
    ("CCOC(=O)C=C1CCCCC1", 10, None, "ethyl cyclohexylideneacetate: C2/C6 and C3/C5 split (common practice)"),
    ("CC(C)=C(C)C", 2, [12], "2,3-dimethylbut-2-ene: both ends alike, one methyl signal"),
    ("C=C(C)C", 3, [6], "isobutene: the =CH2 end has two H, one methyl signal"),
    ("CC(C)=C(C#N)C#N", 4, [6], "isopropylidenemalononitrile: the other end carries two alike CN groups"),
])
def test_alike_groups_across_a_double_bond(smiles, signals, protons, why):
    facts = structure_facts(smiles)
    assert facts.expected_13c_signals == signals, why
    if protons is not None:   # the 1H classes of the methyls: two 3H singlets where they differ
        mol = Chem.MolFromSmiles(smiles)
        methyls = [g for g in facts.hydrogen_classes if all(mol.GetAtomWithIdx(a).GetTotalNumHs() == 3 for a in g)]
        assert sorted(3 * len(g) for g in methyls) == sorted(protons), why


def test_geminal_ring_pairs_differ_in_the_open_data(shared_data):
    """NMRShiftDB2 assigned 13C shifts: the geminal ring pairs the 'ring' rule splits differ by 1 ppm or more in
    most molecules that have them (20 pairs when written; cyclopropane dimethyls by about 11 ppm)."""
    from shiftrank.chem.structure import ring_twin_sites, symmetry_ranks
    from training.data import load_assigned

    gaps = [abs(m.shifts[a] - m.shifts[b]) for m in load_assigned(shared_data)
            for _, a, b, _ in ring_twin_sites(m.mol, symmetry_ranks(m.mol)) if a in m.shifts and b in m.shifts]
    assert len(gaps) >= 15
    assert sum(g >= 1.0 for g in gaps) >= len(gaps) / 2


def test_slow_rotation_pairs_differ_in_the_open_data(shared_data):
    """NMRShiftDB2 assigned 13C shifts: the N-substituent pairs split for slow rotation differ by 1 ppm or more in
    at least a third of the molecules that have them (a pair printed at one value costs the ranking little)."""
    from shiftrank.chem.structure import symmetry_ranks, twin_sides
    from training.data import load_assigned

    split = differ = 0
    for m in load_assigned(shared_data):
        ranks = symmetry_ranks(m.mol)
        sides = {}
        for atom, (side, why) in twin_sides(m.mol, ranks).items():
            nbrs = [n.GetIdx() for n in m.mol.GetAtomWithIdx(atom).GetNeighbors()]
            if why == "slow N" and atom in m.shifts and any(m.mol.GetAtomWithIdx(n).GetAtomicNum() == 7 for n in nbrs):
                sides.setdefault(side, []).append(m.shifts[atom])
        if len(sides) == 2 and len(sides[0]) == len(sides[1]) == 1:
            split += 1
            differ += abs(sides[0][0] - sides[1][0]) >= 1.0
    assert split >= 20
    assert differ >= split / 3


def test_alike_groups_across_a_double_bond_differ_in_the_open_data(shared_data):
    """NMRShiftDB2 assigned 13C shifts: the twin carbons this rule separates (prenyl methyls and the like) differ
    by 1 ppm or more in most molecules that have them, by several ppm at the median."""
    import statistics

    from shiftrank.chem.structure import symmetry_ranks, twin_sides
    from training.data import load_assigned

    gaps = []
    for m in load_assigned(shared_data):
        twins = twin_sides(m.mol, symmetry_ranks(m.mol))
        sides: dict = {}
        for atom, (side, why) in twins.items():
            if why == "alkene" and atom in m.shifts and m.mol.GetAtomWithIdx(atom).GetAtomicNum() == 6:
                sides.setdefault(side, []).append(m.shifts[atom])
        if len(sides) == 2 and len(sides[0]) == len(sides[1]) == 1:
            gaps.append(abs(sides[0][0] - sides[1][0]))
    assert len(gaps) >= 50
    assert sum(g >= 1.0 for g in gaps) >= 0.75 * len(gaps)
    assert statistics.median(gaps) >= 4.0


# Lactam–lactim and thione–thiol tautomerism: 2- and 4-hydroxypyridines, hydroxypyrimidines and
# 2-quinolinols are mostly the pyridone (lactam) form in solution, azole-2-thiols and
# 1,2,4-triazole-3-thiols the thione form (common practice; reviewed by Katritzky, Karelson & Harris,
# Heterocycles 1991, 32, 329, from memory).  Drawings of the other form are flagged, not changed.
@pytest.mark.parametrize("smiles, sites", [
    ("Oc1ccccn1", [(0, 1)]),                       # 2-hydroxypyridine (2-pyridone drawn as the lactim)
    ("Oc1ccncc1", [(0, 1)]),                       # 4-hydroxypyridine, N opposite
    ("Oc1ccc2ccccc2n1", [(0, 1)]),                 # quinolin-2-ol
    ("Sc1nc2ccccc2[nH]1", [(0, 1)]),               # benzimidazole-2-thiol
    ("Cc1nnc(S)n1C", [(5, 4)]),                    # a 1,2,4-triazole-3-thiol
    ("Oc1nc2ccccc2o1", [(0, 1)]),                  # benzoxazol-2-ol
    ("O=c1cccc[nH]1", []),                         # the lactam itself
    ("S=c1[nH]c2ccccc2[nH]1", []),                 # the thione itself
    ("Oc1cccnc1", []),                             # 3-hydroxypyridine: no lactam form
    ("Oc1cccc2cccnc12", []),                       # 8-hydroxyquinoline: OH not on the pyridine ring
    ("COc1ccccn1", []),                            # 2-methoxypyridine: no H to move
    ("Oc1cc(C)[nH]n1", []),                        # pyrazol-3-ol: its form depends on the compound
    ("Oc1ccccc1", []),                             # phenol
])
def test_lactim_drawings_are_found(smiles, sites):
    assert lactim_sites(Chem.MolFromSmiles(smiles)) == sites


@pytest.mark.parametrize("smiles,says", [
    ("c1ccnc1", r"aromatic N that carries H is written \[nH\]"),      # pyrrole without its NH (common slip)
    ("CC(C)(C)(C)C", r"atom 1 \(C\) has 5 bonds"),
    ("C1CC", "ring closure 1 is opened but never closed"),
    ("c1ccccc1X", "a symbol RDKit does not read"),
])
def test_a_refused_smiles_says_what_is_wrong(smiles, says):
    with pytest.raises(InputError, match=says):
        structure_facts(smiles)
