"""A time and memory budget for the work done on one workbook (check, recalc, audit).

A watchdog thread looks at the clock and at the process's resident memory a few times a
second while the work runs; past either limit it stops the working thread by raising
:class:`OverBudget` in it (an exception the engine's own ``except Exception`` handlers do not
catch), and :func:`run_within` turns that into :class:`TooLarge` naming the limit passed.
The work never ends half-written: the caller writes its outputs only after the run returned.
A :class:`MemoryError` inside the work is reported the same way.

Defaults: 600 s, and half the machine's physical memory shared by the workbooks checked at
once (``default_memory(jobs)``), never less than 256 MiB.

Examples
--------
>>> from joulebook.faces.workbook.budget import Budget, run_within
>>> run_within(Budget(max_seconds=5), sum, [1, 2, 3])
6
"""

from __future__ import annotations

import ctypes
import os
import threading
import time
from dataclasses import dataclass, field

__all__ = [
    "Budget",
    "DEFAULT_SECONDS",
    "OverBudget",
    "TooLarge",
    "default_memory",
    "resident_memory",
    "parse_memory",
    "run_within",
]

#: seconds a workbook may take by default
DEFAULT_SECONDS = 600.0
_FLOOR = 256 * 2**20  # the least default memory budget (bytes)
_POLL = 0.05  # seconds between the watchdog's looks
_AGAIN = 1.0  # seconds before the stop is raised again, should a handler have swallowed it


class OverBudget(BaseException):
    """Raised asynchronously in the working thread when the budget is passed.

    A ``BaseException``, like ``KeyboardInterrupt``, so that the engine's handlers of a
    failed formula (``except Exception``) do not swallow it."""


class TooLarge(Exception):
    """The workbook could not be done within its budget; ``reason`` names the limit."""

    def __init__(self, reason: str):
        super().__init__(reason)
        self.reason = reason


def _physical_memory() -> int | None:
    try:
        return os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES")
    except (ValueError, OSError, AttributeError):
        return None


def default_memory(jobs: int = 1) -> int:
    """Default memory budget in bytes: half the physical memory over *jobs* workbooks run
    at once, at least 256 MiB (4 GiB where the physical memory is not known)."""
    total = _physical_memory()
    if total is None:
        return 4 * 2**30
    return max(_FLOOR, total // 2 // max(1, jobs))


_UNITS = {
    "": 2**20,
    "K": 2**10,
    "KB": 2**10,
    "KIB": 2**10,
    "M": 2**20,
    "MB": 2**20,
    "MIB": 2**20,
    "G": 2**30,
    "GB": 2**30,
    "GIB": 2**30,
}


def parse_memory(text: str) -> int:
    """Bytes of a memory size written ``512M``, ``2G``, ``1.5GiB`` or ``800`` (MiB).

    Raises ValueError naming the value and what is accepted."""
    t = str(text).strip().upper().replace(" ", "")
    digits = t.rstrip("KMGIB")
    unit = t[len(digits) :]
    try:
        n = float(digits)
    except ValueError:
        n = float("nan")
    if unit not in _UNITS or not (n > 0 and n != float("inf")):
        raise ValueError(
            f"--max-memory {text!r} must be a size above 0 such as 800M, 2G or 1.5GiB "
            "(a plain number is MiB)"
        )
    return int(n * _UNITS[unit])


def resident_memory() -> int:
    """The resident memory of this process now, in bytes (its peak where the current value
    cannot be read)."""
    try:
        with open("/proc/self/statm", "rb") as fh:
            return int(fh.read().split()[1]) * os.sysconf("SC_PAGE_SIZE")
    except (OSError, ValueError, IndexError):
        import resource  # not on Windows: there the peak is unknown and taken as 0

        try:
            peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
        except (AttributeError, ValueError):  # pragma: no cover
            return 0
        return peak if os.uname().sysname == "Darwin" else peak * 1024


@dataclass(frozen=True)
class Budget:
    """The limits of the work on one workbook: seconds of wall time and bytes of resident
    memory of the process (``None``: the default)."""

    max_seconds: float = DEFAULT_SECONDS
    max_memory: int = field(default_factory=default_memory)

    def __post_init__(self):
        for name in ("max_seconds", "max_memory"):
            v = getattr(self, name)
            if not (isinstance(v, (int, float)) and v > 0 and v == v and v != float("inf")):
                raise ValueError(f"{name} = {v!r} must be a finite number above 0")


def _mib(n: float) -> str:
    return f"{n / 2**20:,.0f} MiB"


class _Watchdog:
    def __init__(self, budget: Budget, thread_id: int):
        self.budget = budget
        self.thread_id = thread_id
        self.reason = ""
        self._lock = threading.Lock()
        self._stopped = False
        self._injected = False
        self._wake = threading.Event()
        self._t0 = time.monotonic()
        self._thread = threading.Thread(target=self._watch, name="joulebook-budget", daemon=True)

    def start(self) -> None:
        self._thread.start()

    def over(self) -> str:
        took = time.monotonic() - self._t0
        if took > self.budget.max_seconds:
            return f"it took more than --max-seconds {self.budget.max_seconds:g} s"
        rss = resident_memory()
        if rss > self.budget.max_memory:
            return (
                f"it used {_mib(rss)} of memory, more than --max-memory "
                f"{_mib(self.budget.max_memory)}"
            )
        return ""

    def _watch(self) -> None:
        wait = _POLL
        while not self._wake.wait(wait):
            why = self.over()
            if not why:
                continue
            with self._lock:
                if self._stopped:
                    return
                self.reason = self.reason or why
                ctypes.pythonapi.PyThreadState_SetAsyncExc(
                    ctypes.c_ulong(self.thread_id), ctypes.py_object(OverBudget)
                )
                self._injected = True
            wait = _AGAIN  # raised again later only if the work still runs then

    def _stop_once(self) -> None:
        with self._lock:
            self._stopped = True
            if self._injected:  # one raised but not yet delivered must not escape the run
                ctypes.pythonapi.PyThreadState_SetAsyncExc(ctypes.c_ulong(self.thread_id), None)
        self._wake.set()
        self._thread.join()

    def stop(self) -> None:
        """Stop watching; an OverBudget arriving while stopping is taken as tripped."""
        while True:
            try:
                self._stop_once()
                return
            except OverBudget:
                continue


def run_within(budget: Budget | None, fn, *args, **kwargs):
    """``fn(*args, **kwargs)`` stopped past *budget*; raises :class:`TooLarge` then.

    Parameters
    ----------
    budget : Budget or None
        The limits (seconds, bytes); ``None`` runs *fn* without a watchdog.
    fn : callable
        The work: read, recompute, build a report — never a write, which comes after.

    Returns
    -------
    object
        What *fn* returned.

    Raises
    ------
    TooLarge
        When the time or memory budget was passed (or memory ran out); its ``reason`` names
        the limit.
    """
    if budget is None:
        return fn(*args, **kwargs)
    dog = _Watchdog(budget, threading.get_ident())
    why = dog.over()  # already past it (memory) before the work begins
    if why:
        raise TooLarge(why)
    done, result = False, None
    try:
        dog.start()
        result, done = fn(*args, **kwargs), True
    except OverBudget:
        pass
    except MemoryError:
        dog.reason = dog.reason or (
            f"it ran out of memory (--max-memory {_mib(budget.max_memory)})"
        )
    finally:
        dog.stop()
    if dog.reason or not done:
        raise TooLarge(dog.reason or "it passed its budget")
    return result
