"""A map's cost before anything runs: every FDTD point and the whole map, and the budget.

Each point's rungs are estimated by :func:`hornproof.compare.jobs.point_cost.rung_costs` (cells,
time steps, seconds, peak memory on this machine). The map's wall time is the total divided by
the number of processes it runs on (the best the point pool can do; the last point limits it).
A map estimated beyond its budget is refused (``InputError``, exit 2) unless forced.
"""

from ...errors import InputError
from .point_cost import rung_costs

__all__ = ["DEFAULT_BUDGET_HOURS", "estimate_map", "estimate_lines", "check_budget"]

#: default --budget-hours: a map longer than this on this machine needs --force (hornproof's choice)
DEFAULT_BUDGET_HOURS = 2.0


def estimate_map(points, frequencies, settings, ladder, processes=1):
    """Estimate of every point and of the whole map.

    Parameters
    ----------
    points : list of (x, y, horn)
    processes : int
        Processes the map runs on (``mpirun -np``).

    Returns
    -------
    dict
        ``points`` (x, y, fitted cells per wavelength, seconds, peak memory MiB per point),
        ``seconds_total`` (one process), ``seconds_wall`` (on ``processes``), ``processes``.
    """
    rows = []
    for x, y, horn in points:
        try:
            rungs = rung_costs(horn, frequencies, settings, ladder)
        except ValueError as error:
            rows.append({"x": x, "y": y, "cells_per_wavelength": [], "seconds": None, "peak_memory_mib": None,
                         "problem": str(error)})
            continue
        rows.append({"x": x, "y": y, "cells_per_wavelength": [r.cells_per_wavelength for r in rungs],
                     "cells": [r.cells for r in rungs],
                     "seconds": sum(r.seconds for r in rungs),
                     "peak_memory_mib": max(r.peak_memory_bytes for r in rungs) / 2**20})
    total = sum(r["seconds"] or 0.0 for r in rows)
    longest = max((r["seconds"] or 0.0 for r in rows), default=0.0)
    processes = max(1, int(processes))
    return {"points": rows, "seconds_total": total, "seconds_wall": max(total / processes, longest),
            "processes": processes}


def estimate_lines(estimate, x_label, y_label):
    """People's view of an estimate: one line per point, then the total."""
    lines = [f"hornproof: map estimate (before running), {len(estimate['points'])} FDTD points:"]
    for row in estimate["points"]:
        if row["seconds"] is None:
            lines.append(f"hornproof:   {x_label} = {row['x']:g}, {y_label} = {row['y']:g}: cannot be laid out "
                         f"({row['problem']})")
            continue
        rungs = "/".join(f"{c:.1f}" for c in row["cells_per_wavelength"])
        lines.append(f"hornproof:   {x_label} = {row['x']:g}, {y_label} = {row['y']:g}: rungs {rungs} cells per "
                     f"wavelength, about {row['seconds']:.0f} s, peak {row['peak_memory_mib']:.0f} MiB")
    lines.append(f"hornproof:   whole map: about {estimate['seconds_total'] / 60:.1f} min of one process; "
                 f"about {estimate['seconds_wall'] / 60:.1f} min on {estimate['processes']} process(es) "
                 "(estimate good to about ±30 %)")
    return lines


def check_budget(estimate, budget_hours, force, where):
    """Refuse a map estimated beyond ``budget_hours`` of wall time unless ``force``."""
    hours = estimate["seconds_wall"] / 3600.0
    if hours > float(budget_hours) and not force:
        raise InputError(f"{where}: map: estimated {hours:.2f} h is beyond the budget of {float(budget_hours):g} h "
                         "(--budget-hours); use --force to run it anyway, fewer points, or coarser cells")
