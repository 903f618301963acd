"""A time limit around a computation that may not come back (large closed forms).

In the main thread the limit is a real-time interval timer (``signal.setitimer``, SIGALRM)
whose handler interrupts whatever Python code runs; the previous handler and timer are put
back afterwards. In any other thread (where signals cannot be received) the work runs in a
forked child process, itself under the timer, and the parent waits at most the limit plus
a margin before killing it. The work also calls ``tick()`` between its steps, which checks
the clock; so on a platform with neither SIGALRM nor fork the limit still holds between
steps.
"""

from __future__ import annotations

import math
import signal
import threading
import time
from collections.abc import Callable
from typing import TypeVar

from ..errors import CaseError, LeastworkError, MechanismError

__all__ = ["TimeUp", "run_bounded", "NO_TIMER_ABOVE"]

T = TypeVar("T")
_MARGIN = 5.0  # seconds the parent waits beyond the limit for a child to report
#: a limit beyond this many seconds (about 116 days) is taken as none: the interval timer
#: and the clock cannot hold an arbitrarily large one (1e300 s overflows them)
NO_TIMER_ABOVE = 1e7


class TimeUp(BaseException):
    """Raised inside the work when its time is up (a BaseException, so that no
    ``except Exception`` in a library swallows it)."""


def _deadline_tick(seconds: float) -> Callable[[], None]:
    end = time.monotonic() + seconds

    def tick() -> None:
        if time.monotonic() > end:
            raise TimeUp()

    return tick


def _with_alarm(work: Callable[[Callable[[], None]], T], seconds: float) -> T:
    def handler(signum, frame):
        raise TimeUp()

    started = time.monotonic()
    old_handler = signal.signal(signal.SIGALRM, handler)
    old_delay, old_interval = signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        return work(_deadline_tick(seconds))
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, old_handler)
        if old_delay > 0:  # someone else's timer was running: give back what is left
            left = max(old_delay - (time.monotonic() - started), 1e-3)
            signal.setitimer(signal.ITIMER_REAL, left, old_interval)


def _child(work, seconds, conn) -> None:  # pragma: no cover - runs in the child
    try:
        conn.send(("ok", _with_alarm(work, seconds)))
    except TimeUp:
        conn.send(("time", ""))
    except CaseError as exc:
        conn.send(("case", str(exc)))
    except MechanismError as exc:
        conn.send(("mechanism", (exc.message, exc.motions)))
    except BaseException as exc:  # noqa: BLE001 - reported to the parent as it is
        conn.send(("bug", f"{exc.__class__.__name__}: {exc}"))
    finally:
        conn.close()


def run_bounded(work: Callable[[Callable[[], None]], T], seconds: float, message: str,
                source: str | None = None) -> T:
    """Run ``work(tick)`` for at most ``seconds`` (``math.inf`` or more than
    ``NO_TIMER_ABOVE``: no limit); past it raise CaseError(message). ``seconds`` must be
    positive (ValueError otherwise, NaN included)."""
    if not seconds > 0:
        raise ValueError(f"a time limit must be a positive number of seconds, not {seconds!r}")
    if math.isinf(seconds) or seconds > NO_TIMER_ABOVE:  # no limit asked
        return work(lambda: None)
    main = threading.current_thread() is threading.main_thread()
    try:
        if main and hasattr(signal, "setitimer"):
            return _with_alarm(work, seconds)
        import multiprocessing as mp

        if hasattr(signal, "setitimer") and "fork" in mp.get_all_start_methods():
            return _in_child(work, seconds, message, source)
        return work(_deadline_tick(seconds))
    except TimeUp:
        raise CaseError(message, source=source) from None


def _in_child(work, seconds: float, message: str, source: str | None):
    import multiprocessing as mp

    ctx = mp.get_context("fork")
    receiver, sender = ctx.Pipe(duplex=False)
    proc = ctx.Process(target=_child, args=(work, seconds, sender), daemon=True)
    proc.start()
    sender.close()
    try:
        if not receiver.poll(seconds + _MARGIN):
            raise CaseError(message, source=source)
        kind, payload = receiver.recv()
    except EOFError:
        raise LeastworkError("the symbolic solve stopped without an answer") from None
    finally:
        if proc.is_alive():
            proc.kill()
        proc.join(1.0)
        receiver.close()
    if kind == "ok":
        return payload
    if kind == "time":
        raise CaseError(message, source=source)
    if kind == "case":
        raise CaseError(payload)
    if kind == "mechanism":
        raise MechanismError(*payload)
    raise RuntimeError(payload)
