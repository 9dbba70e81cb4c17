#!/usr/bin/env python3
"""Cross-check pkarta's molecule perception against RDKit.

Runs `pkarta inspect --format jsonl` (or, where the binary lacks that command, the
`inspect` example of the mol crate, which prints the same fields) over two sets of SMILES:

- RDKit's bundled NCI sample, `rdkit/Data/NCI/first_5K.smi`;
- the MOSES sample at ../shared/data/moses-sample.smi (read in place, never copied), or
  tests/data/sample.smi when ../shared is absent.

Per molecule it compares heavy atoms, total hydrogens, net charge, aromatic atoms and ring
count (SSSR size: E - V + C from our bonds; RDKit's RingInfo.NumRings()), and, atom by
atom in input order, element, charge, hydrogens and aromaticity ("per_atom"). Records RDKit
cannot read are skipped and counted; records RDKit reads and we refuse count as
disagreements on every measure.

Thresholds: >= 99.5 % agreement on heavy atoms, total H and net charge; >= 99 % on
aromatic atoms. Ring count and per-atom agreement are reported, not enforced (RDKit's ring set is the symmetrized
SSSR, which is larger for cages such as cubane). Exit status 1 below a threshold, 2 when a
tool is missing.

With --standardize it also compares our standardized parent (through the mol crate's
`inspect` example, `--parent`) with RDKit's `rdMolStandardize.ChargeParent` (largest
fragment, then neutralized): parent heavy atoms, parent net charge and the parent itself
(both canonicalized by RDKit); and our SMILES writer, by reading what it writes with RDKit
("written": RDKit's canonical form of our output equals that of the input, stereo aside).
Reported only: the two standardizers follow different rules
for some classes (docs/rdkit-crosscheck.md).

Usage: python3 scripts/rdkit_crosscheck.py [--show N] [--bin PATH] [--standardize] [FILE ...]
"""

import argparse
import json
import os
import shutil
import subprocess
import sys

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
THRESHOLDS = {"heavy": 99.5, "hydrogens": 99.5, "charge": 99.5, "aromatic": 99.0}
MEASURES = ["heavy", "hydrogens", "charge", "aromatic", "rings", "per_atom"]


def find_example():
    """The mol crate's `inspect` example (built in release when missing)."""
    target = os.environ.get("CARGO_TARGET_DIR", os.path.join(ROOT, "target"))
    example = os.path.join(target, "release", "examples", "inspect")
    if not os.path.exists(example):
        if shutil.which("cargo") is None:
            sys.exit("rdkit_crosscheck: no cargo to build the mol inspect example")
        subprocess.run(
            ["cargo", "build", "--release", "-p", "pkarta-mol", "--example", "inspect"],
            cwd=ROOT,
            check=True,
        )
    return example


def find_reader(explicit):
    """The command that reads SMILES lines on stdin and prints inspect JSON lines."""
    if explicit:
        if os.path.basename(explicit).startswith("pkarta"):
            return [explicit, "inspect", "-", "--format", "jsonl"]
        return [explicit]
    pkarta = os.path.join(ROOT, "target", "release", "pkarta")
    if os.path.exists(pkarta):
        probe = subprocess.run(
            [pkarta, "inspect", "-", "--format", "jsonl"],
            input="C\n",
            capture_output=True,
            text=True,
        )
        if probe.returncode == 0 and probe.stdout.strip().startswith("{"):
            return [pkarta, "inspect", "-", "--format", "jsonl"]
    # Fallback: the mol crate's example prints the same fields.
    return [find_example()]


def read_smiles(path):
    """(smiles, line number) per non-blank line; the SMILES is the first field."""
    out = []
    with open(path, encoding="utf-8", errors="replace") as f:
        for n, line in enumerate(f, 1):
            fields = line.split()
            if fields:
                out.append((fields[0], n))
    return out


def ours(reader, smiles):
    """Our inspect records, one per input, in order."""
    text = "".join(s + "\n" for s in smiles)
    run = subprocess.run(reader, input=text, capture_output=True, text=True)
    records = [json.loads(l) for l in run.stdout.splitlines() if l.strip()]
    if len(records) != len(smiles):
        sys.exit(
            f"rdkit_crosscheck: {len(records)} records for {len(smiles)} inputs "
            f"(status {run.returncode}): {run.stderr[:500]}"
        )
    return records


def our_measures(r):
    atoms = r["atoms"]
    n_bonds = len(r["bonds"])
    return {
        "heavy": sum(1 for a in atoms if a["element"] not in ("H", "*")),
        "hydrogens": sum(a["hydrogens"] for a in atoms)
        + sum(1 for a in atoms if a["element"] == "H"),
        "charge": sum(a["charge"] for a in atoms),
        "aromatic": sum(1 for a in atoms if a["aromatic"]),
        "rings": n_bonds - len(atoms) + len(r["components"]),
        "per_atom": [(a["element"], a["charge"], a["hydrogens"], a["aromatic"]) for a in atoms],
    }


def rdkit_measures(Chem, smiles):
    params = Chem.SmilesParserParams()
    # Keep written [H] atoms so atoms match ours one to one, in input order.
    params.removeHs = False
    m = Chem.MolFromSmiles(smiles, params)
    if m is None:
        return None
    h = Chem.AddHs(m)
    return {
        "heavy": sum(1 for a in m.GetAtoms() if a.GetAtomicNum() > 1),
        "hydrogens": sum(1 for a in h.GetAtoms() if a.GetAtomicNum() == 1),
        "charge": sum(a.GetFormalCharge() for a in m.GetAtoms()),
        "aromatic": sum(1 for a in m.GetAtoms() if a.GetIsAromatic()),
        "rings": m.GetRingInfo().NumRings(),
        "per_atom": [
            (a.GetSymbol(), a.GetFormalCharge(), a.GetTotalNumHs(), a.GetIsAromatic())
            for a in m.GetAtoms()
        ],
    }


def check(name, path, reader, Chem, show):
    smiles = read_smiles(path)
    records = ours(reader, [s for s, _ in smiles])
    compared = 0
    rdkit_failed = 0
    we_failed = []
    agree = {k: 0 for k in MEASURES}
    disagreements = {k: [] for k in MEASURES}
    for (s, line), r in zip(smiles, records):
        theirs = rdkit_measures(Chem, s)
        if theirs is None:
            rdkit_failed += 1
            continue
        compared += 1
        if r.get("error"):
            we_failed.append((line, s, r["error"]["message"].splitlines()[0]))
            continue
        mine = our_measures(r)
        for k in MEASURES:
            if mine[k] == theirs[k]:
                agree[k] += 1
            else:
                disagreements[k].append((line, s, mine[k], theirs[k]))
    print(f"== {name}: {path}")
    print(f"records {len(smiles)}, RDKit cannot read {rdkit_failed} (skipped), compared {compared}")
    print(f"RDKit reads, we refuse: {len(we_failed)}")
    for line, s, msg in we_failed[:show]:
        print(f"  line {line}: {s}  -- {msg}")
    failed = False
    for k in MEASURES:
        pct = 100.0 * agree[k] / compared if compared else 100.0
        limit = THRESHOLDS.get(k)
        verdict = ""
        if limit is not None:
            ok = pct >= limit
            failed |= not ok
            verdict = f"(threshold {limit} %: {'ok' if ok else 'BELOW'})"
        else:
            verdict = "(reported only)"
        print(f"{k:10s} agree {agree[k]}/{compared} = {pct:.2f} % {verdict}")
        for line, s, a, b in disagreements[k][:show]:
            if k == "per_atom":
                diff = [i for i, (x, y) in enumerate(zip(a, b)) if x != y]
                a = [a[i] for i in diff[:3]] if len(a) == len(b) else f"{len(a)} atoms"
                b = [b[i] for i in diff[:3]] if len(diff) else f"{len(b)} atoms"
                s = f"{s} (atoms {diff[:3]})"
            print(f"  line {line}: {s}  ours {a}, RDKit {b}")
    return failed


def canonical(Chem, smiles):
    """RDKit's canonical SMILES without stereo (we do not keep it), or None."""
    m = Chem.MolFromSmiles(smiles)
    if m is None:
        return None
    Chem.RemoveStereochemistry(m)
    return Chem.MolToSmiles(m)


def check_standardize(name, path, example, Chem, show):
    from rdkit.Chem.MolStandardize import rdMolStandardize

    smiles = read_smiles(path)
    records = ours([example, "--parent"], [s for s, _ in smiles])
    chooser = rdMolStandardize.LargestFragmentChooser()
    uncharger = rdMolStandardize.Uncharger()
    compared = 0
    agree = {"written": 0, "parent_heavy": 0, "parent_charge": 0, "parent": 0}
    shown = {k: [] for k in agree}
    for (s, line), r in zip(smiles, records):
        m = Chem.MolFromSmiles(s)
        if m is None or r.get("error"):
            continue
        theirs = uncharger.uncharge(chooser.choose(m))
        mine = Chem.MolFromSmiles(r["parent"])
        if mine is None:
            shown["parent"].append((line, s, r["parent"], "RDKit cannot read our parent"))
            compared += 1
            continue
        compared += 1
        pairs = {
            "written": (canonical(Chem, r["written"]), canonical(Chem, s)),
            "parent_heavy": (r["parent_heavy"], theirs.GetNumHeavyAtoms()),
            "parent_charge": (r["parent_charge"], Chem.GetFormalCharge(theirs)),
            "parent": (Chem.MolToSmiles(mine), Chem.MolToSmiles(theirs)),
        }
        for k, (a, b) in pairs.items():
            if a == b:
                agree[k] += 1
            else:
                shown[k].append((line, s, a, b))
    print(f"== standardize, {name}: compared {compared}")
    for k in agree:
        pct = 100.0 * agree[k] / compared if compared else 100.0
        print(f"{k:13s} agree {agree[k]}/{compared} = {pct:.2f} % (reported only)")
        for line, s, a, b in shown[k][:show]:
            print(f"  line {line}: {s}  ours {a}, RDKit {b}")


def main():
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("files", nargs="*", help="SMILES files (default: NCI 5K and MOSES sample)")
    p.add_argument("--show", type=int, default=10, help="disagreements shown per measure")
    p.add_argument("--bin", help="pkarta binary or a reader printing inspect JSON lines")
    p.add_argument(
        "--standardize",
        action="store_true",
        help="also compare standardized parents with RDKit's ChargeParent (reported only)",
    )
    args = p.parse_args()
    try:
        import rdkit
        from rdkit import Chem, RDConfig, RDLogger
    except ImportError:
        print("rdkit_crosscheck: rdkit is not installed (pip install rdkit)", file=sys.stderr)
        return 2
    RDLogger.DisableLog("rdApp.*")
    print(f"RDKit {rdkit.__version__}")
    reader = find_reader(args.bin)
    print(f"reader: {' '.join(reader)}")
    files = [(f, f) for f in args.files]
    if not files:
        files.append(("NCI first 5K", os.path.join(RDConfig.RDDataDir, "NCI", "first_5K.smi")))
        moses = os.path.join(ROOT, "..", "shared", "data", "moses-sample.smi")
        if os.path.exists(moses):
            files.append(("MOSES sample", os.path.normpath(moses)))
        else:
            print("../shared/data/moses-sample.smi absent: using tests/data/sample.smi")
            files.append(("own sample", os.path.join(ROOT, "tests", "data", "sample.smi")))
    failed = False
    for name, path in files:
        failed |= check(name, path, reader, Chem, args.show)
    if args.standardize:
        example = find_example()
        for name, path in files:
            check_standardize(name, path, example, Chem, args.show)
    print("== result:", "BELOW THRESHOLD" if failed else "all thresholds met")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
