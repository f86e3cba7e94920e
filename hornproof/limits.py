"""hornproof's limits on what a run may ask for: the one table, with the reason for each.

The case-file loader, the command line and the jobs read these; none keeps its own copy.
"""

#: Smallest grid density accepted, cells per wavelength at f_max (hornproof's choice: coarser
#: grids cannot hold a TE10 guide of the usual proportions).
MIN_CELLS_PER_WAVELENGTH = 4.0
#: A finer grid is a typing slip, not a model (a 3D horn of a few wavelengths at 400 cells per
#: wavelength would need terabytes; the resource estimate refuses far smaller ones on 24 GiB).
MAX_CELLS_PER_WAVELENGTH = 400.0
#: Fewer cells than this across the narrowest opening of the model draws a warning (common
#: practice for FDTD: a few cells across the smallest feature; the threshold is hornproof's).
MIN_CELLS_ACROSS_OPENING = 4.0
#: Most frequencies a band may hold (each one is a DFT monitor frequency in the FDTD model).
MAX_BAND_POINTS = 1000
#: A band edge closer than this fraction above TE10 cutoff draws a warning.
NEAR_CUTOFF_FRACTION = 0.05
#: Largest numerical uncertainty a stored baseline may carry, per figure unit: an uncertainty
#: beyond it would call any change "within noise" (the same bounds as the largest tolerance a
#: case may set, compare/case/plausibility.py).
MAX_BASELINE_UNCERTAINTY = {"dB": 20.0, "deg": 90.0}
