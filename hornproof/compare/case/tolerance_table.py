"""The ``[tolerance]`` table of a case file: machining tolerances for a tolerance study.

Keys (all ± mm; one value for every free size with ``all_mm``, or one per size, named as in
``[horn]``): ``all_mm``, ``aperture_a_mm``, ``aperture_b_mm``, ``flare_length_mm``,
``waveguide_a_mm``, ``waveguide_b_mm``; a per-size key overrides ``all_mm`` for that size. A
sectoral horn's tied side cannot be given (an H-plane sectoral horn's B is its guide height b).
``samples`` (Monte Carlo horns, default 400), ``seed`` (default 1) and ``model``
(``"closed_form"``, the default, or ``"exact_phase"``) set the study.
"""

from dataclasses import dataclass

from ...analytic.tolerance import DEFAULT_SAMPLES, DEFAULT_SEED, free_dimensions
from ...units import MM
from .values import CaseProblem, check_keys, read_choice, read_integer, read_positive

#: case-file key -> machined size (``analytic.tolerance.DIMENSIONS``)
SIZE_KEYS = {"aperture_a_mm": "A", "aperture_b_mm": "B", "flare_length_mm": "L",
             "waveguide_a_mm": "a", "waveguide_b_mm": "b"}
TOLERANCE_KEYS = ("all_mm",) + tuple(SIZE_KEYS) + ("samples", "seed", "model")
TOLERANCE_MODELS = ("closed_form", "exact_phase")
#: a tolerance above this (mm) is not a machining tolerance
MAX_TOLERANCE_MM = 5.0
SAMPLE_RANGE = (10, 20000)


@dataclass(frozen=True)
class ToleranceSpec:
    """What the ``[tolerance]`` table asks for: ±m per free size, sample count, seed, model."""

    tolerances: dict
    samples: int
    seed: int
    model: str


def read_tolerance(table, horn):
    """The case's ``ToleranceSpec``, or None when the file has no ``[tolerance]`` table."""
    if not table:
        return None
    check_keys(table, TOLERANCE_KEYS, "tolerance")
    free = free_dimensions(horn.kind)
    tolerances = {}
    if "all_mm" in table:
        value = _tolerance(table, "all_mm")
        tolerances = {dim: value for dim in free}
    for key, dim in SIZE_KEYS.items():
        if key not in table:
            continue
        if dim not in free:
            tied = "guide height (waveguide_b_mm)" if dim == "B" else "guide width (waveguide_a_mm)"
            raise CaseProblem(f"tolerance.{key}", f"a {horn.kind} horn's side {dim} is its {tied}: "
                                                  f"give the tolerance there")
        tolerances[dim] = _tolerance(table, key)
    if not tolerances:
        raise CaseProblem("tolerance", "no tolerance given: add all_mm or one of "
                                       f"{', '.join(SIZE_KEYS)}")
    samples = _integer(table, "samples", DEFAULT_SAMPLES, *SAMPLE_RANGE)
    seed = _integer(table, "seed", DEFAULT_SEED, 0, 2**32 - 1)
    model = read_choice(table, "model", "tolerance", TOLERANCE_MODELS, default="closed_form")
    return ToleranceSpec(tolerances=tolerances, samples=samples, seed=seed, model=model)


def _tolerance(table, key):
    value = read_positive(table, key, "tolerance", unit="a tolerance in mm")
    if value > MAX_TOLERANCE_MM:
        raise CaseProblem(f"tolerance.{key}", f"±{value:g} mm is more than {MAX_TOLERANCE_MM:g} mm: "
                                              f"not a machining tolerance")
    return value * MM


def _integer(table, key, default, low, high):
    if key not in table:
        return default
    value = read_integer(table[key], f"tolerance.{key}")
    if not low <= value <= high:
        raise CaseProblem(f"tolerance.{key}", f"must be in [{low}, {high}], got {value}")
    return value
