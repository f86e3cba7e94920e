# Over 400 lines by choice: one published procedure (Celik et al. 2008) written out step by step,
# each step a small function citing its equation, and a long module docstring recording every
# departure from the paper; split up, the procedure could no longer be read in order.
"""Grid convergence of an FDTD figure: observed order, Richardson extrapolation and the GCI.

The procedure is the Grid Convergence Index of Roache (1997) in the three-grid form written
out step by step by Celik et al. (2008), with the ladder classification (monotonic,
oscillatory, divergent) that both papers insist on before an extrapolation is trusted.

Equation numbers are those of Celik et al. (2008) as recalled (from memory); the paper
is organised in numbered steps, cited here too. Notation (Celik et al. 2008): grid 1 is the finest, cell sizes h1 < h2 < h3,
refinement ratios r21 = h2/h1 and r32 = h3/h2, figures φ1, φ2, φ3,
ε21 = φ2 − φ1, ε32 = φ3 − φ2, s = sign(ε32/ε21).

* Observed order p, by fixed-point iteration (their step 3, eqs. 3a–3c):
  p = |ln|ε32/ε21| + q(p)| / ln r21,  q(p) = ln((r21^p − s)/(r32^p − s)).
* Extrapolated value (step 4, eq. 4): φ_ext21 = (r21^p φ1 − φ2)/(r21^p − 1).
* Approximate and extrapolated relative errors (step 5): e_a21 = |(φ1 − φ2)/φ1|,
  e_ext21 = |(φ_ext21 − φ1)/φ_ext21|.
* Fine-grid convergence index (step 5): GCI_fine21 = 1.25 e_a21 / (r21^p − 1).

Absolute uncertainty. A figure in dB (directivity in dBi, a sidelobe level) is already
logarithmic, and its relative error "per cent of a dB value" means nothing. hornproof therefore
reports the GCI in the figure's own units as well:
``uncertainty = Fs · |φ1 − φ2| / (r21^p − 1)`` (= GCI_fine21 · |φ1|), with the safety
factor Fs = 1.25 for a three-grid monotonic ladder with an observed order in range, and
Fs = 3.0 when only two grids exist or the order had to be assumed (Roache 1997). This is the
number the verdicts add to the tolerance.

Ladder classification, with R = ε21/ε32 (Celik et al. 2008, step 5; Roache 1997),
generalised to unequal ratios as R = (ε21/ln r21)/(ε32/ln r32) (see :func:`classify_ladder`):

``"monotonic"``   0 < R < 1: differences shrink with the same sign; GCI as above.
``"oscillatory"`` R < 0: the figure goes up then down (or down then up); no extrapolation.
``"divergent"``   R ≥ 1: differences do not shrink; no extrapolation.
``"converged"``   the finest differences lie within a stated noise floor.
``"two-grid"``    only two grids: assumed order (``formal_order``), Fs = 3.0.
``"single"``      one grid: no uncertainty can be estimated (NaN).

For oscillatory and divergent ladders no confident number is reported: the extrapolated value
and the observed order are NaN, and the uncertainty is a *bound from the spread* of the whole
ladder, ``spread_factor · (max φ − min φ)`` (default factor 1.0, i.e. twice the half range
that Stern et al. (2001) take as the uncertainty of an oscillatory ladder — from memory),
flagged ``"spread-bound"``. It is an honest "at least this uncertain", not an error estimate.

An observed order outside [``min_order``, ``max_order``] (default 0.5 and 2 × ``formal_order``)
means the grids are not in the asymptotic range or the differences are noise: it is flagged
``"order-out-of-range"`` and the estimate falls back to the formal order pf with Fs = 3.0,
``3 |ε21| / (r21^pf − 1)`` (Roache 1997). As a floor, hornproof also carries the coarse pair to
the fine grid at the fastest credible order, ``3 |ε32| / (r21^pmax (r32^pmax − 1))`` (from
φ = φ0 + C h^p with p = ``max_order``), and keeps the larger: a fine pair that happens to agree
(ε21 ≈ 0) then does not produce a near-zero uncertainty. (The floor is hornproof's choice.)

The default ``formal_order`` is 1: Meep's Yee scheme is second order in a smooth medium, but
PEC walls get no subpixel smoothing, so a flared (staircased) horn converges at about first
order (observed in earlier development runs of this project; DEVELOPERS.md, "Modelling notes
that bit us"; the default is hornproof's own decision). Pass 2 for smooth problems such as a
free-space dipole.

With more than three grids the three finest are used for the estimate (flag
``"three-finest-of-N"``); the spread bound of a non-monotonic ladder uses all grids.

Which of these numbers a verdict may lean on is one rule, in
:mod:`hornproof.compare.numerics.confidence` (``confident_uncertainty``: the only uncertainty
that may support "agrees", a three-grid GCI with the observed order in range).

References
----------
P. J. Roache, "Quantification of uncertainty in computational fluid dynamics", Annu. Rev.
Fluid Mech. 29 (1997) 123–160.
I. B. Celik, U. Ghia, P. J. Roache, C. J. Freitas, H. Coleman, P. E. Raad, "Procedure for
estimation and reporting of uncertainty due to discretization in CFD applications",
J. Fluids Eng. 130 (2008) 078001.
ASME V&V 20-2009, Standard for Verification and Validation in Computational Fluid Dynamics
and Heat Transfer (numerical uncertainty u_num from the GCI).
F. Stern, R. V. Wilson, H. W. Coleman, E. G. Paterson, "Comprehensive approach to
verification and validation of CFD simulations — Part 1", J. Fluids Eng. 123 (2001) 793–802
(oscillatory convergence; cited from memory).
"""

from dataclasses import dataclass, field
import math

import numpy as np

from .confidence import confident_uncertainty

#: Safety factor for a three-grid study with an observed order (Roache 1997; Celik et al. 2008).
SAFETY_FACTOR_THREE_GRID = 1.25
#: Safety factor for two grids or an assumed order (Roache 1997).
SAFETY_FACTOR_TWO_GRID = 3.0

LADDER_STATUSES = ("monotonic", "oscillatory", "divergent", "converged", "two-grid", "single")


def refinement_ratio(coarse_cell_size, fine_cell_size):
    """Grid refinement ratio r = h_coarse / h_fine (> 1 for a true refinement).

    Parameters
    ----------
    coarse_cell_size, fine_cell_size : float
        Cell sizes, any common length unit (only the ratio matters).

    References
    ----------
    Celik et al. (2008), step 2: r21 = h2/h1, r32 = h3/h2.
    """
    if not (coarse_cell_size > 0 and fine_cell_size > 0):
        raise ValueError("cell size: must be positive")
    return coarse_cell_size / fine_cell_size


def observed_order(eps21, eps32, r21, r32, *, tolerance=1e-12, max_iterations=500):
    """Observed order of convergence p from three grids, by Celik's fixed-point iteration.

    Parameters
    ----------
    eps21, eps32 : float
        ε21 = φ2 − φ1 and ε32 = φ3 − φ2 (figure units), both non-zero.
    r21, r32 : float
        Refinement ratios h2/h1 and h3/h2, both > 1.
    tolerance : float
        Stop when successive iterates differ by less than this (absolute, in order units).
    max_iterations : int
        Give up after this many iterations.

    Returns
    -------
    float
        The observed order p, or NaN if the iteration fails (no fixed point, or an argument of
        a logarithm that is not positive).

    References
    ----------
    Celik et al. (2008), step 3, eqs. 3a–3c: p = |ln|ε32/ε21| + q(p)| / ln r21,
    q(p) = ln((r21^p − s)/(r32^p − s)), s = sign(ε32/ε21).
    """
    if eps21 == 0 or eps32 == 0 or not (np.isfinite(eps21) and np.isfinite(eps32)):
        raise ValueError("eps21, eps32: must be finite and non-zero")
    if not (r21 > 1 and r32 > 1):
        raise ValueError(f"r21, r32: refinement ratios must exceed 1 (got {r21}, {r32})")
    s = math.copysign(1.0, eps32 / eps21)
    log_ratio = math.log(abs(eps32 / eps21))
    ln_r21 = math.log(r21)
    p = abs(log_ratio) / ln_r21  # q = 0 start: exact when r21 == r32
    if p < 0.05:
        # q(0) is 0/0; with unequal ratios ε21 ≈ ε32 can still mean p ≈ 1 (see
        # classify_ladder), so start the iteration from first order instead.
        p = 1.0
    for _ in range(max_iterations):
        numerator = r21**p - s
        denominator = r32**p - s
        if numerator <= 0 or denominator <= 0:
            return math.nan
        q = math.log(numerator / denominator)
        p_next = abs(log_ratio + q) / ln_r21
        if abs(p_next - p) < tolerance:
            return p_next
        p = p_next
    return math.nan


def richardson_extrapolate(fine_value, coarse_value, r21, order):
    """Richardson-extrapolated value from the two finest grids.

    Parameters
    ----------
    fine_value, coarse_value : float or array_like
        φ1 (finest grid) and φ2 (next coarser), figure units.
    r21 : float
        Refinement ratio h2/h1 (> 1).
    order : float
        Order of convergence p (observed or assumed), > 0.

    Returns
    -------
    float or numpy.ndarray
        φ_ext21 = (r21^p φ1 − φ2)/(r21^p − 1).

    References
    ----------
    Celik et al. (2008), eq. 4; Roache (1997), generalized Richardson extrapolation.
    """
    if not r21 > 1:
        raise ValueError(f"r21: must exceed 1, got {r21}")
    if not order > 0:
        raise ValueError(f"order: must be positive, got {order}")
    rp = r21**order
    return (rp * np.asarray(fine_value, dtype=float) - np.asarray(coarse_value, dtype=float)) / (rp - 1.0)


def approximate_relative_error(fine_value, coarse_value):
    """e_a21 = |(φ1 − φ2)/φ1| (Celik et al. 2008, step 5). NaN if φ1 = 0."""
    fine_value = float(fine_value)
    if fine_value == 0:
        return math.nan
    return abs((fine_value - float(coarse_value)) / fine_value)


def extrapolated_relative_error(fine_value, extrapolated_value):
    """e_ext21 = |(φ_ext21 − φ1)/φ_ext21| (Celik et al. 2008, step 5). NaN if φ_ext21 = 0."""
    extrapolated_value = float(extrapolated_value)
    if extrapolated_value == 0 or not np.isfinite(extrapolated_value):
        return math.nan
    return abs((extrapolated_value - float(fine_value)) / extrapolated_value)


def gci_fine_relative(fine_value, coarse_value, r21, order, safety_factor=SAFETY_FACTOR_THREE_GRID):
    """Fine-grid convergence index, relative: Fs · e_a21 / (r21^p − 1).

    References
    ----------
    Celik et al. (2008), step 5 (Fs = 1.25); Roache (1997) (Fs = 3 for two grids).
    """
    e_a = approximate_relative_error(fine_value, coarse_value)
    return safety_factor * e_a / (r21**order - 1.0)


def gci_fine_absolute(fine_value, coarse_value, r21, order, safety_factor=SAFETY_FACTOR_THREE_GRID):
    """Fine-grid convergence index in the figure's own units: Fs · |φ1 − φ2| / (r21^p − 1).

    Equals :func:`gci_fine_relative` × |φ1|; the form to use for figures in dB.

    Parameters
    ----------
    fine_value, coarse_value : float
        φ1, φ2 in figure units.
    r21 : float
        Refinement ratio h2/h1 (> 1).
    order : float
        Order p (> 0).
    safety_factor : float
        Fs (1.25 three grids, 3.0 two grids or assumed order).

    References
    ----------
    Roache (1997); Celik et al. (2008), step 5, multiplied through by |φ1|.
    """
    if not r21 > 1:
        raise ValueError(f"r21: must exceed 1, got {r21}")
    if not order > 0:
        raise ValueError(f"order: must be positive, got {order}")
    if not safety_factor > 0:
        raise ValueError(f"safety_factor: must be positive, got {safety_factor}")
    return safety_factor * abs(float(fine_value) - float(coarse_value)) / (r21**order - 1.0)


def classify_ladder(eps21, eps32=None, noise_floor=0.0, r21=None, r32=None):
    """Classify a ladder from its finest differences.

    Parameters
    ----------
    eps21 : float
        φ2 − φ1 (finest pair), figure units.
    eps32 : float or None
        φ3 − φ2, or None for a two-grid ladder.
    noise_floor : float
        Differences with magnitude at or below this (figure units, ≥ 0) count as converged.
    r21, r32 : float, optional
        Refinement ratios h2/h1, h3/h2 (> 1). Needed when they differ; default equal.

    Returns
    -------
    str
        One of ``"converged"``, ``"two-grid"``, ``"monotonic"``, ``"oscillatory"``,
        ``"divergent"``: with R = (ε21 / ln r21) / (ε32 / ln r32), 0 < R < 1 monotonic,
        R < 0 oscillatory, R ≥ 1 divergent.

    Notes
    -----
    Celik et al. (2008) classify with R = ε21/ε32, which presumes a constant refinement
    ratio. With r21 ≠ r32 that test misfires: a first-order series φ0 + C h on h = 1, 1.5, 2
    has ε21 = ε32 (R = 1, "divergent") although it converges. For φ = φ0 + C h^p,
    ε32/ε21 = r21^p (r32^p − 1)/(r21^p − 1), which tends to ln r32 / ln r21 as p → 0+; so
    "the observed order is positive" is R < 1 with the differences taken per unit of ln h, as
    above. For r21 = r32 it is exactly Celik's R. (hornproof's departure from the paper.)

    References
    ----------
    Celik et al. (2008), step 5 discussion; Roache (1997).
    """
    if noise_floor < 0 or not np.isfinite(noise_floor):
        raise ValueError(f"noise_floor: must be finite and non-negative, got {noise_floor}")
    if eps32 is None:
        return "converged" if abs(eps21) <= noise_floor else "two-grid"
    if abs(eps21) <= noise_floor and abs(eps32) <= noise_floor:
        return "converged"
    if abs(eps32) <= noise_floor:
        return "divergent"  # the fine pair moved more than a still coarse pair: not converging
    if (r21 is None) != (r32 is None):
        raise ValueError("r21, r32: give both or neither")
    if r21 is not None and not (r21 > 1 and r32 > 1):
        raise ValueError(f"r21, r32: refinement ratios must exceed 1 (got {r21}, {r32})")
    weight = 1.0 if r21 is None else math.log(r32) / math.log(r21)
    ratio = weight * eps21 / eps32
    if ratio < 0:
        return "oscillatory"
    if ratio >= 1:
        return "divergent"
    return "monotonic"


@dataclass
class ConvergenceEstimate:
    """The convergence estimate of one figure at one frequency.

    Attributes
    ----------
    status : str
        Ladder class, one of :data:`LADDER_STATUSES`.
    fine_value : float
        φ1, the value on the finest grid (the value to report).
    extrapolated_value : float
        φ_ext21 (NaN for single, oscillatory, divergent ladders).
    observed_order : float
        p from three grids (NaN if not computed).
    order_used : float
        The order in the extrapolation and the GCI (observed, or assumed/formal).
    safety_factor : float
        Fs used (1.25 or 3.0; NaN when no GCI).
    approximate_relative_error, extrapolated_relative_error, gci_fine_relative : float
        e_a21, e_ext21, GCI_fine21 of Celik et al. (2008) (fractions, not per cent).
    uncertainty : float
        Absolute uncertainty of ``fine_value`` in figure units (the GCI, or a spread bound).
    uncertainty_kind : str
        ``"gci"``, ``"spread-bound"`` or ``"none"``.
    flags : list of str
        ``"order-out-of-range"``, ``"order-iteration-failed"``, ``"assumed-order"``,
        ``"spread-bound"``, ``"three-finest-of-N"``.
    cell_sizes : list of float
        The cell sizes used, finest first (units of the input: metres, or 1/cpw in
        wavelengths).
    values : list of float
        The figure values on those grids, finest first.
    """

    status: str
    fine_value: float = math.nan
    extrapolated_value: float = math.nan
    observed_order: float = math.nan
    order_used: float = math.nan
    safety_factor: float = math.nan
    approximate_relative_error: float = math.nan
    extrapolated_relative_error: float = math.nan
    gci_fine_relative: float = math.nan
    uncertainty: float = math.nan
    uncertainty_kind: str = "none"
    flags: list = field(default_factory=list)
    cell_sizes: list = field(default_factory=list)
    values: list = field(default_factory=list)

    @property
    def confident(self):
        """True when :func:`confident_uncertainty` accepts this estimate (a three-rung GCI with
        an observed order in range, or with Fs = 3 at the formal order when it is out of range)."""
        return confident_uncertainty(self)[0] is not None

    def to_dict(self):
        """JSON-ready dict (NaN -> None)."""
        def clean(v):
            return None if isinstance(v, float) and not math.isfinite(v) else v

        return {
            "status": self.status,
            "fine_value": clean(self.fine_value),
            "extrapolated_value": clean(self.extrapolated_value),
            "observed_order": clean(self.observed_order),
            "order_used": clean(self.order_used),
            "safety_factor": clean(self.safety_factor),
            "approximate_relative_error": clean(self.approximate_relative_error),
            "extrapolated_relative_error": clean(self.extrapolated_relative_error),
            "gci_fine_relative": clean(self.gci_fine_relative),
            "uncertainty": clean(self.uncertainty),
            "uncertainty_kind": self.uncertainty_kind,
            "confident": self.confident,
            "flags": list(self.flags),
            "cell_sizes": [float(h) for h in self.cell_sizes],
            "values": [float(v) for v in self.values],
        }


def _float_array(values):
    """Float array from numbers or (nested) lists; JSON null (None) -> NaN."""
    array = np.asarray(values, dtype=object)
    return np.where(array == None, np.nan, array).astype(float)  # noqa: E711 (elementwise)


def _spread(values):
    return float(np.max(values) - np.min(values))


def estimate_ladder(cell_sizes, values, *, formal_order=1.0, noise_floor=0.0, min_order=0.5,
                    max_order=None, spread_factor=1.0):
    """Convergence estimate of one figure from one ladder of grids.

    Parameters
    ----------
    cell_sizes : array_like, shape [ngrid]
        Cell sizes h (any common unit; 1/cells-per-wavelength works), positive, distinct, any
        order (sorted finest first here).
    values : array_like, shape [ngrid]
        The figure on each grid, figure units. NaN grids are dropped.
    formal_order : float
        Order assumed for two grids and for the fallback; sets the default order range.
        Default 1 (staircased PEC, see module notes).
    noise_floor : float
        Absolute noise floor of the figure (figure units, ≥ 0); differences at or below it
        count as converged. Default 0.
    min_order, max_order : float
        Accepted range of the observed order (default 0.5 and 2 × ``formal_order``).
    spread_factor : float
        Multiplier of (max − min) for the spread bound of non-monotonic ladders (default 1).

    Returns
    -------
    ConvergenceEstimate

    References
    ----------
    Celik et al. (2008); Roache (1997). See the module docstring for the decisions made here.
    """
    h = np.asarray(cell_sizes, dtype=float)
    phi = _float_array(values)
    max_order = _checked_max_order(h, phi, formal_order, min_order, max_order, spread_factor)
    keep = np.isfinite(phi)
    h, phi = h[keep], phi[keep]
    order = np.argsort(h)
    h, phi = h[order], phi[order]
    n = h.size
    if n == 0:
        return ConvergenceEstimate(status="single", flags=["no-finite-values"])
    estimate = ConvergenceEstimate(status="single", fine_value=float(phi[0]),
                                   cell_sizes=h.tolist(), values=phi.tolist())
    if n == 1:
        return estimate
    phi1, phi2 = float(phi[0]), float(phi[1])
    r21 = refinement_ratio(h[1], h[0])
    eps21 = phi2 - phi1
    if n == 2:
        estimate.status = classify_ladder(eps21, None, noise_floor)
        if estimate.status == "converged":
            return _converged(estimate, phi, noise_floor)
        estimate.flags.append("assumed-order")
        return _fill_gci(estimate, phi1, phi2, r21, formal_order, SAFETY_FACTOR_TWO_GRID)
    if n > 3:
        estimate.flags.append("three-finest-of-N")
    phi3 = float(phi[2])
    r32 = refinement_ratio(h[2], h[1])
    eps32 = phi3 - phi2
    estimate.status = classify_ladder(eps21, eps32, noise_floor, r21, r32)
    if estimate.status == "converged":
        return _converged(estimate, phi, noise_floor)
    if estimate.status in ("oscillatory", "divergent"):
        estimate.uncertainty = spread_factor * _spread(phi)
        estimate.uncertainty_kind = "spread-bound"
        estimate.flags.append("spread-bound")
        return estimate
    return _monotonic_estimate(estimate, phi1, phi2, eps21, eps32, r21, r32, formal_order=formal_order,
                               noise_floor=noise_floor, min_order=min_order, max_order=max_order)


def _checked_max_order(h, phi, formal_order, min_order, max_order, spread_factor):
    """Check the arguments of :func:`estimate_ladder`; returns ``max_order`` (default 2 × formal)."""
    if h.ndim != 1 or phi.shape != h.shape:
        raise ValueError(f"values: shape {phi.shape} must match cell_sizes shape {h.shape}")
    if np.any(~np.isfinite(h)) or np.any(h <= 0):
        raise ValueError("cell_sizes: must be finite and positive")
    if np.unique(h).size != h.size:
        raise ValueError("cell_sizes: two grids have the same cell size")
    if not formal_order > 0:
        raise ValueError(f"formal_order: must be positive, got {formal_order}")
    if max_order is None:
        max_order = 2.0 * formal_order
    if not (0 < min_order < max_order):
        raise ValueError(f"min_order, max_order: need 0 < min_order < max_order, got {min_order}, {max_order}")
    if not spread_factor > 0:
        raise ValueError(f"spread_factor: must be positive, got {spread_factor}")
    return max_order


def _monotonic_estimate(estimate, phi1, phi2, eps21, eps32, r21, r32, *, formal_order, noise_floor,
                        min_order, max_order):
    """The GCI of a monotonic three-grid ladder: observed order if in range, else the assumed
    order with the two-grid safety factor, bounded below by the coarse pair's share."""
    p = observed_order(eps21, eps32, r21, r32) if abs(eps21) > noise_floor else math.nan
    estimate.observed_order = p
    if math.isnan(p):
        estimate.flags.append("order-iteration-failed" if abs(eps21) > noise_floor else "order-out-of-range")
    elif not (min_order <= p <= max_order):
        estimate.flags.append("order-out-of-range")
    if estimate.flags and estimate.flags[-1] in ("order-out-of-range", "order-iteration-failed"):
        _fill_gci(estimate, phi1, phi2, r21, formal_order, SAFETY_FACTOR_TWO_GRID)
        coarse_pair = SAFETY_FACTOR_TWO_GRID * abs(eps32) / (r21**max_order * (r32**max_order - 1.0))
        estimate.uncertainty = max(estimate.uncertainty, coarse_pair)
        if phi1 != 0:
            estimate.gci_fine_relative = estimate.uncertainty / abs(phi1)
        return estimate
    return _fill_gci(estimate, phi1, phi2, r21, p, SAFETY_FACTOR_THREE_GRID)


def _converged(estimate, phi, noise_floor):
    estimate.uncertainty = max(_spread(phi), noise_floor)
    estimate.uncertainty_kind = "spread-bound"
    estimate.flags.append("spread-bound")
    estimate.extrapolated_value = estimate.fine_value
    return estimate


def _fill_gci(estimate, phi1, phi2, r21, order, safety_factor):
    estimate.order_used = float(order)
    estimate.safety_factor = safety_factor
    estimate.extrapolated_value = float(richardson_extrapolate(phi1, phi2, r21, order))
    estimate.approximate_relative_error = approximate_relative_error(phi1, phi2)
    estimate.extrapolated_relative_error = extrapolated_relative_error(phi1, estimate.extrapolated_value)
    estimate.gci_fine_relative = gci_fine_relative(phi1, phi2, r21, order, safety_factor)
    estimate.uncertainty = gci_fine_absolute(phi1, phi2, r21, order, safety_factor)
    estimate.uncertainty_kind = "gci"
    return estimate


def cell_sizes_from_cells_per_wavelength(cells_per_wavelength):
    """Cell size in wavelengths, h/λ = 1/cpw, for a cells-per-wavelength ladder.

    Parameters
    ----------
    cells_per_wavelength : array_like, shape [ngrid]
        Resolution of each grid, cells per free-space wavelength (> 0).
    """
    cells = np.asarray(cells_per_wavelength, dtype=float)
    if cells.ndim != 1 or cells.size == 0 or np.any(~np.isfinite(cells)) or np.any(cells <= 0):
        raise ValueError("cells_per_wavelength: must be a non-empty 1-D array of positive numbers")
    return 1.0 / cells


def grid_convergence(values, *, cells_per_wavelength=None, cell_sizes=None, formal_order=1.0,
                     noise_floor=0.0, min_order=0.5, max_order=None, spread_factor=1.0):
    """Convergence estimate of a figure at every band frequency.

    Parameters
    ----------
    values : array_like, shape [ngrid] or [ngrid, nf]
        The figure (e.g. directivity in dBi) on each grid of the ladder, per frequency.
    cells_per_wavelength : array_like, shape [ngrid], optional
        The ladder as cells per wavelength (a larger number is a finer grid).
    cell_sizes : array_like, shape [ngrid], optional
        The ladder as cell sizes h, m (give exactly one of the two).
    formal_order, noise_floor, min_order, max_order, spread_factor
        See :func:`estimate_ladder`.

    Returns
    -------
    list of ConvergenceEstimate
        One per frequency (length 1 for 1-D ``values``).

    References
    ----------
    Celik et al. (2008); Roache (1997).
    """
    if (cells_per_wavelength is None) == (cell_sizes is None):
        raise ValueError("cells_per_wavelength, cell_sizes: give exactly one")
    if cell_sizes is None:
        h = cell_sizes_from_cells_per_wavelength(cells_per_wavelength)
    else:
        h = np.asarray(cell_sizes, dtype=float)
    phi = _float_array(values)
    if phi.ndim == 1:
        phi = phi[:, None]
    if phi.ndim != 2 or phi.shape[0] != h.shape[0]:
        raise ValueError(f"values: shape {np.shape(values)} must be [ngrid] or [ngrid, nf] with ngrid = {h.shape[0]}")
    return [
        estimate_ladder(h, phi[:, j], formal_order=formal_order, noise_floor=noise_floor,
                        min_order=min_order, max_order=max_order, spread_factor=spread_factor)
        for j in range(phi.shape[1])
    ]
