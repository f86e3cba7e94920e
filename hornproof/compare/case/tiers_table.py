"""The ``[tiers]`` table of a case file: named overrides ("quick", "full") of grid and band.

A tier may set the model's ``dims``, its ``cells_per_wavelength`` ladder and the band's
``points``. Tiers the file does not write get defaults: "quick" runs one coarse grid (2D for a
sectoral horn unless ``fdtd.quick_2d = false``), "full" runs the case as written.
"""

from .band_table import read_band_points
from .fdtd_table import read_cells_ladder, read_dims
from .values import CaseProblem, check_keys, read_table

TIER_NAMES = ("quick", "full")
TIER_KEYS = ("dims", "cells_per_wavelength", "points")
#: The default "quick" tier never runs finer than this.
QUICK_TIER_MAX_CELLS = 10.0


def read_tiers(table, horn, band, fdtd_fields, quick_2d):
    """Tier name -> overrides; defaults for tiers the file does not define."""
    check_keys(table, TIER_NAMES, "tiers")
    coarsest = min(fdtd_fields["cells_per_wavelength"])
    quick = {"cells_per_wavelength": (min(coarsest, QUICK_TIER_MAX_CELLS),)}
    if quick_2d and horn.kind != "pyramidal":
        quick["dims"] = 2
    tiers = {"quick": quick, "full": {}}
    for name in TIER_NAMES:
        tier_table = read_table(table, name, required=False, prefix="tiers")
        if name in table:
            tiers[name] = _tier_overrides(tier_table, f"tiers.{name}", horn, band)
    return tiers


def _tier_overrides(tier_table, prefix, horn, band):
    """The overrides written in one tier's table."""
    check_keys(tier_table, TIER_KEYS, prefix)
    overrides = {}
    if "dims" in tier_table:
        overrides["dims"] = read_dims(tier_table["dims"], f"{prefix}.dims", horn)
    if "cells_per_wavelength" in tier_table:
        overrides["cells_per_wavelength"] = read_cells_ladder(
            tier_table["cells_per_wavelength"], f"{prefix}.cells_per_wavelength")
    if "points" in tier_table:
        if "list" in band:
            raise CaseProblem(f"{prefix}.points", "the band is a frequencies_ghz list; points "
                                                  "applies only to f_min_ghz/f_max_ghz bands")
        overrides["points"] = read_band_points(tier_table["points"], f"{prefix}.points",
                                               band["f_min"], band["f_max"])
    return overrides
