"""The library's mark in the single files it writes, so ``overwrite=True`` replaces
only files the library wrote.

Where the format has room for it the mark sits inside the file: the document
properties of a workbook, a ``<meta>`` tag of an HTML report, a comment line
of an MPS, LP or YAML plan file. A CSV file has no comment a reader would
skip, so its mark is a record beside it: the hidden file ``.growthplan-files``
of its folder lists the CSV files the library wrote there with the SHA-256 of
their content, and a file whose content has changed since is no longer the
library's.

:func:`ours` answers for an existing file; :func:`record` updates the record
after CSV files are renamed into place.
"""

from __future__ import annotations

import contextlib
import hashlib
import json
import os
import stat
import zipfile
from collections.abc import Iterable
from pathlib import Path
from typing import Any

__all__ = ["MARK", "RECORD", "HTML_MARK", "ours", "record", "comment_line"]

MARK = "written by growthplan"
"""The words every mark holds."""

RECORD = ".growthplan-files"
"""The record of the CSV files the library wrote in a folder."""

HTML_MARK = f'<meta name="generator" content="growthplan ({MARK})">'

_HEAD = 4096  # bytes read at the head of a text file for its mark
_RECORD_MAX = 1 << 20
_CORE_MAX = 1 << 16  # the document properties of a workbook are a small XML part
_HASH_MAX = 1 << 30  # a CSV larger than this is not hashed: never the library's

# comment syntax of each text format that has one
_COMMENTS = {".mps": "*", ".lp": "\\", ".yaml": "#", ".yml": "#"}


def comment_line(suffix: str) -> str:
    """The mark as a comment line of the format of ``suffix`` (newline included)."""
    return f"{_COMMENTS[suffix.lower()]} {MARK}\n"


def _head(path: Path, n: int = _HEAD) -> bytes:
    with open(path, "rb") as f:
        return f.read(n)


def _digest(path: Path) -> str | None:
    st = os.stat(path)
    if not stat.S_ISREG(st.st_mode) or st.st_size > _HASH_MAX:
        return None
    h = hashlib.sha256()
    with open(path, "rb") as f:
        for chunk in iter(lambda: f.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()


def _read_record(folder: Path) -> dict[str, str]:
    try:
        with open(folder / RECORD, "rb") as f:
            raw = f.read(_RECORD_MAX + 1)
        data: Any = json.loads(raw.decode("utf-8")) if len(raw) <= _RECORD_MAX else {}
    except (OSError, UnicodeDecodeError, ValueError, RecursionError):
        return {}
    files = data.get("files") if isinstance(data, dict) else None
    if not isinstance(files, dict):
        return {}
    return {str(k): str(v) for k, v in files.items() if isinstance(v, str)}


def ours(path: str | os.PathLike[str]) -> bool:
    """Whether the existing file ``path`` carries the library's mark (False when unreadable)."""
    p = Path(path)
    suffix = p.suffix.lower()
    try:
        if suffix == ".xlsx":
            with zipfile.ZipFile(p) as book:
                info = book.getinfo("docProps/core.xml")
                if info.file_size > _CORE_MAX:
                    return False
                return MARK.encode() in book.read(info)
        if suffix in (".html", ".htm"):
            return HTML_MARK.encode() in _head(p)
        if suffix in _COMMENTS:
            lines = _head(p, 512).split(b"\n", 2)[:2]  # the mark is on the first or second
            return any(line.startswith(_COMMENTS[suffix].encode()) and MARK.encode() in line
                       for line in lines)
        known = _read_record(p.parent).get(p.name)
        return known is not None and known == _digest(p)
    except (OSError, KeyError, zipfile.BadZipFile, ValueError):
        return False


def record(paths: Iterable[Path]) -> None:
    """Add the CSV files ``paths`` (just written) to their folders' records."""
    by_folder: dict[Path, list[Path]] = {}
    for p in paths:
        if p.suffix.lower() not in _COMMENTS and p.suffix.lower() not in (
                ".xlsx", ".html", ".htm"):
            by_folder.setdefault(p.parent, []).append(p)
    for folder, files in by_folder.items():
        with contextlib.suppress(OSError):  # no record: the file is simply not ours later
            known = _read_record(folder)
            for p in files:
                digest = _digest(p)
                if digest is not None:
                    known[p.name] = digest
            known = {k: v for k, v in known.items() if (folder / k).is_file()}
            doc = {"comment": f"Files {MARK} (SHA-256 of each); overwrite=True replaces "
                   "only these, and only while they are unchanged.", "files": known}
            tmp = folder / f"{RECORD}.tmp-{os.getpid()}"
            tmp.write_text(json.dumps(doc, indent=1, sort_keys=True) + "\n", encoding="utf-8")
            os.replace(tmp, folder / RECORD)
