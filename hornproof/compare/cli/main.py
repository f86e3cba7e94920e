"""The ``hornproof`` command line.

One module per subcommand does the work; this module only parses arguments, dispatches,
and turns the user-facing errors (``hornproof.errors``) into one line and an exit status:
0 ok · 1 a check or regression failed · 2 bad input · 3 the run failed · 4 verify: unresolved.
Anything else is a bug and keeps its traceback.
"""

import argparse
import contextlib
import errno
import importlib
import os
import signal
import sys
import traceback

from ...errors import HornproofError, InputError
from ...version import VERSION
from ..jobs.messages import is_main_process, silence_solver_exit_banner
from ..output import terminal
from .arguments import refuse_empty_paths

DESCRIPTION = """\
How far do closed-form rectangular-horn formulas hold for your horn? hornproof reads a case
file (mm, GHz), evaluates the quadratic-phase (Fresnel) model and an exact-phase aperture model,
runs a CPU-only full-wave FDTD model with Meep, and compares them with numerical uncertainty.

Results are a design aid, not a substitute for measurement. RF exposure near an energised horn
can exceed safe limits: follow IEEE C95.1-2019 / ICNIRP (2020), local regulations and licensed
practice."""


#: subcommand -> its module (``setup_arguments(parser)``, ``run(args) -> int``), imported when
#: the parser is built; Meep loads only when a run needs it
COMMANDS = {
    "predict": "hornproof.compare.cli.predict",
    "simulate": "hornproof.compare.cli.simulate",
    "verify": "hornproof.compare.cli.verify",
    "sweep": "hornproof.compare.cli.sweep",
    "map": "hornproof.compare.cli.map",
    "regress": "hornproof.compare.cli.regress",
    "design": "hornproof.compare.cli.design",
    "report": "hornproof.compare.cli.report",
    "exposure": "hornproof.compare.cli.exposure",
}

#: one line of help per subcommand (``hornproof --help``)
HELP = {
    "predict": "closed-form and exact-phase models only (instant)",
    "simulate": "FDTD model only (Meep); writes fields.h5, result.json, s11.s1p",
    "verify": "the main job: models + FDTD ladder, compared, with verdict and report",
    "sweep": "model errors vs one horn parameter (3D unless told); breakdown intervals, optima",
    "map": "model error over two horn parameters; breakdown intervals (cost estimated first)",
    "regress": "nightly suite against stored baselines (JUnit XML)",
    "design": "optimum horn sizing (analytic)",
    "report": "rebuild report.html from a stored result folder",
    "exposure": "on-axis distances beyond which RF exposure reference levels hold (an estimate)",
}


def build_parser():
    """The ``hornproof`` parser: one subparser per entry of :data:`COMMANDS`, each taking the
    shared ``--debug`` option after the subcommand too."""
    parser = argparse.ArgumentParser(
        prog="hornproof", description=DESCRIPTION, formatter_class=argparse.RawDescriptionHelpFormatter
    )
    parser.add_argument("--version", action="version", version=f"hornproof {VERSION}")
    parser.add_argument("--debug", action="store_true", help="show tracebacks for every error")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    debug = argparse.ArgumentParser(add_help=False)
    debug.add_argument("--debug", action="store_true", default=argparse.SUPPRESS,
                       help="show tracebacks for every error")
    for name, module_name in COMMANDS.items():
        module = importlib.import_module(module_name)
        module.setup_arguments(sub.add_parser(name, parents=[debug], help=HELP[name]))
        sub.choices[name].set_defaults(run=module.run)
    return parser


def dispatch(args):
    """Run the chosen subcommand; its exit status (0 when it returns None)."""
    if args.command not in COMMANDS:
        raise InputError("no command given: try 'hornproof --help'")
    return args.run(args) or 0


def main(argv=None):
    parser = build_parser()
    argv = sys.argv[1:] if argv is None else list(argv)
    args = parser.parse_args(argv)
    debug = bool(getattr(args, "debug", False))
    terminal.set_result_stream(sys.stdout)
    previous_sigterm = signal.signal(signal.SIGTERM, _terminate)
    try:
        refuse_repeated_options(parser, argv, args.command)
        refuse_empty_paths(args)
        if args.command == "regress":  # regress keeps its own standard-output discipline
            return dispatch(args)
        with contextlib.redirect_stdout(sys.stderr):  # solver banners go to standard error
            return dispatch(args)
    except HornproofError as error:
        return _report(debug, error.exit_code, str(error) or type(error).__name__, all_ranks_alike=True)
    except KeyboardInterrupt:
        print("hornproof: interrupted", file=sys.stderr)
        return 130
    except _Terminated:
        print("hornproof: terminated (SIGTERM); nothing half-written was kept", file=sys.stderr)
        return 143
    except MemoryError:
        return _report(debug, 3, "out of memory: the model does not fit in this machine's memory "
                                 "(fewer cells per wavelength, a smaller band or horn)")
    except OSError as error:
        code, message = os_error_message(error)
        return _report(debug, code, message)
    finally:
        signal.signal(signal.SIGTERM, previous_sigterm)
        terminal.set_result_stream(None)
        silence_solver_exit_banner()


def _report(debug, code, message, all_ranks_alike=False):
    """Print one error line (and, with ``--debug``, the traceback first); return ``code`` —
    ``--debug`` never changes the exit status."""
    if debug:
        traceback.print_exc()
    if not all_ranks_alike or is_main_process():  # every MPI rank raises a user error alike; one prints it
        print(f"hornproof: error: {escape_controls(message)}", file=sys.stderr)
    return code


def escape_controls(text):
    """``text`` on one line: newlines, escapes (ANSI), NUL and other control characters shown
    as Python escapes, so nothing a user or a file supplied can move the cursor or cut a line."""
    return "".join(c if c.isprintable() else repr(c)[1:-1] for c in str(text))


#: errno -> (exit status, words): the OSError cases a user can act on, each its own message
_OS_ERRORS = {
    errno.ENOSPC: (3, "no space left on the device"),
    errno.EDQUOT: (3, "disk quota exceeded"),
    errno.EROFS: (2, "read-only file system"),
    errno.EACCES: (2, "permission denied"),
    errno.EPERM: (2, "operation not permitted"),
    errno.ELOOP: (2, "a symbolic link loop"),
    errno.ENOENT: (2, "no such file or folder"),
    errno.ENOTDIR: (2, "a part of the path is not a folder"),
    errno.EISDIR: (2, "is a folder"),
    errno.ENAMETOOLONG: (2, "the name is too long"),
    errno.EMFILE: (3, "too many open files"),
    errno.ENOMEM: (3, "out of memory"),
}


def os_error_message(error):
    """(exit status, one line) for an ``OSError`` that reached the command line: the user's
    path (never a temporary name: :mod:`hornproof.atomic` reports the target) and the reason.
    A full disk or another resource is exit 3 ("the run failed: out of resources"), a path the
    user can fix exit 2, anything else 3."""
    code, words = _OS_ERRORS.get(error.errno, (3, error.strerror or str(error)))
    where = error.filename
    if isinstance(where, bytes):
        where = os.fsdecode(where)
    if where:
        return code, f"{where}: {words}"
    return code, f"{words} (while writing or reading a file)"


def refuse_repeated_options(parser, argv, command):
    """Refuse an option given twice (argparse would silently keep the last one)."""
    sub = parser._subparsers._group_actions[0].choices.get(command) if parser._subparsers else None
    seen = {}
    for token in argv:
        if token == "--":
            break
        if not token.startswith("--") or token == "--":
            continue
        name = token.split("=", 1)[0]
        action = None
        for candidate_parser in (sub, parser):
            if candidate_parser is None:
                continue
            action = candidate_parser._option_string_actions.get(name)
            if action is None:  # an unambiguous abbreviation, as argparse accepts it
                matches = {a for option, a in candidate_parser._option_string_actions.items()
                           if option.startswith(name)}
                action = matches.pop() if len(matches) == 1 else None
            if action is not None:
                break
        if action is None:
            continue
        if action.dest in seen:
            also = "" if seen[action.dest] == name else f" (also as {seen[action.dest]})"
            raise InputError(f"{name}: given twice{also}; give each option once")
        seen[action.dest] = name


class _Terminated(BaseException):
    """SIGTERM, raised where the process is so that every ``except BaseException`` cleanup
    (staging folders, temporary files) runs before the command exits."""


def _terminate(signum, frame):
    raise _Terminated()



if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
