"""Exports of the feed work: CSV tables, HDF5 dimension scales with CF attributes, and the dense
band in Touchstone.

References: RFC 4180 (CSV) through Python's ``csv`` reader; the HDF5 Dimension Scales
specification (the ``CLASS = "DIMENSION_SCALE"`` and ``NAME`` attributes and the attachments
that netCDF-4 readers turn into named axes) through h5py, the reference HDF5 binding (xarray /
h5netcdf / netCDF4 are not installed here as Debian packages, so the named axes are checked at
the HDF5 level); the NetCDF Climate and Forecast (CF) Conventions' ``units`` and ``long_name``
attributes (from memory); Touchstone read back through scikit-rf (a reference library on PyPI).
"""

import csv

import numpy as np
import pytest

h5py = pytest.importorskip("h5py")

from hornproof.compare.output.csv_tables import band_table, csv_text, cut_tables, dense_table, unit_of, write_csv_tables  # noqa: E402,E501
from hornproof.compare.output.fields_h5 import read_fields_h5, write_fields_h5  # noqa: E402
from hornproof.compare.output.touchstone import write_s1p  # noqa: E402
from hornproof.sim.result import SimResult  # noqa: E402


def _result(nf=3, ntheta=9):
    """A SimResult with a feed field and a dense band; the numbers are arbitrary test data."""
    theta = np.linspace(-180.0, 180.0, ntheta)
    rng = np.random.default_rng(2)
    nan = np.full(nf, np.nan)
    f = np.linspace(9e9, 11e9, nf)
    cut = lambda: rng.normal(size=(nf, ntheta)) + 1j * rng.normal(size=(nf, ntheta))  # noqa: E731
    feed = {"theta_deg": theta, "cuts": {"h": (cut(), cut()), "e": (cut(), cut()), "d45": (cut(), cut())},
            "phase_reference_z_m": 0.01}
    dense_f = np.linspace(9e9, 11e9, 101)
    dense = {"frequencies_hz": dense_f, "s11": 0.1 * np.exp(1j * dense_f / 1e9), "fit_residual": np.zeros(101)}
    return SimResult(
        name="fdtd", dims=3, frequencies=f, theta_deg=theta,
        h_plane_dbi=rng.normal(size=(nf, ntheta)), e_plane_dbi=rng.normal(size=(nf, ntheta)),
        directivity_dbi=nan, hpbw_h_deg=nan, hpbw_e_deg=nan, first_null_h_deg=nan,
        first_null_e_deg=nan, sll_h_db=nan, sll_e_db=nan,
        extra={"s11_real": rng.normal(size=nf) * 0.1, "s11_imag": rng.normal(size=nf) * 0.1},
        run={"meep_version": "1.25.0"}, feed_pattern=feed, dense_band=dense)


def test_hdf5_axes_are_attached_dimension_scales_with_cf_attributes(tmp_path):
    path = tmp_path / "fields.h5"
    result = _result()
    write_fields_h5(path, result, case_sha256="0" * 64, case_name="t", flare_length_m=0.07)
    with h5py.File(path, "r") as handle:
        assert handle["frequencies"].attrs["CLASS"] == b"DIMENSION_SCALE"
        for name in ("patterns/h_plane_dbi", "feed/d45_cross_dbi", "feed/h_co_phase_deg"):
            ds = handle[name]
            assert [d[0].name for d in ds.dims] == ["/frequencies", "/" + name.split("/")[0] + "/theta_deg"]
            assert ds.attrs["units"] in ("dBi", "deg") and ds.attrs["long_name"]
        dense = handle["dense_band/s11_real"]
        assert dense.dims[0][0].name == "/dense_band/frequencies"
        assert handle["dense_band/frequencies"].attrs["units"] == "Hz"
        for name in ("s11/real", "s11/imag"):
            assert handle[name].dims[0][0].name == "/frequencies"
    back = read_fields_h5(path)  # the package's own reader still reads it
    assert back["dense_band"]["s11_real"].shape == (101,)
    np.testing.assert_allclose(back["feed"]["d45_co_dbi"],
                               20 * np.log10(np.abs(result.feed_pattern["cuts"]["d45"][0])))


def test_csv_tables_read_back_with_units_in_the_header(tmp_path):
    summary = {"frequencies_ghz": [9.0, 10.0],
               "models": {"closed_form": {"directivity_dbi": [15.0, 16.0], "phase_centre_h_mm": [30.0, None]},
                          "fdtd": {"directivity_dbi": [15.1, 16.2], "reflector_efficiency_pct": [70.0, 71.0],
                                   "uncertainty": {"directivity_dbi": [0.1, 0.2]}, "cuts": [[1, 2], [3, 4]]}}}
    header, rows = band_table(summary)
    assert header[:3] == ["frequency [GHz]", "closed_form directivity_dbi [dBi]", "closed_form phase_centre_h_mm [mm]"]
    assert "fdtd reflector_efficiency_pct [%]" in header and "fdtd_uncertainty directivity_dbi [dBi]" in header
    assert not any("cuts" in h for h in header)
    parsed = list(csv.reader(csv_text(header, rows).splitlines()))
    assert parsed[2][2] == ""  # a missing value is an empty cell
    assert float(parsed[1][1]) == 15.0
    assert unit_of("s11_real") == "1" and unit_of("edge_path_h_wl") == "wavelengths"
    result = _result()
    files = write_csv_tables(tmp_path, summary, result)
    names = {p.name for p in files}
    assert {"band.csv", "dense_s11.csv", "cut_h_plane_fdtd.csv", "cut_d45_cross_fdtd.csv"} <= names
    header, rows = dense_table(result.dense_band)
    assert len(rows) == 101 and header[3] == "s11 [dB]"
    assert rows[0][3] == pytest.approx(20.0 * np.log10(0.1))
    cuts = cut_tables({}, result)
    header, rows = cuts["cut_h_plane_fdtd"]
    assert header[0] == "theta [deg]" and header[1] == "9 GHz [dBi]" and len(rows) == 9


def test_dense_band_touchstone_reads_back_through_scikit_rf(tmp_path):
    skrf = pytest.importorskip("skrf")
    dense = _result().dense_band
    path = tmp_path / "s11.s1p"
    write_s1p(path, dense["frequencies_hz"], dense["s11"], case_name="t", solver_version="1.25.0",
              comments=["dense band"])
    network = skrf.Network(str(path))
    assert len(network.f) == 101
    np.testing.assert_allclose(network.f, dense["frequencies_hz"], rtol=1e-12)
    np.testing.assert_allclose(network.s[:, 0, 0], dense["s11"], rtol=1e-12, atol=1e-15)
