"""Fields of surface currents at a finite point: the exact dipole field, and the far-zone limit.

Outside facts, each with its source:

* Exact fields of an infinitesimal electric dipole I·l along z (C. A. Balanis, *Antenna
  Theory*, 3rd ed., §4.2.1, eqs. for E_r, E_θ, H_φ; from memory), written in e^{−iωt}
  (j → −i) with η = 1:
  E_r = Il cosθ/(2π r²) (1 + i/(kr)) e^{ikr},
  E_θ = −i k Il sinθ/(4π r) (1 + i/(kr) − 1/(kr)²) e^{ikr},
  H_φ = −i k Il sinθ/(4π r) (1 + i/(kr)) e^{ikr}.
* Duality (Balanis §3.7): a magnetic current M gives H as an electric current J gives E, and
  E = −(H of the electric problem).
* The far-zone transform (sim/farfield_transform.py, checked against Meep's near2far and the
  dipole's D = 1.5 elsewhere) is the kR → ∞ limit.
"""

import numpy as np
import pytest

from hornproof.sim.farfield_transform import CurrentSheet, fast_far_fields
from hornproof.sim.point_transform import point_fields


def dipole_sheet(magnetic=False, amplitude=1.0):
    """One sample at the origin, a z-directed current of moment ``amplitude`` (one frequency)."""
    return CurrentSheet(axes=(0, 1), coordinates=(np.array([0.0]), np.array([0.0])), normal_axis=2,
                        normal_position=0.0, direction=np.array([0.0, 0.0, 1.0]), magnetic=magnetic,
                        amplitude=np.array([[[amplitude]]], dtype=complex))


@pytest.mark.parametrize("kr", [0.3, 1.0, 4.0, 40.0])
@pytest.mark.parametrize("theta_deg", [30.0, 90.0, 150.0])
def test_electric_dipole_exact_fields(kr, theta_deg):
    f = 1.0  # Meep units: k = 2π
    k = 2 * np.pi * f
    r = kr / k
    th = np.radians(theta_deg)
    point = np.array([[r * np.sin(th), 0.0, r * np.cos(th)]])
    e, h = point_fields([dipole_sheet()], point, [f])
    r_hat = point[0] / r
    theta_hat = np.array([np.cos(th), 0.0, -np.sin(th)])
    phi_hat = np.array([0.0, 1.0, 0.0])
    phase = np.exp(1j * kr)
    e_r = np.cos(th) / (2 * np.pi * r**2) * (1 + 1j / kr) * phase
    e_theta = -1j * k * np.sin(th) / (4 * np.pi * r) * (1 + 1j / kr - 1 / kr**2) * phase
    h_phi = -1j * k * np.sin(th) / (4 * np.pi * r) * (1 + 1j / kr) * phase
    np.testing.assert_allclose(e[0, 0] @ r_hat, e_r, rtol=1e-12, atol=1e-14 * abs(e_theta))
    np.testing.assert_allclose(e[0, 0] @ theta_hat, e_theta, rtol=1e-12)
    np.testing.assert_allclose(h[0, 0] @ phi_hat, h_phi, rtol=1e-12)
    np.testing.assert_allclose(h[0, 0] @ r_hat, 0, atol=1e-14 * abs(h_phi))
    # duality: the magnetic dipole's H is the electric dipole's E; its E is −(that H)
    em, hm = point_fields([dipole_sheet(magnetic=True)], point, [f])
    np.testing.assert_allclose(hm, e, rtol=1e-12, atol=1e-15)
    np.testing.assert_allclose(em, -h, rtol=1e-12, atol=1e-15)


def test_far_away_it_is_the_far_zone_transform():
    rng = np.random.default_rng(7)
    sheets = []
    for magnetic, direction in ((False, [1.0, 0, 0]), (True, [0, 1.0, 0]), (False, [0, 1.0, 0])):
        amplitude = rng.normal(size=(2, 5, 4)) + 1j * rng.normal(size=(2, 5, 4))
        sheets.append(CurrentSheet(axes=(0, 1), coordinates=(np.linspace(-0.5, 0.5, 5), np.linspace(-0.3, 0.3, 4)),
                                   normal_axis=2, normal_position=0.2, direction=np.array(direction),
                                   magnetic=magnetic, amplitude=amplitude))
    freqs = [0.9, 1.0]
    distance = 1.0e5
    direction = np.array([[0.3, 0.2, np.sqrt(1 - 0.13)]])
    e_far, h_far = fast_far_fields(sheets, direction, freqs, distance, 3)
    e, h = point_fields(sheets, distance * direction, freqs)
    scale = np.max(np.abs(e_far))
    np.testing.assert_allclose(e, e_far, atol=1e-4 * scale)
    np.testing.assert_allclose(h, h_far, atol=1e-4 * scale)


@pytest.mark.fullwave
def test_fdtd_range_gain_matches_meeps_own_green_function_and_tends_to_directivity():
    # Meep's get_farfield evaluates the equivalent currents' field at any point with its own
    # Green's function (Meep documentation, near-to-far: "get_farfield(near2far, x)" at any x);
    # hornproof's numpy route must give the same range gain on the same kind of run.
    from hornproof.analytic.geometry import HornGeometry
    from hornproof.sim.run import simulate
    from hornproof.sim.settings import FdtdSettings

    horn = HornGeometry("pyramidal", 22.86e-3, 10.16e-3, 45e-3, 35e-3, 40e-3, 1e-3)
    distances = (0.05, 0.3, 1e3)
    gains = {}
    for method in ("fast", "meep"):
        settings = FdtdSettings(pattern_step_deg=3.0, farfield_method=method, extra={"range_distances_m": distances})
        result = simulate(horn, np.array([10e9]), settings, 8)
        gains[method] = np.asarray(result.extra["range_gain_dbi"])[0]
        assert result.run["range_distances_m"] == list(distances)
        result.to_model_result()  # the extra arrays stay one row per frequency
        # far away the range gain is the directivity (the far-zone transform's boresight value)
        assert gains[method][2] == pytest.approx(float(result.directivity_dbi[0]), abs=0.01)
    np.testing.assert_allclose(gains["fast"], gains["meep"], atol=1e-6)
    assert gains["fast"][0] < gains["fast"][1] < gains["fast"][2]  # a closer probe sees less gain
