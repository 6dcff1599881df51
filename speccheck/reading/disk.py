"""Reading a file from disk without surprises: only a regular file, never more than a limit.

A FIFO or a device is refused instead of read (opening with ``O_NONBLOCK`` means a FIFO
without a writer cannot block the open, and ``fstat`` on the open file tells what it is),
and at most ``max_bytes + 1`` bytes are read, so ``/dev/zero`` or a 2 GB file costs
constant memory; the caller sees that the limit was passed by the length.
"""

from __future__ import annotations

import os
import stat

_FLAGS = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_CLOEXEC", 0) | getattr(os, "O_BINARY", 0)
_CHUNK = 1 << 20


class NotRegular(OSError):
    """A path that names something other than a regular file."""

    def __init__(self, what: str) -> None:
        super().__init__(f"not a regular file ({what})")
        self.strerror = f"not a regular file ({what})"


def kind_of(mode: int) -> str:
    if stat.S_ISDIR(mode):
        return "a directory"
    if stat.S_ISFIFO(mode):
        return "a named pipe"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def read_regular(path, max_bytes: int) -> bytes:
    """The first ``max_bytes + 1`` bytes of a regular file (all of it when it is not larger)."""
    fd = os.open(path, _FLAGS)
    try:
        mode = os.fstat(fd).st_mode
        if not stat.S_ISREG(mode):
            raise NotRegular(kind_of(mode))
        chunks, left = [], max_bytes + 1
        while left > 0:
            block = os.read(fd, min(left, _CHUNK))
            if not block:
                break
            chunks.append(block)
            left -= len(block)
        return b"".join(chunks)
    finally:
        os.close(fd)
