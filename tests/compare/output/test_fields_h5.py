"""fields.h5 and result.json: checked against the HDF5 file format (signature), h5py as the
reference reader, RFC 8259 (JSON has no NaN), ISO 8601 time stamps and atomic replacement."""

import datetime
import json
import os

import numpy as np
import pytest

h5py = pytest.importorskip("h5py")

from hornproof.atomic import atomic_path, write_text_atomic  # noqa: E402
from hornproof.errors import InputError  # noqa: E402
from hornproof.compare.output.fields_h5 import FIELDS_SCHEMA, read_fields_h5, write_fields_h5  # noqa: E402
from hornproof.compare.output.result_json import RESULT_SCHEMA, read_result_json, write_result_json  # noqa: E402
from hornproof.sim.result import SimResult  # noqa: E402

# HDF5 File Format Specification, "Format Signature" of the superblock: these 8 bytes.
HDF5_SIGNATURE = b"\x89HDF\r\n\x1a\n"


def _result(nf=3, ntheta=7, with_full=True):
    """A ``sim.result.SimResult`` as a run returns it (the writer's one input); the numbers are
    arbitrary test data."""
    theta = np.linspace(-90.0, 90.0, ntheta)
    rng = np.random.default_rng(1)
    full = None
    if with_full:
        full = {"theta_deg": np.linspace(0, 180, 5), "phi_deg": np.linspace(0, 360, 9),
                "directivity_dbi": rng.normal(size=(nf, 5, 9))}
    nan = np.full(nf, np.nan)
    return SimResult(
        name="fdtd", dims=3, frequencies=np.linspace(9e9, 11e9, nf), theta_deg=theta,
        h_plane_dbi=rng.normal(size=(nf, ntheta)), e_plane_dbi=rng.normal(size=(nf, ntheta)),
        directivity_dbi=nan, hpbw_h_deg=nan, hpbw_e_deg=nan, first_null_h_deg=nan,
        first_null_e_deg=nan, sll_h_db=nan, sll_e_db=nan,
        extra={"h_plane_cross_dbi": rng.normal(size=(nf, ntheta)) - 30,
               "s11_real": rng.normal(size=nf) * 0.1, "s11_imag": rng.normal(size=nf) * 0.1,
               "incident_power": np.full(nf, 2.0), "reflected_power": np.full(nf, 0.02),
               "radiated_power": np.full(nf, 1.98)},
        run={"meep_version": "1.25.0", "cells_per_wavelength": 16.0, "resolution_cells_per_m": 533.3,
             "wall_thickness_modelled_m": 3.75e-3},
        full_pattern=full,
    )


def test_fields_file_is_hdf5_with_units_everywhere(tmp_path):
    result = _result()
    path = tmp_path / "fields.h5"
    write_fields_h5(path, result, case_sha256="ab" * 32, case_name="demo")
    assert path.read_bytes()[:8] == HDF5_SIGNATURE  # superblock at offset 0 (no user block)
    with h5py.File(path, "r") as handle:  # h5py as the reference reader
        for key in ("schema", "solver", "solver_version", "cells_per_wavelength", "resolution",
                    "wall_thickness_modelled_m", "case_sha256", "case_name",
                    "hornproof_version", "created"):
            assert key in handle.attrs, key
        assert handle.attrs["schema"] == FIELDS_SCHEMA
        assert handle.attrs["solver"] == "meep"
        assert handle.attrs["wall_thickness_modelled_m"] == pytest.approx(3.75e-3)
        created = datetime.datetime.fromisoformat(handle.attrs["created"])  # ISO 8601
        assert created.utcoffset() == datetime.timedelta(0)
        assert abs(datetime.datetime.now(datetime.timezone.utc) - created).total_seconds() < 60
        datasets = []
        handle.visititems(lambda name, obj: datasets.append(name)
                          if isinstance(obj, h5py.Dataset) else None)
        assert set(datasets) >= {"frequencies", "patterns/theta_deg", "patterns/h_plane_dbi",
                                 "patterns/e_plane_dbi", "patterns/h_plane_cross_dbi",
                                 "full_pattern/theta_deg", "full_pattern/phi_deg",
                                 "full_pattern/directivity_dbi", "s11/real", "s11/imag",
                                 "power/incident", "power/reflected", "power/radiated"}
        for name in datasets:
            assert "units" in handle[name].attrs, name
        assert handle["frequencies"].attrs["units"] == "Hz"
        assert handle["patterns/h_plane_dbi"].attrs["units"] == "dBi"
        assert handle["patterns/theta_deg"].attrs["units"] == "deg"
        np.testing.assert_array_equal(handle["patterns/e_plane_dbi"][()], result.e_plane_dbi)


def test_fields_round_trip(tmp_path):
    result = _result()
    path = tmp_path / "fields.h5"
    write_fields_h5(path, result, case_sha256="00" * 32, case_name="demo")
    back = read_fields_h5(path)
    np.testing.assert_array_equal(back["frequencies"], result.frequencies)
    np.testing.assert_array_equal(back["patterns"]["h_plane_dbi"], result.h_plane_dbi)
    np.testing.assert_array_equal(back["full_pattern"]["directivity_dbi"],
                                  result.full_pattern["directivity_dbi"])
    np.testing.assert_array_equal(back["s11"], result.extra["s11_real"]
                                  + 1j * result.extra["s11_imag"])
    np.testing.assert_array_equal(back["power"]["radiated"], result.extra["radiated_power"])
    assert back["attributes"]["case_name"] == "demo"
    assert back["units"]["/full_pattern/phi_deg"] == "deg"


def test_fields_with_optional_parts_missing(tmp_path):
    # a 2D H-plane model: no S11, full pattern, powers or metadata; its E-plane cut is NaN
    nan = np.full(1, np.nan)
    result = SimResult(name="fdtd", dims=2, frequencies=[10e9], theta_deg=[0.0, 1.0],
                       h_plane_dbi=[[1.0, 2.0]], e_plane_dbi=[[np.nan, np.nan]], directivity_dbi=nan,
                       hpbw_h_deg=nan, hpbw_e_deg=nan, first_null_h_deg=nan, first_null_e_deg=nan,
                       sll_h_db=nan, sll_e_db=nan)
    path = tmp_path / "fields.h5"
    write_fields_h5(path, result, case_sha256="1" * 64, case_name="bare")
    back = read_fields_h5(path)
    assert back["s11"] is None and back["full_pattern"] is None and back["power"] == {}
    assert "h_plane_cross_dbi" not in back["patterns"]
    assert np.all(np.isnan(back["patterns"]["e_plane_dbi"]))
    assert back["attributes"]["solver_version"] == "unknown"
    assert back["attributes"]["dims"] == 2


def test_bad_shape_leaves_the_old_file_and_no_temporary(tmp_path):
    path = tmp_path / "fields.h5"
    write_fields_h5(path, _result(), case_sha256="a" * 64, case_name="first")
    before = path.read_bytes()
    broken = _result()
    broken.e_plane_dbi = broken.e_plane_dbi[:, :3]
    with pytest.raises(ValueError, match="e_plane_dbi"):
        write_fields_h5(path, broken, case_sha256="b" * 64, case_name="second")
    assert path.read_bytes() == before
    assert os.listdir(tmp_path) == ["fields.h5"]


def test_fields_reader_refuses_an_unknown_schema(tmp_path):
    path = tmp_path / "fields.h5"
    with h5py.File(path, "w") as handle:
        handle.attrs["schema"] = "hornproof.fields/2"
    with pytest.raises(InputError, match="not supported.*upgrade"):
        read_fields_h5(path)
    with h5py.File(path, "w") as handle:
        handle.attrs["schema"] = "someone.else/1"
    with pytest.raises(InputError, match="not a file of this kind"):
        read_fields_h5(path)
    (tmp_path / "text.h5").write_text("not hdf5")
    with pytest.raises(InputError, match="not a readable HDF5"):
        read_fields_h5(tmp_path / "text.h5")


def _strict_json(text):
    """RFC 8259 has no NaN/Infinity literals; Python's json accepts them unless refused."""
    def refuse(constant):
        raise ValueError(f"non-standard JSON constant {constant}")
    return json.loads(text, parse_constant=refuse)


def test_result_json_is_strict_json_with_nulls_for_nan(tmp_path):
    path = tmp_path / "result.json"
    summary = {"case": "demo", "frequencies_ghz": np.array([9.0, 10.0]),
               "models": {"fdtd": {"directivity_dbi": [np.float64(12.5), float("nan")],
                                   "s11_db": np.array([-20.0, np.inf])}}}
    written = write_result_json(path, summary)
    data = _strict_json(path.read_text())
    assert data["schema"] == RESULT_SCHEMA
    assert data["models"]["fdtd"]["directivity_dbi"] == [12.5, None]
    assert data["models"]["fdtd"]["s11_db"] == [-20.0, None]
    assert data == written == read_result_json(path)


def test_result_json_refuses_other_versions_with_a_hint(tmp_path):
    path = tmp_path / "result.json"
    path.write_text(json.dumps({"schema": "hornproof.result/7"}))
    with pytest.raises(InputError, match="hornproof.result/1.*upgrade"):
        read_result_json(path)
    path.write_text(json.dumps({"case": "no schema"}))
    with pytest.raises(InputError, match="no schema"):
        read_result_json(path)
    path.write_text("{broken")
    with pytest.raises(InputError, match="not valid JSON"):
        read_result_json(path)
    with pytest.raises(ValueError, match="schema"):
        write_result_json(tmp_path / "x.json", {"schema": "hornproof.result/2"})
    assert not (tmp_path / "x.json").exists()


def test_atomic_writer_keeps_old_content_on_failure(tmp_path):
    path = tmp_path / "notes.txt"
    write_text_atomic(path, "old\n")
    with pytest.raises(RuntimeError):
        with atomic_path(path) as temporary:
            with open(temporary, "w") as handle:
                handle.write("half")
            raise RuntimeError("interrupted")
    assert path.read_text() == "old\n"
    assert os.listdir(tmp_path) == ["notes.txt"]
    # a new file gets the umask's permissions, as open() would give it (POSIX), not 0600
    umask = os.umask(0)
    os.umask(umask)
    write_text_atomic(tmp_path / "new.txt", "x")
    assert (os.stat(tmp_path / "new.txt").st_mode & 0o777) == (0o666 & ~umask)


def test_fields_from_the_physics_side_result_class(tmp_path):
    # sim.result.SimResult keeps its metadata in a ``run`` dict (meep_version,
    # resolution_cells_per_m, wall_thickness_modelled_m, power_units): the writer must find it
    base = _result(nf=2, ntheta=5)
    nan = np.full(2, np.nan)
    result = SimResult(
        name="fdtd", dims=3, frequencies=base.frequencies, theta_deg=base.theta_deg,
        h_plane_dbi=base.h_plane_dbi, e_plane_dbi=base.e_plane_dbi, directivity_dbi=nan,
        hpbw_h_deg=nan, hpbw_e_deg=nan, first_null_h_deg=nan, first_null_e_deg=nan,
        sll_h_db=nan, sll_e_db=nan, extra=base.extra,
        run={"meep_version": "1.25.0", "resolution_cells_per_m": 640.0,
             "wall_thickness_modelled_m": 2.5e-3, "cells_per_wavelength": 12.0,
             "power_units": "Meep units (relative)"},
        full_pattern={"theta_deg": base.full_pattern["theta_deg"],
                      "phi_deg": base.full_pattern["phi_deg"],
                      "directivity_dbi": base.full_pattern["directivity_dbi"],
                      "co_polar_dbi": base.full_pattern["directivity_dbi"] - 0.1})
    path = tmp_path / "fields.h5"
    write_fields_h5(path, result, case_sha256="c" * 64, case_name="physics")
    back = read_fields_h5(path)
    assert back["attributes"]["solver_version"] == "1.25.0"
    assert back["attributes"]["resolution"] == 640.0
    assert back["attributes"]["wall_thickness_modelled_m"] == 2.5e-3
    assert back["units"]["/power/radiated"] == "Meep units (relative)"
    assert "co_polar_dbi" in back["full_pattern"]
