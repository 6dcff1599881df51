"""Where ``speccheck check`` spends its time: prints figures, asserts nothing.

    python benchmarks/hotspots.py [--python PATH] [--n 1000] [--top 25] [--keep]

1. cProfile of ``python -m speccheck check --format json FOLDER`` over n
   generated specs (cumulative and own time; profiler overhead inflates
   functions that are called very often, so see 2 for wall-clock shares).
2. Wall-clock phase breakdown of the same work in one process, without a
   profiler: imports, unit registry, reading, YAML, schema, the block check
   (and its parts), building and writing the JSON report.  Phases are timed by
   wrapping the package's functions from outside; a phase whose function is
   not found is reported as such.
3. Experiments that bound what a change could win, on the same documents:
   a hand-compiled validator for the schema's keywords against jsonschema,
   and JSON encoding alternatives.
4. ``-X importtime`` of ``speccheck check one.yaml``, summed per package.

Runs in subprocesses of ``--python`` with this environment passed through.
"""

from __future__ import annotations

import argparse
import os
import re
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from generate import generate  # noqa: E402
from run import subprocess_env  # noqa: E402

SCHEMA = HERE.parent / "schemas" / "spec-v1.schema.json"

PHASES = r'''
import json, os, sys, time
T = {}
def add(name, dt):
    T[name] = T.get(name, 0.0) + dt
folder, schema_path = sys.argv[1], sys.argv[2]
t0 = time.perf_counter()
import pint
add("import pint (and numpy through it)", time.perf_counter() - t0)
t0 = time.perf_counter()
import jsonschema, jsonschema.exceptions
add("import jsonschema", time.perf_counter() - t0)
t0 = time.perf_counter()
import speccheck.cli as cli
from speccheck.files import spec_files
import speccheck.checking.document as chk
from speccheck.reading.units import UnitSystem
add("import speccheck (its own modules, yaml)", time.perf_counter() - t0)

def wrap(owner, name, label):
    fn = getattr(owner, name, None)
    if fn is None:
        print(f"  (phase {label!r}: {getattr(owner, '__name__', owner)}.{name} not found)")
        return
    def timed(*a, **k):
        s = time.perf_counter()
        try:
            return fn(*a, **k)
        finally:
            add(label, time.perf_counter() - s)
    setattr(owner, name, timed)

wrap(chk, "load", "  YAML load (compose + own builder)")
wrap(chk, "validate", "  schema validate (jsonschema + mapping)")
import speccheck.checking.column as blk
block = blk.BlockCheck
if block is not None:
    wrap(block, "run", "  block check, total")
    wrap(block, "parse_values", "    block: parse_values")
import speccheck.checking.cells as cells_mod
import speccheck.checking.column_limits as limits_mod
import speccheck.checking.conflicts as conflicts_mod
wrap(conflicts_mod, "report", "    block: conflicts")
wrap(cells_mod, "build", "    block: cells")
wrap(limits_mod, "report_limits", "    block: limits")
wrap(limits_mod, "report_assumptions", "    block: assumptions")
wrap(blk, "diagnose", "    block: diagnose (propagation)")

t0 = time.perf_counter()
units = UnitSystem()
add("UnitSystem() (pint registry, constants)", time.perf_counter() - t0)
checker = chk.Checker(units)
t0 = time.perf_counter()
files = spec_files([folder])
add("find files", time.perf_counter() - t0)
results = []
for name, path in files:
    s = time.perf_counter()
    data = path.read_bytes()
    add("read files", time.perf_counter() - s)
    s = time.perf_counter()
    results.append(checker.check_text(data, name))
    add("check_text, total", time.perf_counter() - s)
from speccheck.formats import json_format
t0 = time.perf_counter()
doc = json_format.document(results)
add("  JSON: build document (separately)", time.perf_counter() - t0)
with open(os.devnull, "w", encoding="utf-8") as out:
    t0 = time.perf_counter()
    json_format.write(results, out)
    add("JSON: write() as shipped (build + dump)", time.perf_counter() - t0)
    ways = {
        "json.dump(doc, out, indent=2)   [as now]":
            lambda: json.dump(doc, out, indent=2, ensure_ascii=False, allow_nan=False),
        "out.write(json.dumps(doc, indent=2))":
            lambda: out.write(json.dumps(doc, indent=2, ensure_ascii=False, allow_nan=False)),
        "out.write(json.dumps(doc))  compact, C encoder":
            lambda: out.write(json.dumps(doc, ensure_ascii=False, allow_nan=False)),
        "one compact json.dumps per file, joined with newlines (JSON Lines)":
            lambda: out.write("\n".join(json.dumps(f, ensure_ascii=False, allow_nan=False) for f in doc["files"])),
    }
    alt = {}
    for label, way in ways.items():
        best = float("inf")
        for _ in range(3):
            t0 = time.perf_counter(); way(); best = min(best, time.perf_counter() - t0)
        alt[label] = best
print(json.dumps({"phases": T, "json_alternatives": alt, "files": len(files)}))
'''

VALIDATOR = r'''
"""Experiment: speccheck's compiled schema checks (fastschema.py) against jsonschema."""
import copy, json, sys, time
import yaml
from jsonschema import Draft202012Validator

from speccheck.reading.fastschema import compile_schema  # the compiled checks speccheck ships

schema = json.load(open(sys.argv[1], encoding="utf-8"))
docs = [yaml.load(open(p, "rb").read().decode("utf-8-sig"), Loader=yaml.CSafeLoader) for p in sys.argv[2:]]
t0 = time.perf_counter(); fast = compile_schema(schema); t_compile = time.perf_counter() - t0
t0 = time.perf_counter(); v = Draft202012Validator(schema); t_build = time.perf_counter() - t0

# agreement on the documents and on spoilt copies of them
spoilt = []
for d in docs[:200]:
    for how in range(8):
        x = copy.deepcopy(d)
        if how == 0: x["laser"]["wavelenght"] = "800 nm"
        elif how == 1: x["spec_version"] = True
        elif how == 2: x["laser"]["pulse_shape"] = "triangle"
        elif how == 3: x["laser"]["pulse_energy"] = {}
        elif how == 4: x.pop("laser")
        elif how == 5: x["laser"]["m2"] = [1.1]
        elif how == 6: x["operating_points"] = [{"name": "low", "average_power": "1 W"}, {"nmae": "x"}]
        elif how == 7: x["operating_points"] = [{"name": "high", "wavelenght": "1 um"}]
        spoilt.append(x)
fine = []
for d in docs[:100]:
    x = copy.deepcopy(d)
    x["operating_points"] = [{"name": "low power", "average_power": "1 W"}, {"pulse_shape": "sech2"}]
    fine.append(x)
disagree = sum(fast(x) != v.is_valid(x) for x in docs + spoilt + fine)
invalid = sum(not fast(x) for x in spoilt)

rounds = 5
t0 = time.perf_counter()
for _ in range(rounds):
    for d in docs: list(v.iter_errors(d))
t_iter = (time.perf_counter() - t0) / rounds
t0 = time.perf_counter()
for _ in range(rounds):
    for d in docs: v.is_valid(d)
t_valid = (time.perf_counter() - t0) / rounds
t0 = time.perf_counter()
for _ in range(rounds):
    for d in docs: fast(d)
t_fast = (time.perf_counter() - t0) / rounds
print(json.dumps({"n": len(docs), "disagree": disagree, "checked": len(docs) + len(spoilt) + len(fine),
                  "spoilt_invalid": invalid, "spoilt": len(spoilt),
                  "iter_errors": t_iter, "is_valid": t_valid, "compiled": t_fast,
                  "compile": t_compile, "validator_build": t_build}))
'''


ENV: dict = {}


def run(python: str, args: list[str], cwd: Path, ok=(0,), capture=True) -> subprocess.CompletedProcess:
    proc = subprocess.run([python, *args], cwd=cwd, env=ENV or os.environ.copy(), stdin=subprocess.DEVNULL,
                          stdout=subprocess.PIPE if capture else subprocess.DEVNULL,
                          stderr=subprocess.PIPE, text=True)
    if proc.returncode not in ok:
        raise SystemExit(f"hotspots: {' '.join(args[:4])} exited {proc.returncode}\n{proc.stderr[-3000:]}")
    return proc


def short(name: str) -> str:
    """A pstats function key made readable: package-relative path, line and name."""
    file, line, func = name
    for marker in ("site-packages/", "/lib/python3."):
        if marker in file:
            file = file.split(marker, 1)[1]
            if marker.startswith("/lib"):
                file = "stdlib/" + file.split("/", 1)[1]
            break
    else:
        if "/speccheck/" in file:
            file = "speccheck/" + file.rsplit("/speccheck/", 1)[1]
    return f"{file}:{line}({func})" if line else func


def profile(python: str, folder: Path, tmp: Path, top: int) -> None:
    import pstats

    out = tmp / "check.prof"
    run(python, ["-m", "speccheck", "check", "--format", "json", str(folder)], tmp, ok=(0, 1))  # bytecode, caches
    run(python, ["-m", "cProfile", "-o", str(out), "-m", "speccheck", "check", "--format", "json", str(folder)],
        tmp, ok=(0, 1))
    stats = pstats.Stats(str(out))
    total = max(v[3] for v in stats.stats.values())  # the outermost cumulative time
    print(f"1. cProfile, {total:.2f} s under the profiler")
    print(f"   {'cum %':>6} {'own %':>6} {'calls':>9}  function")
    items = sorted(stats.stats.items(), key=lambda kv: -kv[1][3])
    skip = re.compile(r"<frozen|\{built-in method builtins.exec\}|<string>|runpy|__main__\.py|cli\.py.*\((main|run)\)")
    shown = 0
    for key, (cc, nc, tt, ct, _) in items:
        label = short(key)
        if skip.search(label) or skip.search(key[0]):
            continue
        print(f"   {100 * ct / total:6.1f} {100 * tt / total:6.1f} {nc:9d}  {label}")
        shown += 1
        if shown >= top:
            break
    print("\n   by own time")
    for key, (cc, nc, tt, ct, _) in sorted(stats.stats.items(), key=lambda kv: -kv[1][2])[:top // 2]:
        print(f"   {100 * ct / total:6.1f} {100 * tt / total:6.1f} {nc:9d}  {short(key)}")
    print()


def phases(python: str, folder: Path, tmp: Path) -> None:
    import json

    script = tmp / "phases.py"
    script.write_text(PHASES, encoding="utf-8")
    run(python, ["-c", "pass"], tmp)  # warm
    import time

    t0 = time.perf_counter()
    run(python, ["-c", "pass"], tmp)
    interpreter = time.perf_counter() - t0
    t0 = time.perf_counter()
    proc = run(python, [str(script), str(folder), str(SCHEMA)], tmp)
    wall = time.perf_counter() - t0
    lines = proc.stdout.strip().splitlines()
    for line in lines[:-1]:
        print(line)
    data = json.loads(lines[-1])
    n = data["files"]
    phases_ = data["phases"]
    top_level = ("import pint", "import jsonschema", "import speccheck", "UnitSystem()", "find files",
                 "read files", "check_text, total", "JSON: write()")
    shipped = sum(t for name, t in phases_.items() if name.startswith(top_level))
    print(f"2. Phases, one process over {n} files, without a profiler: {shipped * 1000:.0f} ms of timed work "
          f"+ interpreter start {interpreter * 1000:.0f} ms (process wall {wall * 1000:.0f} ms, which also "
          f"ran the experiments below)")
    print(f"   {'ms':>8} {'ms/file':>8} {'share':>7}  phase (indented: part of the line above it)")
    for name, t in phases_.items():
        print(f"   {t * 1000:8.1f} {t / n * 1000:8.3f} {100 * t / shipped:6.1f}%  {name}")
    print("   JSON encoding alternatives for the same, already built document (best of 3):")
    for name, t in data["json_alternatives"].items():
        print(f"   {t * 1000:8.1f} {t / n * 1000:8.3f} {100 * t / shipped:6.1f}%  {name}")
    print()


def validator(python: str, folder: Path, tmp: Path) -> None:
    import json

    script = tmp / "validator.py"
    script.write_text(VALIDATOR, encoding="utf-8")
    files = sorted(str(p) for p in folder.rglob("*.y*ml"))
    proc = run(python, [str(script), str(SCHEMA), *files], tmp)
    d = json.loads(proc.stdout)
    n = d["n"]
    print(f"3. Schema validation of {n} parsed documents (best kept per call; averages of 5 rounds)")
    for key, label in (("iter_errors", "jsonschema iter_errors (what the reference runs)"),
                       ("is_valid", "jsonschema is_valid"),
                       ("compiled", "speccheck.reading.fastschema: the schema compiled to plain Python checks")):
        print(f"   {d[key] * 1000:8.1f} ms {d[key] / n * 1e6:8.1f} µs/doc  {label}")
    print(f"   compiled check vs jsonschema: {d['disagree']} disagreements over {d['checked']} documents "
          f"({d['spoilt_invalid']}/{d['spoilt']} spoilt copies rejected); compile {d['compile'] * 1000:.2f} ms, "
          f"Draft202012Validator() {d['validator_build'] * 1000:.2f} ms")
    print()


def importtime(python: str, one: Path, tmp: Path, top: int) -> None:
    run(python, ["-m", "speccheck", "check", str(one)], tmp, ok=(0, 1))  # warm bytecode caches
    proc = run(python, ["-X", "importtime", "-m", "speccheck", "check", str(one)], tmp, ok=(0, 1))
    rows = []
    for line in proc.stderr.splitlines():
        m = re.match(r"import time:\s+(\d+) \|\s+(\d+) \|(\s*)(\S+)", line)
        if m:
            rows.append((int(m[1]), int(m[2]), len(m[3]), m[4]))
    total = sum(r[0] for r in rows)
    per_package: dict[str, int] = {}
    for self_us, _, _, name in rows:
        per_package[name.split(".")[0]] = per_package.get(name.split(".")[0], 0) + self_us
    print(f"4. -X importtime of `speccheck check one.yaml`: {total / 1000:.1f} ms of imports in all")
    print("   self time summed per top-level package:")
    for name, us in sorted(per_package.items(), key=lambda kv: -kv[1])[:top // 2]:
        print(f"   {us / 1000:8.1f} ms {100 * us / total:5.1f} %  {name}")
    print("   biggest cumulative imports:")
    for self_us, cum, depth, name in sorted(rows, key=lambda r: -r[1])[:top]:
        print(f"   {cum / 1000:8.1f} ms  {'  ' * (depth // 2)}{name}")
    print()


def main(argv: list[str] | None = None) -> int:
    p = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    p.add_argument("--python", default=sys.executable)
    p.add_argument("--n", type=int, default=1000)
    p.add_argument("--top", type=int, default=25)
    p.add_argument("--seed", type=int, default=0)
    p.add_argument("--keep", action="store_true")
    p.add_argument("--as-is", action="store_true", help="pass the environment through without caching bytecode")
    args = p.parse_args(argv)
    tmp = Path(tempfile.mkdtemp(prefix="speccheck-hotspots-"))
    env, note = subprocess_env(tmp, args.as_is)
    ENV.update(env)
    print(f"({note})\n")
    try:
        folder = tmp / "specs"
        records = generate(args.n, folder, seed=args.seed)
        one = Path(next(r["path"] for r in records if not r["error"]))
        profile(args.python, folder, tmp, args.top)
        phases(args.python, folder, tmp)
        validator(args.python, folder, tmp)
        importtime(args.python, one, tmp, args.top)
        if args.keep:
            print(f"kept {tmp}")
    finally:
        if not args.keep:
            shutil.rmtree(tmp, ignore_errors=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
