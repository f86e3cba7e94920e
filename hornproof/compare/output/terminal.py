"""What a command prints for people and scripts: its result on standard output.

While a command runs, the command line points ``sys.stdout`` at standard error so that what
the solver prints (Meep's banners) never mixes with ``--json`` output; results go through
``emit`` to the stream set with ``set_result_stream``.
"""

import sys
import textwrap

from .json_document import dumps
from .safety import RF_EXPOSURE_CAUTION

_result_stream = None


def set_result_stream(stream):
    """Where ``emit`` writes: the command's real standard output (set by the command line)."""
    global _result_stream
    _result_stream = stream


def emit(text=""):
    """Write a command's result (table or JSON) to standard output (see the module notes)."""
    stream = _result_stream or sys.stdout
    text = str(text)
    stream.write(text if text.endswith("\n") else text + "\n")
    stream.flush()


def emit_result(as_json, document, table, where=None):
    """A command's result on standard output: the JSON document, or the table for people
    followed by where the files are."""
    if as_json:
        emit(dumps(document))
        return
    emit(table)
    if where:
        emit(f"  {where}")


def safety_lines(indent="  ", width=96):
    """The RF-exposure caution wrapped for a terminal."""
    return textwrap.fill(RF_EXPOSURE_CAUTION, width=width, initial_indent=indent, subsequent_indent=indent)
