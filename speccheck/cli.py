"""The command line: ``run(argv, stdout, stderr) -> int`` and a thin ``main``.

Exit codes: 0 no error-level finding; 1 at least one (with ``--strict``,
warnings count too); 2 usage or I/O failure (a missing file).  Input files
are only ever opened for reading.
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from . import __version__
from .findings import FileResult, Finding

SPEC_SUFFIXES = (".yaml", ".yml")


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="speccheck", description="Check ultrafast laser experiment specs: "
                                "units, physics consistency, and every number that follows.")
    p.add_argument("--version", action="version", version=f"speccheck {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")
    c = sub.add_parser("check", help="check spec files or folders of them")
    c.add_argument("paths", nargs="+", metavar="PATH", help="a spec file, or a folder searched for *.yaml / *.yml")
    c.add_argument("--format", default="human", choices=["human", "json", "review"],
                   help="output format (default human)")
    c.add_argument("--review", action="store_true",
                   help="a short review: consistent claims, impossible ones, numbers implied but not stated "
                   "(same as --format review)")
    c.add_argument("-o", "--output", metavar="FILE", help="write the report to FILE instead of standard output")
    c.add_argument("--strict", action="store_true", help="exit 1 on warnings too")
    c.add_argument("--no-color", action="store_true", help="never colour the output (also: NO_COLOR=1)")
    c.add_argument("--color", action="store_true", help="colour the output even when it is not a terminal")
    c.add_argument("--no-sheet", action="store_true", help="human format: findings only, no sheet")
    sub.add_parser("rules", help="list every rule with its id, severity and summary")
    e = sub.add_parser("explain", help="explain a rule: the physics, the source, examples")
    e.add_argument("rule", metavar="RULE-ID")
    sub.add_parser("relations", help="list the relation table")
    sub.add_parser("schema", help="print the JSON Schema of the spec format")
    return p


def _spec_files(paths: list[str]) -> list[tuple[str, Path | None]]:
    """Expand folders into their spec files (sorted, hidden folders skipped)."""
    out: list[tuple[str, Path | None]] = []
    for raw in paths:
        path = Path(raw)
        if path.is_dir():
            found = []
            for root, dirs, files in os.walk(path):
                dirs[:] = sorted(d for d in dirs if not d.startswith("."))
                found += [Path(root) / f for f in files if f.endswith(SPEC_SUFFIXES) and not f.startswith(".")]
            out += [(str(f), f) for f in sorted(found)]
        else:
            out.append((raw, path))
    return out


def read_beside(name: str, spec: str, max_bytes: int = 50 * 1024 * 1024) -> bytes:
    """Read a data file named in a spec: a relative path inside the spec's folder, size-bounded."""
    folder = Path(spec).resolve().parent
    target = (folder / name).resolve()
    if Path(name).is_absolute() or not target.is_relative_to(folder):
        raise ValueError("data files must be given relative to the spec, inside its folder")
    if target.stat().st_size > max_bytes:
        raise ValueError(f"larger than {max_bytes} bytes")
    with open(target, "rb") as f:
        return f.read()


def _read_failure(name: str, exc: OSError) -> FileResult:
    reason = exc.strerror or type(exc).__name__
    if isinstance(exc, IsADirectoryError):
        reason = "is a directory"
    finding = Finding("unreadable-file", "error", f"cannot read {name}: {reason}", name)
    return FileResult(name, (finding,))


def _check(args, stdout, stderr) -> int:
    from .check import Checker
    from .formats import OutputOptions, writer
    from .units import UnitSystem

    units = UnitSystem()
    checker = Checker(units, read=read_beside)
    results: list[FileResult] = []
    io_failure = False
    for name, path in _spec_files(args.paths):
        try:
            data = path.read_bytes()
        except OSError as exc:
            io_failure = True
            stderr.write(f"speccheck: cannot read {name}: {exc.strerror or exc}\n")
            results.append(_read_failure(name, exc))
            continue
        results.append(checker.check_text(data, name))
    to_terminal = args.output is None and hasattr(stdout, "isatty") and stdout.isatty()
    color = (args.color or to_terminal) and not args.no_color and not os.environ.get("NO_COLOR")
    options = OutputOptions(units=units, color=color, show_sheet=not args.no_sheet)
    write = writer("review" if args.review else args.format)
    if args.output:
        _write_atomically(Path(args.output), lambda out: write(results, out, options))
    else:
        write(results, stdout, options)
    if io_failure:
        return 2
    failing = {"error", "warning"} if args.strict else {"error"}
    return 1 if any(f.severity in failing for r in results for f in r.findings) else 0


def _write_atomically(target: Path, fill) -> None:
    import tempfile

    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", dir=target.parent or ".")
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as out:
            fill(out)
        os.replace(tmp, target)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def _rules(stdout) -> int:
    from .rules import RULES

    width = max(len(r) for r in RULES)
    for r in RULES.values():
        stdout.write(f"{r.id:<{width}}  {r.severity:<7}  {r.summary}\n")
    return 0


def _explain(rule_id: str, stdout, stderr) -> int:
    import difflib

    from .relations import RELATIONS
    from .rules import RULES

    r = RULES.get(rule_id)
    if r is None:
        guess = difflib.get_close_matches(rule_id, list(RULES), n=1)
        hint = f"; did you mean {guess[0]!r}?" if guess else "; `speccheck rules` lists them"
        stderr.write(f"speccheck: unknown rule {rule_id!r}{hint}\n")
        return 2
    stdout.write(f"{r.id} ({r.severity}): {r.summary}\n\n{r.explanation}\n")
    if r.id == "relation-conflict":
        stdout.write("\nRelations:\n" + "".join(f"  {x.id:<24} {x.formula}\n" for x in RELATIONS))
    if r.failing:
        stdout.write("\nFails:\n" + "".join(f"  {line}\n" for line in r.failing.splitlines()))
    if r.passing:
        stdout.write("\nPasses:\n" + "".join(f"  {line}\n" for line in r.passing.splitlines()))
    return 0


def _relations(stdout) -> int:
    from .relations import RELATIONS

    for x in RELATIONS:
        stdout.write(f"{x.id:<24} {x.formula}\n{'':<24} source: {x.source}\n")
    return 0


def run(argv: list[str], stdout=None, stderr=None) -> int:
    stdout = stdout or sys.stdout
    stderr = stderr or sys.stderr
    parser = _parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse exits on --help, --version and usage errors
        return 0 if exc.code in (0, None) else 2
    if args.command == "check":
        return _check(args, stdout, stderr)
    if args.command == "rules":
        return _rules(stdout)
    if args.command == "explain":
        return _explain(args.rule, stdout, stderr)
    if args.command == "relations":
        return _relations(stdout)
    if args.command == "schema":
        from .schema import schema_text

        stdout.write(schema_text())
        return 0
    parser.print_help(stdout)
    return 2


def main() -> None:
    try:
        code = run(sys.argv[1:])
    except KeyboardInterrupt:
        code = 130
    except BrokenPipeError:
        code = 0
    sys.exit(code)
