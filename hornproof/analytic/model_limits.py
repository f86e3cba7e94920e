"""Where the closed-form and aperture models of a horn stop being trustworthy, for one design.

Two different limits:

* the **phase approximation** (the quadratic path length of the closed form) — computed
  exactly for any horn as closed form − exact phase: no guess involved;
* the **aperture models themselves** (a TE10 cosine field over the aperture, no edge or wall
  currents) — not predictable in closed form; hornproof's own full-wave runs show where they
  miss. For a sectoral horn whose unflared opening is narrow (the WR-90 guide height, 0.34
  wavelength at 10 GHz), 3D FDTD gave aperture-model errors of −1.4 to −1.6 dB at 10–25°,
  −2.3 dB at 40° and −3.6 dB at 45° flare half-angle (the shipped 3D sweep,
  cases/sweep-h-flare-3d.toml; ARCHITECTURE.md's audit figures −1.3 / −2.9 dB at 20 / 40° agree);
  short horns with wide flares are where both limits bite.

:func:`model_limit_warnings` turns these into one-line warnings for the designer.
"""

import numpy as np

from . import closed_form, exact_phase
from ..units import wavelength

#: flare half-angle (deg) beyond which a horn is "wide" here: the 3D aperture-model error of the
#: project's WR-90 sweep was −2.3 dB at 40° and −3.6 dB at 45° (module docstring)
WIDE_FLARE_DEG = 40.0

#: an unflared opening narrower than this (wavelengths) is outside the aperture models' reach
NARROW_OPENING_WAVELENGTHS = 0.5


def phase_approximation_error_db(horn, frequency):
    """Closed form − exact phase directivity, dB: the error of the quadratic path length alone."""
    closed = float(np.atleast_1d(closed_form.directivity(horn, frequency))[0])
    exact = float(np.atleast_1d(exact_phase.directivity(horn, frequency))[0])
    return 10.0 * np.log10(closed / exact)


def model_limit_warnings(horn, frequency, tolerance_db=0.3):
    """One-line warnings when ``horn`` sits past the limits of the closed-form or aperture models.

    Parameters
    ----------
    horn : HornGeometry
    frequency : float
        Hz.
    tolerance_db : float
        The directivity error a designer accepts (hornproof's sweeps use 0.3 dB).

    Returns
    -------
    list of str
        Each names the phase error or size that triggers it and the expected error size.
    """
    warnings = []
    wl = float(wavelength(frequency))
    s, t = float(horn.phase_error_h(frequency)), float(horn.phase_error_e(frequency))
    error = phase_approximation_error_db(horn, frequency)
    if abs(error) > tolerance_db:
        warnings.append(f"past the phase-approximation breakdown: peak phase errors S = {s:.2f}, T = {t:.2f} "
                        f"wavelengths; the closed form is off the exact-phase model by {error:+.2f} dB here "
                        f"(tolerance {tolerance_db:g} dB): size it with the exact-phase model")
    angles = [np.degrees(a) for a, flares in ((horn.flare_half_angle_h, horn.flares_h),
                                             (horn.flare_half_angle_e, horn.flares_e)) if flares]
    widest = max(angles, default=0.0)
    narrow = [(name, size / wl) for name, size, flares in (("H-plane width a", horn.aperture_a, horn.flares_h),
                                                           ("E-plane height b", horn.aperture_b, horn.flares_e))
              if not flares and size / wl < NARROW_OPENING_WAVELENGTHS]
    if widest > WIDE_FLARE_DEG:
        warnings.append(f"wide flare: half-angle {widest:.1f} deg (S = {s:.2f}, T = {t:.2f} wavelengths); in "
                        f"hornproof's 3D runs of a narrow-opening horn the aperture models missed full-wave by "
                        f"2.3 dB at 40 deg and 3.6 dB at 45 deg: check this design with 'hornproof verify'")
    for name, size_wl in narrow:
        warnings.append(f"narrow unflared opening: {name} = {size_wl:.2f} wavelength; the aperture models "
                        f"ignore its edges, and in hornproof's 3D runs of 60 mm WR-90 horns (0.34 wavelength, "
                        f"10–50 deg flare) they missed full-wave by 1.4–3.6 dB: the closed-form figures are a first "
                        f"guess, check with 'hornproof verify'")
    return warnings
