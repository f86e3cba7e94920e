"""The ``[sweep]`` of a case file: one horn parameter stepped over a list of values.

A sweep holds everything else about the horn fixed. Sweeping a flare half-angle or an aperture
size keeps the axial flare length; sweeping the flare length keeps the flare half-angle(s), so
the aperture grows with the length. Values are kept in the case file's edge units (degrees or
millimetres) because they are what a report plots on its horizontal axis; :meth:`SweepSpec.horns`
turns each value into an SI :class:`~hornproof.analytic.geometry.HornGeometry`.
"""

import dataclasses
import math
from dataclasses import dataclass

from ...analytic.design import optimum_horn
from ...units import MM


@dataclass(frozen=True)
class SweptParameter:
    """A horn parameter a sweep may step: how people read it and what stepping it keeps.

    Attributes
    ----------
    label : str
        Trade words for tables, plots and ``sweep.json``.
    unit : str
        The edge unit its values are written in: ``"deg"`` or ``"mm"``.
    held_fixed : str
        What the sweep keeps while stepping it, in words.
    """

    label: str
    unit: str
    held_fixed: str


#: Sweep parameter (its ``[sweep]`` name) -> what it is: the one table of sweep parameters.
SWEEP_PARAMETERS = {
    "flare_half_angle_h_deg": SweptParameter("H-plane flare half-angle", "deg", "flare length"),
    "flare_half_angle_e_deg": SweptParameter("E-plane flare half-angle", "deg", "flare length"),
    "aperture_a_mm": SweptParameter("Aperture width A", "mm", "flare length"),
    "aperture_b_mm": SweptParameter("Aperture height B", "mm", "flare length"),
    "flare_length_mm": SweptParameter("Flare length", "mm", "flare half-angles"),
    "flare_half_angle_deg": SweptParameter("Flare half-angle, both planes", "deg", "flare length"),
    "optimum_flare_length_mm": SweptParameter("Flare length of the optimum horn", "mm",
                                              "optimum aperture(s) at the band centre"),
}

#: Sweep parameter -> (label, unit), as ``sweep.json`` records them.
PARAMETER_LABELS = {name: (parameter.label, parameter.unit)
                    for name, parameter in SWEEP_PARAMETERS.items()}

#: grids of a sweep point when ``[sweep] cells_per_wavelength`` is one number N: N x these. Three
#: grids give a GCI with an observed order (Celik et al. 2008); two grids force the assumed order
#: and safety factor 3, which in a development run here hid every breakdown
GRID_RATIOS = (1.0, 1.4, 2.0)

#: the sweep parameters that set a flare half-angle at fixed length (H, E or both planes)
FLARE_ANGLE_PARAMETERS = ("flare_half_angle_h_deg", "flare_half_angle_e_deg", "flare_half_angle_deg")

#: Largest flare half-angle still called a horn (the limit of ``validate_geometry``), degrees.
MAX_FLARE_HALF_ANGLE_DEG = 80.0


def aperture_for_flare_angle(guide_size, flare_length, half_angle):
    """Aperture size D = d + 2 L tan(θ) of a straight flare, m.

    Parameters
    ----------
    guide_size : float
        Guide size d in the plane of the flare (a or b), m.
    flare_length : float
        Axial flare length L, m.
    half_angle : float
        Flare half-angle θ, rad.

    Notes
    -----
    Plain similar-triangle geometry of a wall running straight from the guide edge to the
    aperture edge; the inverse of ``analytic.geometry.flare_half_angle``.
    """
    return guide_size + 2.0 * flare_length * math.tan(half_angle)


def sweep_applies_to(parameter, kind):
    """Reason why ``parameter`` cannot be swept on a horn of type ``kind``, or None if it can."""
    if parameter == "flare_half_angle_deg" and kind != "pyramidal":
        return "only a pyramidal horn flares in both planes (sweep one plane's half-angle instead)"
    if parameter in ("flare_half_angle_h_deg", "aperture_a_mm") and kind == "e-sectoral":
        return "an E-plane sectoral horn has no H-plane flare (A stays equal to the guide width a)"
    if parameter in ("flare_half_angle_e_deg", "aperture_b_mm") and kind == "h-sectoral":
        return "an H-plane sectoral horn has no E-plane flare (B stays equal to the guide height b)"
    return None


@dataclass(frozen=True)
class SweepSpec:
    """One swept horn parameter.

    Parameters
    ----------
    parameter : str
        One of :data:`SWEEP_PARAMETERS`.
    values : tuple of float
        The swept values in the parameter's edge unit (degrees or mm), at least two.
    dims : {2, 3}
        Dimension of the FDTD model of the sweep (3: the real horn, the default; 2: the
        principal-plane first look of a sectoral horn).
    cells_per_wavelength : tuple of float or None
        Nominal ladder of every point (fitted to each point's horn), cells per wavelength at
        f_max; None: the default ladder of each point's horn (``sim.grid_fit.default_ladder``).
    frequency : float
        The band-centre frequency the sweep compares at, Hz (the optimum family is sized there).
    principal_plane : bool
        Also run the 2D principal-plane model of every point beside the 3D one, to show where
        the two part.
    """

    parameter: str
    values: tuple
    dims: int
    cells_per_wavelength: tuple
    frequency: float = float("nan")
    principal_plane: bool = False

    def horns(self, base_horn):
        """The swept horns: list of ``(value, HornGeometry)`` in the order of ``values``.

        Parameters
        ----------
        base_horn : HornGeometry
            The case's horn; every field not touched by the sweep is kept.

        Raises
        ------
        ValueError
            Naming the parameter and the value, when a value makes an impossible horn.
        """
        return [(value, self.horn_at(base_horn, value)) for value in self.values]

    def horn_at(self, base_horn, value):
        """The horn at one swept ``value`` (edge unit of the parameter); see :meth:`horns`."""
        parameter = self.parameter
        if parameter not in SWEEP_PARAMETERS:
            raise ValueError(f"parameter: unknown sweep parameter {parameter!r}")
        value = float(value)
        if not math.isfinite(value) or value <= 0:
            raise ValueError(f"{parameter} = {value:g}: must be a positive finite number")
        unfit = sweep_applies_to(parameter, base_horn.kind)
        if unfit:
            raise ValueError(f"{parameter}: {unfit}")
        length = base_horn.flare_length
        changes = {}
        if parameter in FLARE_ANGLE_PARAMETERS:
            if value >= MAX_FLARE_HALF_ANGLE_DEG:
                raise ValueError(f"{parameter} = {value:g}: a flare half-angle of "
                                 f"{MAX_FLARE_HALF_ANGLE_DEG:g} deg or more is not a horn")
            angle = math.radians(value)
            if parameter != "flare_half_angle_e_deg":
                changes["aperture_a"] = aperture_for_flare_angle(base_horn.guide_a, length, angle)
            if parameter != "flare_half_angle_h_deg":
                changes["aperture_b"] = aperture_for_flare_angle(base_horn.guide_b, length, angle)
        elif parameter == "optimum_flare_length_mm":
            if not math.isfinite(self.frequency):
                raise ValueError(f"{parameter}: the optimum family needs the band-centre frequency")
            try:
                designed = optimum_horn(base_horn.kind, base_horn.guide_a, base_horn.guide_b, value * MM,
                                        self.frequency, wall_thickness=base_horn.wall_thickness)
            except ValueError as error:
                raise ValueError(f"{parameter} = {value:g}: {error}") from None
            changes.update(flare_length=value * MM, aperture_a=designed.horn.aperture_a,
                           aperture_b=designed.horn.aperture_b)
        elif parameter == "aperture_a_mm":
            changes["aperture_a"] = value * MM
        elif parameter == "aperture_b_mm":
            changes["aperture_b"] = value * MM
        else:  # flare_length_mm: keep the flare half-angles of the base horn
            new_length = value * MM
            changes["flare_length"] = new_length
            if base_horn.flares_h:
                changes["aperture_a"] = aperture_for_flare_angle(
                    base_horn.guide_a, new_length, base_horn.flare_half_angle_h)
            if base_horn.flares_e:
                changes["aperture_b"] = aperture_for_flare_angle(
                    base_horn.guide_b, new_length, base_horn.flare_half_angle_e)
        try:
            return dataclasses.replace(base_horn, **changes)
        except ValueError as error:
            raise ValueError(f"{parameter} = {value:g}: {error}") from None
