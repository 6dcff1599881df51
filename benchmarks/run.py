"""Benchmark of ``speccheck check``: prints figures and ratios, asserts nothing.

    python benchmarks/run.py [--python PATH] [--quick] [--repeat 3] [--seed 0] [--keep]

Every timing is a separate subprocess of ``--python`` (default: this
interpreter) with this process's environment passed through (so
``PYTHONPATH=/work/main`` reaches it), run from a temporary folder.  Each
figure is the best of ``--repeat`` runs, with the median beside it.

1. Throughput over 1,000 generated specs (1b: each with a glass, a compressor and a focus,
   the field's case; with ``--jobs 2`` beside it):
   (a) ``python -m speccheck check --format json FOLDER``
   (h) ``python -m speccheck check FOLDER``: the default human output, not to a terminal (1 only)
   (b) a reference that does strictly less: read the same files, parse each
       with PyYAML's C loader and validate it against the JSON Schema
       (one Draft202012Validator), nothing else.
2. Cold start on one spec: ``speccheck check one.yaml`` (human and json)
   against ``python -c "import pint"``.
3. Scaling: 100, 1,000 and 10,000 specs (``--quick`` skips 10,000).
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from collections import Counter
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from generate import generate  # noqa: E402

DEFAULT_SCHEMA = HERE.parent / "schemas" / "spec-v1.schema.json"

REFERENCE = r'''
"""Reference: read, parse (PyYAML C loader), validate (jsonschema). Nothing else."""
import json, os, sys
import yaml
from jsonschema import Draft202012Validator

schema_path, *roots = sys.argv[1:]
with open(schema_path, encoding="utf-8") as f:
    validator = Draft202012Validator(json.load(f))
paths = []
for root in roots:
    for folder, dirs, files in os.walk(root):
        dirs[:] = sorted(d for d in dirs if not d.startswith("."))
        paths += [os.path.join(folder, n) for n in files if n.endswith((".yaml", ".yml")) and not n.startswith(".")]
paths.sort()
errors = 0
for path in paths:
    with open(path, "rb") as f:
        text = f.read().decode("utf-8-sig")
    data = yaml.load(text, Loader=yaml.CSafeLoader)
    errors += sum(1 for _ in validator.iter_errors(data))
print(f"{len(paths)} files, {errors} schema errors")
'''


# ------------------------------------------------------------------ helpers

def subprocess_env(tmp: Path, as_is: bool = False) -> tuple[dict, str]:
    """This process's environment for the timed subprocesses, and a line saying how it was changed.

    By default bytecode is cached (under ``tmp``, never in the work tree), as it
    is for an installed package: with PYTHONDONTWRITEBYTECODE set, a source
    tree would be compiled again by every run, which is not what users pay.
    """
    env = os.environ.copy()
    if as_is:
        return env, "environment passed through unchanged" + (
            " (PYTHONDONTWRITEBYTECODE is set: modules outside site-packages are compiled on every run)"
            if env.get("PYTHONDONTWRITEBYTECODE") else "")
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    env["PYTHONPYCACHEPREFIX"] = str(tmp / "pycache")
    return env, f"environment passed through, with bytecode cached under {tmp / 'pycache'} (--as-is: unchanged)"


class Runner:
    def __init__(self, python: str, cwd: Path, repeat: int, env: dict | None = None) -> None:
        self.python = python
        self.cwd = cwd
        self.repeat = repeat
        self.env = env if env is not None else os.environ.copy()

    def once(self, args: list[str], ok=(0,), capture: bool = False) -> tuple[float, str]:
        start = time.perf_counter()
        proc = subprocess.run([self.python, *args], cwd=self.cwd, env=self.env, stdin=subprocess.DEVNULL,
                              stdout=subprocess.PIPE if capture else subprocess.DEVNULL,
                              stderr=subprocess.PIPE, text=True)
        elapsed = time.perf_counter() - start
        if proc.returncode not in ok:
            raise SystemExit(f"benchmark: {' '.join(args)} exited {proc.returncode}\n{proc.stderr[-2000:]}")
        return elapsed, proc.stdout if capture else ""

    def time(self, args: list[str], ok=(0,)) -> tuple[float, float]:
        """(best, median) seconds over ``repeat`` runs."""
        times = [self.once(args, ok)[0] for _ in range(self.repeat)]
        return min(times), statistics.median(times)


CHECK_OK = (0, 1)  # 1: the generated specs do contain deliberate errors


def check_args(*paths: str, fmt: str | None = "json") -> list[str]:
    return ["-m", "speccheck", "check", *(["--format", fmt] if fmt else []), *paths]


def ms(seconds: float) -> str:
    return f"{seconds * 1000:9.1f} ms"


def row(label: str, best_median: tuple[float, float], extra: str = "") -> None:
    best, median = best_median
    print(f"  {label:<44} best {ms(best)}   median {ms(median)}{extra}")


def machine(runner: Runner) -> None:
    model = "unknown"
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                model = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    try:
        usable = len(os.sched_getaffinity(0))
    except AttributeError:
        usable = os.cpu_count()
    probe = ("import sys, importlib.metadata as m, speccheck\n"
             "v = lambda n: m.version(n)\n"
             "print(sys.version.split()[0], sys.executable)\n"
             "print('pyyaml', v('pyyaml'), 'jsonschema', v('jsonschema'), 'pint', v('pint'))\n"
             "import yaml; print('libyaml', yaml.__with_libyaml__, 'speccheck from', speccheck.__file__)")
    _, out = runner.once(["-c", probe], capture=True)
    repo = HERE.parent
    try:
        head = subprocess.run(["git", "-C", str(repo), "rev-parse", "--short", "HEAD"], capture_output=True,
                              text=True).stdout.strip()
        dirty = subprocess.run(["git", "-C", str(repo), "status", "--porcelain", "--", "speccheck", "schemas"],
                               capture_output=True, text=True).stdout.splitlines()
        tree = f"{head}" + (f" with {len(dirty)} changed or new files in speccheck/ and schemas/" if dirty else "")
    except OSError:
        tree = "unknown (no git)"
    print("Machine")
    print(f"  nproc {usable} (os.cpu_count {os.cpu_count()}), CPU {model}")
    print(f"  {platform.system()} {platform.release()}")
    for line in out.strip().splitlines():
        print(f"  python {line}" if line[:1].isdigit() else f"  {line}")
    print(f"  work tree {tree}")


def sanity(runner: Runner, folder: Path, records: list[dict]) -> None:
    """One untimed run: did the checker see every file, and the deliberate errors?"""
    _, out = runner.once(check_args(str(folder)), ok=CHECK_OK, capture=True)
    doc = json.loads(out)
    by_path = {Path(f["path"]).resolve(): f for f in doc["files"]}
    caught, missed, false_alarms = Counter(), Counter(), 0
    for r in records:
        f = by_path.get(Path(r["path"]).resolve())
        if f is None:
            continue
        errors = [x for x in f["findings"] if x["severity"] == "error"]
        if r["error"]:
            (caught if errors else missed)[r["error"]] += 1
        elif errors:
            false_alarms += 1
    wrong = sum(1 for r in records if r["error"])
    print(f"  sanity: {len(doc['files'])} files checked, counts {doc['counts']}; deliberate errors "
          f"flagged {sum(caught.values())}/{wrong}, errors on consistent specs {false_alarms}")
    if missed:
        print(f"          not flagged as errors: {dict(missed)}")


# ------------------------------------------------------------------ main

def main(argv: list[str] | None = None) -> int:
    p = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    p.add_argument("--python", default=sys.executable, help="interpreter to benchmark (default: this one)")
    p.add_argument("--quick", action="store_true", help="skip the 10,000-spec scaling point")
    p.add_argument("--repeat", type=int, default=3, help="runs per figure (best and median reported)")
    p.add_argument("--seed", type=int, default=0)
    p.add_argument("--schema", default=str(DEFAULT_SCHEMA), help="schema for the reference (default: the repo's)")
    p.add_argument("--keep", action="store_true", help="keep the temporary folder and print it")
    p.add_argument("--as-is", action="store_true", help="pass the environment through without caching bytecode")
    args = p.parse_args(argv)

    tmp = Path(tempfile.mkdtemp(prefix="speccheck-bench-"))
    env, env_note = subprocess_env(tmp, args.as_is)
    runner = Runner(args.python, tmp, args.repeat, env)
    try:
        machine(runner)
        print(f"  {env_note}")
        print(f"  load average before: {' '.join(Path('/proc/loadavg').read_text().split()[:3])}"
              if Path("/proc/loadavg").exists() else "")
        print()
        reference = tmp / "reference.py"
        reference.write_text(REFERENCE, encoding="utf-8")

        folders: dict[int, Path] = {}
        records: dict[int, list[dict]] = {}

        def specs(n: int) -> Path:
            if n not in folders:
                folders[n] = tmp / f"specs-{n}"
                start = time.perf_counter()
                recs = generate(n, folders[n], seed=args.seed)
                records[n] = recs
                print(f"  generated {n} specs in {time.perf_counter() - start:.1f} s "
                      f"({sum(1 for r in recs if r['error'])} with a deliberate error)")
            return folders[n]

        # ---------------------------------------------------------- 1. throughput
        print("1. Throughput, 1,000 specs (each run a fresh process)")
        folder = specs(1000)
        sanity(runner, folder, records[1000])
        _, ref_out = runner.once([str(reference), args.schema, str(folder)], capture=True)
        print(f"  reference: {ref_out.strip()}")
        runner.once(check_args(str(folder)), ok=CHECK_OK)  # warm caches (bytecode, pint's registry cache)
        a = runner.time(check_args(str(folder)), ok=CHECK_OK)
        h = runner.time(check_args(str(folder), fmt=None), ok=CHECK_OK)
        b = runner.time([str(reference), args.schema, str(folder)])
        row("(a) speccheck check --format json", a, f"   {a[0] / 1000 * 1e3:.2f} ms/file")
        row("(h) speccheck check (human, not a terminal)", h, f"   {h[0] / 1000 * 1e3:.2f} ms/file")
        row("(b) reference: read + C YAML + jsonschema", b, f"   {b[0] / 1000 * 1e3:.2f} ms/file")
        print(f"  ratio a/b: {a[0] / b[0]:.2f}x (best)   {a[1] / b[1]:.2f}x (median);   "
              f"h/b: {h[0] / b[0]:.2f}x (best)   {h[1] / b[1]:.2f}x (median)")
        print()

        # ------------------------------------------- 1b. every spec with a pulse path
        print("1b. Throughput, 1,000 specs each with a three-stage path (glass, compressor, focus)")
        folder = tmp / "specs-path"
        generate(1000, folder, seed=args.seed, error_rate=0.0, stages=3, kinds="glass-compressor")
        runner.once(check_args(str(folder)), ok=CHECK_OK)
        ap = runner.time(check_args(str(folder)), ok=CHECK_OK)
        aj = runner.time(check_args(str(folder)) + ["--jobs", "2"], ok=CHECK_OK)
        bp = runner.time([str(reference), args.schema, str(folder)])
        row("(a) speccheck check --format json", ap, f"   {ap[0] / 1000 * 1e3:.2f} ms/file")
        row("(a2) the same with --jobs 2", aj, f"   {aj[0] / 1000 * 1e3:.2f} ms/file")
        row("(b) reference: read + C YAML + jsonschema", bp, f"   {bp[0] / 1000 * 1e3:.2f} ms/file")
        print(f"  ratio a/b: {ap[0] / bp[0]:.2f}x (best)   {ap[1] / bp[1]:.2f}x (median);   "
              f"with --jobs 2: {aj[0] / bp[0]:.2f}x (best)   {aj[1] / bp[1]:.2f}x (median)")
        print()

        # ---------------------------------------------------------- 2. cold start
        print("2. Cold start, one spec")
        first_clean = next(r for r in records[1000] if not r["error"])
        one = tmp / "one.yaml"
        shutil.copyfile(first_clean["path"], one)
        baseline = runner.time(["-c", "pass"])
        pint_import = runner.time(["-c", "import pint"])
        human = runner.time(check_args(str(one), fmt=None), ok=CHECK_OK)
        as_json = runner.time(check_args(str(one)), ok=CHECK_OK)
        row("python -c pass (interpreter alone)", baseline)
        row('python -c "import pint"', pint_import)
        row("speccheck check one.yaml", human, f"   {human[0] / pint_import[0]:.2f}x pint (median "
            f"{human[1] / pint_import[1]:.2f}x)")
        row("speccheck check --format json one.yaml", as_json, f"   {as_json[0] / pint_import[0]:.2f}x pint "
            f"(median {as_json[1] / pint_import[1]:.2f}x)")
        print()

        # ---------------------------------------------------------- 3. scaling
        print("3. Scaling (best of runs; per file = total / n; marginal = (total - cold json) / n)")
        sizes = [100, 1000] if args.quick else [100, 1000, 10_000]
        for n in sizes:
            folder = specs(n)
            an = a if n == 1000 else runner.time(check_args(str(folder)), ok=CHECK_OK)
            bn = b if n == 1000 else runner.time([str(reference), args.schema, str(folder)])
            print(f"  n={n:>6}  (a) {an[0]:8.2f} s  {an[0] / n * 1e3:6.2f} ms/file  marginal "
                  f"{(an[0] - as_json[0]) / n * 1e3:6.2f} ms/file   |  (b) {bn[0]:7.2f} s  "
                  f"{bn[0] / n * 1e3:6.2f} ms/file   a/b {an[0] / bn[0]:.2f}x")
        print()

        # ---------------------------------------------------------- 4. stages
        print("4. Scaling with the length of the beam path (100 specs each, every spec with a path)")
        per_stage = []
        for n_stages in (1, 10, 100):
            folder = tmp / f"stages-{n_stages}"
            recs = generate(100, folder, seed=args.seed, error_rate=0.0, stages=n_stages)
            with_path = sum(1 for r in recs if r.get("stages"))
            t = runner.time(check_args(str(folder)), ok=CHECK_OK)
            marginal = (t[0] - as_json[0]) / 100
            per_stage.append((n_stages, marginal))
            print(f"  stages={n_stages:>4}  {with_path} specs with a path   (a) {t[0]:7.2f} s   "
                  f"{t[0] / 100 * 1e3:7.2f} ms/file   marginal {marginal * 1e3:7.2f} ms/file")
        (s1, m1), _, (s100, m100) = per_stage
        print(f"  time per added stage: {(m100 - m1) / (s100 - s1) * 1e3:.3f} ms/spec/stage "
              f"(from 1 to 100 stages)")
        if args.keep:
            print(f"\nkept {tmp}")
    finally:
        if not args.keep:
            shutil.rmtree(tmp, ignore_errors=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
