"""Argument types shared by several subcommands."""

import argparse

from ...errors import InputError
from ...limits import MAX_CELLS_PER_WAVELENGTH, MIN_CELLS_PER_WAVELENGTH


def add_fdtd_run_arguments(parser, *, cells_metavar, cells_help, out_help):
    """The arguments of a command that runs the FDTD model: the case, its grids, the output
    folder, ``--json`` and ``--force``."""
    parser.add_argument("case", help="case file (.toml)")
    parser.add_argument("--cells-per-wavelength", type=cells_per_wavelength_list, metavar=cells_metavar,
                        help=cells_help)
    parser.add_argument("--out", metavar="DIR", help=out_help)
    parser.add_argument("--json", action="store_true", help="print the hornproof.result/1 summary on stdout")
    parser.add_argument("--force", action="store_true", help="run even if the estimate exceeds free memory")


def refuse_empty_paths(args, options=("out", "summary", "junit", "results", "baselines", "write_case")):
    """Refuse an option given as an empty path (``--out ""`` would silently mean the default or
    the working folder)."""
    for dest in options:
        if getattr(args, dest, None) == "":
            raise InputError(f"--{dest.replace('_', '-')}: the path is empty; name a folder or file, "
                             "or leave the option out")


def cells_per_wavelength_list(text):
    """``--cells-per-wavelength N[,N2,...]``: grid densities within hornproof's limits."""
    try:
        values = [float(v) for v in text.split(",") if v.strip()]
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected numbers separated by commas, got {text!r}")
    if not values or any(not MIN_CELLS_PER_WAVELENGTH <= v <= MAX_CELLS_PER_WAVELENGTH for v in values):
        raise argparse.ArgumentTypeError(f"cells per wavelength must be numbers from {MIN_CELLS_PER_WAVELENGTH:g} "
                                         f"to {MAX_CELLS_PER_WAVELENGTH:g}")
    return values


def distance_list(text):
    """``--range-m R[,R2,...]``: positive distances in metres (the case loader checks limits)."""
    try:
        values = [float(v) for v in text.split(",") if v.strip()]
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected distances in m separated by commas, got {text!r}")
    if not values or any(not (v > 0 and v < float("inf")) for v in values):
        raise argparse.ArgumentTypeError("distances must be positive finite numbers of metres")
    return values
