"""Files on disk for the command line: finding spec files (folders, globs), reading the data
files a spec names beside it, and writing a report atomically.  Only this module and the
command line touch the file system; the checker gets text and an injected reader."""

from __future__ import annotations

import dataclasses
import glob
import os
import re
from pathlib import Path

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


def spec_files(paths: list[str], selector=None) -> Expansion:
    """Expand folders and globs into spec files: each argument in order, each expansion sorted."""
    out = Expansion([], [], [])
    seen: set[str] = set()

    def add(name: str, path: Path, found: bool = True) -> None:
        key = os.path.normcase(os.path.abspath(name))
        if key not in seen:
            seen.add(key)
            out.files.append((name, path))
            if found:
                out.found.add(name)

    for raw in paths:
        path = Path(raw)
        if _GLOB.search(raw) and not os.path.lexists(raw):
            matches = sorted(glob.glob(raw, recursive=True))
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
            add(raw, path, found=False)  # named: read whatever it is (a pipe from the shell, too)
    return out


def read_beside(name: str, spec: str, max_bytes: int = 50 * 1024 * 1024) -> bytes:
    """Read a data file named in a spec: a relative path inside the spec's folder, size-bounded."""
    folder = Path(spec).resolve().parent
    target = (folder / name).resolve()
    if Path(name).is_absolute() or not target.is_relative_to(folder):
        raise ValueError("data files must be given relative to the spec, inside its folder")
    if not regular(target):  # a named pipe or a device would block or never end
        raise ValueError("not a regular file")
    if target.stat().st_size > max_bytes:
        raise ValueError(f"larger than {max_bytes} bytes")
    with open(target, "rb") as f:
        return f.read()


def regular(path: Path) -> bool:
    import stat

    return stat.S_ISREG(path.stat().st_mode)


class NotRegular(OSError):
    strerror = "not a regular file (a pipe, socket or device found in a folder is not read)"


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


def write_atomically(target: Path, fill) -> None:
    """Write through a temporary file in the same folder and a rename: readers never see half a file."""
    import stat
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
