#!/usr/bin/env python3
"""Regenerates tests/data/rdkit_counts.toml: match counts produced by RDKit.

The expected values in that file come from RDKit (an outside library, https://www.rdkit.org),
not from this crate: for each (SMILES, SMARTS) case it records

- count: len(GetSubstructMatches(query, uniquify=True)), distinct matched atom sets;
- anchors: the sorted distinct molecule atoms on which the anchored query atom (the one with
  atom map 1, else query atom 0) sits, over all matches (uniquify=False).

Run from the crate directory:  python3 tests/gen_rdkit_counts.py
(needs `pip install rdkit`). The Rust test tests/rdkit_counts.rs compares against the file.

Cases avoid the places where RDKit is known to read SMARTS differently from Daylight, which
this crate follows: `h` on bracket atoms (RDKit counts only implicit, not bracket, H) and
explicit [H] atoms (RDKit's SMILES reader removes them).
"""
import os
import sys

from rdkit import Chem, rdBase

# (name, SMILES, SMARTS)
CASES = [
    # element symbols and organic shorthand
    ("aliphatic_carbon", "CCO", "C"),
    ("oxygen", "CCO", "O"),
    ("aromatic_carbon", "Oc1ccccc1", "c"),
    ("aliphatic_c_not_aromatic", "c1ccccc1", "C"),
    ("chlorine_bromine", "ClCCBr", "Cl"),
    ("bromine", "ClCCBr", "Br"),
    ("bracket_chlorine", "ClCC(Cl)Cl", "[Cl]"),
    ("star", "CC(=O)O", "*"),
    ("aromatic_any", "c1ccccc1CC", "a"),
    ("aliphatic_any", "c1ccccc1CC", "A"),
    ("atomic_number_n", "Cc1ccncc1", "[#7]"),
    ("atomic_number_c", "Cc1ccncc1", "[#6]"),
    ("aromatic_n", "Cc1ccncc1N", "n"),
    ("aromatic_s", "c1ccsc1C", "s"),
    ("aromatic_o", "c1ccoc1", "o"),
    # hydrogen counts, degree, connectivity
    ("methyl", "CC(C)O", "[CH3]"),
    ("methine", "CC(C)O", "[CH1]"),
    ("hydroxyl", "CC(C)O", "[OH]"),
    ("no_h", "CN(C)C", "[NH0]"),
    ("h0_any", "CC(C)(C)O", "[H0]"),
    ("aromatic_ch", "Cc1ccccc1", "[cH]"),
    ("pyrrole_nh", "c1cc[nH]c1", "[nH]"),
    ("implicit_h_organic", "CCO", "[h2]"),
    ("degree_4", "CC(C)(C)O", "[D4]"),
    ("degree_1", "CC(C)(C)O", "[D1]"),
    ("degree_default", "CC(C)(C)O", "[D]"),
    ("connectivity_3", "CC=O", "[CX3]"),
    ("connectivity_4", "CC=O", "[CX4]"),
    ("connectivity_2", "CC#N", "[CX2]"),
    ("connectivity_default", "CC#N", "[X1]"),
    # rings
    ("ring_count_2", "c1ccc2ccccc2c1CC", "[R2]"),
    ("ring_count_1", "c1ccc2ccccc2c1CC", "[R1]"),
    ("ring_any", "c1ccc2ccccc2c1CC", "[R]"),
    ("ring_none", "c1ccc2ccccc2c1CC", "[R0]"),
    ("ring_size_3", "C1CC1CCC1CCCCC1", "[r3]"),
    ("ring_size_6", "C1CC1CCC1CCCCC1", "[r6]"),
    ("ring_size_any", "C1CC1CCC1CCCCC1", "[r]"),
    ("ring_size_fused", "c1ccc2c(c1)CCC2", "[r5]"),
    # charges
    ("cation_plus", "C[N+](C)(C)C.[Cl-]", "[+]"),
    ("anion_minus", "C[N+](C)(C)C.[Cl-]", "[-]"),
    ("carboxylate", "CC(=O)[O-]", "[O-]"),
    ("charge_minus_one", "CC(=O)[O-]", "[#8;-1]"),
    ("charge_zero", "CC(=O)[O-]", "[+0]"),
    ("charge_two", "[O-]S(=O)(=O)[O-]", "[S+0]"),
    ("double_minus", "C[N-2]", "[--]"),
    ("plus_two", "C[N+2]C", "[+2]"),
    ("isotope", "[13CH3]C", "[13C]"),
    # precedence
    ("semicolon_or", "NCC(=O)O", "[N,O;H2]"),
    ("and_before_or", "NCC(=O)O", "[N,O&H1]"),
    ("implicit_and_before_or", "NCC(=O)O", "[N,OH1]"),
    ("not_h0", "CC(=O)Nc1ccccc1O", "[O,N;!H0]"),
    ("and_of_or", "CC(=O)Nc1ccccc1O", "[O;H1,N]"),
    ("not_not_aromatic", "c1ccccc1CN", "[!C;!c]"),
    ("not_binds_first", "c1ccccc1CN", "[!C&!N,c]"),
    # recursive environments
    ("primary_amine_not_amide", "CC(=O)NCCN", "[NX3;H2;!$(NC=[O,S,N]);!$(Na)]"),
    ("amide_nitrogen", "CC(=O)NCCN", "[N;$(NC=O)]"),
    ("phenol_oxygen", "OC(=O)c1ccccc1O", "[OH;$(Oc)]"),
    ("acid_hydroxyl", "OC(=O)c1ccccc1O", "[$([OH]C=O)]"),
    ("nested_environment", "CCN.CO", "[C;$(C[$(N)])]"),
    ("not_amide", "CCN(CC)CC(=O)N", "[N;!$(N-C=O)]"),
    ("environment_on_neighbour", "OCC(=O)O", "[CH2][$(C=O)]"),
    # bonds
    ("ring_bond", "C1CCCCC1CC", "C@C"),
    ("chain_bond", "C1CCCCC1CC", "C!@C"),
    ("any_ring_bond", "C1CCCCC1CC", "*@*"),
    ("biaryl_chain_bond", "c1ccccc1-c1ccccc1", "c!@c"),
    ("biaryl_single", "c1ccccc1-c1ccccc1", "c-c"),
    ("aromatic_bond", "c1ccccc1-c1ccccc1", "c:c"),
    ("implicit_bond", "c1ccccc1-c1ccccc1", "cc"),
    ("double", "C=CC=O", "C=C"),
    ("carbonyl", "C=CC=O", "C=O"),
    ("single", "C=CC=O", "C-C"),
    ("any_double", "C=CC=O", "*=*"),
    ("any_bond", "C=CC=O", "C~O"),
    ("triple", "CC#N", "C#N"),
    ("kekule_double_is_not_double", "c1ccccc1", "c=c"),
    ("kekule_input_perceived", "C1=CC=CC=C1", "C=C"),
    ("kekule_input_aromatic_bonds", "C1=CC=CC=C1", "c:c"),
    ("kekule_input_number_double", "C1=CC=CC=C1", "[#6]=[#6]"),
    ("kekule_input_any", "C1=CC=CC=C1", "[#6]~[#6]"),
    ("double_or_aromatic", "c1ccccc1C=O", "[#6]=,:[#6]"),
    ("single_to_ring", "Cc1ccccc1", "[#6]-[#6]"),
    ("single_and_ring", "C1CCC1C", "C-@C"),
    ("not_single", "C=CC=O", "C!-C"),
    # ring closures in the pattern
    ("cyclohexane_self", "C1CCCCC1", "C1CCCCC1"),
    ("cyclopropane_absent", "C1CCCCC1", "C1CC1"),
    ("benzene_in_naphthalene", "c1ccc2ccccc2c1", "c1ccccc1"),
    ("rings_in_decalin", "C1CCC2CCCCC2C1", "C1CCCCC1"),
    ("star_ring", "C1CC1C", "*1**1"),
    ("five_ring_in_indole", "c1ccc2[nH]ccc2c1", "[nH]1cccc1"),
    ("ring_closure_bond", "C1CC=CC1", "C1=CCCC1"),
    # duplicates dropped
    ("ethane_pair", "CC", "CC"),
    ("propane_pairs", "CCC", "CC"),
    ("neopentane_star", "CC(C)(C)C", "C(C)(C)(C)C"),
    ("benzene_pairs", "c1ccccc1", "*~*"),
    ("isobutane_methyls", "CC(C)C", "[CH3]C"),
    # many matches (past the small-list stage of duplicate removal) and many environments
    ("long_chain_pairs", "C" * 30, "CC"),
    ("long_chain_paths", "C" * 30, "C~C~C"),
    ("long_chain_environment", "C" * 30, "[$(CC)]"),
    ("long_chain_environment_pairs", "C" * 30, "[$(CCC)][$(CC)]"),
    ("anthracene_pairs", "c1ccc2cc3ccccc3cc2c1", "*~*"),
    ("anthracene_rings", "c1ccc2cc3ccccc3cc2c1", "c1ccccc1"),
    ("benzene_any_cycle", "c1ccccc1", "*1~*~*~*~*~*1"),
    ("cyclohexane_paths", "C1CCCCC1", "*~*~*"),
    # site patterns
    ("carboxylic_acid", "OC(=O)CC(=O)O", "[CX3](=O)[OX2H1:1]"),
    ("primary_amine", "NCCc1ccc(O)cc1", "[NX3;H2;!$(NC=[O,S,N]);!$(Na):1]"),
    ("pyridine_n", "c1ccncc1", "[nX2:1]"),
    ("imidazole_n", "Cc1cnc[nH]1", "[nX2:1]"),
    ("phenol", "Oc1ccccc1", "[OH:1]c"),
    ("aniline", "Nc1ccccc1C", "[NH2:1]c"),
    ("thiol", "CCS", "[SX2H1:1]"),
    ("sulfonamide", "NS(=O)(=O)c1ccccc1", "[NX3;H2,H1:1]S(=O)=O"),
    ("tetrazole", "Cc1nnn[nH]1", "[nH:1]1nnnc1"),
    ("guanidine", "NC(=N)N", "[NX3][CX3]=[NX2]"),
    ("secondary_amine", "CNCC(=O)NC", "[NX3;H1;!$(NC=O):1]([#6])[#6]"),
    ("tertiary_amine", "CN(C)CCOC(=O)C", "[NX3;H0;!$(NC=O);!$(N=*):1]([CX4])([CX4])[CX4]"),
    ("imide", "O=C1CCC(=O)N1", "[NH:1](C=O)C=O"),
    ("hydroxamic", "CC(=O)NO", "[OH:1][NH]C=O"),
    ("enol_14_dione", "CC(=O)CC(C)=O", "[CH2:1](C=O)C=O"),
    ("mapped_middle_anchor", "CCOC(=O)CN", "C[N:1]"),
]


def anchor_index(query):
    for atom in query.GetAtoms():
        if atom.GetAtomMapNum() == 1:
            return atom.GetIdx()
    return 0


def quote(text):
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"'


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    out = [
        "# Expected match counts produced by RDKit (an outside library), not by this crate.",
        f"# Generated by tests/gen_rdkit_counts.py with RDKit {rdBase.rdkitVersion}; do not edit",
        "# by hand, rerun the script. count = distinct matched atom sets; anchors = molecule",
        "# atoms on which the anchored pattern atom (map 1, else atom 0) sits.",
        "",
    ]
    names = set()
    for name, smiles, smarts in CASES:
        if name in names:
            sys.exit(f"duplicate case name {name}")
        names.add(name)
        mol = Chem.MolFromSmiles(smiles)
        query = Chem.MolFromSmarts(smarts)
        if mol is None or query is None:
            sys.exit(f"{name}: RDKit could not read {smiles!r} / {smarts!r}")
        count = len(mol.GetSubstructMatches(query, uniquify=True, maxMatches=100000))
        a = anchor_index(query)
        every = mol.GetSubstructMatches(query, uniquify=False, maxMatches=100000)
        anchors = sorted({m[a] for m in every})
        out += [
            "[[case]]",
            f"name = {quote(name)}",
            f"smiles = {quote(smiles)}",
            f"smarts = {quote(smarts)}",
            f"count = {count}",
            f"anchors = {anchors}",
            "",
        ]
    path = os.path.join(here, "data", "rdkit_counts.toml")
    with open(path, "w") as f:
        f.write("\n".join(out))
    print(f"wrote {len(CASES)} cases to {path}")


if __name__ == "__main__":
    main()
