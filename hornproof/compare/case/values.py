"""Typed values of a case file: read one TOML value as a number, a choice, a list or a table.

Each reader takes the value (or its table and key) and the dotted key it came from, and raises
:class:`CaseProblem` naming that key and the reason when the value is not what the format asks
for. The loader turns a ``CaseProblem`` into one ``InputError`` line naming the file.
"""

import difflib
import math

from ...errors import InputError

#: Marks a key without a default: its absence is a problem.
REQUIRED = object()


class CaseProblem(Exception):
    """A problem at one dotted key of a case file; becomes an ``InputError`` naming the file."""

    def __init__(self, key, reason):
        super().__init__(key, reason)
        self.key = key
        self.reason = reason


def one_line(text):
    """``text`` with every run of whitespace (newlines too) made one space."""
    return " ".join(str(text).split())


def input_error(path, problem):
    """The user-facing ``InputError`` for a :class:`CaseProblem` in the case file ``path``."""
    return InputError(one_line(f"{path}: {problem.key}: {problem.reason}"))


def dotted_key(prefix, key):
    """``"prefix.key"``, or ``key`` at the top level (empty prefix)."""
    return f"{prefix}.{key}" if prefix else key


def describe_value(value):
    """A short description of a TOML value's type, for error messages."""
    if isinstance(value, bool):
        return f"a boolean ({str(value).lower()})"
    if isinstance(value, str):
        return f"a string ({value!r})"
    if isinstance(value, int):
        return f"an integer ({value})"
    if isinstance(value, float):
        return f"a number ({value!r})"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "a table"
    return f"a {type(value).__name__} ({value})"


def suggestion(word, known):
    """' (did you mean ...?)' for the nearest known name (difflib, else a prefix match), or ''."""
    word = str(word)
    match = difflib.get_close_matches(word, list(known), n=1, cutoff=0.6)
    if not match and len(word) >= 3:
        match = [name for name in known if name.startswith(word)][:1]
    return f" (did you mean {match[0]!r}?)" if match else ""


def check_keys(table, known, prefix):
    """Refuse the first key of ``table`` that is not in ``known``, with a hint."""
    for key in table:
        if key not in known:
            hint = suggestion(key, known) or f" (known keys: {', '.join(known)})"
            raise CaseProblem(dotted_key(prefix, key), f"unknown key{hint}")


def read_table(parent, key, *, required, prefix=""):
    """The sub-table ``parent[key]``; ``{}`` when absent and not ``required``."""
    dotted = dotted_key(prefix, key)
    if key not in parent:
        if required:
            raise CaseProblem(dotted, f"missing required table [{dotted}]")
        return {}
    value = parent[key]
    if not isinstance(value, dict):
        raise CaseProblem(dotted, f"must be a table [{dotted}], got {describe_value(value)}")
    return value


def is_number(value):
    """True for a TOML integer or float (never a boolean)."""
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def read_number(value, dotted):
    """A finite int or float (never a boolean) as float."""
    if not is_number(value):
        raise CaseProblem(dotted, f"must be a number, got {describe_value(value)}")
    if not math.isfinite(value):
        raise CaseProblem(dotted, f"must be a finite number, got {value!r}")
    return float(value)


def read_positive(table, key, prefix, *, unit, default=REQUIRED):
    """A positive number ``table[key]`` (``unit`` names it in messages), or ``default``."""
    dotted = dotted_key(prefix, key)
    if key not in table:
        if default is REQUIRED:
            raise CaseProblem(dotted, "missing required key")
        return default
    value = read_number(table[key], dotted)
    if value <= 0:
        raise CaseProblem(dotted, f"must be positive ({unit}), got {table[key]!r}")
    return value


def read_bounded(table, key, prefix, default, low, high, *, unit, low_inclusive=False):
    """A number with low < x <= high (or low <= x if ``low_inclusive``)."""
    dotted = dotted_key(prefix, key)
    if key not in table:
        return default
    value = read_number(table[key], dotted)
    below = value < low if low_inclusive else value <= low
    if below or value > high:
        left = "[" if low_inclusive else "("
        raise CaseProblem(dotted, f"must be in {left}{low:g}, {high:g}] ({unit}), "
                                  f"got {table[key]!r}")
    return value


def read_integer(value, dotted):
    """A TOML integer (never a boolean)."""
    if isinstance(value, bool) or not isinstance(value, int):
        raise CaseProblem(dotted, f"must be an integer, got {describe_value(value)}")
    return value


def read_boolean(table, key, prefix, default):
    """``table[key]`` as true or false, or ``default`` when absent."""
    dotted = dotted_key(prefix, key)
    if key not in table:
        return default
    value = table[key]
    if not isinstance(value, bool):
        raise CaseProblem(dotted, f"must be true or false, got {describe_value(value)}")
    return value


def read_choice(table, key, prefix, choices, *, default=REQUIRED):
    """``table[key]``, a string among ``choices``, or ``default`` when absent."""
    dotted = dotted_key(prefix, key)
    listed = ", ".join(map(repr, choices))
    if key not in table:
        if default is REQUIRED:
            raise CaseProblem(dotted, f"missing required key (one of {listed})")
        return default
    value = table[key]
    if not isinstance(value, str):
        raise CaseProblem(dotted, f"must be a string, one of {listed}; "
                                  f"got {describe_value(value)}")
    if value not in choices:
        raise CaseProblem(dotted, f"unknown value {value!r}{suggestion(value, choices)}; "
                                  f"expected one of {listed}")
    return value


def read_number_list(value, dotted, *, minimum_length=1):
    """A list of at least ``minimum_length`` finite numbers, as floats."""
    if not isinstance(value, list):
        raise CaseProblem(dotted, f"must be a list of numbers, got {describe_value(value)}")
    if len(value) < minimum_length:
        if not value:
            raise CaseProblem(dotted, "the list is empty")
        raise CaseProblem(dotted, f"needs at least {minimum_length} values, got {len(value)}")
    return [read_number(item, f"{dotted}[{index}]") for index, item in enumerate(value)]
