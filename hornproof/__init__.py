"""hornproof: how far do closed-form rectangular-horn formulas hold for *your* horn?

Packages: ``analytic`` (pure numpy/scipy models), ``sim`` (Meep FDTD), ``compare``
(case files, metrics, verdicts, command line).
"""

__version__ = "0.1.0"
