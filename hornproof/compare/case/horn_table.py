"""The ``[horn]`` table of a case file: the feed guide and the flare, validated into SI.

A horn is its type, its feed guide (an EIA size or two sizes in mm), its aperture, its axial
flare length and its wall thickness. A sectoral horn keeps one aperture side equal to the
guide: the key may be left out, or must repeat the guide size.
"""

import math
import types
from dataclasses import dataclass

from ...analytic.materials import MATERIAL_NAMES, wall_material
from ...analytic.geometry import HORN_TYPES, HornGeometry, flare_half_angle, validate_geometry
from ...analytic.waveguide import EIA_WAVEGUIDES, waveguide_size
from ...units import MM
from .sweepspec import MAX_FLARE_HALF_ANGLE_DEG
from .values import (CaseProblem, check_keys, describe_value, read_choice, read_number, read_positive,
                     suggestion)

HORN_KEYS = ("type", "waveguide", "waveguide_a_mm", "waveguide_b_mm", "aperture_a_mm",
             "aperture_b_mm", "flare_length_mm", "wall_mm", "wall_material", "wall_roughness_um",
             "feed_guide_length_mm")
#: keys of the wall metal (read by :func:`read_wall`); without ``wall_material`` the walls are
#: perfect conductors and gain equals directivity
WALL_KEYS = ("wall_material", "wall_roughness_um", "feed_guide_length_mm")
#: roughness above this (µm) is not a machined or plated waveguide surface
MAX_ROUGHNESS_UM = 100.0
DEFAULT_WALL_MM = 1.0
#: Relative tolerance for "must equal the guide size" (sectoral horns).
_SAME_SIZE_RELATIVE_TOLERANCE = 1e-6
_LENGTH = "a length in mm"


def read_horn(table):
    """The validated horn, ``HornGeometry`` in metres."""
    check_keys(table, HORN_KEYS, "horn")
    kind = read_choice(table, "type", "horn", HORN_TYPES)
    guide_a, guide_b, guide_key = _read_guide(table)
    if guide_b > guide_a:
        raise CaseProblem(guide_height_key(guide_key),
                          f"guide height b = {guide_b / MM:g} mm exceeds width "
                          f"a = {guide_a / MM:g} mm (TE10 needs E along the short side)")
    aperture_a, aperture_b = _read_aperture(table, kind, guide_a, guide_b)
    flare_length = read_positive(table, "flare_length_mm", "horn", unit=_LENGTH) * MM
    wall = read_positive(table, "wall_mm", "horn", unit=_LENGTH, default=DEFAULT_WALL_MM) * MM
    _check_flare(kind, guide_a, guide_b, aperture_a, aperture_b, flare_length)

    fields = dict(kind=kind, guide_a=guide_a, guide_b=guide_b, aperture_a=aperture_a,
                  aperture_b=aperture_b, flare_length=flare_length, wall_thickness=wall)
    problems = validate_geometry(types.SimpleNamespace(**fields))
    if problems:  # a safety net: the checks above should have named the problem already
        field, reason = problems[0]
        raise CaseProblem(geometry_key(field, guide_key), reason)
    return HornGeometry(**fields)


@dataclass(frozen=True)
class WallSpec:
    """The walls' metal (``analytic.materials.WallMaterial``) and the feed guide length, m,
    whose loss counts with the flare's."""

    material: object
    feed_guide_length: float


def read_wall(table):
    """The case's ``WallSpec``, or None when ``wall_material`` is absent (perfect conductor).

    ``wall_material`` is a metal name (``MATERIAL_NAMES``) or a conductivity in S/m;
    ``wall_roughness_um`` (RMS, default 0) and ``feed_guide_length_mm`` (default 0) need it.
    """
    if "wall_material" not in table:
        for key in ("wall_roughness_um", "feed_guide_length_mm"):
            if key in table:
                raise CaseProblem(f"horn.{key}", "needs horn.wall_material (a metal name or a "
                                                 "conductivity in S/m)")
        return None
    roughness = _non_negative(table, "wall_roughness_um", MAX_ROUGHNESS_UM, "an RMS roughness in µm") * 1e-6
    feed = _non_negative(table, "feed_guide_length_mm", 1e5, "a length in mm") * MM
    value = table["wall_material"]
    try:
        material = wall_material(value, roughness)
    except ValueError as error:
        reason = str(error).split(": ", 1)[-1]
        if isinstance(value, str):
            reason += suggestion(value.strip().lower(), MATERIAL_NAMES)
        raise CaseProblem("horn.wall_material", reason) from None
    return WallSpec(material=material, feed_guide_length=feed)


def _non_negative(table, key, high, unit):
    """``table[key]`` in [0, high] (0 when absent)."""
    if key not in table:
        return 0.0
    value = read_number(table[key], f"horn.{key}")
    if not 0 <= value <= high:
        raise CaseProblem(f"horn.{key}", f"must be in [0, {high:g}] ({unit}), got {table[key]!r}")
    return value


def guide_height_key(guide_key):
    """Case-file key that set the guide height b, given the key that defined the guide."""
    return "horn.waveguide_b_mm" if guide_key == "horn.waveguide_a_mm" else guide_key


def geometry_key(field, guide_key):
    """Case-file key of a ``HornGeometry`` field."""
    return {"kind": "horn.type", "guide_a": guide_key, "guide_b": guide_height_key(guide_key),
            "aperture_a": "horn.aperture_a_mm", "aperture_b": "horn.aperture_b_mm",
            "flare_length": "horn.flare_length_mm", "wall_thickness": "horn.wall_mm"}[field]


def _read_guide(table):
    """(a, b) in metres, and the key that defined them (for messages)."""
    has_name = "waveguide" in table
    explicit = [key for key in ("waveguide_a_mm", "waveguide_b_mm") if key in table]
    if has_name and explicit:
        raise CaseProblem(f"horn.{explicit[0]}", "give either waveguide (an EIA size) or "
                                                 "waveguide_a_mm + waveguide_b_mm, not both")
    if has_name:
        return (*_eia_guide(table["waveguide"]), "horn.waveguide")
    if not explicit:
        raise CaseProblem("horn.waveguide", "missing required key: give an EIA size such as "
                                            "\"WR-90\", or waveguide_a_mm and waveguide_b_mm")
    guide_a = read_positive(table, "waveguide_a_mm", "horn", unit=_LENGTH) * MM
    guide_b = read_positive(table, "waveguide_b_mm", "horn", unit=_LENGTH) * MM
    return guide_a, guide_b, "horn.waveguide_a_mm"


def _eia_guide(name):
    """(a, b) in metres of the EIA waveguide ``name`` (the value of ``horn.waveguide``)."""
    if not isinstance(name, str):
        raise CaseProblem("horn.waveguide", f"must be an EIA size name such as \"WR-90\", "
                                            f"got {describe_value(name)}")
    try:
        return waveguide_size(name)
    except KeyError:
        known = list(EIA_WAVEGUIDES)
        hint = suggestion(name.strip().upper(), known)
        raise CaseProblem("horn.waveguide", f"unknown EIA waveguide {name!r}{hint}; known: "
                                            f"{', '.join(known)} (or give waveguide_a_mm "
                                            f"and waveguide_b_mm)") from None


def _read_aperture(table, kind, guide_a, guide_b):
    """Aperture width A and height B, metres; a sectoral horn's unflared side is the guide's."""
    if kind == "e-sectoral":
        aperture_a = _sectoral_side(table, "aperture_a_mm", kind, guide_a, "A", "width a")
    else:
        aperture_a = read_positive(table, "aperture_a_mm", "horn", unit=_LENGTH) * MM
    if kind == "h-sectoral":
        aperture_b = _sectoral_side(table, "aperture_b_mm", kind, guide_b, "B", "height b")
    else:
        aperture_b = read_positive(table, "aperture_b_mm", "horn", unit=_LENGTH) * MM
    return aperture_a, aperture_b


def _sectoral_side(table, key, kind, guide, plane_word, guide_word):
    """Aperture side that a sectoral horn keeps equal to the guide: defaulted or checked."""
    if key not in table:
        return guide
    value = read_positive(table, key, "horn", unit=_LENGTH) * MM
    if abs(value - guide) > _SAME_SIZE_RELATIVE_TOLERANCE * guide:
        raise CaseProblem(f"horn.{key}", f"{value / MM:g} mm differs from the guide {guide_word} "
                                         f"{guide / MM:g} mm; {_kind_words(kind)} keeps "
                                         f"{plane_word} equal to it (leave the key out)")
    return guide


def _kind_words(kind):
    """A horn type in plain words with its article, for messages."""
    return {"h-sectoral": "an H-plane sectoral horn", "e-sectoral": "an E-plane sectoral horn",
            "pyramidal": "a pyramidal horn"}[kind]


def _check_flare(kind, guide_a, guide_b, aperture_a, aperture_b, flare_length):
    """Refuse an aperture smaller than the guide, a plane that should flare and does not, and
    a flare half-angle too wide to be a horn."""
    for key, aperture, guide, side, guide_side in (
            ("aperture_a_mm", aperture_a, guide_a, "width A", "width a"),
            ("aperture_b_mm", aperture_b, guide_b, "height B", "height b")):
        if aperture < guide * (1 - 1e-9):
            raise CaseProblem(f"horn.{key}", f"aperture {side} = {aperture / MM:g} mm is smaller "
                                             f"than the guide {guide_side} = {guide / MM:g} mm")
    if kind in ("h-sectoral", "pyramidal") and not aperture_a > guide_a:
        raise CaseProblem("horn.aperture_a_mm", f"{_kind_words(kind)} flares in the H-plane: "
                                                f"A must exceed the guide width a = "
                                                f"{guide_a / MM:g} mm")
    if kind in ("e-sectoral", "pyramidal") and not aperture_b > guide_b:
        raise CaseProblem("horn.aperture_b_mm", f"{_kind_words(kind)} flares in the E-plane: "
                                                f"B must exceed the guide height b = "
                                                f"{guide_b / MM:g} mm")
    for key, aperture, guide, plane in (("aperture_a_mm", aperture_a, guide_a, "H"),
                                        ("aperture_b_mm", aperture_b, guide_b, "E")):
        angle = math.degrees(flare_half_angle(guide, aperture, flare_length))
        if angle >= MAX_FLARE_HALF_ANGLE_DEG:
            raise CaseProblem(f"horn.{key}", f"{plane}-plane flare half-angle {angle:.1f} deg is "
                                             f"{MAX_FLARE_HALF_ANGLE_DEG:g} deg or more: not a "
                                             f"horn (lengthen flare_length_mm or shrink the "
                                             f"aperture)")
