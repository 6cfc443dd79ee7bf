"""Signals during a review pack's write: stop cleanly before the pack is in place, and
change nothing once it is.

The command line runs every command under :func:`interrupt_guard`, and
:func:`rheoline.scenario.pack_folder.write_folder_atomically` writes under it too (for
Python callers).  Until the new pack is renamed into place, SIGINT raises
KeyboardInterrupt and SIGTERM or SIGHUP raise :class:`PackInterrupted`, so the writer
removes its temporary folder and puts an earlier pack back; once it is in place
(:func:`mark_placed`) the three signals are ignored until the guard ends, so a late
interrupt never turns a written pack into a failure.  This module imports only the
standard library (the command line imports it at start-up).

Examples
--------
>>> with interrupt_guard():
...     pack_placed()
False
"""

from __future__ import annotations

import contextlib
import signal
import threading

__all__ = ["PackInterrupted", "interrupt_guard", "mark_placed", "pack_placed"]

#: The signals that stop a pack write: an interrupt, a termination, a closed terminal.
_STOP_SIGNALS = tuple(
    getattr(signal, name) for name in ("SIGINT", "SIGTERM", "SIGHUP") if hasattr(signal, name)
)


class PackInterrupted(BaseException):
    """SIGTERM or SIGHUP arrived while a pack was written (a BaseException, like
    KeyboardInterrupt, so that no ``except Exception`` swallows it); ``signum`` says which."""

    def __init__(self, signum):
        super().__init__(f"stopped by signal {signum}")
        self.signum = signum


class _State:
    """Whether the pack of the write under way is in place (a signal then changes nothing)."""

    placed = False


def mark_placed() -> None:
    """Record that the pack of the write under way is in place."""
    _State.placed = True


def pack_placed() -> bool:
    """Whether the latest pack write renamed its folder into place."""
    return _State.placed


def _on_stop_signal(signum, frame):
    if _State.placed:  # the pack is in place: finish normally, the answer stands
        return
    if signum == signal.SIGINT:
        raise KeyboardInterrupt
    raise PackInterrupted(signum)


@contextlib.contextmanager
def interrupt_guard():
    """Handle SIGINT, SIGTERM and SIGHUP as a pack write needs while the block runs.

    Before a pack is in place each raises (KeyboardInterrupt, :class:`PackInterrupted`) so
    that the temporary folder is removed and an earlier pack put back; once the pack is
    renamed into place they are ignored, so a late interrupt does not turn a written pack
    into a failure.  Only handlers that are still the interpreter's defaults are replaced
    (an application's own are kept), only in the main thread, and all are restored after.
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    defaults = (signal.SIG_DFL, signal.default_int_handler, _on_stop_signal)
    saved = {s: signal.getsignal(s) for s in _STOP_SIGNALS}
    mine = [s for s, h in saved.items() if h in defaults]
    if _on_stop_signal not in saved.values():  # the outermost guard: a new write
        _State.placed = False
    for s in mine:
        signal.signal(s, _on_stop_signal)
    try:
        yield
    finally:
        for s in mine:
            signal.signal(s, saved[s])
