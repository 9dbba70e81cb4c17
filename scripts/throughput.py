#!/usr/bin/env python3
"""End-to-end throughput of `pkarta predict`, with RDKit parsing on the same machine.

Measures and prints; asserts nothing.

- Molecules: N SMILES (default 50,000) from the MOSES benchmark's test split, taken from
  the PyPI package `molsets` (`pip download --no-deps molsets`, the wheel's
  moses/dataset/data/test.csv.gz), cached under bench-data/ (gitignored). Without network
  access, ../shared/data/moses-sample.smi is repeated to N lines instead.
- pkarta: `pkarta predict --threads 1 --format jsonl --quiet FILE`, its output read through
  a pipe and its lines counted, wall time.
- RDKit: `Chem.MolFromSmiles` (parse + sanitize) over the same SMILES in this process,
  one core, wall time. RDKit does much less (no sites, no scoring, no speciation): the
  ratio says what an estimate costs next to reading the molecule with a common toolkit.
- --threads 2 against --threads 1 on the same file, each run with the CPU seconds (user +
  system) the process used.
- Each timing is repeated (--repeat, default 3), the runs of --threads 1, --threads 2 and
  RDKit interleaved so that all three meet the same load from other work on the machine;
  the fastest run of each is compared (other work only ever slows a run down), and every
  run is printed with the load average before it, so a noisy machine shows as such.
- Peak memory (maximum resident set) of one `predict` run over the whole test split
  (176,074 molecules), measured in a child process with getrusage.

Usage: python3 scripts/throughput.py [--n 50000] [--repeat 3] [--binary target/release/pkarta]
"""

import argparse
import csv
import gzip
import io
import os
import resource
import subprocess
import sys
import time
import zipfile
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
CACHE = ROOT / "bench-data"
SAMPLE = ROOT.parent / "shared" / "data" / "moses-sample.smi"


def moses_split(name):
    """SMILES of one MOSES split ('test' or 'train') from the molsets wheel, cached."""
    cached = CACHE / f"moses-{name}.smi"
    if cached.exists():
        return cached.read_text().split()
    CACHE.mkdir(exist_ok=True)
    wheels = list((CACHE / "wheel").glob("molsets-*.whl"))
    if not wheels:
        cmd = [sys.executable, "-m", "pip", "download", "--no-deps", "--quiet", "molsets", "-d", str(CACHE / "wheel")]
        result = subprocess.run(cmd, capture_output=True, text=True)
        if result.returncode != 0:
            print(f"note: pip download molsets failed: {result.stderr.strip()[:300]}")
            return None
        wheels = list((CACHE / "wheel").glob("molsets-*.whl"))
        if not wheels:
            print("note: pip download gave no molsets wheel")
            return None
    with zipfile.ZipFile(wheels[0]) as wheel:
        members = [m for m in wheel.namelist() if m.endswith(f"dataset/data/{name}.csv.gz")]
        if not members:
            print(f"note: no {name}.csv.gz in {wheels[0].name}")
            return None
        raw = gzip.decompress(wheel.read(members[0])).decode()
    reader = csv.DictReader(io.StringIO(raw))
    column = next((c for c in reader.fieldnames if c.lower() == "smiles"), reader.fieldnames[0])
    smiles = [row[column] for row in reader if row[column]]
    cached.write_text("\n".join(smiles) + "\n")
    return smiles


def molecules(n):
    """N SMILES and where they came from."""
    test = moses_split("test")
    if test and len(test) < n:
        train = moses_split("train") or []
        test = test + train[: n - len(test)]
    if test:
        return test[:n], "MOSES (molsets wheel)"
    if not SAMPLE.exists():
        sys.exit(f"no molecules: molsets could not be downloaded and {SAMPLE} is absent")
    sample = [l.split()[0] for l in SAMPLE.read_text().splitlines() if l.strip()]
    repeated = (sample * (n // len(sample) + 1))[:n]
    return repeated, f"{SAMPLE.name} repeated"


def run_pkarta(binary, path, threads):
    """Wall seconds of one predict run, its CPU seconds (user + system) and its output
    line count."""
    cmd = [str(binary), "predict", "--threads", str(threads), "--format", "jsonl", "--quiet", str(path)]
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    proc = subprocess.Popen(cmd, stdout=subprocess.PIPE)
    lines = sum(chunk.count(b"\n") for chunk in iter(lambda: proc.stdout.read(1 << 20), b""))
    proc.wait()
    seconds = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    if proc.returncode not in (0, 1):
        sys.exit(f"{' '.join(cmd)} exited with {proc.returncode}")
    return seconds, cpu, lines


def peak_memory(binary, path):
    """Maximum resident set (MiB) of one predict run, measured in a fresh child."""
    probe = (
        "import resource, subprocess, sys\n"
        "subprocess.run(sys.argv[1:], stdout=subprocess.DEVNULL)\n"
        "print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)\n"
    )
    cmd = [sys.executable, "-c", probe, str(binary), "predict", "--format", "jsonl", "--quiet", str(path)]
    start = time.perf_counter()
    out = subprocess.run(cmd, capture_output=True, text=True, check=True).stdout
    seconds = time.perf_counter() - start
    return int(out.strip()) / 1024.0, seconds  # ru_maxrss is in KiB on Linux


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--n", type=int, default=50_000, help="molecules to time (default 50,000)")
    parser.add_argument("--binary", default=str(ROOT / "target" / "release" / "pkarta"))
    parser.add_argument("--no-memory", action="store_true", help="skip the peak-memory run")
    parser.add_argument("--repeat", type=int, default=3, help="runs of each timing (default 3); the fastest counts")
    args = parser.parse_args()
    binary = Path(args.binary)
    if not binary.exists():
        sys.exit(f"{binary} not found: build it with `cargo build --release`")

    smiles, origin = molecules(args.n)
    CACHE.mkdir(exist_ok=True)
    path = CACHE / f"throughput-{len(smiles)}.smi"
    path.write_text("\n".join(smiles) + "\n")
    print(f"molecules: {len(smiles)} from {origin}; cores on this machine: {os.cpu_count()}")

    try:
        from rdkit import Chem, RDLogger

        RDLogger.DisableLog("rdApp.*")
    except ImportError:
        Chem = None
        print("RDKit not installed (pip install rdkit): RDKit timing skipped")

    def rdkit_run():
        start = time.perf_counter()
        parsed = sum(1 for s in smiles if Chem.MolFromSmiles(s) is not None)
        return time.perf_counter() - start, parsed

    runs = {1: [], 2: [], "rdkit": []}
    lines = parsed = None
    for r in range(args.repeat):
        for what in (1, 2, "rdkit"):
            if what == "rdkit" and Chem is None:
                continue
            load = os.getloadavg()[0]
            if what == "rdkit":
                seconds, parsed = rdkit_run()
                label = "RDKit MolFromSmiles (parse + sanitize), one core"
            else:
                seconds, cpu, lines = run_pkarta(binary, path, what)
                # CPU seconds beside wall seconds: a --threads 2 run that takes more CPU for
                # the same work than --threads 1 shows cores that slow each other down,
                # which no pipeline can win back.
                label = f"pkarta predict --threads {what} (CPU {cpu:.2f} s)"
            runs[what].append(seconds)
            print(f"run {r + 1}: {label}: {seconds:.2f} s, {len(smiles) / seconds:,.0f} molecules/s (load average before: {load:.2f})")

    best1, best2 = min(runs[1]), min(runs[2])
    rate1, rate2 = len(smiles) / best1, len(smiles) / best2
    print(f"pkarta predict --threads 1, fastest of {args.repeat}: {best1:.2f} s, {rate1:,.0f} molecules/s ({lines} records)")
    if runs["rdkit"]:
        rd_rate = len(smiles) / min(runs["rdkit"])
        print(f"RDKit MolFromSmiles, fastest of {args.repeat}: {min(runs['rdkit']):.2f} s, {rd_rate:,.0f} molecules/s ({parsed} parsed)")
        print(f"ratio pkarta estimate / RDKit parse (rate): {rate1 / rd_rate:.3f}")
    print(f"pkarta predict --threads 2, fastest of {args.repeat}: {best2:.2f} s, {rate2:,.0f} molecules/s")
    print(f"speed-up --threads 2 / --threads 1: {rate2 / rate1:.2f}")

    if not args.no_memory:
        test = moses_split("test")
        if test:
            big, label = test, "MOSES test split"
        else:
            sample = smiles
            big, label = (sample * (176_074 // len(sample) + 1))[:176_074], "repeated sample"
        big_path = CACHE / f"memory-{len(big)}.smi"
        big_path.write_text("\n".join(big) + "\n")
        mib, seconds = peak_memory(binary, big_path)
        print(f"peak memory, predict over {len(big)} molecules ({label}, all cores): {mib:.1f} MiB max RSS, {seconds:.1f} s")


if __name__ == "__main__":
    main()
