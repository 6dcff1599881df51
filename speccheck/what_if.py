"""What-if on the command line: ``--set INPUT=VALUE`` (on ``check`` and ``solve``) and the
``solve`` command, the range of one input over which every target is met and no error is
reported (exit 0; 1 when the range is empty; 2 on a usage error)."""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path

from speccheck import api, files
from speccheck.reading.loader import Limits


def add_solve(sub) -> None:
    v = sub.add_parser("solve", help="the range of one input over which every target is met and no error is "
                       "reported")
    v.add_argument("path", metavar="FILE", help="a spec file ('-': standard input)")
    v.add_argument("--for", dest="input", required=True, metavar="INPUT",
                   help="the input: laser.<quantity>, <stage>.<parameter> or <operating point>.<quantity>")
    v.add_argument("--format", default="human", choices=["human", "json"], help="output format (default human)")
    set_option(v)
    vwhere = v.add_mutually_exclusive_group()
    vwhere.add_argument("--config", metavar="FILE", help="read the project configuration from FILE")
    vwhere.add_argument("--no-config", action="store_true", help="ignore any project configuration")


def set_option(p) -> None:
    p.add_argument("--set", action="append", type=setting, default=[], metavar="INPUT=VALUE", dest="settings",
                   help="what if: check with INPUT (laser.<quantity>, <stage>.<parameter>, <operating point>."
                   "<quantity>) set to VALUE, written as in a spec ('3 mJ', '>= 20 W'); the file is not changed; "
                   "repeatable")


def setting(text: str) -> tuple[str, str]:
    name, eq, value = text.partition("=")
    name, value = name.strip(), value.strip()
    if not eq or not api.valid_setting(name, value):
        raise argparse.ArgumentTypeError(f"expected INPUT=VALUE such as laser.pulse_energy='3 mJ' or "
                                         f"lens.focal_length='100 mm', got {text!r}")
    return name, value


def solve(args, stdout, stderr, stdin, config) -> int:
    """``speccheck solve FILE --for INPUT``: exit 0 with a range, 1 when it is empty, 2 on a usage error."""
    import json

    from speccheck.checking import overrides
    from speccheck.checking.document import Checker, Options
    from speccheck.reading.units import UnitSystem
    from speccheck.checking.wording import show

    if config is None:
        return 2
    if not args.path:
        stderr.write("speccheck: an empty path was given (an unset variable?); name a spec file\n")
        return 2
    shown = files.STDIN_NAME if args.path == "-" else files.printable(args.path)
    try:
        data = files.read_stdin(stdin if stdin is not None else sys.stdin, Limits.max_bytes) if args.path == "-" \
            else files.read_spec(Path(args.path), Limits.max_bytes)
    except OSError as exc:
        stderr.write(f"speccheck: cannot read {shown}: {files.reason(exc)}\n")
        return 2
    units = UnitSystem()
    checker = Checker(units, Options(tolerance=config.tolerance, tolerances=config.tolerances,
                                     settings=tuple(args.settings), remedies="none"),
                      read=files.DataReader())
    try:
        result, found = checker.solve(data, shown, args.input)
    except overrides.SettingProblem as exc:
        stderr.write(f"speccheck: {shown}: {files.printable(str(exc))}\n")
        return 2
    if args.format == "json":
        def num(x):
            return None if x is None or not math.isfinite(x) else float("%.15g" % x)

        searched = [num(x) for x in found.searched] if found.searched else None
        text = json.dumps({"input": found.input, "low": num(found.low), "high": num(found.high),
                           "unit": found.unit, "reachable": found.reachable, "searched": searched},
                          ensure_ascii=False) + "\n"
    else:
        unit = found.display_unit or found.unit

        def v(x):
            return show(units, x, unit) if unit != "1" else f"{x:.4g}"

        now = f" (now {v(found.value)})" if found.value is not None else ""
        settings = "".join(f"with --set {s}: " for s in result.settings)
        searched = f"{v(found.searched[0])} … {v(found.searched[1])}" if found.searched else ""
        if not found.reachable:
            text = (f"{shown}: {settings}no value of {found.input}"
                    + (f" in the range searched ({searched})" if searched else "")
                    + f" meets every target without an error{now}" + (f"; {found.why}" if found.why else "") + "\n")
        else:
            span = (f"at {v(found.low)} … {v(found.high)}" if found.low is not None and found.high is not None else
                    f"at ≥ {v(found.low)}" if found.low is not None else f"at ≤ {v(found.high)}"
                    if found.high is not None else f"at every value searched ({searched})")
            text = f"{shown}: {settings}every target is met and no error is reported for {found.input} {span}{now}\n"
    if not files.write_stdout(stdout, stderr, lambda out: out.write(text), args.format):
        return 2
    units.save()
    return 0 if found.reachable else 1


