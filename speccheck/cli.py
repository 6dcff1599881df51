"""The command line: ``run(argv, stdout, stderr) -> int`` and a thin ``main``.

Exit codes: 0 no finding at the failing level; 1 at least one (errors by
default; ``--strict`` or ``fail-on`` in the project configuration make
warnings or notes count too; the laser-safety caution never counts); 2 usage or I/O failure (a missing file, a glob
that matches nothing, a mistake in the configuration).  Input files are only
ever opened for reading.
"""

from __future__ import annotations

import argparse
import errno
import os
import re
import sys
from pathlib import Path

from speccheck._version import __version__
from speccheck import api, files, what_if
from speccheck.reading.loader import MAX_DEPTH, Limits

MAX_FILE_SIZE = 1024 * 1024 * 1024  # the largest --max-file-size: a spec is read whole into memory

def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="speccheck", description="Check ultrafast laser experiment specs: "
                                "units, physics consistency, and every number that follows.")
    p.add_argument("--version", action="version", version=f"speccheck {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")
    from speccheck.formats import FORMATS
    from speccheck.starter import KINDS

    c = sub.add_parser("check", help="check spec files or folders of them")
    c.add_argument("paths", nargs="+", metavar="PATH",
                   help="a spec file, a folder searched for *.yaml / *.yml, or a quoted glob ('specs/**/*.yaml')")
    c.add_argument("--format", default="human", choices=list(FORMATS),
                   help="output format (default human)")
    c.add_argument("--review", action="store_true",
                   help="a short review: consistent claims, impossible ones, numbers implied but not stated "
                   "(same as --format review)")
    c.add_argument("-o", "--output", metavar="FILE",
                   help="write the report to FILE instead of standard output ('-': standard output)")
    c.add_argument("--strict", action="store_true", help="exit 1 on warnings too (same as --fail-on warning)")
    c.add_argument("--fail-on", choices=["error", "warning", "note"],
                   help="the lowest severity that makes the exit code 1 (default error, or the configuration's)")
    where = c.add_mutually_exclusive_group()
    where.add_argument("--config", metavar="FILE",
                       help="read the project configuration from FILE (speccheck.toml, or a pyproject.toml "
                       "with [tool.speccheck]) instead of searching for it")
    where.add_argument("--no-config", action="store_true", help="ignore any project configuration")
    c.add_argument("--no-color", action="store_true", help="never colour the output (also: NO_COLOR=1)")
    c.add_argument("--color", action="store_true", help="colour the output even when it is not a terminal")
    sheet = c.add_mutually_exclusive_group()
    sheet.add_argument("--sheet", action="store_true",
                       help="human format: the sheet of every file, also when several are checked")
    sheet.add_argument("--no-sheet", action="store_true",
                       help="human format: findings only, no sheet (default when several files are checked)")
    what_if.set_option(c)
    c.add_argument("--jobs", "-j", type=_positive_int, default=1, metavar="N",
                   help="check the files in N processes (the report is the same; gains only with more cores)")
    limits = c.add_argument_group("input limits (each file that exceeds one gets an input-limit finding)")
    limits.add_argument("--max-file-size", type=_positive_int, default=Limits.max_bytes, metavar="BYTES",
                        help=f"largest spec file read (default {Limits.max_bytes})")
    limits.add_argument("--max-nodes", type=_positive_int, default=Limits.max_nodes, metavar="N",
                        help=f"most YAML nodes in a document, aliases expanded (default {Limits.max_nodes})")
    limits.add_argument("--max-depth", type=_positive_int, default=Limits.max_depth, metavar="N",
                        help=f"deepest nesting of mappings and lists (default {Limits.max_depth})")
    what_if.add_solve(sub)
    sub.add_parser("rules", help="list every rule with its id, severity and summary")
    e = sub.add_parser("explain", help="explain a rule: the physics, the source, examples")
    e.add_argument("rule", metavar="RULE-ID")
    sub.add_parser("relations", help="list the relation table")
    sub.add_parser("schema", help="print the JSON Schema of the spec format")
    n = sub.add_parser("new", help="write a commented starter spec that passes the check")
    n.add_argument("--kind", default="oscillator", choices=list(KINDS), help="the kind of setup (default oscillator)")
    n.add_argument("-o", "--output", metavar="FILE", help="write the spec to FILE instead of standard output")
    n.add_argument("--force", action="store_true", help="replace FILE if it exists")
    n.add_argument("--schema", metavar="PATH-OR-URL",
                   help="add the editor modeline '# yaml-language-server: $schema=PATH-OR-URL'")
    return p


def _positive_int(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"expected a number of at least 1, got {value}")
    return value


def _config(args, stderr):
    """The project configuration the arguments ask for; None after reporting a mistake in it."""
    from speccheck.reading import config as cfg

    try:
        return api.load_config(False if args.no_config else args.config or None)
    except cfg.ConfigError as exc:
        stderr.write(f"speccheck: {exc}\n")
        return None


def _check(args, stdout, stderr, stdin=None) -> int:
    from speccheck.formats import OutputOptions, writer
    from speccheck.reading.units import UnitSystem

    if any(not p for p in args.paths):
        stderr.write("speccheck: an empty path was given (an unset variable?); name a file, a folder or '-'\n")
        return 2
    if args.output == "":
        stderr.write("speccheck: -o was given an empty path (an unset variable?); name the report file, or '-' "
                     "for standard output\n")
        return 2
    if args.output == "-":  # standard output, as without -o
        args.output = None
    elif args.output and args.output.endswith(("/", os.sep)):
        stderr.write(f"speccheck: cannot write {files.printable(args.output)}: it names a folder; name the report "
                     "file\n")
        return 2
    if args.max_file_size > MAX_FILE_SIZE:
        stderr.write(f"speccheck: --max-file-size {args.max_file_size} is more than speccheck reads; using "
                     f"{MAX_FILE_SIZE}\n")
        args.max_file_size = MAX_FILE_SIZE
    config = _config(args, stderr)
    if config is None:
        return 2
    found = api.find(args.paths, config)
    for message in found.messages:
        stderr.write(f"speccheck: {message}\n")
    from speccheck.reading import unit_table

    inputs = [str(path) for name, path in found.files if name != "-"] + (
        [str(config.path)] if getattr(config, "path", None) else []) + [str(p) for p in (unit_table.path(),) if p]
    target = None
    if args.output:
        try:
            target = files.output_target(args.output, inputs)
        except files.OutputRefused as exc:
            stderr.write(f"speccheck: cannot write {files.printable(args.output)}: {exc}\n")
            return 2
    units = UnitSystem()
    if args.max_depth > MAX_DEPTH:
        stderr.write(f"speccheck: --max-depth {args.max_depth} is more than speccheck can read; using {MAX_DEPTH}\n")
    limits = Limits(max_bytes=args.max_file_size, max_nodes=args.max_nodes, max_depth=args.max_depth)
    fail_on = api.fail_level(config, args.fail_on, args.strict)
    done = api.run(found, config, settings=tuple(args.settings), fail_on=fail_on, limits=limits, jobs=args.jobs,
                   profiles=not args.review and args.format == "html",  # only the HTML report plots the field
                   remedies="all" if args.review or args.format == "review" else "unmet", stdin=stdin, units=units)
    for message in done.messages[len(found.messages):]:
        stderr.write(f"speccheck: {message}\n")
    if any(r.set_problems for r in done.files):
        return 2
    results = list(done.files)
    to_terminal = args.output is None and hasattr(stdout, "isatty") and stdout.isatty()
    color = (args.color or to_terminal) and not args.no_color and not os.environ.get("NO_COLOR")
    import shutil

    options = OutputOptions(units=units, color=color, fail_on=fail_on,
                            show_sheet=True if args.sheet else False if args.no_sheet else None,
                            width=shutil.get_terminal_size().columns if to_terminal and color else None)
    chosen = "review" if args.review else args.format
    write = writer(chosen)
    code = done.exit_code
    if target is not None:
        read_data = [p for p in done.data_files if files.same_file(str(target), Path(p))]
        if read_data:
            stderr.write(f"speccheck: cannot write {files.printable(args.output)}: it is "
                         f"{files.printable(read_data[0])}, a data file this run reads; input files are never "
                         "written\n")
            return 2
        try:
            files.write_atomically(target, lambda out: write(results, out, options))
        except OSError as exc:
            stderr.write(f"speccheck: cannot write {args.output}: {files.reason(exc)}\n")
            return 2
    elif not files.write_stdout(stdout, stderr, lambda out: write(results, out, options), chosen):
        return 2
    units.save()  # remember pint's answers for the next run
    return code


def _rules(stdout) -> int:
    from speccheck.records.rules import RULES

    width = max(len(r) for r in RULES)
    for r in RULES.values():
        stdout.write(f"{r.id:<{width}}  {r.severity:<7}  {r.summary}\n")
    return 0


# Words that mark a parenthesis of a rule's explanation as naming where its numbers come from.
_SOURCE_WORDS = re.compile(r"published|\bISO\b|\bIEC\b|\bANSI\b|CODATA|common practice|from memory|"
                           r"et al\.|\b(?:1[89]|20)\d\d\b|handbook|tables?\b", re.I)


def source_of(explanation: str) -> str | None:
    """The source a rule's explanation names in parentheses ("(ISO 11146)"), if any."""
    found = [m.group(1).strip() for m in re.finditer(r"\(([^()]*)\)", explanation)
             if _SOURCE_WORDS.search(m.group(1))]
    return "; ".join(dict.fromkeys(found)) or None


def _explain(rule_id: str, stdout, stderr) -> int:
    import difflib

    from speccheck.physics.relations import RELATIONS
    from speccheck.records.rules import RULES

    r = RULES.get(rule_id)
    if r is None:
        guess = difflib.get_close_matches(rule_id, list(RULES), n=1)
        hint = f"; did you mean {guess[0]!r}?" if guess else "; `speccheck rules` lists them"
        stderr.write(f"speccheck: unknown rule {rule_id!r}{hint}\n")
        return 2
    stdout.write(f"{r.id} ({r.severity}): {r.summary}\n\n{r.explanation}\n")
    if r.id == "relation-conflict":
        stdout.write("\nSource: each relation's own; `speccheck relations` lists them\n")
        stdout.write("\nRelations:\n" + "".join(f"  {x.id:<24} {x.formula}\n" for x in RELATIONS))
    else:
        source = r.source or source_of(r.explanation)
        if source:
            stdout.write(f"\nSource: {source}\n")
    if r.id == "relation-conflict":
        from speccheck.physics.quantities import QUANTITIES
        from speccheck.physics.stages import PARAM_TOLERANCES

        stdout.write("\nDefault tolerances of plain values (a spec's defaults or the configuration override them):\n")
        for q in QUANTITIES:
            stdout.write(f"  {q.name:<30} {q.tolerance * 100:g}%  {q.tolerance_why}\n")
        for name, (tol, why) in PARAM_TOLERANCES.items():
            stdout.write(f"  {name:<30} {tol * 100:g}%  {why}  (stage parameter)\n")
    if r.id == "stage-parameter":
        from speccheck.physics.stages import STAGE_KINDS

        stdout.write("\nStage kinds and their parameters (* required):\n")
        for kind in STAGE_KINDS.values():
            params = ", ".join(p.name + ("*" if p.required else "") for p in kind.params)
            extra = f"; at least one of {', '.join(kind.one_of)}" if kind.one_of else ""
            extra += "; two named branches" if kind.splits else ""
            stdout.write(f"  {kind.name:<14} {params}{extra}\n  {'':<14} {kind.summary}\n")
    if r.failing:
        stdout.write("\nFails:\n" + "".join(f"  {line}\n" for line in r.failing.splitlines()))
    if r.passing:
        stdout.write("\nPasses:\n" + "".join(f"  {line}\n" for line in r.passing.splitlines()))
    return 0


def _new(args, stdout, stderr) -> int:
    from speccheck.starter import starter

    if args.output is None:
        stdout.write(starter(args.kind, "spec.yaml", args.schema))
        return 0
    target = Path(args.output)
    if target.is_dir():
        stderr.write(f"speccheck: {args.output} is a folder; name the file to write\n")
        return 2
    if os.path.lexists(target) and not args.force:
        stderr.write(f"speccheck: {args.output} exists; use --force to replace it\n")
        return 2
    try:
        real = files.output_target(args.output)
    except files.OutputRefused as exc:
        stderr.write(f"speccheck: cannot write {files.printable(args.output)}: {exc}\n")
        return 2
    text = starter(args.kind, target.name, args.schema)
    try:
        files.write_atomically(real, lambda out: out.write(text))
    except OSError as exc:
        stderr.write(f"speccheck: cannot write {args.output}: {files.reason(exc)}\n")
        return 2
    stderr.write(f"speccheck: wrote {args.output} ({args.kind}); check it with `speccheck check {args.output}`\n")
    return 0


def _relations(stdout) -> int:
    from speccheck.physics.relations import RELATIONS

    for x in RELATIONS:
        stdout.write(f"{x.id:<24} {x.formula}\n{'':<24} source: {x.source}\n")
    return 0


def run(argv: list[str], stdout=None, stderr=None, stdin=None) -> int:
    stdout = stdout if stdout is not None else sys.stdout
    stderr = files.Quiet(stderr if stderr is not None else sys.stderr)
    parser = _parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse exits on --help, --version and usage errors
        return 0 if exc.code in (0, None) else 2
    if args.command == "check":
        return _check(args, stdout, stderr, stdin)
    if args.command == "solve":
        return what_if.solve(args, stdout, stderr, stdin, _config(args, stderr))
    if args.command == "rules":
        return _rules(stdout)
    if args.command == "explain":
        return _explain(args.rule, stdout, stderr)
    if args.command == "relations":
        return _relations(stdout)
    if args.command == "new":
        return _new(args, stdout, stderr)
    if args.command == "schema":
        from speccheck.reading.schema import schema_text

        stdout.write(schema_text())
        return 0
    parser.print_help(stdout)
    return 2


class _Closed:
    """Standard output when the process was started with it closed: every write fails."""

    def write(self, text: str) -> int:
        raise OSError(errno.EBADF, "standard output is closed")

    def flush(self) -> None:
        pass


def _terminated(signum, frame) -> None:
    raise SystemExit(128 + signum)  # unwinds, so a half-written report's temporary file is removed


def main() -> None:
    import signal

    for stream in (sys.stdout, sys.stderr):  # text for people: what the terminal cannot show is escaped
        try:
            stream.reconfigure(errors="backslashreplace")
        except (AttributeError, ValueError, OSError):
            pass
    try:
        signal.signal(signal.SIGTERM, _terminated)
    except (ValueError, OSError, AttributeError):  # not the main thread, or no SIGTERM here
        pass
    try:
        code = run(sys.argv[1:], stdout=sys.stdout if sys.stdout is not None else _Closed())
    except KeyboardInterrupt:
        code = 130
    except BrokenPipeError:
        files.silence(sys.stdout)
        code = 0
    except OSError as exc:
        (sys.stderr or sys.__stderr__).write(f"speccheck: {files.reason(exc)}\n") if sys.stderr else None
        code = 2
    sys.exit(code)
