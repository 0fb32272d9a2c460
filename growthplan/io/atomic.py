"""The one atomic writer behind every export: written aside, renamed into place.

:func:`atomic_file` yields a temporary path beside the target; the file is
renamed onto the target only when the ``with`` block succeeds and removed
on any exception, a ``KeyboardInterrupt`` included, so a reader never sees
half a file. :func:`atomic_files` does the same for several files that must
appear together (a plan file and its tables).

:func:`atomic_folder` yields a temporary folder for an export of many files
(CSV tables, charts). A new folder appears whole, by one rename. Into an
existing folder (``overwrite=True``) the new files replace only files the
library wrote there before: they are listed in the folder's
``.growthplan-manifest``; files the library did not write are never
replaced or deleted, and an existing file of the same name is an error.

Files and folders get the user's normal permissions (``0o666`` and
``0o777`` less the umask), not the private modes of temporary files.

Examples
--------
>>> import tempfile
>>> with tempfile.TemporaryDirectory() as folder:
...     with atomic_file(Path(folder) / "note.txt") as tmp:
...         _ = tmp.write_text("written whole or not at all")
...     print((Path(folder) / "note.txt").read_text())
written whole or not at all
"""

from __future__ import annotations

import contextlib
import json
import os
import shutil
import signal
import stat
import tempfile
import threading
from collections.abc import Callable, Iterable, Iterator
from pathlib import Path
from typing import Any

from ..errors import InvalidInput, invalid
from .marks import MARK, ours, record

__all__ = ["atomic_file", "atomic_files", "atomic_folder", "together", "MANIFEST"]

MANIFEST = ".growthplan-manifest"
_MANIFEST_MAX_BYTES = 1 << 20

PathLike = str | os.PathLike[str]


def _umask() -> int:
    """The process umask, read without changing it where the system allows."""
    try:
        with open("/proc/self/status", encoding="ascii") as status:
            for line in status:
                if line.startswith("Umask:"):
                    return int(line.split()[1], 8)
    except (OSError, ValueError):
        pass
    mask = os.umask(0o022)  # no other way to read it; restored at once
    os.umask(mask)
    return mask


def _file_mode() -> int:
    return 0o666 & ~_umask()


def _folder_mode() -> int:
    return 0o777 & ~_umask()


@contextlib.contextmanager
def _interrupt_deferred() -> Iterator[None]:
    """Hold Ctrl-C back while the renames run, so an interrupt leaves none or all."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    caught: list[int] = []
    try:
        previous = signal.signal(signal.SIGINT, lambda signum, frame: caught.append(signum))
    except ValueError:  # not the main interpreter
        yield
        return
    try:
        yield
    finally:
        signal.signal(signal.SIGINT, previous)
        if caught:
            if callable(previous):
                previous(signal.SIGINT, None)
            elif previous != signal.SIG_IGN:
                raise KeyboardInterrupt


def _os_error(field: str, rule: str, path: Path, exc: OSError) -> InvalidInput:
    return invalid(field, rule, str(path), hint=f"({exc.strerror or exc})")


def _stat(path: Path) -> os.stat_result | None:
    try:
        return os.stat(path)
    except FileNotFoundError:
        return None
    except NotADirectoryError:
        raise invalid("path", "be inside a folder, not a file", str(path)) from None
    except (OSError, ValueError) as exc:
        if isinstance(exc, ValueError):  # an embedded NUL byte
            raise invalid("path", "be a valid path", str(path)) from None
        raise _os_error("path", "be a path you can reach", path, exc) from None


def valid_path(path: PathLike, field: str) -> Path:
    """``path`` as a Path, refused in the message template when no system accepts it
    (a NUL byte, a name longer than the file system takes)."""
    try:
        p = Path(path)
        os.stat(p)
    except (FileNotFoundError, NotADirectoryError):
        pass
    except ValueError:  # an embedded NUL byte
        raise invalid(field, "be a valid path (no NUL character)", str(path)) from None
    except TypeError:
        raise invalid(field, "be a path", path) from None
    except OSError as exc:
        raise _os_error(field, "be a path the system accepts", Path(path), exc) from None
    return p


def _resolved(paths: Iterable[PathLike]) -> list[Path]:
    return [valid_path(p, "protect").resolve() for p in paths]


def _make_parent(folder: Path) -> None:
    st = _stat(folder)
    if st is not None and not stat.S_ISDIR(st.st_mode):
        raise invalid("path", "be inside a folder, not a file", str(folder))
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise _os_error("path", "be in a folder you can create", folder, exc) from None


def _check_file_target(target: Path, overwrite: bool, protected: list[Path],
                       force: bool = False) -> None:
    if target.name in ("", ".", ".."):
        raise invalid("path", "name a file", str(target))
    st = _stat(target)
    if st is not None:
        if stat.S_ISDIR(st.st_mode):
            raise invalid("path", "name a file, not an existing folder", str(target))
        if not stat.S_ISREG(st.st_mode):
            raise invalid("path", "name a regular file (not a device or pipe)", str(target))
        if not overwrite:
            raise invalid("path", "not exist yet (pass overwrite=True to replace it)",
                          str(target))
    if target.resolve() in protected:
        # the plan file and its tables, or an economy spec and its tables
        raise invalid("path", "not be one of the input files it was made from", str(target))
    if st is not None and not force and not ours(target):
        raise invalid("path", "be a file growthplan wrote to be replaced (it holds no "
                      f"'{MARK}' mark; pass force=True to replace it anyway)", str(target))


@contextlib.contextmanager
def atomic_files(paths: Iterable[PathLike], *, overwrite: bool = False,
                 protect: Iterable[PathLike] = (), force: bool = False) -> Iterator[list[Path]]:
    """Write several files that appear together or not at all.

    Parameters
    ----------
    paths : iterable of path
        The files to write.
    overwrite : bool, default False
        Replace existing files the library wrote (they carry its mark, see
        :mod:`growthplan.io.marks`); without it an existing target is an error.
    protect : iterable of path
        Files that must never be written (the inputs the output came from).
    force : bool, default False
        With ``overwrite``, replace existing files that lack the library's mark too.

    Yields
    ------
    list of Path
        One temporary path per target, in the same folder and with the same
        suffix (writers that choose a format by suffix keep working).

    Raises
    ------
    InvalidInput
        A target that is a folder, a device, exists without ``overwrite``,
        is protected, or lies in a folder that cannot be written.
    """
    targets = [valid_path(p, "path") for p in paths]
    protected = _resolved(protect)
    if len({t.resolve() for t in targets}) != len(targets):
        raise invalid("path", "name each file once", [str(t) for t in targets])
    for t in targets:
        _check_file_target(t, overwrite, protected, force)
    temps: list[Path] = []
    deferred = False
    try:
        for t in targets:
            _make_parent(t.parent)
            try:
                fd, name = tempfile.mkstemp(prefix=f".{t.name}.tmp-", suffix=t.suffix,
                                            dir=t.parent)
            except OSError as exc:
                raise _os_error("path", "be in a folder you can write to", t.parent,
                                exc) from None
            os.close(fd)
            temps.append(Path(name))
        yield list(temps)
        for t in targets:  # the targets may have appeared while the files were written
            _check_file_target(t, overwrite, protected, force)

        def commit() -> None:
            for t in targets:
                _check_file_target(t, overwrite, protected, force)
            mode = _file_mode()
            with _interrupt_deferred():
                for tmp, t in zip(temps, targets, strict=True):
                    os.chmod(tmp, mode)
                    os.replace(tmp, t)
            record(targets)  # CSV files have no room for the mark: a record beside them

        def discard() -> None:
            for tmp in temps:
                with contextlib.suppress(OSError):
                    tmp.unlink(missing_ok=True)

        deferred = _defer(commit, discard)
        if not deferred:
            commit()
    finally:
        for tmp in temps if not deferred else ():
            with contextlib.suppress(OSError):
                tmp.unlink(missing_ok=True)


@contextlib.contextmanager
def atomic_file(path: PathLike, *, overwrite: bool = False,
                protect: Iterable[PathLike] = (), force: bool = False) -> Iterator[Path]:
    """Write one file atomically: yield a temporary path, rename it into place on success.

    Parameters
    ----------
    path : path
        The file to write. Missing parent folders are created.
    overwrite : bool, default False
        Replace an existing file the library wrote (it carries the library's
        mark); without it an existing file is an error.
    protect : iterable of path
        Files that must never be written (the inputs the output came from).
    force : bool, default False
        With ``overwrite``, replace an existing file without the mark too.

    Yields
    ------
    Path
        A temporary file beside ``path`` with the same suffix. It is renamed
        onto ``path`` when the block succeeds and removed when it raises
        (``KeyboardInterrupt`` included).

    Raises
    ------
    InvalidInput
        Naming the path: it is an existing folder, exists without
        ``overwrite``, exists without the library's mark and without
        ``force``, is protected, or its folder cannot be written.
    """
    with atomic_files([path], overwrite=overwrite, protect=protect, force=force) as (tmp,):
        yield tmp


# -- outputs that appear together -----------------------------------------

_BATCH: list[list[tuple[Callable[[], None], Callable[[], None]]]] = []


def _defer(commit: Callable[[], None], discard: Callable[[], None]) -> bool:
    """Hand a checked, written output to the open :func:`together` block (False: none)."""
    if not _BATCH or threading.current_thread() is not threading.main_thread():
        return False
    _BATCH[-1].append((commit, discard))
    return True


@contextlib.contextmanager
def together() -> Iterator[None]:
    """Outputs written in the block appear together at its end, or none of them.

    Every :func:`atomic_file`, :func:`atomic_files` and :func:`atomic_folder`
    inside the block writes and checks its files as usual, but the renames
    into place wait for the end of the block; an error or an interrupt in the
    block removes every output written so far (a command's workbook, report
    and folder of tables are all written or none is).

    Examples
    --------
    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     try:
    ...         with together():
    ...             with atomic_file(Path(folder) / "a.txt") as tmp:
    ...                 _ = tmp.write_text("first")
    ...             raise RuntimeError("the second output failed")
    ...     except RuntimeError:
    ...         pass
    ...     print(sorted(p.name for p in Path(folder).iterdir()))
    []
    """
    pending: list[tuple[Callable[[], None], Callable[[], None]]] = []
    _BATCH.append(pending)
    done = 0
    try:
        yield
        _BATCH.pop()
        with _interrupt_deferred():
            for commit, _ in pending:
                commit()
                done += 1
    finally:
        if _BATCH and _BATCH[-1] is pending:
            _BATCH.pop()
        for _, discard in pending[done:]:
            discard()


# -- folders ---------------------------------------------------------------

def read_manifest(folder: Path) -> dict[str, list[str]]:
    """The files the library wrote in ``folder``, by export kind (unsafe names dropped)."""
    try:
        fd = os.open(folder / MANIFEST, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    except OSError:
        return {}
    try:
        if not stat.S_ISREG(os.fstat(fd).st_mode):
            return {}
        raw = os.read(fd, _MANIFEST_MAX_BYTES + 1)
    finally:
        os.close(fd)
    try:
        data: Any = json.loads(raw.decode("utf-8")) if len(raw) <= _MANIFEST_MAX_BYTES else {}
    except (UnicodeDecodeError, ValueError, RecursionError):
        return {}
    kinds = data.get("files") if isinstance(data, dict) else None
    if not isinstance(kinds, dict):
        return {}
    return {str(k): [n for n in v if _plain_name(n)] for k, v in kinds.items()
            if isinstance(v, list)}


def _plain_name(name: Any) -> bool:
    """A file name with no folder part: all a manifest may list (it may have been edited)."""
    return (isinstance(name, str) and name not in ("", ".", "..", MANIFEST)
            and "/" not in name and "\\" not in name and "\0" not in name)


def _check_folder_target(target: Path, overwrite: bool, protected: list[Path],
                         ignore: str = "") -> None:
    resolved = target.resolve()
    cwd = Path.cwd().resolve()
    if target.name in ("", ".", "..") or resolved == cwd or resolved in cwd.parents:
        raise invalid("folder", "be a folder of its own (not the current folder or one "
                      "above it)", str(target))
    for p in protected:
        if p == resolved or resolved in p.parents:
            raise invalid("folder", "not hold the input files it was made from (choose a "
                          "folder of its own)", str(target))
    st = _stat(target)
    if st is None:
        return
    if not stat.S_ISDIR(st.st_mode):
        raise invalid("folder", "name a folder, not an existing file", str(target))
    if not overwrite:
        try:
            with os.scandir(target) as entries:
                empty = all(e.name == ignore for e in entries)
        except OSError as exc:
            raise _os_error("folder", "be a folder you can read", target, exc) from None
        if not empty:
            raise invalid("folder", "not exist yet or be empty (pass overwrite=True to "
                          "replace the files growthplan wrote there)", str(target))


def _write_manifest(path: Path, kinds: dict[str, list[str]]) -> None:
    doc = {"comment": "Files growthplan wrote here; overwriting replaces only these.",
           "files": {k: sorted(v) for k, v in sorted(kinds.items()) if v}}
    path.write_text(json.dumps(doc, indent=1) + "\n", encoding="utf-8")


@contextlib.contextmanager
def atomic_folder(path: PathLike, *, overwrite: bool = False,
                  protect: Iterable[PathLike] = (), kind: str = "files") -> Iterator[Path]:
    """Write a folder of files atomically: yield a temporary folder, move it in on success.

    Parameters
    ----------
    path : path
        The folder to write. A new folder appears whole, by one rename.
    overwrite : bool, default False
        Write into an existing, non-empty folder. The new files then replace
        only files the library wrote there before (listed in the folder's
        ``.growthplan-manifest``); files of an earlier export of the same
        ``kind`` that this one does not write are removed; every other file
        is left alone, and one that the new files would replace is an error.
    protect : iterable of path
        Input files: a folder that holds any of them is refused.
    kind : str, default "files"
        What is exported (``"tables"``, ``"charts"``), so two exports into
        one folder do not remove each other's files.

    Yields
    ------
    Path
        A temporary folder (files only, no subfolders). It is removed when
        the block raises (``KeyboardInterrupt`` included).

    Raises
    ------
    InvalidInput
        Naming the folder: it is the current folder or above it, holds a
        protected file, is an existing file, is not empty without
        ``overwrite``, holds a file of a new file's name that the library did
        not write, or cannot be written.
    """
    target = valid_path(path, "folder")
    protected = _resolved(protect)
    _check_folder_target(target, overwrite, protected)
    existed = _stat(target) is not None
    _make_parent(target if existed else target.parent)
    try:  # inside an existing folder, so the moves never cross a mount point
        tmp = Path(tempfile.mkdtemp(prefix=f".{target.name}.tmp-",
                                    dir=target if existed else target.parent))
    except OSError as exc:
        raise _os_error("folder", "be a folder you can write to", target, exc) from None
    moved = False
    try:
        yield tmp
        _precheck_folder(tmp, target, overwrite, protected)
        if _defer(lambda: _commit_folder(tmp, target, overwrite, protected, kind, existed),
                  lambda: shutil.rmtree(tmp, ignore_errors=True)):
            moved = True  # at the end of the batch, or removed then
            return
        _commit_folder(tmp, target, overwrite, protected, kind, existed)
        moved = True
    finally:
        if not moved:
            shutil.rmtree(tmp, ignore_errors=True)


def _precheck_folder(tmp: Path, target: Path, overwrite: bool,
                     protected: list[Path]) -> None:
    """What :func:`_commit_folder` would refuse, refused before anything moves."""
    with os.scandir(tmp) as listing:
        names = [e.name for e in listing if e.name != MANIFEST]
    _check_folder_target(target, overwrite, protected, ignore=tmp.name)
    if _stat(target) is None:
        return
    ours = {n for v in read_manifest(target).values() for n in v}
    for name in sorted(names):
        if os.path.lexists(target / name) and name not in ours:
            raise invalid("folder", "not hold files growthplan did not write under the "
                          "names it writes (move them, or choose another folder)",
                          str(target / name))


def _commit_folder(tmp: Path, target: Path, overwrite: bool, protected: list[Path],
                   kind: str, existed: bool) -> None:
    """Move the files of ``tmp`` into ``target`` (see :func:`atomic_folder`)."""
    moved = False
    try:
        with os.scandir(tmp) as listing:
            entries = sorted(listing, key=lambda e: e.name)
        for e in entries:
            if not e.is_file(follow_symlinks=False):
                raise invalid("folder", "hold only files (atomic_folder writes files only)", e.name)
        names = [e.name for e in entries if e.name != MANIFEST]
        file_mode, folder_mode = _file_mode(), _folder_mode()
        for name in names:
            os.chmod(tmp / name, file_mode)
        _check_folder_target(target, overwrite, protected, ignore=tmp.name)
        if not existed and _stat(target) is None:
            _write_manifest(tmp / MANIFEST, {kind: names})
            os.chmod(tmp / MANIFEST, file_mode)
            os.chmod(tmp, folder_mode)
            with _interrupt_deferred():
                os.rename(tmp, target)
            moved = True
            return
        kinds = read_manifest(target)
        ours = {n for v in kinds.values() for n in v}
        for name in names:
            if os.path.lexists(target / name) and name not in ours:
                raise invalid("folder", "not hold files growthplan did not write under the "
                              "names it writes (move them, or choose another folder)",
                              str(target / name))
        stale = [n for n in kinds.get(kind, []) if n not in names
                 and not any(n in v for k, v in kinds.items() if k != kind)]
        new = {k: [n for n in v if n not in names] for k, v in kinds.items() if k != kind}
        new[kind] = names
        _write_manifest(tmp / MANIFEST, new)
        os.chmod(tmp / MANIFEST, file_mode)
        with _interrupt_deferred():
            for name in names:
                os.replace(tmp / name, target / name)
            os.replace(tmp / MANIFEST, target / MANIFEST)
            for name in stale:
                p = target / name
                with contextlib.suppress(OSError):
                    if stat.S_ISREG(os.lstat(p).st_mode):
                        p.unlink()
    finally:
        if not moved:
            shutil.rmtree(tmp, ignore_errors=True)
