"""Files on disk for the command line: finding spec files (folders, globs), reading the data
files a spec names beside it, and writing a report atomically.  Besides this module only the
configuration (``reading/config.py``) and the unit table (``reading/unit_table.py``) touch the
file system; the checking layer gets text and an injected reader."""

from __future__ import annotations

import dataclasses
import errno
import glob
import os
import re
import stat
import sys
from pathlib import Path

from speccheck.formats import MACHINE_FORMATS, inert
from speccheck.reading.patterns import compile_pattern
from speccheck.reading.disk import kind_of, read_regular
from speccheck.records.findings import FileResult, Finding

SPEC_SUFFIXES = (".yaml", ".yml")
_GLOB = re.compile(r"[*?[]")


@dataclasses.dataclass
class Expansion:
    files: list[tuple[str, Path]]  # (name as shown, path), in order, each file once
    unmatched: list[str]  # globs that matched no file
    skipped: list[str]  # files named on the command line that the configuration leaves out
    found: set[str] = dataclasses.field(default_factory=set)  # names found in a folder or by a glob

    def __iter__(self):  # iterating gives the files, as the plain list of earlier versions did
        return iter(self.files)

    def __len__(self) -> int:
        return len(self.files)


def walk(folder: Path, selector) -> list[Path]:
    """Spec files under a folder, sorted; hidden and excluded folders are not entered."""
    found = []
    for root, dirs, files in os.walk(folder):
        dirs[:] = sorted(d for d in dirs if not d.startswith(".")
                         and not (selector and selector.excluded(os.path.join(root, d))))
        found += [Path(root) / f for f in files if f.endswith(SPEC_SUFFIXES) and not f.startswith(".")
                  and (selector is None or selector.selected(os.path.join(root, f)))]
    return sorted(found)


def recursive_glob(pattern: str) -> list[str]:
    """What ``glob.glob(pattern, recursive=True)`` finds, but following each real folder once: a
    symbolic link back up the tree neither loops nor repeats a file (the standard glob follows
    links into folders without end)."""
    parts = pattern.replace(os.sep, "/").split("/")
    fixed = 0
    while fixed < len(parts) - 1 and not _GLOB.search(parts[fixed]):
        fixed += 1
    base = "/".join(parts[:fixed]) or ("/" if pattern.startswith("/") else ".")
    matcher = compile_pattern("/".join(parts[fixed:]))
    found, visited = [], set()
    for root, dirs, names in os.walk(base, followlinks=True):
        try:
            st = os.stat(root)
        except OSError:
            dirs[:] = []
            continue
        if (st.st_dev, st.st_ino) in visited:
            dirs[:] = []  # reached again through a link: already searched
            continue
        visited.add((st.st_dev, st.st_ino))
        dirs[:] = sorted(d for d in dirs if not d.startswith("."))
        for name in dirs + [n for n in names if not n.startswith(".")]:
            path = os.path.join(root, name)
            rel = os.path.relpath(path, base).replace(os.sep, "/")
            if matcher.fullmatch(rel):
                found.append(path[2:] if base == "." and path.startswith("./") else path)
    return found


def spec_files(paths: list[str], selector=None) -> Expansion:
    """Expand folders and globs into spec files: each argument in order, each expansion sorted."""
    out = Expansion([], [], [])
    seen: set[str] = set()

    def add(name: str, path: Path, found: bool = True) -> None:
        key = name if name == "-" else os.path.normcase(os.path.realpath(name))  # once, however reached
        if key not in seen:
            seen.add(key)
            out.files.append((name, path))
            if found:
                out.found.add(name)

    for raw in paths:
        path = Path(raw)
        if raw == "-":
            add("-", path, found=False)  # standard input
        elif _GLOB.search(raw) and not os.path.lexists(raw):
            matches = sorted(recursive_glob(raw) if "**" in raw else glob.glob(raw))
            if not any(os.path.isdir(m) or m.endswith(SPEC_SUFFIXES) for m in matches):
                out.unmatched.append(raw)
            for match in matches:
                if os.path.isdir(match):
                    for f in walk(Path(match), selector):
                        add(str(f), f)
                elif match.endswith(SPEC_SUFFIXES) and (selector is None or selector.selected(match)):
                    add(match, Path(match))
        elif path.is_dir():
            for f in walk(path, selector):
                add(str(f), f)
        elif selector is not None and os.path.lexists(raw) and not selector.selected(raw):
            out.skipped.append(raw)
        else:
            add(raw, path, found=False)  # named: read if it is a regular file
    return out


class DataReader:
    """Reads the data files a spec names beside it, and remembers which it read (so the report
    can never be written over one of them)."""

    def __init__(self, max_bytes: int = 50 * 1024 * 1024, folder: str | None = None) -> None:
        self.max_bytes = max_bytes
        self.folder = folder  # where the data files are, for a spec that is not a file (else its folder)
        self.read_paths: set[str] = set()

    def __call__(self, name: str, spec: str) -> bytes:
        return read_beside(name, spec, self.max_bytes, self.read_paths, self.folder)


def read_beside(name: str, spec: str, max_bytes: int = 50 * 1024 * 1024, read_paths: set | None = None,
                folder: str | None = None) -> bytes:
    """Read a data file named in a spec: a relative path inside the spec's folder (or inside
    ``folder``, where given), a regular file, size-bounded."""
    try:
        where = Path(folder).resolve() if folder is not None else Path(spec).resolve().parent
        target = (where / name).resolve()
    except (OSError, RuntimeError):  # a symlink loop ("Symlink loop from …")
        raise ValueError("the path cannot be resolved (a symbolic link loop?)") from None
    if Path(name).is_absolute() or not target.is_relative_to(where):
        raise ValueError("data files must be given relative to the spec, inside its folder")
    if read_paths is not None:
        read_paths.add(str(target))
    data = read_regular(target, max_bytes)
    if len(data) > max_bytes:
        raise ValueError(f"larger than {max_bytes} bytes")
    return data


def read_spec(path: Path, max_bytes: int) -> bytes:
    """A spec file's bytes: a regular file only, at most ``max_bytes + 1`` of them (the loader
    reports a longer text as over the limit)."""
    return read_regular(path, max_bytes)


def read_failure(name: str, exc: OSError) -> FileResult:
    reason = exc.strerror or type(exc).__name__
    if isinstance(exc, IsADirectoryError):
        reason = "is a directory"
    finding = Finding("unreadable-file", "error", f"cannot read {name}: {reason}", name)
    return FileResult(name, (finding,))


def same_file(a: str, b: Path) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:
        return False


def reason(exc: OSError) -> str:
    if isinstance(exc, IsADirectoryError):
        return "is a directory"
    return exc.strerror or type(exc).__name__


class OutputRefused(Exception):
    """A report path that is not a regular file or a new path; ``str()`` says why."""


def output_target(name: str, inputs=()) -> Path:
    """The real path to write a report named ``name`` to: a regular file (through a symbolic link,
    which stays) or a new path in an existing folder, and none of the ``inputs`` the run reads."""
    try:
        st = os.stat(name)  # follows links: what would be written is what the link points to
    except FileNotFoundError:
        st = None
    except OSError as exc:
        raise OutputRefused(reason(exc)) from None
    if st is not None and not stat.S_ISREG(st.st_mode):
        raise OutputRefused(f"it is {kind_of(st.st_mode)}; a report is written only to a regular file or a "
                            "new path")
    real = Path(os.path.realpath(name))
    if not real.parent.is_dir():
        raise OutputRefused(f"the folder {Path(name).parent} does not exist")
    for item in inputs:
        if st is not None and same_file(str(real), Path(item)):
            raise OutputRefused(f"it is {printable(str(item))}, which this run reads; input files are never "
                                "written")
    return real


def write_atomically(target: Path, fill) -> None:
    """Write through a temporary file in the same folder and a rename: readers never see half a file.
    ``target`` is a real path (``output_target``), so a symbolic link to it stays a link."""
    import tempfile

    try:  # keep the permissions of the file replaced, or give a new one the usual ones
        mode = stat.S_IMODE(target.stat().st_mode)
    except OSError:
        umask = os.umask(0)
        os.umask(umask)
        mode = 0o666 & ~umask
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", dir=target.parent or ".")
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as out:
            fill(out)
        os.chmod(tmp, mode)
        os.replace(tmp, target)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def internal_error(name: str, exc: BaseException) -> FileResult:
    """The result of a file whose check failed inside speccheck: one finding that says so."""
    where = ""
    tb = exc.__traceback__
    while tb is not None:  # the innermost frame inside speccheck, for the report
        if "speccheck" in tb.tb_frame.f_code.co_filename:
            where = f" in {Path(tb.tb_frame.f_code.co_filename).name}:{tb.tb_frame.f_code.co_name}"
        tb = tb.tb_next
    finding = Finding("internal-error", "error",
                      f"speccheck failed while checking this file ({type(exc).__name__}{where}), so its check is "
                      "incomplete; please report it with this spec", name)
    return FileResult(name, (finding,))


STDIN_NAME = "<stdin>"


def printable(name: str) -> str:
    """A file name as reports show it: bytes that are not UTF-8 (kept by the file system's
    decoding as lone surrogates) and control characters become visible escapes."""
    return inert(name)


def read_stdin(stdin, max_bytes: int) -> bytes:
    """``-``: the spec from standard input, with the same size limit as a file."""
    stream = stdin if stdin is not None else sys.stdin
    if stream is None:
        raise OSError(errno.EBADF, "standard input is closed")
    raw = getattr(stream, "buffer", stream)
    data = raw.read(max_bytes + 1)
    return data.encode("utf-8") if isinstance(data, str) else data


def silence(stream) -> None:
    """After a broken pipe: point the stream at the null device, so flushing it at exit is quiet."""
    try:
        fd = stream.fileno()
        null = os.open(os.devnull, os.O_WRONLY)
        os.dup2(null, fd)
        os.close(null)
    except (OSError, ValueError, AttributeError):
        pass


def _stream_settings(stdout, fmt: str) -> dict:
    """How a report of format ``fmt`` is encoded on standard output (see ``write_stdout``)."""
    utf8 = (getattr(stdout, "encoding", None) or "").lower().replace("-", "").replace("_", "") == "utf8"
    if fmt in ("html", "junit"):  # markup can say any character in ASCII, as a character reference
        return {} if utf8 else {"encoding": "ascii", "errors": "xmlcharrefreplace"}
    if fmt in MACHINE_FORMATS:
        return {"encoding": "utf-8", "errors": "strict"}
    return {"errors": "backslashreplace"}


def write_stdout(stdout, stderr, fill, fmt: str) -> bool:
    """Write the report to standard output; False (after saying why) when it cannot be written.

    JSON, SARIF and CSV are UTF-8 whatever the locale says; HTML and JUnit XML are UTF-8, or ASCII
    with character references where standard output is not UTF-8; the formats for people follow
    the terminal's encoding, with what it cannot show escaped.  A
    reader that stops early (``| head``) is not a failure: the run's exit code still stands."""
    if stdout is None:
        stderr.write("speccheck: standard output is closed; name a report file with -o FILE\n")
        return False
    settings = _stream_settings(stdout, fmt)
    if settings and hasattr(stdout, "reconfigure"):
        try:
            stdout.reconfigure(**settings)
        except (OSError, ValueError, AttributeError):
            pass
    try:
        fill(stdout)
        stdout.flush()
    except BrokenPipeError:
        silence(stdout)
        return True
    except OSError as exc:
        silence(stdout)
        stderr.write(f"speccheck: cannot write the report to standard output: {reason(exc)}\n")
        return False
    return True


class Quiet:
    """Standard error for notes: a note that cannot be written (a closed pipe, a full disk) never
    costs the report or changes the exit code."""

    def __init__(self, stream) -> None:
        self.stream = stream

    def write(self, text: str) -> int:
        try:
            return self.stream.write(text) if self.stream is not None else 0
        except (OSError, ValueError, UnicodeError):
            return 0

    def flush(self) -> None:
        try:
            if self.stream is not None:
                self.stream.flush()
        except (OSError, ValueError):
            pass
