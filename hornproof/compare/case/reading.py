"""Reading a case file from disk: bytes -> UTF-8 text -> TOML tables, one-line errors."""

import errno
import os
import re
import stat
import tomllib
from pathlib import Path

from ...errors import InputError
from .values import one_line


#: largest case file read (a case file is a few hundred bytes; hornproof's limit)
MAX_CASE_FILE_BYTES = 1 << 20
#: deepest nesting of tables and arrays accepted (format 1 needs 3: [tiers.quick] -> list)
MAX_CASE_NESTING = 16


def read_toml(path):
    """Parse a TOML file into a dict; any failure is a one-line ``InputError`` naming the file.

    Only a regular file is read (a FIFO or a device such as ``/dev/zero`` would block or never
    end), at most :data:`MAX_CASE_FILE_BYTES`, nested at most :data:`MAX_CASE_NESTING` deep.
    """
    path = Path(path)
    shown = one_line_path(path)
    try:
        info = os.stat(path)
    except (OSError, ValueError) as error:  # ValueError: e.g. a NUL byte in the path
        raise InputError(f"{shown}: cannot read the case file: {_os_reason(error)}") from None
    if stat.S_ISDIR(info.st_mode):
        raise InputError(f"{shown}: cannot read the case file: it is a directory")
    if not stat.S_ISREG(info.st_mode):
        raise InputError(f"{shown}: cannot read the case file: not a regular file "
                         f"({_file_kind(info.st_mode)}); give a .toml file")
    if info.st_size > MAX_CASE_FILE_BYTES:
        raise InputError(f"{shown}: cannot read the case file: {info.st_size} bytes is more than "
                         f"{MAX_CASE_FILE_BYTES} (a case file is a few hundred bytes)")
    try:
        with open(path, "rb") as handle:
            data = handle.read(MAX_CASE_FILE_BYTES + 1)
    except OSError as error:
        raise InputError(f"{shown}: cannot read the case file: {_os_reason(error)}") from None
    if len(data) > MAX_CASE_FILE_BYTES:
        raise InputError(f"{shown}: cannot read the case file: more than {MAX_CASE_FILE_BYTES} bytes")
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as error:
        raise InputError(f"{shown}: cannot read the case file: not UTF-8 text "
                         f"(bad byte at offset {error.start})") from None
    depth = max(bracket_depth(text), dotted_key_depth(text))
    if depth > MAX_CASE_NESTING:
        raise InputError(f"{shown}: invalid case file: arrays or tables nested {depth} deep "
                         f"(at most {MAX_CASE_NESTING})")
    try:
        document = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        where, message = _syntax_error_place(error)
        raise InputError(f"{shown}: {where}: invalid TOML: {message}") from None
    except RecursionError:
        raise InputError(f"{shown}: invalid case file: nested too deeply "
                         f"(at most {MAX_CASE_NESTING})") from None
    depth = nesting_depth(document)
    if depth > MAX_CASE_NESTING:
        raise InputError(f"{shown}: invalid case file: tables nested {depth} deep "
                         f"(at most {MAX_CASE_NESTING})")
    return document


def one_line_path(path):
    """A path as shown in a one-line message: control characters (a newline) escaped."""
    return "".join(c if c.isprintable() else repr(c)[1:-1] for c in str(path))


def _os_reason(error):
    """Words for why a file could not be read, one per ``errno`` the user can act on."""
    reasons = {errno.ENOENT: "no such file", errno.ELOOP: "a symbolic link loop",
               errno.EACCES: "permission denied", errno.ENOTDIR: "a part of the path is not a folder",
               errno.ENAMETOOLONG: "the name is too long", errno.EISDIR: "it is a directory"}
    if isinstance(error, OSError) and error.errno in reasons:
        return reasons[error.errno]
    return one_line(getattr(error, "strerror", None) or error)


def _file_kind(mode):
    """Plain words for a non-regular file type."""
    if stat.S_ISFIFO(mode):
        return "a FIFO"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a plain file"


def bracket_depth(text):
    """Deepest nesting of ``[``/``{`` in TOML ``text`` outside strings and comments (an upper
    bound on the parsed depth, found without recursion, so a hostile file cannot exhaust the
    parser's stack)."""
    depth = deepest = 0
    i, n = 0, len(text)
    while i < n:
        c = text[i]
        if c == "#":
            end = text.find("\n", i)
            i = n if end < 0 else end
            continue
        if c in "\"'":
            triple = text.startswith(c * 3, i)
            quote = c * 3 if triple else c
            j = i + len(quote)
            while j < n:
                if c == '"' and text[j] == "\\":
                    j += 2
                    continue
                if text.startswith(quote, j):
                    break
                if not triple and text[j] == "\n":
                    break
                j += 1
            i = j + len(quote)
            continue
        if c in "[{":
            depth += 1
            deepest = max(deepest, depth)
        elif c in "]}":
            depth = max(depth - 1, 0)
        i += 1
    return deepest


def dotted_key_depth(text):
    """Most parts in one dotted key or table header of TOML ``text`` (``a.b.c`` has 3), dots
    inside quotes not counted: a key path 50,000 parts long takes the parser seconds."""
    deepest = 0
    for line in text.splitlines():
        key = line.strip()
        if key.startswith("["):
            key = key.strip("[")
            key = key.split("]", 1)[0]
        elif "=" in key:
            key = key.split("=", 1)[0]
        else:
            continue
        parts, quote = 1, None
        for c in key:
            if quote:
                quote = None if c == quote else quote
            elif c in "\"'":
                quote = c
            elif c == ".":
                parts += 1
        deepest = max(deepest, parts)
    return deepest


def nesting_depth(value):
    """Deepest nesting of dicts and lists in a parsed document (iterative)."""
    deepest = 0
    stack = [(value, 0)]
    while stack:
        item, depth = stack.pop()
        if isinstance(item, dict):
            children = item.values()
        elif isinstance(item, list):
            children = item
        else:
            continue
        deepest = max(deepest, depth + 1)
        stack.extend((child, depth + 1) for child in children)
    return deepest


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
