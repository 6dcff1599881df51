"""Checking a list of spec files: one after another, or split over processes (``--jobs N``).

Each file is read, checked and its suppressions applied on its own; a file that cannot be
read, or whose check fails inside speccheck, costs only that file (a finding for it, and the
run exits 2).  With ``jobs`` above 1 and more than one file, the files are handed out in
order to a pool of worker processes, each with its own checker (units, caches); the results
come back in the files' order, so the report is the same as one process writes.  Standard
input is always read here, in the parent.
"""

from __future__ import annotations

import dataclasses
import errno
import gc
from dataclasses import dataclass, field

from speccheck import files
from speccheck.records.findings import FileResult


@dataclass
class Batch:
    results: list[FileResult] = field(default_factory=list)
    messages: list[str] = field(default_factory=list)  # for standard error, in the files' order (one line each)
    read_paths: set[str] = field(default_factory=set)  # the data files the specs named
    failed: bool = False  # a file could not be read or checked: exit 2


def _one(checker, reader, name: str, path, stdin, max_bytes: int):
    """(result, message or None, failed) for one file."""
    shown = files.STDIN_NAME if name == "-" else files.printable(name)
    try:
        data = files.read_stdin(stdin, max_bytes) if name == "-" else files.read_spec(path, max_bytes)
    except MemoryError:
        exc = OSError(errno.ENOMEM, "not enough memory to read it (lower --max-file-size)")
        return files.read_failure(shown, exc), f"cannot read {shown}: {files.reason(exc)}", True
    except OSError as exc:
        return files.read_failure(shown, exc), f"cannot read {shown}: {files.reason(exc)}", True
    result, failed = check_one(checker, data, shown)
    return result, None, failed


def check_one(checker, data: bytes | str, shown: str) -> tuple[FileResult, bool]:
    """(result, failed) of one spec's text: checked, its own suppressions applied; a failure inside
    speccheck becomes an ``internal-error`` finding for that file alone."""
    from speccheck.reading import suppress

    try:
        result = checker.check_text(data, shown)
        findings = suppress.apply(data, result.findings, shown)
    except Exception as exc:  # the last line of defence: one file's failure costs only that file
        return files.internal_error(shown, exc), True
    return (result if findings is result.findings else dataclasses.replace(result, findings=findings)), False


_WORKER: dict = {}
_TUNED: list = []


def tune_process() -> None:
    """Settings for a process that checks many files (once per process):

    * the garbage collector's first threshold raised: a batch makes many small objects and few cycles;
    * glibc's malloc told to keep freed memory for reuse (the thresholds for mapping a block of its
      own and for giving the top of the heap back, 16 and 64 MiB): by default a block over 128 KiB,
      a field's grid of FFT rows, is mapped afresh each time and its pages faulted in one by one,
      which on a virtual machine made an FFT of 11 × 4,096 points 4× slower (DEVELOPERS.md, Speed).
      Elsewhere than on glibc nothing is changed.
    """
    if _TUNED:
        return
    _TUNED.append(True)
    gc.set_threshold(50_000, 50, 50)
    try:
        import ctypes

        libc = ctypes.CDLL("libc.so.6")
        libc.mallopt(-3, 16 << 20)  # M_MMAP_THRESHOLD
        libc.mallopt(-1, 64 << 20)  # M_TRIM_THRESHOLD
    except (OSError, AttributeError):  # not glibc: its defaults stay
        pass


def _start(make_checker) -> None:
    reader = files.DataReader()
    _WORKER.update(checker=make_checker(reader), reader=reader)
    tune_process()


def _work(item):
    name, path, max_bytes = item
    reader = _WORKER["reader"]
    reader.read_paths = set()
    result, message, failed = _one(_WORKER["checker"], reader, name, path, None, max_bytes)
    return result, message, failed, reader.read_paths


def check_files(pairs, make_checker, max_bytes: int, stdin=None, jobs: int = 1) -> Batch:
    """Check ``pairs`` of (name as given, path); ``make_checker(reader)`` builds a checker."""
    batch = Batch()
    on_disk = [(name, path) for name, path in pairs if name != "-"]
    if jobs > 1 and len(on_disk) > 1:
        import multiprocessing

        context = multiprocessing.get_context("fork" if "fork" in multiprocessing.get_all_start_methods()
                                              else "spawn")
        chunk = max(1, len(on_disk) // (jobs * 8))
        with context.Pool(jobs, _start, (make_checker,)) as pool:
            done = iter(pool.imap(_work, [(n, p, max_bytes) for n, p in on_disk], chunksize=chunk))
            for name, path in pairs:
                if name == "-":
                    _add(batch, *_local(make_checker, name, path, stdin, max_bytes))
                else:
                    _add(batch, *next(done))
        return batch
    reader = files.DataReader()
    checker = make_checker(reader)
    if len(pairs) > 1:
        tune_process()
    for name, path in pairs:
        result, message, failed = _one(checker, reader, name, path, stdin, max_bytes)
        _add(batch, result, message, failed, set())
    batch.read_paths |= reader.read_paths
    return batch


def _local(make_checker, name, path, stdin, max_bytes):
    reader = files.DataReader()
    result, message, failed = _one(make_checker(reader), reader, name, path, stdin, max_bytes)
    return result, message, failed, reader.read_paths


def _add(batch: Batch, result, message, failed, read_paths) -> None:
    batch.results.append(result)
    if message:
        batch.messages.append(message)
    batch.failed |= failed
    batch.read_paths |= read_paths
