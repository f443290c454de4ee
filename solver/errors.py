"""One exception family for everything traystack reports to a user.

Each error carries a message that a process engineer can act on without a traceback, and the
exit code the command line uses for it (2 bad input or infeasible specification, 3 the solver
did not converge).
"""

from __future__ import annotations

from typing import Any

__all__ = ["CaseError", "ConvergenceError", "SpecError", "ThermoError", "TraystackError"]


class TraystackError(Exception):
    """Base class; ``exit_code`` is what the ``traystack`` command exits with."""

    exit_code = 2

    def __init__(self, message: str) -> None:
        super().__init__(message)
        self.message = message

    def __str__(self) -> str:
        return self.message


class CaseError(TraystackError):
    """Bad input: a case file that cannot be read, or a key whose value is not allowed.

    The message names the file, the key path (``feeds[0].composition``), the value found and
    what was expected.
    """

    def __init__(
        self,
        problem: str,
        *,
        file: str | None = None,
        key: str | None = None,
        value: Any = None,
        expected: str | None = None,
    ) -> None:
        self.problem = problem
        self.file = file
        self.key = key
        self.value = value
        self.expected = expected
        where = ""
        if file:
            where += f"{file}: "
        if key:
            where += f"{key}: "
        text = where + problem
        if value is not None:
            text += f" (got {value!r})"
        if expected:
            text += f"; expected {expected}"
        super().__init__(text)


class SpecError(TraystackError):
    """An infeasible or contradictory specification (too many or too few specs, a purity
    beyond an azeotrope, a reflux below the minimum, ...). The message names the spec and,
    where one is known, the bound."""


class ThermoError(TraystackError):
    """A property model asked for something it cannot give: a vapor pressure above the
    critical temperature, a correlation outside its validity range, a failed flash."""


class ConvergenceError(TraystackError):
    """The solver gave up. Carries the iteration log and, where there is one, the last
    (unconverged) result so it can still be written and marked ``converged: false``."""

    exit_code = 3

    def __init__(self, message: str, *, iteration_log: list[dict] | None = None, result: Any = None) -> None:
        super().__init__(message)
        self.iteration_log = list(iteration_log or [])
        self.result = result
