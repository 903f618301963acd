"""What the command line shows on standard error while a long run works: the current phase
with the time since it began (:class:`PhaseDisplay`, fed by ``solve(progress=...)``) or a
plain spinner (:func:`busy`). Both appear only on a terminal, so piped output stays clean.
"""

from __future__ import annotations

import contextlib
import sys

__all__ = ["PhaseDisplay", "progress", "busy", "no_progress"]


class PhaseDisplay:
    """The current phase of a long run and the time since it began, on one line of
    standard error that rich redraws a few times a second and removes at the end.

    Call the instance with a phase name as each phase starts (``solve(progress=...)``). The
    line appears only once the run has lasted ``delay`` seconds, so quick runs print
    nothing.
    """

    def __init__(self, what: str, console=None, delay: float = 1.0):
        import threading
        import time

        from rich.console import Console
        from rich.spinner import Spinner

        self.what = what
        self.phase = "starting"
        self.console = console or Console(stderr=True)
        self.delay = delay
        self._clock = time.monotonic
        self._t0 = self._clock()
        self._spinner = Spinner("dots")
        self._lock = threading.Lock()
        self._live = None
        self._closed = False
        self._timer = threading.Timer(delay, self._show)
        self._timer.daemon = True

    def __call__(self, phase: str) -> None:
        self.phase = phase

    def __rich__(self):
        elapsed = self._clock() - self._t0
        self._spinner.update(text=f"{self.what}: {self.phase} ({elapsed:.0f} s)")
        return self._spinner

    def _show(self) -> None:
        from rich.live import Live

        with self._lock:
            if self._closed:
                return
            self._live = Live(self, console=self.console, transient=True,
                              refresh_per_second=8, redirect_stdout=False,
                              redirect_stderr=False)
            self._live.start()

    def __enter__(self) -> PhaseDisplay:
        self._t0 = self._clock()
        self._timer.start()
        return self

    def __exit__(self, *exc) -> None:
        with self._lock:
            self._closed = True
            self._timer.cancel()
            if self._live is not None:
                self._live.stop()


def progress(what: str):
    """A :class:`PhaseDisplay` on a terminal; elsewhere a context that yields a callable
    that does nothing."""
    if not sys.stderr.isatty():
        return contextlib.nullcontext(no_progress)
    return PhaseDisplay(what)


def no_progress(phase: str) -> None:
    """Progress callback when nothing is shown."""


def busy(message: str):
    """A spinner on standard error while something slow runs, only on a terminal."""
    if not sys.stderr.isatty():
        return contextlib.nullcontext()
    from rich.console import Console

    return Console(stderr=True).status(f"{message}...", spinner="dots")
