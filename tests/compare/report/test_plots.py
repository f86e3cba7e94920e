"""Tests of the figures: each renders from synthetic data to a PNG and an SVG, atomically.

Synthetic data (invented for the test): Gaussian-beam patterns (parabolic in dB, common
practice for a horn main lobe), a smooth directivity rise over a band, a monotonic ladder from
φ(h) = φ0 + C h, and errors that grow with flare angle. The look of each figure was checked
by eye when it was written; these tests check what can be checked automatically: both files
exist, are complete images of the right type and size, carry the labels a reader needs, and
nothing temporary is left behind.
"""

import os
import xml.etree.ElementTree as ET

import numpy as np
import pytest

from hornproof.compare.numerics import convergence
from hornproof.compare.report import plots, sweep_plots

PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"  # PNG specification (ISO/IEC 15948), file signature


def check_pair(paths, *texts):
    png, svg = paths
    with open(png, "rb") as fh:
        head = fh.read(24)
    assert head[:8] == PNG_SIGNATURE
    # IHDR width and height, big-endian, bytes 16–24 (PNG specification): a real figure.
    width, height = int.from_bytes(head[16:20], "big"), int.from_bytes(head[20:24], "big")
    assert width > 400 and height > 300
    root = ET.parse(svg).getroot()
    assert root.tag.endswith("svg")
    directory = os.path.dirname(png)
    assert not [n for n in os.listdir(directory) if n.startswith(".tmp-")]
    # Readable by others (the temporary file's private 0600 mode is not kept).
    assert os.stat(png).st_mode & 0o044 == 0o044 and os.stat(svg).st_mode & 0o044 == 0o044
    return png, svg


def gaussian_db(theta, peak, hpbw):
    # −3 dB at ±hpbw/2 (definition of HPBW) for a parabola in dB
    return peak - 3.0 * (theta / (hpbw / 2)) ** 2


def test_pattern_overlay(tmp_path):
    theta = np.linspace(-90, 90, 361)
    paths = plots.plot_pattern_overlay(
        theta, gaussian_db(theta, 18.0, 24.0), gaussian_db(theta, 17.6, 25.0),
        gaussian_db(theta, 17.4, 25.5) + 0.3 * np.sin(theta / 7), tmp_path / "pattern_h_plane",
        fdtd_uncertainty_db=0.25, plane="H", frequency=10.5e9, case_title="Synthetic test horn")
    check_pair(paths)
    # E-plane of a 2D-less model: only FDTD given, array uncertainty, unit dB.
    check_pair(plots.plot_pattern_overlay(
        theta, None, None, gaussian_db(theta, 11.0, 60.0), tmp_path / "pattern_e_plane",
        fdtd_uncertainty_db=np.full(theta.shape, 0.4), plane="E", unit="dB", case_title="Synthetic"))
    with pytest.raises(ValueError, match="closed_form_dbi"):
        plots.plot_pattern_overlay(theta, None, None, None, tmp_path / "x")
    with pytest.raises(ValueError, match="plane"):
        plots.plot_pattern_overlay(theta, None, None, theta, tmp_path / "x", plane="X")


def test_directivity_vs_frequency(tmp_path):
    f = np.linspace(9.5e9, 11.5e9, 5)
    cf = 16.0 + 0.8 * (f - 9.5e9) / 1e9
    paths = plots.plot_directivity_vs_frequency(
        f, cf, cf - 0.25, cf - 0.45, tmp_path / "directivity_vs_frequency",
        fdtd_uncertainty_db=[0.2, 0.2, np.nan, 0.3, 0.35], case_title="Synthetic test horn")
    check_pair(paths)


def test_convergence_ladder(tmp_path):
    cpw = np.array([12.0, 16.0, 24.0])
    values = 15.0 - 20.0 / cpw  # φ0 + C h with h = 1/cpw: first order
    est = convergence.grid_convergence(values, cells_per_wavelength=cpw)[0]
    assert est.status == "monotonic"
    check_pair(plots.plot_convergence_ladder(cpw, values, tmp_path / "convergence_ladder",
                                             estimate=est, frequency=10e9,
                                             case_title="Synthetic test horn"))
    osc = convergence.grid_convergence([11.8, 12.1, 11.9], cells_per_wavelength=[20, 28, 40])[0]
    check_pair(plots.plot_convergence_ladder([20, 28, 40], [11.8, 12.1, 11.9],
                                             tmp_path / "convergence_osc",
                                             estimate=osc.to_dict(), case_title="Synthetic"))


def test_error_vs_parameter_with_breakdown(tmp_path, synthetic_sweep):
    angle = np.linspace(4.0, 30.0, 14)
    phase = 0.002 * angle**2
    aperture = 0.1 + 0.01 * angle
    u = 0.05 + 0.002 * angle
    document = synthetic_sweep(angle, phase, aperture, u)
    brk = document["breakdown"]
    # |phase| = 0.002 θ² crosses 0.5 at θ = sqrt(250) = 15.8 deg (between samples 14 and 16)
    assert brk["phase_approximation"]["latest"] == pytest.approx(np.sqrt(250), abs=0.2)
    # |e| + u = 0.15 + 0.012 θ reaches 0.5 at θ = 29.17 (linear, so exact between samples), while
    # |e| − u = 0.05 + 0.008 θ never does: it may break there, nothing is sure -> unresolved
    assert brk["aperture_model"]["status"] == "unresolved"
    assert brk["aperture_model"]["earliest"] == pytest.approx(0.35 / 0.012, abs=1e-9)
    check_pair(sweep_plots.plot_error_vs_parameter(tmp_path / "error_vs_parameter", document))
    check_pair(sweep_plots.plot_directivity_vs_parameter(tmp_path / "directivity_vs_parameter", document))


def test_s11_and_atomic_failure(tmp_path):
    f = np.linspace(9.5e9, 11.5e9, 9)
    check_pair(plots.plot_s11(f, -18 + 4 * np.cos(f / 3e8), tmp_path / "s11", case_title="Synthetic"))
    with pytest.raises(ValueError, match="path_stem"):
        plots.plot_s11(f, -18 + 0 * f, tmp_path / "no_such_dir" / "s11")
    with pytest.raises(ValueError, match="s11_db"):
        plots.plot_s11(f, [1.0, 2.0], tmp_path / "s11")
