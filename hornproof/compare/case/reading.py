"""Reading a case file from disk: bytes -> UTF-8 text -> TOML tables, one-line errors."""

import re
import tomllib
from pathlib import Path

from ...errors import InputError
from .values import one_line


def read_toml(path):
    """Parse a TOML file into a dict; any failure is a one-line ``InputError`` naming the file."""
    path = Path(path)
    try:
        if not path.exists():
            raise InputError(f"{path}: cannot read the case file: no such file")
        if path.is_dir():
            raise InputError(f"{path}: cannot read the case file: it is a directory")
        data = path.read_bytes()
    except (OSError, ValueError) as error:  # ValueError: e.g. a NUL byte in the path
        reason = getattr(error, "strerror", None) or error
        raise InputError(one_line(f"{path}: cannot read the case file: {reason}")) from None
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as error:
        raise InputError(f"{path}: cannot read the case file: not UTF-8 text "
                         f"(bad byte at offset {error.start})") from None
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        where, message = _syntax_error_place(error)
        raise InputError(f"{path}: {where}: invalid TOML: {message}") from None


def _syntax_error_place(error):
    """("line L, column C" or "end of file", the message without its place) of a TOML error."""
    message = one_line(str(error))
    found = re.search(r"\s*\(at line (\d+), column (\d+)\)\s*$", message)
    if found:
        return f"line {found.group(1)}, column {found.group(2)}", message[:found.start()]
    found = re.search(r"\s*\(at end of document\)\s*$", message)
    if found:
        message = message[:found.start()]
    return "end of file", message
