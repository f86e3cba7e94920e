"""Planning a regression run under MPI: each case's cost, and which process group runs which case."""

import math

from ...units import SPEED_OF_LIGHT

__all__ = ["PARALLEL_EFFICIENCY_EXPONENT", "estimate_case_cost", "plan_process_groups"]

# Exponent of the speed-up with r ranks in one group (speed ∝ r**exponent). Measured here
# (bench/bench_regress.py, 2-core machine shared with other work, Meep 1.25): the quick-tier 3D
# pyramidal case ran 0.73x as fast on 2 ranks as on 1; the whole quick suite 0.72x as one 2-rank
# group and 1.18x as two 1-rank groups. 0.2 keeps cases on separate ranks unless one case is far
# larger than all the others together; on dedicated nodes with large 3D cases a higher value
# (or --ranks-per-case) may do better.
PARALLEL_EFFICIENCY_EXPONENT = 0.2


def estimate_case_cost(case):
    """Rough relative work of one case: Σ over the ladder of cells × time steps.

    cells ∝ Π (extent / λ · cells per λ) over the model's dimensions, time steps ∝ cells per λ
    (Courant limit). Extents are the aperture (plus a wavelength of padding and PML) across, and
    the flare length plus a wavelength of feed along the axis, at f_max. Only used to balance the
    process groups; 1.0 when the case lacks the attributes.
    """
    try:
        f_max = max(float(f) for f in case.frequencies)
        wavelength = SPEED_OF_LIGHT / f_max
        horn = case.horn
        dims = int(case.fdtd.dims)
        ladder = [float(c) for c in case.fdtd.cells_per_wavelength]
        across_a = horn.aperture_a / wavelength + 2.0
        across_b = horn.aperture_b / wavelength + 2.0
        along = horn.flare_length / wavelength + 2.0
        extents = [max(across_a, across_b), along] if dims == 2 else [across_a, across_b, along]
        total = 0.0
        for cells in ladder:
            product = 1.0
            for extent in extents:
                product *= extent * cells
            total += product * cells
        return total if total > 0 and math.isfinite(total) else 1.0
    except (AttributeError, TypeError, ValueError):
        return 1.0


def _group_sizes(world_size, groups):
    """Ranks per group as Meep divides them (rank r goes to group r·groups // world_size)."""
    sizes = [0] * groups
    for r in range(world_size):
        sizes[r * groups // world_size] += 1
    return sizes


def plan_process_groups(costs, world_size, efficiency_exponent=PARALLEL_EFFICIENCY_EXPONENT, ranks_per_case=None):
    """Choose the number of process groups and which cases each runs.

    Tries every group count g = 1 … min(world_size, cases); each group's speed is
    (its ranks)**efficiency_exponent; cases go largest first to the group that would finish
    them earliest (longest-processing-time rule). The g with the shortest estimated makespan
    wins (fewer groups on a tie). ``ranks_per_case`` fixes g = world_size // ranks_per_case
    (at least 1, at most the number of cases) instead.

    Parameters
    ----------
    costs : sequence of float
        Relative work of each case (:func:`estimate_case_cost`).
    world_size : int
        Number of MPI ranks.
    efficiency_exponent : float
        Speed of a group of r ranks relative to one rank is r**efficiency_exponent.
    ranks_per_case : int, optional
        Ranks wanted per group (``--ranks-per-case``).

    Returns
    -------
    assignment : list of list of int
        For each group, the indices into ``costs`` it runs, in order.
    """
    if world_size < 1:
        raise ValueError(f"world_size: {world_size} must be >= 1")
    n = len(costs)
    if n == 0:
        return [[]]
    if ranks_per_case is not None and ranks_per_case < 1:
        raise ValueError(f"ranks_per_case: {ranks_per_case} must be >= 1")
    candidates = range(1, min(world_size, n) + 1)
    if ranks_per_case is not None:
        candidates = [max(1, min(world_size // ranks_per_case, n))]
    best = None
    for groups in candidates:
        speeds = [size ** efficiency_exponent for size in _group_sizes(world_size, groups)]
        finish = [0.0] * groups
        assignment = [[] for _ in range(groups)]
        for index in sorted(range(n), key=lambda i: (-costs[i], i)):
            target = min(range(groups), key=lambda g: (finish[g] + costs[index] / speeds[g], g))
            finish[target] += costs[index] / speeds[target]
            assignment[target].append(index)
        makespan = max(finish)
        if best is None or makespan < best[0] * (1 - 1e-9):
            best = (makespan, assignment)
    return [sorted(group) for group in best[1]]
