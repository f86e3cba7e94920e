"""Plausibility limits of a case: one table, each row with its reason.

A value outside a row's *refused* range cannot describe a horn hornproof can model (or would
hang or exhaust the machine): the case is refused with one line naming the file, the key and
the reason. A value outside the *plausible* range is possible but probably a slip (MHz typed
as GHz, metres as millimetres): it draws a warning, printed before the run and before the
safety text. README.md ("Plausibility limits") carries a copy of this table;
``tests/compare/case/test_plausibility.py`` checks that the two agree.

To add a row, append a :class:`Limit` to :data:`LIMITS`: its ``value`` function gets the
:class:`Quantities` of the case (SI inside) and returns the number to judge in the row's unit,
or None when the row does not apply. The bounds are hornproof's choices unless the reason
names a source.
"""

import math
from dataclasses import dataclass
from typing import Callable, Optional

import numpy as np

from ...analytic.waveguide import te10_cutoff_frequency
from ...limits import MAX_CELLS_PER_WAVELENGTH
from ...units import GHZ, MM, SPEED_OF_LIGHT
from .values import CaseProblem


@dataclass(frozen=True)
class Quantities:
    """What the rows judge: the horn (``HornGeometry``, metres), the band (Hz), the FDTD
    keyword arguments, the checks (tolerances in dB / degrees) and the sweep's cells."""

    horn: object
    frequencies: np.ndarray
    fdtd: dict
    checks: dict
    sweep_cells: Optional[float] = None

    @property
    def f_min(self):
        return float(np.min(self.frequencies))

    @property
    def f_max(self):
        return float(np.max(self.frequencies))

    @property
    def wavelength_short(self):
        """Free-space wavelength at the top of the band, m."""
        return SPEED_OF_LIGHT / self.f_max

    @property
    def wavelength_long(self):
        """Free-space wavelength at the bottom of the band, m."""
        return SPEED_OF_LIGHT / self.f_min


@dataclass(frozen=True)
class Limit:
    """One row of the plausibility table.

    ``refused`` = (low, high): outside it (strictly) the case is refused; ``plausible`` =
    (low, high): outside it (within ``refused``) the case draws a warning. Either bound may be
    None (no bound on that side).
    """

    name: str
    key: str
    unit: str
    value: Callable
    refused: tuple
    plausible: tuple
    reason: str


def _guide_wavelength_ratio(q):
    """Feed-guide length in free-space wavelengths at f_max (the feed is given in guide
    wavelengths at f_min, which grow without bound near cutoff)."""
    cutoff = float(te10_cutoff_frequency(q.horn.guide_a))
    if q.f_min <= cutoff:
        return None
    guide_wavelength = q.wavelength_long / math.sqrt(1 - (cutoff / q.f_min) ** 2)
    return q.fdtd.get("feed_length_wavelengths", 1.0) * guide_wavelength / q.wavelength_short


def _closest_spacing(q):
    """Smallest spacing of adjacent band frequencies relative to the frequency; None for one."""
    f = np.sort(np.asarray(q.frequencies, dtype=float))
    if f.size < 2:
        return None
    return float(np.min(np.diff(f) / f[1:]))


def _largest_tolerance(q, suffix):
    values = [v for k, v in q.checks.items() if k.endswith(suffix) and k != "s11_db"]
    return max(values) if values else None


#: The plausibility table. Columns: name, key (for messages), unit, value, refused range,
#: plausible range, reason. README.md ("Plausibility limits") carries a copy.
LIMITS = (
    Limit("lowest frequency", "band.f_min_ghz", "GHz", lambda q: q.f_min / GHZ, (0.1, 1000.0), (0.3, 330.0),
          "horns fed by rectangular guide span about WR-2300 (from 0.32 GHz) to WR-3 (to about 330 GHz; "
          "EIA bands from memory); outside 0.1-1000 GHz the number is a unit slip (MHz typed as GHz)"),
    Limit("highest frequency", "band.f_max_ghz", "GHz", lambda q: q.f_max / GHZ, (0.1, 1000.0), (0.3, 330.0),
          "as the lowest frequency"),
    Limit("band above TE10 cutoff", "band.f_min_ghz", "x cutoff",
          lambda q: q.f_min / float(te10_cutoff_frequency(q.horn.guide_a)), (1.01, None), (None, None),
          "within 1 % of cutoff the guide wavelength exceeds 7 free-space wavelengths and the feed "
          "never settles (a run would not end); within 5 % the band check warns (limits.NEAR_CUTOFF_FRACTION)"),
    Limit("band width", "band.f_max_ghz", "f_max / f_min", lambda q: q.f_max / q.f_min, (None, 10.0), (None, 2.5),
          "a rectangular guide is single-mode over less than an octave (TE10 to TE20 cutoff is 2:1)"),
    Limit("band spacing", "band", "relative", _closest_spacing, (1e-6, None), (1e-4, None),
          "frequencies closer than 1 ppm are the same frequency to the DFT monitors of any run "
          "that ends; below 100 ppm a run needs very long records to tell them apart"),
    Limit("aperture size", "horn.aperture_a_mm", "wavelengths at f_max",
          lambda q: max(q.horn.aperture_a, q.horn.aperture_b) / q.wavelength_short, (None, 200.0), (None, 30.0),
          "rectangular horns are a few to about 20 wavelengths across (standard-gain horns, "
          "common practice); beyond 200 the aperture models alone take minutes and FDTD is out of reach"),
    Limit("flare length", "horn.flare_length_mm", "wavelengths at f_max",
          lambda q: q.horn.flare_length / q.wavelength_short, (None, 500.0), (None, 60.0),
          "optimum horns of up to about 25 dBi are tens of wavelengths long; 500 is far beyond any "
          "built horn (a metres-for-millimetres slip)"),
    Limit("flare length against aperture", "horn.flare_length_mm", "length / largest aperture side",
          lambda q: q.horn.flare_length / max(q.horn.aperture_a, q.horn.aperture_b), (1e-3, None), (0.1, None),
          "a horn shorter than a tenth of its aperture is a flange, not a flare"),
    Limit("wall thickness", "horn.wall_mm", "mm", lambda q: q.horn.wall_thickness / MM, (1e-3, None), (0.05, None),
          "below 1 um a wall is thinner than the skin depth of copper at 1 GHz (2 um) and not a "
          "wall; below 0.05 mm it is foil (machined or formed horns use 0.5-3 mm, common practice)"),
    Limit("wall against aperture", "horn.wall_mm", "wall / largest aperture side",
          lambda q: q.horn.wall_thickness / max(q.horn.aperture_a, q.horn.aperture_b), (None, 1.0), (None, 0.25),
          "a wall thicker than the aperture is a block, not a horn wall"),
    Limit("boundary layer (PML)", "fdtd.pml_wavelengths", "wavelengths at f_min",
          lambda q: q.fdtd.get("pml_wavelengths"), (0.05, 10.0), (0.25, 2.0),
          "a PML thinner than a quarter wavelength reflects (common FDTD practice: half a "
          "wavelength or more); thicker than two only costs memory; below 0.05 no power gets out "
          "cleanly, above 10 the run is mostly absorber"),
    Limit("padding", "fdtd.padding_wavelengths", "wavelengths", lambda q: q.fdtd.get("padding_wavelengths"),
          (0.01, 10.0), (0.1, 2.0),
          "the near-to-far surface needs some free space around the horn; more than two "
          "wavelengths only costs memory"),
    Limit("feed length", "fdtd.feed_length_wavelengths", "guide wavelengths at f_min",
          lambda q: q.fdtd.get("feed_length_wavelengths"), (0.05, 20.0), (0.5, 5.0),
          "the source needs about half a guide wavelength for higher modes to die out before the "
          "throat; more than a few guide wavelengths only costs time"),
    Limit("feed length in free space", "fdtd.feed_length_wavelengths", "wavelengths at f_max",
          _guide_wavelength_ratio, (None, 50.0), (None, 10.0),
          "the feed is counted in guide wavelengths, which grow without bound near cutoff"),
    Limit("dB tolerance", "checks", "dB", lambda q: _largest_tolerance(q, "_db"), (None, 20.0), (None, 6.0),
          "a tolerance of more than 20 dB accepts any horn; more than 6 dB decides little"),
    Limit("angle tolerance", "checks", "degrees", lambda q: _largest_tolerance(q, "_deg"), (None, 90.0),
          (None, 30.0), "a beam-width or null tolerance of more than 90 degrees accepts any pattern"),
    Limit("return-loss check", "checks.s11_db", "dB", lambda q: q.checks.get("s11_db"), (None, 80.0),
          (None, 40.0), "a horn's return loss is rarely above 40 dB; above 80 dB no model can show it"),
    Limit("sweep grids within the cell cap", "sweep.cells_per_wavelength", "cells per wavelength (finest rung)",
          lambda q: q.sweep_cells, (None, MAX_CELLS_PER_WAVELENGTH),
          (None, None), "one number N runs N, 1.4 N and 2 N; the finest rung must stay within the cap of "
                        f"{MAX_CELLS_PER_WAVELENGTH:g} cells per wavelength"),
)


def _outside(value, bounds):
    """True when ``value`` lies outside ``bounds`` (the bounds themselves are in)."""
    low, high = bounds
    return (low is not None and value < low) or (high is not None and value > high)


def _range_words(bounds, unit):
    low, high = bounds
    if low is not None and high is not None:
        return f"{low:g} to {high:g} {unit}"
    if low is not None:
        return f"at least {low:g} {unit}"
    return f"at most {high:g} {unit}"


def judge(quantities, where=""):
    """Apply every row of :data:`LIMITS`; raise the first refusal, return the warnings.

    Parameters
    ----------
    quantities : Quantities
    where : str
        Prefix of the reason (e.g. "swept value 30: ") when judging one horn of a sweep.

    Returns
    -------
    list of (key, reason)

    Raises
    ------
    CaseProblem
        A value outside a row's refused range.
    """
    warnings = []
    for limit in LIMITS:
        try:
            value = limit.value(quantities)
        except (ZeroDivisionError, OverflowError, ValueError):
            value = math.inf
        if value is None:
            continue
        value = float(value)
        if not math.isfinite(value) or _outside(value, limit.refused):
            raise CaseProblem(limit.key, f"{where}{limit.name} {value:.6g} {limit.unit} is refused "
                                         f"(must be {_range_words(limit.refused, limit.unit)}): {limit.reason}")
        if _outside(value, limit.plausible):
            warnings.append((limit.key, f"{where}{limit.name} {value:.6g} {limit.unit} is implausible "
                                        f"(usually {_range_words(limit.plausible, limit.unit)}): "
                                        f"{limit.reason}"))
    return warnings


def limit_named(name):
    """The row of :data:`LIMITS` called ``name``."""
    for limit in LIMITS:
        if limit.name == name:
            return limit
    raise KeyError(name)


def judge_value(name, value):
    """Judge one value against the row ``name`` alone (for command-line options that mean the
    same as a case key). Returns a warning reason or None; raises ``CaseProblem`` (key: the
    row's) when refused."""
    limit = limit_named(name)
    value = float(value)
    if not math.isfinite(value) or _outside(value, limit.refused):
        raise CaseProblem(limit.key, f"{limit.name} {value:.6g} {limit.unit} is refused "
                                     f"(must be {_range_words(limit.refused, limit.unit)}): {limit.reason}")
    if _outside(value, limit.plausible):
        return (f"{limit.name} {value:.6g} {limit.unit} is implausible "
                f"(usually {_range_words(limit.plausible, limit.unit)}): {limit.reason}")
    return None
