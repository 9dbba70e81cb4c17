#!/usr/bin/env python3
"""Regenerates tests/data/rdkit_sample_totals.toml: per-pattern match totals produced by
RDKit (an outside library, https://www.rdkit.org) over the drug-like sample
../shared/data/moses-sample.smi (beside the repository; 2,000 MOSES test-split molecules).

Only totals are written, never rows of the sample: for each pattern,
- matches: sum over molecules of len(GetSubstructMatches(q, uniquify=True));
- anchors: sum over molecules of the number of distinct atoms the anchored query atom (map 1,
  else atom 0) sits on (uniquify=False);
- molecules: how many molecules have at least one match.

Run from the crate directory:  python3 tests/gen_rdkit_sample_totals.py
(needs `pip install rdkit`). tests/rdkit_sample.rs compares against the file, and skips when
the sample is absent.
"""
import os
import sys

from rdkit import Chem, rdBase

PATTERNS = [
    # ionizable-site patterns (as in benches/match.rs)
    "[CX3](=O)[OX2H1:1]",
    "[NX3;H2;!$(NC=[O,S,N]);!$(Na):1]",
    "[NX3;H1;!$(NC=[O,S,N]);!$(Na):1]([CX4])[CX4]",
    "[NX3;H0;!$(NC=[O,S,N]);!$(Na);!$(N=*):1]([CX4])([CX4])[CX4]",
    "[nX2:1]",
    "[nX2;r5:1]",
    "[nX2;$(n1ccccc1):1]",
    "[OH:1]c",
    "[NX3;H2,H1;!$(NC=O);!$(NS=O):1]c",
    "[SX2H1:1]",
    "[NX3;H2,H1:1]S(=O)=O",
    "[nH:1]1nnnc1",
    "[nH:1]1nccc1",
    "[nH:1]1ccc2ccccc12",
    "[NX3;H2,H1:1]C=[NX2]",
    "[NX2:1]=C(N)N",
    "[NH:1](C=O)C=O",
    "[OX2H1;$(O[CX4]):1]",
    "[CX4;H1,H2:1](C=O)C=O",
    "[NX3;H1,H2:1]C=O",
    "[NH:1](C=O)N",
    "[NX3;R;!$(NC=O):1]1CCOCC1",
    "[NX3;!$(NC=O):1]1CCNCC1",
    "[CX4;!H0:1]C#N",
    "[N+:1](=O)[O-]",
    # single primitives and bonds, over real ring systems
    # Ring membership, not ring counts: `R<n>` depends on which rings a bridged system's SSSR
    # holds (adamantane has four equivalent candidates for three places; RDKit keeps all
    # four), so counts there are a choice, not a fact to check.
    "[R]",
    "[R0]",
    "[r6]",
    "[r5]",
    "[r3,r4]",
    "[X4]",
    "[D3]",
    "[CH2]",
    "[cH]",
    "a",
    "[nH]",
    "s",
    "o",
    "[F,Cl,Br,I]",
    "c:c",
    "c-c",
    "*@*",
    "*!@*",
    "[#6]=[#6]",
    "[#6]=[#7,#8]",
    "[#7]#[#6]",
    "C=O",
    "S(=O)(=O)",
    "c1ccccc1",
    "[$(c1ccccc1)]",
    "*1~*~*~*~*1",
    "[#6]~[#7]~[#6]",
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
    sample = os.path.join(here, "..", "..", "..", "..", "shared", "data", "moses-sample.smi")
    if not os.path.exists(sample):
        sys.exit(f"sample not found: {sample}")
    molecules = []
    for line in open(sample):
        fields = line.split()
        if fields:
            m = Chem.MolFromSmiles(fields[0])
            if m is None:
                sys.exit(f"RDKit could not read {fields[0]!r}")
            molecules.append(m)
    out = [
        "# Per-pattern match totals over ../shared/data/moses-sample.smi, produced by RDKit",
        f"# (an outside library), version {rdBase.rdkitVersion}, by tests/gen_rdkit_sample_totals.py.",
        "# Do not edit by hand; rerun the script. Totals only: no rows of the sample are copied.",
        f"molecules = {len(molecules)}",
        "",
    ]
    for smarts in PATTERNS:
        q = Chem.MolFromSmarts(smarts)
        if q is None:
            sys.exit(f"RDKit could not read {smarts!r}")
        a = anchor_index(q)
        matches = anchors = hit = 0
        for m in molecules:
            n = len(m.GetSubstructMatches(q, uniquify=True, maxMatches=100000))
            matches += n
            hit += n > 0
            every = m.GetSubstructMatches(q, uniquify=False, maxMatches=100000)
            anchors += len({x[a] for x in every})
        out += [
            "[[pattern]]",
            f"smarts = {quote(smarts)}",
            f"matches = {matches}",
            f"anchors = {anchors}",
            f"molecules = {hit}",
            "",
        ]
    path = os.path.join(here, "data", "rdkit_sample_totals.toml")
    with open(path, "w") as f:
        f.write("\n".join(out))
    print(f"wrote {len(PATTERNS)} patterns to {path}")


if __name__ == "__main__":
    main()
