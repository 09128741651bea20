"""Exception and warning types, and the strict mode that turns range warnings into errors.

Every error raised by ``ionact`` for a caller's input derives from :class:`IonactError`,
so ``except ionact.IonactError`` catches all of them; most also derive from the matching
built-in (``ValueError``, ``KeyError``) so generic code keeps working.
"""

from __future__ import annotations

import contextlib
import contextvars
import os
import sys
import types
import warnings
from collections.abc import Iterator

__all__ = [
    "IonactError",
    "InputError",
    "UnitError",
    "UnknownSpeciesError",
    "MissingParameterError",
    "InfeasibleDesignError",
    "ConvergenceError",
    "ValidityRangeError",
    "ValidityRangeWarning",
    "UnitAssumptionWarning",
    "strict",
    "is_strict",
    "warn_range",
]


_UNSET = object()


class IonactError(Exception):
    """Base class of every error ``ionact`` raises for a caller's input.

    Besides the message, an error carries structured fields where the raising code knows
    them: ``value`` (the offending value), ``allowed`` (the allowed range or set, as text)
    and ``field`` (the argument, column or file field it came from); None when not given.
    """

    def __init__(self, message: object = "", *, value: object = _UNSET, allowed: str | None = None,
                 field: str | None = None) -> None:
        super().__init__(message)
        self.value = None if value is _UNSET else value
        self.has_value = value is not _UNSET
        self.allowed = allowed
        self.field = field


class InputError(IonactError, ValueError):
    """A value is malformed, out of its allowed range, NaN, negative, or inconsistent."""


class UnitError(InputError):
    """A unit string is unknown or has the wrong dimension for the quantity asked."""


class UnknownSpeciesError(IonactError, KeyError):
    """An ion or salt is not known (not in the tables and not parseable)."""

    def __str__(self) -> str:  # KeyError quotes its message; we want it plain
        return str(self.args[0]) if self.args else ""


class MissingParameterError(IonactError, KeyError):
    """A model needs a parameter (a Pitzer pair, an SIT ε, an ion size) the tables lack."""

    def __str__(self) -> str:
        return str(self.args[0]) if self.args else ""


class ConvergenceError(IonactError, RuntimeError):
    """An iterative solution (chemical equilibrium) did not converge; the message names the balance."""


class InfeasibleDesignError(IonactError, ValueError):
    """No adjuster design within the constraints meets the error budget."""


class ValidityRangeError(InputError):
    """A model or correlation was used outside its validity range in strict mode."""


class ValidityRangeWarning(UserWarning):
    """A model or correlation is used outside its validity range; the message says which."""


class UnitAssumptionWarning(UserWarning):
    """A unit was read under an assumption (e.g. ppm taken as mg/L for dilute water)."""


_STRICT: contextvars.ContextVar[bool] = contextvars.ContextVar("ionact_strict", default=False)


def is_strict() -> bool:
    """Return True inside a :func:`strict` block."""
    return _STRICT.get()


@contextlib.contextmanager
def strict(enabled: bool = True) -> Iterator[None]:
    """Turn :class:`ValidityRangeWarning` into :class:`ValidityRangeError` inside the block.

    Parameters
    ----------
    enabled : bool
        True to make range problems errors inside the block; False to keep them warnings
        (e.g. inside an outer strict block).

    Yields
    ------
    None
        The block runs with the setting; the previous one returns after it.

    Raises
    ------
    ValidityRangeError
        Inside the block, wherever ionact would otherwise warn about a validity range.

    Examples
    --------
    >>> import ionact as ia
    >>> with ia.strict():
    ...     ia.water.density(103.0)
    Traceback (most recent call last):
    ...
    ionact.errors.ValidityRangeError: water density: temperature 103 °C is outside 0–100 °C
    """
    token = _STRICT.set(enabled)
    try:
        yield
    finally:
        _STRICT.reset(token)


_PACKAGE_DIR = os.path.dirname(os.path.abspath(__file__))


def caller_stacklevel() -> int:
    """The ``stacklevel`` that points a warning at the first frame outside ionact.

    Counted for a ``warnings.warn`` call made in the function that calls this one.
    """
    frame: types.FrameType | None = sys._getframe(1)
    level = 1
    while frame is not None and frame.f_code.co_filename.startswith(_PACKAGE_DIR):
        frame = frame.f_back
        level += 1
    return level


def warn_range(message: str) -> None:
    """Warn (or raise in strict mode) that something is used outside its validity range.

    The warning points at the caller's own code (the first frame outside ionact).
    """
    if _STRICT.get():
        raise ValidityRangeError(message)
    warnings.warn(message, ValidityRangeWarning, stacklevel=caller_stacklevel())
