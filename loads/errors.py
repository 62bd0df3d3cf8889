"""Errors and warnings raised by the models and the file layer.

Every error a user can cause carries where it came from (file, key) and why, so the
command line can print one line and exit 2 instead of a traceback.
"""
from __future__ import annotations


class InputError(ValueError):
    """Bad input: a malformed file, an unknown key, a value out of range.

    ``str(error)`` is the one-line message shown to the user:
    ``FILE: KEY: REASON`` (parts that are unknown are left out).
    """

    def __init__(self, reason: str, *, key: str | None = None, file: str | None = None,
                 line: int | None = None) -> None:
        self.reason = reason
        self.key = key
        self.file = file
        self.line = line
        super().__init__(reason)

    def located(self, *, file: str | None = None, key_prefix: str | None = None) -> "InputError":
        """The same error with the file and/or an outer key prefix filled in."""
        key = self.key
        if key_prefix:
            key = f"{key_prefix}.{key}" if key else key_prefix
        return InputError(self.reason, key=key, file=file or self.file, line=self.line)

    def __str__(self) -> str:
        where = []
        if self.file:
            where.append(f"{self.file}" + (f":{self.line}" if self.line else ""))
        if self.key:
            where.append(self.key)
        return ": ".join(where + [self.reason])


class SolverError(RuntimeError):
    """The simulator could not go on with a legal circuit (its step size collapsed).

    ``str()`` is one line: where it stopped and the element suspected.  ``circuit`` is
    the circuit simulated (a range end where ranges are evaluated) and ``settings`` the
    simulation's settings, for a bug report."""

    def __init__(self, reason: str, *, t_s: float | None = None, outputs=None, suspect: str | None = None,
                 circuit=None, settings: dict | None = None) -> None:
        self.reason = reason
        self.t_s = t_s
        self.outputs = outputs
        self.suspect = suspect
        self.circuit = circuit
        self.settings = dict(settings or {})
        super().__init__(reason)

    def __str__(self) -> str:
        return self.reason + (f"; suspected element: {self.suspect}" if self.suspect else "")


class ModelRangeWarning(UserWarning):
    """A model is being used outside the range its data or equations cover."""


def require(condition: bool, field: str, value, reason: str) -> None:
    """Raise an InputError naming ``field`` unless ``condition`` holds."""
    if not condition:
        raise InputError(f"{value!r} {reason}", key=field)
