"""hornproof: how far do closed-form rectangular-horn formulas hold for *your* horn?

Packages: ``analytic`` (pure numpy/scipy models), ``sim`` (Meep FDTD), ``compare``
(case files, numerics, jobs, regression, outputs, report, command line).
"""

from .version import VERSION as __version__  # noqa: F401
