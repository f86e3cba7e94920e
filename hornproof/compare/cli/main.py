"""The ``hornproof`` command line.

One module per subcommand does the work; this module only parses arguments, dispatches,
and turns the user-facing errors (``hornproof.errors``) into one line and an exit status:
0 ok · 1 a check or regression failed · 2 bad input · 3 the run failed.
Anything else is a bug and keeps its traceback.
"""

import argparse
import contextlib
import signal
import sys

from ... import __version__
from ...errors import HornproofError, InputError

DESCRIPTION = """\
How far do closed-form rectangular-horn formulas hold for your horn? hornproof reads a case
file (mm, GHz), evaluates the quadratic-phase (Fresnel) model and an exact-phase aperture model,
runs a CPU-only full-wave FDTD model with Meep, and compares them with numerical uncertainty.

Results are a design aid, not a substitute for measurement. RF exposure near an energised horn
can exceed safe limits: follow IEEE C95.1-2019 / ICNIRP (2020), local regulations and licensed
practice."""


def _cells_list(text):
    try:
        values = [float(v) for v in text.split(",") if v.strip()]
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected numbers separated by commas, got {text!r}")
    if not values or any(not 4 <= v <= MAX_CELLS_PER_WAVELENGTH for v in values):
        raise argparse.ArgumentTypeError(f"cells per wavelength must be numbers from 4 to {MAX_CELLS_PER_WAVELENGTH:g}")
    return values


#: a grid beyond this is a typing slip, not a model (a 3D horn of a few wavelengths at 400
#: cells per wavelength would need terabytes); hornproof's limit
MAX_CELLS_PER_WAVELENGTH = 400.0


def build_parser():
    parser = argparse.ArgumentParser(
        prog="hornproof", description=DESCRIPTION, formatter_class=argparse.RawDescriptionHelpFormatter
    )
    parser.add_argument("--version", action="version", version=f"hornproof {__version__}")
    parser.add_argument("--debug", action="store_true", help="show tracebacks for every error")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    debug = argparse.ArgumentParser(add_help=False)
    debug.add_argument("--debug", action="store_true", default=argparse.SUPPRESS,
                       help="show tracebacks for every error")
    _add = sub.add_parser

    def add_parser(name, **kwargs):
        return _add(name, parents=[debug], **kwargs)

    sub.add_parser = add_parser

    p = sub.add_parser("predict", help="closed-form and exact-phase models only (instant)")
    p.add_argument("case", help="case file (.toml)")
    p.add_argument("--json", action="store_true", help="print the hornproof.result/1 summary on stdout")
    p.add_argument("--equivalent", choices=("huygens", "e-field"), default="huygens",
                   help="aperture equivalent for the patterns (default: huygens)")

    p = sub.add_parser("simulate", help="FDTD model only (Meep); writes fields.h5, result.json, s11.s1p")
    p.add_argument("case")
    p.add_argument("--cells-per-wavelength", type=_cells_list, metavar="N",
                   help="grid density at f_max, one value (default: the finest of the case's ladder)")
    p.add_argument("--out", metavar="DIR", help="output folder (default: results/<case>/<hash>/fdtd-<N>)")
    p.add_argument("--json", action="store_true")
    p.add_argument("--force", action="store_true", help="run even if the estimate exceeds free memory")
    p.add_argument("--image", action="store_true", help="also write model.png (two cuts through the axis)")

    p = sub.add_parser("verify", help="the main job: models + FDTD ladder, compared, with verdict and report")
    p.add_argument("case")
    p.add_argument("--cells-per-wavelength", type=_cells_list, metavar="N1,N2,N3",
                   help="convergence ladder, overrides the case's own (e.g. 16,20,24)")
    p.add_argument("--out", metavar="DIR", help="output folder (default: results/<case>/<hash>)")
    p.add_argument("--json", action="store_true")
    p.add_argument("--force", action="store_true", help="run even if the estimate exceeds free memory")

    p = sub.add_parser("sweep", help="model error vs one horn parameter; breakdown threshold")
    p.add_argument("case", help="case file with a [sweep] table")
    p.add_argument("--out", metavar="DIR", help="output folder (default: results/<case>-sweep)")
    p.add_argument("--dims", type=int, choices=(2, 3), help="override the sweep's model dimension")
    p.add_argument("--cells-per-wavelength", type=_cells_list, metavar="N[,N2,...]",
                   help="grids run at every swept value (default: the sweep's cells per wavelength "
                        "x 1, 1.4, 2; three or more give a grid-convergence uncertainty, two a "
                        "conservative one, one none)")
    p.add_argument("--analytic-only", action="store_true", help="skip FDTD (both analytic models only)")
    p.add_argument("--json", action="store_true")
    p.add_argument("--force", action="store_true")

    from .design import add_design_arguments
    from . import regress

    regress.setup_arguments(sub.add_parser("regress", help="nightly suite against stored baselines (JUnit XML)"))
    add_design_arguments(sub.add_parser("design", help="optimum horn sizing (analytic)"))

    p = sub.add_parser("report", help="rebuild report.html from a stored result folder")
    p.add_argument("result_dir", help="a folder holding result.json (from verify or sweep)")
    return parser


#: subcommand -> (module, function taking the parsed arguments)
COMMANDS = {
    "predict": ("hornproof.compare.cli.predict", "predict_command"),
    "simulate": ("hornproof.compare.cli.simulate", "simulate_command"),
    "verify": ("hornproof.compare.jobs.verify", "verify_command"),
    "sweep": ("hornproof.compare.jobs.sweep", "sweep_command"),
    "regress": ("hornproof.compare.cli.regress", "run"),
    "design": ("hornproof.compare.cli.design", "design_command"),
    "report": ("hornproof.compare.cli.report", "report_command"),
}


def dispatch(args):
    """Run the subcommand's module (imported only when used: Meep loads only for FDTD runs)."""
    import importlib

    if args.command not in COMMANDS:
        raise InputError("no command given: try 'hornproof --help'")
    module_name, function_name = COMMANDS[args.command]
    module = importlib.import_module(module_name)
    return getattr(module, function_name)(args)


def main(argv=None):
    parser = build_parser()
    args = parser.parse_args(argv)
    from ..output import terminal

    terminal.set_result_stream(sys.stdout)
    previous_sigterm = signal.signal(signal.SIGTERM, _terminate)
    try:
        if args.command == "regress":  # regress keeps its own standard-output discipline
            return dispatch(args) or 0
        with contextlib.redirect_stdout(sys.stderr):  # solver banners go to standard error
            return dispatch(args) or 0
    except HornproofError as error:
        if args.debug:
            raise
        message = str(error).splitlines()[0] if str(error) else type(error).__name__
        if _is_global_master():  # every MPI rank raises the same error; one prints it
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
        _quiet_meep_exit()


class _Terminated(BaseException):
    """SIGTERM, raised where the process is so that every ``except BaseException`` cleanup
    (staging folders, temporary files) runs before the command exits."""


def _terminate(signum, frame):
    raise _Terminated()


def _is_global_master():
    if "meep" not in sys.modules:
        return True
    try:
        from ...sim.mpi import is_master

        return is_master()
    except Exception:  # pragma: no cover
        return True


def _quiet_meep_exit():
    """Meep reports "Elapsed run time" on standard output at exit; hornproof reports its own times."""
    from ...sim.exit_banner import silence_exit_banner

    silence_exit_banner()


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
