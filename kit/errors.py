"""The kit's errors: one root, each concrete error also a matching builtin.

Every message names the field, the value (with its unit where it has one) and
the allowed range, the choices, or the reason. The facts are kept as
attributes so a panel can show them beside the field.

Tree::

    HeadlineError (Exception)
    ├── InputError (ValueError)            a value the user supplied is not acceptable
    │   ├── OutOfRangeError                a number outside its allowed range
    │   ├── UnknownChoiceError             a key that is not one of the listed choices
    │   ├── UnitParseError                 text that is not a number with a known unit
    │   └── LiquidStateError               a liquid state outside its model (frozen, boiling, ...)
    ├── DimensionError (TypeError)         a quantity with the wrong physical dimension
    ├── ScenarioError (ValueError)         a scenario file with a missing or malformed key
    │   ├── UnknownKeyError                a key the schema does not have (or has elsewhere)
    │   ├── KeyTypeError                   a value of the wrong type (never coerced)
    │   └── ScenarioFileError              a file that is not UTF-8 TOML text of a sane size
    ├── NoSolutionError (ValueError)       a calculation with no answer, and the reason why
    └── RecordError (ValueError)           a record file that is corrupted, edited or unreadable

Example
-------
>>> err = OutOfRangeError("pipe length", -5.0, "m", low=0.0, high=None)
>>> str(err)
"'pipe length' must be greater than 0 m, not -5 m"
"""

from __future__ import annotations

__all__ = [
    "HeadlineError",
    "InputError",
    "OutOfRangeError",
    "UnknownChoiceError",
    "UnitParseError",
    "LiquidStateError",
    "DimensionError",
    "ScenarioError",
    "UnknownKeyError",
    "KeyTypeError",
    "ScenarioFileError",
    "NoSolutionError",
    "RecordError",
    "check_range",
    "check_choice",
]


def _num(value) -> str:
    """Format a number compactly for an error message."""
    if isinstance(value, bool):
        return str(value)
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        return f"{value:.6g}"
    return repr(value)


def _with_unit(value, unit: str | None) -> str:
    text = _num(value)
    return f"{text} {unit}" if unit else text


class HeadlineError(Exception):
    """Root of every error the kit raises on purpose."""


class InputError(HeadlineError, ValueError):
    """A value supplied for a named field is not acceptable."""

    def __init__(self, field: str, value, reason: str, unit: str | None = None):
        self.field = field
        self.value = value
        self.unit = unit
        self.reason = reason
        super().__init__(f"'{field}' {reason}, not {_with_unit(value, unit)}")


class OutOfRangeError(InputError):
    """A number outside its allowed range (either bound may be open)."""

    def __init__(self, field: str, value, unit: str | None = None, low=None, high=None,
                 low_inclusive: bool = False, high_inclusive: bool = True):
        self.low = low
        self.high = high
        self.low_inclusive = low_inclusive
        self.high_inclusive = high_inclusive
        u = f" {unit}" if unit else ""
        if low is not None and high is not None:
            reason = f"must be between {_num(low)} and {_num(high)}{u}"
        elif low is not None:
            word = "at least" if low_inclusive else "greater than"
            reason = f"must be {word} {_num(low)}{u}"
        elif high is not None:
            word = "at most" if high_inclusive else "less than"
            reason = f"must be {word} {_num(high)}{u}"
        else:
            reason = "must be a finite number"
        super().__init__(field, value, reason, unit)


class UnknownChoiceError(InputError):
    """A key that is not one of the listed choices."""

    def __init__(self, field: str, value, choices):
        self.choices = list(choices)
        shown = ", ".join(repr(c) for c in self.choices[:40])
        more = f" (+{len(self.choices) - 40} more)" if len(self.choices) > 40 else ""
        super().__init__(field, value, f"must be one of {shown}{more}")


class UnitParseError(InputError):
    """Text that cannot be read as a number with a known unit."""

    def __init__(self, field: str, text, expected: str):
        self.expected = expected
        super().__init__(field, text, f"must be a number with a unit of {expected}")


class LiquidStateError(InputError):
    """A liquid state outside its model: frozen, boiling, or beyond a correlation's range."""

    def __init__(self, field: str, value, unit: str | None, reason: str):
        super().__init__(field, value, reason, unit)


class DimensionError(HeadlineError, TypeError):
    """A quantity whose physical dimension is not the one the field needs."""

    def __init__(self, field: str, text, expected: str, got: str):
        self.field = field
        self.value = text
        self.expected = expected
        self.got = got
        super().__init__(
            f"'{field}' needs a {expected}, but {text!r} is a {got}")


class ScenarioError(HeadlineError, ValueError):
    """A scenario file with a missing or malformed key."""

    def __init__(self, key: str, reason: str, source: str | None = None):
        self.key = key
        self.reason = reason
        self.source = source
        where = f" in {source}" if source else ""
        super().__init__(f"scenario key '{key}'{where}: {reason}")


class UnknownKeyError(ScenarioError):
    """A key the schema does not declare where it stands; says where it belongs or what is near."""

    def __init__(self, key: str, reason: str, source: str | None = None,
                 suggestion: str | None = None, belongs_in: str | None = None):
        self.suggestion = suggestion
        self.belongs_in = belongs_in
        super().__init__(key, reason, source)


class KeyTypeError(ScenarioError):
    """A value of the wrong TOML type for its key (``"false"`` is not false, 2.7 is not 2)."""

    def __init__(self, key: str, value, expected: str, source: str | None = None):
        self.value = value
        self.expected = expected
        shown = repr(value) if not isinstance(value, (dict, list)) else type(value).__name__
        super().__init__(key, f"must be {expected}, not {shown}", source)


class ScenarioFileError(ScenarioError):
    """A scenario file that is not UTF-8 TOML text, too large, or nested too deep."""


class NoSolutionError(HeadlineError, ValueError):
    """A calculation with no answer; the message says why."""

    def __init__(self, what: str, reason: str):
        self.what = what
        self.reason = reason
        super().__init__(f"no {what}: {reason}")


class RecordError(HeadlineError, ValueError):
    """A record file that is corrupted, edited or unreadable."""

    def __init__(self, path: str, reason: str):
        self.path = path
        self.reason = reason
        super().__init__(f"record {path}: {reason}")


def check_range(field: str, value, unit: str | None = None, low=None, high=None,
                low_inclusive: bool = False, high_inclusive: bool = True) -> float:
    """Return ``float(value)`` or raise :class:`OutOfRangeError` naming the field.

    Non-finite numbers are always refused.

    >>> check_range("count", 3, low=0)
    3.0
    """
    import math

    try:
        x = float(value)
    except (TypeError, ValueError):
        raise OutOfRangeError(field, value, unit, low, high, low_inclusive, high_inclusive) from None
    bad = not math.isfinite(x)
    if low is not None and (x < low or (x == low and not low_inclusive)):
        bad = True
    if high is not None and (x > high or (x == high and not high_inclusive)):
        bad = True
    if bad:
        raise OutOfRangeError(field, x, unit, low, high, low_inclusive, high_inclusive)
    return x


def check_choice(field: str, value, choices):
    """Return ``value`` if it is in ``choices`` or raise :class:`UnknownChoiceError`.

    >>> check_choice("condition", "new", ("new", "aged"))
    'new'
    """
    if value not in choices:
        raise UnknownChoiceError(field, value, choices)
    return value
