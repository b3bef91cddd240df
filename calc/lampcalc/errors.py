"""The core's error tree.

Errors are data: each carries the field, the value and what was expected, and
builds its message from them, so the command line, the page and the build can
all say the same thing in the same words.
"""

from __future__ import annotations

from .protocol import ErrorItem


def printable(value: object, limit: int = 60) -> str:
    """A value as a message shows it: on one line, control characters escaped,
    cut to ``limit`` characters."""
    text = "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in str(value))
    return text if len(text) <= limit else text[: limit - 1] + "…"


class CalcError(Exception):
    """Base of every error the core raises on purpose."""


class InputError(CalcError, ValueError):
    """A value the user gave cannot be used.

    ``field`` names the input (as the user knows it), ``value`` is what was
    given and ``expected`` says what would be accepted.
    """

    def __init__(self, field: str, value: object, expected: str) -> None:
        self.field = field
        self.value = value
        self.expected = expected
        super().__init__(self.message)

    @property
    def message(self) -> str:
        shown = self.value if isinstance(self.value, str) and self.value.strip() else repr(self.value)
        return f"{self.field}: got {printable(shown)}; expected {self.expected}"

    def as_dict(self) -> ErrorItem:
        return {
            "field": self.field,
            "value": str(self.value),
            "expected": self.expected,
            "message": self.message,
        }


class InputErrors(InputError):
    """Several input problems found in one pass (every one is reported)."""

    def __init__(self, errors: list[InputError]) -> None:
        if not errors:
            raise ValueError("InputErrors needs at least one error")
        self.errors = list(errors)
        first = self.errors[0]
        super().__init__(first.field, first.value, first.expected)

    @property
    def message(self) -> str:
        return "; ".join(e.message for e in self.errors)


class NoSolutionError(CalcError, ValueError):
    """The inputs are valid one by one but the circuit has no useful answer
    (for example the LED string needs more than the mains peak)."""

    def __init__(self, field: str, value: object, expected: str, why: str) -> None:
        self.field = field
        self.value = value
        self.expected = expected
        self.why = why
        super().__init__(f"{why} ({field} = {value}; {expected})")

    def as_dict(self) -> ErrorItem:
        return {
            "field": self.field,
            "value": str(self.value),
            "expected": self.expected,
            "message": str(self),
        }


class ConvergenceError(CalcError, ArithmeticError):
    """The steady-state solve did not converge; says which quantity and why."""

    def __init__(self, what: str, why: str) -> None:
        self.what = what
        self.why = why
        super().__init__(f"steady state did not converge ({what}): {why}")


def error_items(e: CalcError) -> list[ErrorItem]:
    """The ``errors`` of a refusal: one item per field at fault (field, value, expected, message); an error
    that names no field is one item with only its message."""
    if isinstance(e, InputErrors):
        return [x.as_dict() for x in e.errors]
    if isinstance(e, (InputError, NoSolutionError)):
        return [e.as_dict()]
    return [{"field": "", "value": "", "expected": "", "message": str(e)}]
