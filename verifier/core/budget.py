"""One clock for a whole claim: every stage (solver queries, splitting, analysis) draws on it.

Why: a per-query timeout bounds each solver call but not how many calls, splits or LPs a claim
needs, so a claim could still run for hours.  A `Budget` is a deadline fixed when the claim starts;
each stage asks it for the time a solver query may take (never more than what is left) and checks it
between units of work.  Running out raises `OutOfBudget` naming the stage; the verdict is then
'unknown' with that stage named, never 'proved'.

The deadline is a point on the system-wide monotonic clock, so the same Budget works in the worker
processes of a pool (it pickles as two floats and a name).
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass

DEFAULT_CLAIM_SECONDS = 600.0


class OutOfBudget(Exception):
    """The claim's time ran out in `stage`.  Deliberately not a GdofError: it is no input error."""

    def __init__(self, stage: str, seconds: float):
        self.stage, self.seconds = stage, seconds
        super().__init__(f"ran out of the claim's time budget ({seconds:g} s) in stage '{stage}'")

    def __reduce__(self):  # travels back from pool workers intact
        return (OutOfBudget, (self.stage, self.seconds))


class TooLarge(OutOfBudget):
    """A stage would exceed a size limit (memory, not time); handled like a spent budget: unknown."""

    def __init__(self, stage: str, size: int, limit: int):
        self.stage, self.seconds, self.size, self.limit = stage, 0.0, size, limit
        Exception.__init__(self, f"stage '{stage}' exceeds its size limit ({size} > {limit})")

    def __reduce__(self):
        return (TooLarge, (self.stage, self.size, self.limit))


@dataclass(frozen=True)
class Budget:
    """`seconds` for the whole claim from `start`; `query_timeout` caps each solver query."""

    seconds: float = DEFAULT_CLAIM_SECONDS
    query_timeout: float = 30.0
    start: float = -1.0

    def __post_init__(self):
        if self.start < 0:
            object.__setattr__(self, "start", time.monotonic())
        for what, v in (("budget", self.seconds), ("timeout", self.query_timeout)):
            if not (isinstance(v, (int, float)) and math.isfinite(v) and v > 0):
                raise ValueError(f"the {what} must be a positive number of seconds, not {v!r}")

    @staticmethod
    def of(budget: "Budget | None", timeout: float = 30.0, seconds: float | None = None) -> "Budget":
        """The given budget, or a fresh one for a claim that starts now."""
        if budget is not None:
            return budget
        return Budget(DEFAULT_CLAIM_SECONDS if seconds is None else seconds, timeout)

    @property
    def deadline(self) -> float:
        return self.start + self.seconds

    def remaining(self) -> float:
        return self.deadline - time.monotonic()

    def spent(self) -> float:
        return time.monotonic() - self.start

    def expired(self) -> bool:
        return self.remaining() <= 0

    def check(self, stage: str) -> None:
        """Raise OutOfBudget when the claim's time is up (call between units of work)."""
        if self.remaining() <= 0:
            raise OutOfBudget(stage, self.seconds)

    def timeout(self, stage: str, cap: float | None = None) -> float:
        """Seconds one solver query may take now: the per-query timeout, `cap`, and what is left."""
        left = self.remaining()
        if left <= 0:
            raise OutOfBudget(stage, self.seconds)
        limit = min(self.query_timeout, left)
        return min(limit, cap) if cap is not None else limit

    def share(self, fraction: float) -> "Budget":
        """A budget ending after `fraction` of what is left (a stage that must leave time for others)."""
        left = max(self.remaining(), 0.0) * fraction
        return Budget(max(left, 1e-3), min(self.query_timeout, max(left, 1e-3)), time.monotonic())
