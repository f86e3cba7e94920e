"""The user-facing error types. Anything else that escapes is a bug and keeps its traceback."""


class HornproofError(Exception):
    """A mistake or condition the user can act on; printed as one line.

    ``exit_code`` follows the command-line contract: 2 bad input, 3 the run failed.
    """

    exit_code = 2


class InputError(HornproofError):
    """Bad case file, bad argument or impossible horn (exit 2)."""

    exit_code = 2


class RunError(HornproofError):
    """The run itself failed: diverged, out of resources, solver missing (exit 3)."""

    exit_code = 3
