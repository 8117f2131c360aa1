"""Ctrl-C that is never lost.

Python turns SIGINT into KeyboardInterrupt wherever the main thread happens to be. Raised
inside a callback whose errors Python ignores (an import lock's clean-up, a weakref
callback), it is printed as "Exception ignored" and the run goes on: seen here when Ctrl-C
landed while the library was being imported (tests/cli/test_interrupt.py). So the command
records the key press as well as raising, and every progress report checks the record:
an interrupt swallowed by such a callback stops the run at the next progress report.
Raised inside a module's initialisation (a lazy import of a compiled extension), it comes
out as another error ("ImportError: initialization failed"); the command's error boundary
asks :func:`pressed` and reports such an error as the interrupt it is.
"""

from __future__ import annotations

import signal
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from types import FrameType

_pressed = threading.Event()


def _on_sigint(signum: int, frame: FrameType | None) -> None:
    _pressed.set()
    raise KeyboardInterrupt


@contextmanager
def recorded() -> Iterator[None]:
    """While inside, Ctrl-C is recorded and raised; the previous handler comes back after.

    Only the main thread may set signal handlers; elsewhere (a test calling the command from
    a worker thread) Python's own handling stays.
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    _pressed.clear()
    previous = signal.signal(signal.SIGINT, _on_sigint)
    try:
        yield
    finally:
        signal.signal(signal.SIGINT, previous)
        _pressed.clear()


def pressed() -> bool:
    """Whether Ctrl-C was pressed while :func:`recorded` was in force."""
    return _pressed.is_set()


def check() -> None:
    """Raise KeyboardInterrupt if Ctrl-C was pressed, even if its first raise was swallowed."""
    if _pressed.is_set():
        raise KeyboardInterrupt
