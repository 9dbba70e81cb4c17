#!/usr/bin/env python3
"""Cross-check of the site classes in fragments/sites/ with RDKit as an independent matcher.

Reads every class, compiles its pattern with RDKit, resolves overlaps the way
`model::find_sites` does (one site per atom, highest priority wins, ties to the class that
comes first in the library), then
  * checks each class wins the site atom of its examples and no atom of its near-misses,
  * measures how many molecules of ../shared/data/iupac-acids.csv get at least one acid
    site and how many of iupac-bases.csv get at least one base site (skipped when absent).

RDKit's aromaticity model is not ours, so this is a second opinion, not the test of record
(that is `cargo test -p pkarta-model --test sites coverage`).

Usage: python3 scripts/site_coverage.py [--misses]
"""
import csv
import pathlib
import sys
import tomllib
from collections import Counter

from rdkit import Chem, RDLogger

RDLogger.DisableLog("rdApp.*")
ROOT = pathlib.Path(__file__).resolve().parent.parent
DATA = ROOT.parent / "shared" / "data"


def load():
    classes = []
    for path in sorted((ROOT / "fragments" / "sites").glob("*.toml")):
        for c in tomllib.loads(path.read_text())["class"]:
            c["file"] = path.name
            q = Chem.MolFromSmarts(c["pattern"])
            if q is None:
                print(f"{path.name}: {c['id']}: pattern does not compile in RDKit")
                continue
            c["query"] = q
            c["site"] = next(a.GetIdx() for a in q.GetAtoms() if a.GetAtomMapNum() == 1)
            classes.append(c)
    return classes


def find_sites(classes, mol):
    best = {}
    for idx, c in enumerate(classes):
        for m in mol.GetSubstructMatches(c["query"], uniquify=False, maxMatches=1000):
            atom = m[c["site"]]
            key = (c["priority"], -idx)
            if atom not in best or key > best[atom][0]:
                best[atom] = (key, c)
    return {a: v[1] for a, v in best.items()}


def check_examples(classes):
    bad = 0
    for c in classes:
        for smi in c["examples"]:
            mol = Chem.MolFromSmiles(smi)
            if mol is None:
                print(f"{c['id']}: example {smi} does not parse"); bad += 1; continue
            sites = find_sites(classes, mol)
            if not any(s is c for s in sites.values()):
                won = sorted({s["id"] for s in sites.values()})
                print(f"{c['id']}: example {smi} not won (sites: {won})"); bad += 1
        for smi in c["near_misses"]:
            mol = Chem.MolFromSmiles(smi)
            if mol is None:
                print(f"{c['id']}: near-miss {smi} does not parse"); bad += 1; continue
            if any(s is c for s in find_sites(classes, mol).values()):
                print(f"{c['id']}: near-miss {smi} matched"); bad += 1
    return bad


def coverage(classes, name, kind, show):
    path = DATA / name
    if not path.exists():
        print(f"{name}: skipped (no {path})")
        return
    n = hit = 0
    misses = []
    won = Counter()
    with open(path) as f:
        for row in csv.DictReader(f):
            mol = Chem.MolFromSmiles(row["smiles"])
            if mol is None:
                continue
            n += 1
            sites = [s for s in find_sites(classes, mol).values() if s["kind"] == kind]
            if sites:
                hit += 1
                for s in sites:
                    won[s["id"]] += 1
            else:
                misses.append(row["smiles"])
    print(f"{name}: {hit}/{n} = {100.0 * hit / n:.1f} % with at least one {kind} site")
    if show:
        for m in misses:
            print("  miss", m)
        for k, v in won.most_common():
            print(f"  {v:5d} {k}")


def main():
    classes = load()
    show = "--misses" in sys.argv
    bad = check_examples(classes)
    print(f"{len(classes)} classes, {bad} example problems")
    coverage(classes, "iupac-acids.csv", "acid", show)
    coverage(classes, "iupac-bases.csv", "base", show)


if __name__ == "__main__":
    main()
