"""Reading input files defensively: regular files only, size-capped, one-line errors."""

from __future__ import annotations

import os
import stat
from pathlib import Path
from typing import Any

from ..errors import InvalidInput, invalid

__all__ = ["read_regular_file", "size_text"]


def size_text(n: int) -> str:
    """``5 MB``, ``512 kB``: limits as people read them."""
    for unit, factor in (("GB", 1 << 30), ("MB", 1 << 20), ("kB", 1 << 10)):
        if n >= factor:
            return f"{n / factor:g} {unit}"
    return f"{n} bytes"


def _os_error(what: str, path: Any, exc: OSError) -> InvalidInput:
    if isinstance(exc, FileNotFoundError):
        return invalid(what, "name an existing file", str(path))
    if isinstance(exc, PermissionError):
        return invalid(what, "be a file you may read", str(path), hint="(permission denied)")
    return invalid(what, "be a readable file", str(path), hint=f"({exc.strerror or exc})")


def read_regular_file(path: str | os.PathLike[str], *, what: str, limit: int) -> bytes:
    """The bytes of a regular file of at most ``limit`` bytes.

    The file is examined with ``stat`` before it is opened, so a folder, a
    pipe, a socket or a device (``/dev/zero``) is refused without being read,
    and a file over the limit is refused without being loaded.

    Raises
    ------
    InvalidInput
        One line naming ``what`` and the file: missing, unreadable, not a
        regular file, or too large.
    """
    p = Path(path)
    try:
        st = os.stat(p)
    except OSError as exc:
        raise _os_error(what, p, exc) from None
    except ValueError:  # a NUL byte in the path
        raise invalid(what, "be a valid file name", str(p)) from None
    _check_stat(st, what, p, limit)
    try:
        fd = os.open(p, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_CLOEXEC", 0))
    except OSError as exc:
        raise _os_error(what, p, exc) from None
    try:
        _check_stat(os.fstat(fd), what, p, limit)  # the same file we examined
        chunks, size = [], 0
        while size <= limit:
            chunk = os.read(fd, min(1 << 20, limit + 1 - size))
            if not chunk:
                break
            chunks.append(chunk)
            size += len(chunk)
    except OSError as exc:
        raise _os_error(what, p, exc) from None
    finally:
        os.close(fd)
    if size > limit:  # it grew while we read it
        raise invalid(what, f"be at most {size_text(limit)}", str(p), hint="(a larger file "
                      "is not read)")
    return b"".join(chunks)


def _check_stat(st: os.stat_result, what: str, p: Path, limit: int) -> None:
    if stat.S_ISDIR(st.st_mode):
        raise invalid(what, "name a file, not a folder", str(p))
    if not stat.S_ISREG(st.st_mode):
        raise invalid(what, "name a regular file (not a device, pipe or socket)", str(p))
    if st.st_size > limit:
        raise invalid(what, f"be at most {size_text(limit)}", str(p),
                      hint=f"(it has {size_text(st.st_size)}; a larger file is not read)")
