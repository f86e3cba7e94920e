"""The ``[range]`` table of a case file: distances at which a range measurement is predicted.

``distances_m`` lists on-axis distances from the aperture plane, in metres (a test range is
laid out in metres, not millimetres). ``verify`` reports the gain a probe at each distance
would infer (``analytic.finite_range``) beside the far-field gain; ``--range-m`` on the command
line sets the same list.
"""

from .values import CaseProblem, check_keys, read_number_list

RANGE_KEYS = ("distances_m",)
#: most distances one case may ask for (each is a row of every range table)
MAX_DISTANCES = 20
#: shortest distance accepted, m: closer than this the aperture models' neglect of the
#: 1/(kR)² terms and of the fields outside the aperture is no longer small at any band
MIN_DISTANCE_M = 0.05
#: longest distance accepted, m (beyond, write the far field: the correction is nil)
MAX_DISTANCE_M = 1.0e5


def read_range(table):
    """The distances, metres, ascending (a tuple; empty when the file has no ``[range]``)."""
    if not table:
        return ()
    check_keys(table, RANGE_KEYS, "range")
    if "distances_m" not in table:
        raise CaseProblem("range.distances_m", "missing required key (a list of distances in m)")
    return range_distances(table["distances_m"], "range.distances_m")


def range_distances(value, dotted):
    """A list of distances (m) as a sorted tuple, each within the accepted limits."""
    if not isinstance(value, list):
        value = [value]
    distances = read_number_list(value, dotted)
    if len(distances) > MAX_DISTANCES:
        raise CaseProblem(dotted, f"{len(distances)} distances; at most {MAX_DISTANCES}")
    for index, distance in enumerate(distances):
        if not MIN_DISTANCE_M <= distance <= MAX_DISTANCE_M:
            raise CaseProblem(f"{dotted}[{index}]", f"{distance:g} m is outside "
                                                    f"[{MIN_DISTANCE_M:g}, {MAX_DISTANCE_M:g}] m")
    if len(set(distances)) != len(distances):
        raise CaseProblem(dotted, "repeated distance")
    return tuple(sorted(distances))
