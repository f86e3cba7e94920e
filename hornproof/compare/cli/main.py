"""The ``hornproof`` command line.

One module per subcommand does the work; this module only parses arguments, dispatches,
and turns the user-facing errors (``hornproof.errors``) into one line and an exit status:
0 ok · 1 a check or regression failed · 2 bad input · 3 the run failed · 4 verify: unresolved.
Anything else is a bug and keeps its traceback.
"""

import argparse
import contextlib
import importlib
import signal
import sys

from ...errors import HornproofError, InputError
from ...version import VERSION
from ..jobs.messages import is_main_process, silence_solver_exit_banner
from ..output import terminal

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
    "sweep": "model error vs one horn parameter; breakdown threshold",
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
    args = parser.parse_args(argv)
    terminal.set_result_stream(sys.stdout)
    previous_sigterm = signal.signal(signal.SIGTERM, _terminate)
    try:
        if args.command == "regress":  # regress keeps its own standard-output discipline
            return dispatch(args)
        with contextlib.redirect_stdout(sys.stderr):  # solver banners go to standard error
            return dispatch(args)
    except HornproofError as error:
        if args.debug:
            raise
        message = str(error).splitlines()[0] if str(error) else type(error).__name__
        if is_main_process():  # every MPI rank raises the same error; one prints it
            print(f"hornproof: error: {message}", file=sys.stderr)
        return error.exit_code
    except KeyboardInterrupt:
        print("hornproof: interrupted", file=sys.stderr)
        return 130
    except _Terminated:
        print("hornproof: terminated (SIGTERM); nothing half-written was kept", file=sys.stderr)
        return 143
    except MemoryError:
        if args.debug:
            raise
        print("hornproof: error: out of memory; use fewer cells per wavelength", file=sys.stderr)
        return 3
    except OSError as error:
        if args.debug:
            raise
        where = error.filename or ""
        print(f"hornproof: error: {where}{': ' if where else ''}{error.strerror or error}", file=sys.stderr)
        return 2 if error.filename else 3
    finally:
        signal.signal(signal.SIGTERM, previous_sigterm)
        terminal.set_result_stream(None)
        silence_solver_exit_banner()


class _Terminated(BaseException):
    """SIGTERM, raised where the process is so that every ``except BaseException`` cleanup
    (staging folders, temporary files) runs before the command exits."""


def _terminate(signum, frame):
    raise _Terminated()



if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
