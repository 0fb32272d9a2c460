"""Signals while the command starts: the first code the ``growthplan`` command runs.

Run as the command (the ``growthplan`` script or ``python -m growthplan.cli``),
:func:`command_signals` routes SIGINT and SIGTERM to a handler that prints
``interrupted`` and exits 3, before anything else of the library is imported
(click, numpy and the rest take a good part of a second): a signal during
start-up ends the command like one at any later moment, one line and no
traceback. The command line's own handlers replace it once they are in place.
Imported as a library, by any other program, it changes no handler. The module
imports only the standard library's ``os``, ``signal`` and ``sys``.
"""

from __future__ import annotations

import os
import signal
import sys
from types import FrameType

__all__ = ["command_signals"]

_SCRIPTS = ("growthplan", "growthplan.exe", "growthplan-script.py")


def _as_command() -> bool:
    """Whether this process is the ``growthplan`` command rather than a program that
    imports the library."""
    argv = list(getattr(sys, "orig_argv", ()) or ())
    if "-m" in argv:
        i = argv.index("-m")
        return argv[i + 1:i + 2] == ["growthplan.cli"]
    return os.path.basename(sys.argv[0] if sys.argv else "") in _SCRIPTS


def _stop_starting(signum: int, frame: FrameType | None) -> None:
    """A signal before the command's own handlers are in place: one line, exit 3."""
    try:
        os.write(2, b"interrupted\n")
    finally:
        os._exit(3)


def command_signals() -> None:
    """Install the start-up handler when this process is the command (else nothing)."""
    if not _as_command():
        return
    for sig in (signal.SIGINT, signal.SIGTERM):
        try:
            if signal.getsignal(sig) != signal.SIG_IGN:  # a background job keeps it so
                signal.signal(sig, _stop_starting)
        except ValueError:  # not the main thread
            return
