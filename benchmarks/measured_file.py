"""Benchmark of a large measured data file: prints figures, asserts nothing.

    python benchmarks/measured_file.py [--rows 1000000] [--repeat 3] [--keep]

Writes a spectrum of ``--rows`` rows (wavelength in nm, counts; a Gaussian on a
noisy baseline, as a spectrometer exports it) and a spec naming it, then times
in fresh processes of this interpreter:

1. ``reading.measured.read_table`` of the file's bytes alone; then, in a run
   of its own (tracing slows every allocation down), the peak of the
   allocations made while reading (``tracemalloc``, which numpy reports to)
   and the peak memory of the process (``ru_maxrss``);
2. ``speccheck check --format json`` of the spec (reading, analysis, check);
3. the same spec with three operating points, which use the same file.

Each figure is the best of ``--repeat`` runs, with the median beside it.
"""

from __future__ import annotations

import argparse
import json
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

READ = """
import resource, sys, time, tracemalloc
from pathlib import Path
from speccheck.reading.measured import read_table
data = Path(sys.argv[1]).read_bytes()
if sys.argv[2] == "time":
    start = time.perf_counter()
    x, y = read_table(data)
    print(time.perf_counter() - start, x.size)
else:  # tracemalloc slows every allocation down: memory is measured in a run of its own
    before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    tracemalloc.start()
    x, y = read_table(data)
    peak = tracemalloc.get_traced_memory()[1]
    print(peak, before, resource.getrusage(resource.RUSAGE_SELF).ru_maxrss)
"""

SPEC = """spec_version: 1
title: a large measured spectrum
laser:
  repetition_rate: 80 MHz
  average_power: 1 W
  pulse_duration: 150 fs
  spectrum: {file: big.csv, wavelength_unit: nm}
"""


def write_spectrum(path: Path, rows: int) -> None:
    rng = np.random.default_rng(0)
    lam = np.linspace(700.0, 900.0, rows)
    counts = 1000.0 * np.exp(-4 * np.log(2) * ((lam - 800.0) / 10.0) ** 2) + 20.0 + rng.normal(0, 2.0, rows)
    with path.open("w", encoding="ascii") as out:
        out.write("wavelength_nm,counts\n")
        np.savetxt(out, np.column_stack((lam, counts)), fmt=("%.6f", "%.3f"), delimiter=",")


def timed(argv: list[str], cwd: Path) -> tuple[float, str]:
    start = time.perf_counter()
    done = subprocess.run(argv, cwd=cwd, capture_output=True, text=True)
    return time.perf_counter() - start, done.stdout


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--rows", type=int, default=1_000_000)
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--keep", action="store_true", help="keep the temporary folder")
    args = parser.parse_args()
    folder = Path(tempfile.mkdtemp(prefix="speccheck-measured-"))
    try:
        data = folder / "big.csv"
        write_spectrum(data, args.rows)
        (folder / "one.yaml").write_text(SPEC, encoding="utf-8")
        (folder / "points.yaml").write_text(
            SPEC + "operating_points:\n" + "".join(f"  - {{name: p{i}, average_power: {i} W}}\n" for i in (2, 3, 4)),
            encoding="utf-8")
        print(f"{args.rows:,} rows, {data.stat().st_size / 2**20:.1f} MiB; Python {sys.version.split()[0]}, "
              f"numpy {np.__version__}")

        times = []
        for _ in range(args.repeat):
            out = subprocess.run([sys.executable, "-c", READ, str(data), "time"], capture_output=True, text=True,
                                 check=True)
            elapsed, size = out.stdout.split()
            times.append(float(elapsed))
        out = subprocess.run([sys.executable, "-c", READ, str(data), "memory"], capture_output=True, text=True,
                             check=True)
        peak, before, after = (int(v) for v in out.stdout.split())
        print(f"read_table: {min(times):.2f} s (median {statistics.median(times):.2f} s) for {int(size):,} rows; "
              f"allocations while reading peak at {peak / 2**20:.0f} MiB; process peak {after / 1024:.0f} MiB "
              f"(before reading, with the file's bytes in memory: {before / 1024:.0f} MiB)")

        for spec in ("one.yaml", "points.yaml"):
            runs = []
            for _ in range(args.repeat):
                elapsed, stdout = timed([sys.executable, "-m", "speccheck", "check", "--no-config", "--format",
                                         "json", spec], folder)
                runs.append(elapsed)
            findings = json.loads(stdout)["files"][0]["findings"]
            print(f"speccheck check {spec}: {min(runs):.2f} s (median {statistics.median(runs):.2f} s); "
                  f"findings: {sorted({f['rule'] for f in findings})}")
    finally:
        if args.keep:
            print(f"kept {folder}")
        else:
            shutil.rmtree(folder)


if __name__ == "__main__":
    main()
