"""Wall metals: DC conductivity of the conductors horns are made of, with where each value comes from.

A horn's wall loss (``wall_loss``) needs the conductivity σ of its inner surface. The table
holds bulk values at room temperature; a case may instead give σ in S/m directly, which is the
right thing for an alloy or a plating whose conductivity the shop or the supplier states.

Sources (values from memory; check them against your copy before relying on the last digit):

* D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley 2012, Appendix F ("Conductivities for
  some materials"): aluminium 3.816e7, brass 2.564e7, copper 5.813e7, gold 4.098e7,
  silver 6.173e7 S/m.
* The *CRC Handbook of Chemistry and Physics* (table "Electrical resistivity of pure metals",
  20 °C) gives resistivities that agree with these within a few per cent (e.g. copper
  1.678e-8 Ω·m, i.e. 5.96e7 S/m; aluminium 2.65e-8 Ω·m, i.e. 3.77e7 S/m).

Notes: "aluminium" is the pure metal. Machined horns are usually an alloy (6061-T6 is about
40–43 % IACS, i.e. about 2.4e7 S/m, from memory): give that conductivity as a number. Brass
varies with its zinc content (about 1.5e7–2.6e7 S/m); the table's value is Pozar's.
"""

from dataclasses import dataclass

import numpy as np

__all__ = ["WallMaterial", "CONDUCTIVITY_S_PER_M", "MATERIAL_SOURCE", "wall_material",
           "MATERIAL_NAMES"]

#: bulk DC conductivity, S/m, Pozar 4th ed. Appendix F (from memory; see the module notes)
CONDUCTIVITY_S_PER_M = {
    "silver": 6.173e7,
    "copper": 5.813e7,
    "gold": 4.098e7,
    "aluminium": 3.816e7,
    "brass": 2.564e7,
}
#: accepted spellings -> table name
_ALIASES = {"aluminum": "aluminium"}
MATERIAL_NAMES = tuple(CONDUCTIVITY_S_PER_M)
MATERIAL_SOURCE = ("D. M. Pozar, Microwave Engineering, 4th ed. (2012), Appendix F, "
                   "conductivities for some materials (values from memory)")
#: a conductivity given as a number must lie in this range, S/m (from poor alloys and
#: stainless steel, about 1.4e6, to silver; a value outside is a typing mistake or not a metal)
CONDUCTIVITY_RANGE_S_PER_M = (1.0e5, 1.0e8)


@dataclass(frozen=True)
class WallMaterial:
    """The conductor of the horn's inner walls.

    Parameters
    ----------
    name : str
        Table name (``"copper"``...) or ``"custom"`` for a conductivity given as a number.
    conductivity : float
        Bulk conductivity σ, S/m.
    source : str
        Where σ comes from (the table's source or "given in the case").
    roughness_rms : float
        RMS surface roughness Δ, m (0: smooth; see ``roughness``).
    """

    name: str
    conductivity: float
    source: str
    roughness_rms: float = 0.0

    def __post_init__(self):
        low, high = CONDUCTIVITY_RANGE_S_PER_M
        if not (np.isfinite(self.conductivity) and low <= self.conductivity <= high):
            raise ValueError(f"conductivity must lie in [{low:g}, {high:g}] S/m, got {self.conductivity!r}")
        if not (np.isfinite(self.roughness_rms) and self.roughness_rms >= 0):
            raise ValueError(f"roughness_rms must be a non-negative length in m, got {self.roughness_rms!r}")

    def summary(self):
        """JSON-ready description (edge units: S/m, µm)."""
        return {"name": self.name, "conductivity_s_per_m": float(self.conductivity),
                "source": self.source, "roughness_rms_um": float(self.roughness_rms) * 1e6}


def wall_material(value, roughness_rms=0.0):
    """A ``WallMaterial`` from a table name (case-insensitive) or a conductivity in S/m.

    Raises ``ValueError`` naming ``wall_material`` for an unknown name or an implausible number.
    """
    if isinstance(value, str):
        key = value.strip().lower()
        key = _ALIASES.get(key, key)
        if key not in CONDUCTIVITY_S_PER_M:
            raise ValueError(f"wall_material: unknown metal {value!r}; known: {', '.join(MATERIAL_NAMES)} "
                             f"(or a conductivity in S/m)")
        return WallMaterial(key, CONDUCTIVITY_S_PER_M[key], MATERIAL_SOURCE, float(roughness_rms))
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise ValueError(f"wall_material: must be a metal name or a conductivity in S/m, got {value!r}")
    low, high = CONDUCTIVITY_RANGE_S_PER_M
    if not (np.isfinite(value) and low <= value <= high):
        raise ValueError(f"wall_material: conductivity {value!r} S/m is outside [{low:g}, {high:g}] S/m")
    return WallMaterial("custom", float(value), "given in the case file", float(roughness_rms))
