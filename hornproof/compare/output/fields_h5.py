"""``fields.h5``: the raw result of a full-wave run on disk (HDF5, schema ``hornproof.fields/1``).

Every dataset has a ``units`` attribute::

    /frequencies                     Hz, [nf]
    /patterns/theta_deg              deg, [nθ]   (cut angle from boresight, −180…180)
    /patterns/h_plane_dbi            dBi, [nf, nθ] co-polar directivity, H-plane (xz)
    /patterns/e_plane_dbi            dBi, [nf, nθ] co-polar directivity, E-plane (yz)
    /patterns/h_plane_cross_dbi      dBi, optional cross-polar cut
    /patterns/e_plane_cross_dbi      dBi, optional
    /full_pattern/theta_deg          deg, [nθ]   optional (θ, φ) grid
    /full_pattern/phi_deg            deg, [nφ]
    /full_pattern/directivity_dbi    dBi, [nf, nθ, nφ]
    /full_pattern/co_polar_dbi       dBi, [nf, nθ, nφ] optional
    /s11/real, /s11/imag             1, [nf]  TE10 mode reflection (normalised to the guide's
                                              TE10 wave impedance; see output/touchstone.py)
    /power/incident, /power/reflected, /power/radiated   [nf], units from the result

Named axes (netCDF-4 / CF readers such as xarray with h5netcdf see them): ``/frequencies``,
``/patterns/theta_deg``, ``/full_pattern/theta_deg`` and ``phi_deg``, ``/feed/…`` and
``/dense_band/frequencies`` are HDF5 dimension scales, attached to every axis of the datasets
that use them; every dataset carries CF-style ``units`` and ``long_name`` attributes.
Optional groups added by the feed figures::

    /feed/theta_deg                  deg, [nθ]   the FDTD cut grid
    /feed/d45_co_dbi, d45_cross_dbi  dBi, [nf, nθ] Ludwig-3 co/cross-polar, 45° cut
    /feed/{h,e}_co_phase_deg         deg, [nf, nθ] co-polar far-field phase about the aperture
                                     centre (e^{+jωt}), principal planes
    /dense_band/frequencies          Hz, [n]     dense S11 band (sim.feed.DENSE_BAND_POINTS)
    /dense_band/s11_real, s11_imag   1, [n]
    /dense_band/band_check_abs       1, [nf] the axis read-out against the full TE10 projection

File attributes: ``schema``, ``solver`` ("meep"), ``solver_version``, ``cells_per_wavelength``,
``resolution`` (cells per metre), ``wall_thickness_modelled_m``, ``case_sha256``,
``case_name``, ``hornproof_version`` (``hornproof.version.build_version()``), ``created`` (UTC, ISO 8601), ``dims``, ``model_name``.
(dB/deg are edge units: this file is read by people and plotting tools as well as by us.)

What the writer reads
---------------------
``write_fields_h5`` takes the ``sim.result.SimResult`` of a run (a ``ModelResult`` with a
``run`` metadata dict and an optional ``full_pattern`` dict):

* ``name``, ``dims``, ``frequencies`` (Hz, [nf]), ``theta_deg``, ``h_plane_dbi``, ``e_plane_dbi``;
* from ``extra``: ``h_plane_cross_dbi``, ``e_plane_cross_dbi`` (optional), ``s11_real`` and
  ``s11_imag`` (optional, together), ``incident_power``, ``reflected_power``,
  ``radiated_power`` (each optional);
* from ``run``: ``meep_version``, ``cells_per_wavelength``, ``resolution_cells_per_m``,
  ``wall_thickness_modelled_m``, ``power_units`` (each optional; "unknown" when missing);
* ``full_pattern``: None or a dict with ``theta_deg``, ``phi_deg``, ``directivity_dbi`` and
  optionally ``co_polar_dbi``.
"""

import datetime
import os

import numpy as np

from ...version import build_version
from ...atomic import atomic_path
from ...errors import InputError
from ...units import SPEED_OF_LIGHT
from .schema_check import refuse_schema

FIELDS_SCHEMA = "hornproof.fields/1"

#: group ``/power`` dataset -> key of ``SimResult.extra``
POWER_KEYS = {"incident": "incident_power", "reflected": "reflected_power", "radiated": "radiated_power"}
#: cuts written under ``/patterns``: (name, description)
PATTERN_CUTS = (("h_plane_dbi", "co-polar directivity, H-plane (xz)"),
                ("e_plane_dbi", "co-polar directivity, E-plane (yz)"),
                ("h_plane_cross_dbi", "cross-polar directivity, H-plane"),
                ("e_plane_cross_dbi", "cross-polar directivity, E-plane"))
DEFAULT_POWER_UNITS = "solver units (only ratios are meaningful)"


def _array(value, name, shape=None):
    array = np.asarray(value, dtype=float)
    if shape is not None and array.shape != shape:
        raise ValueError(f"{name}: shape {array.shape}, expected {shape}")
    return array


def _utc_now():
    return datetime.datetime.now(datetime.timezone.utc).isoformat(timespec="seconds")


def _attr_value(value):
    """An HDF5-storable attribute value (h5py refuses None)."""
    if value is None:
        return "unknown"
    if isinstance(value, (list, tuple)):
        return np.asarray(value, dtype=float)
    return value


def _dataset(group, name, data, units, description=None, scales=()):
    """A dataset with CF-style ``units`` and ``long_name`` (the description, or its name) and
    ``scales`` (HDF5 dimension-scale datasets) attached to its axes in order."""
    dataset = group.create_dataset(name, data=data)
    dataset.attrs["units"] = units
    dataset.attrs["long_name"] = description or name.replace("_", " ")
    if description:
        dataset.attrs["description"] = description
    for axis, scale in enumerate(scales):
        if scale is not None:
            dataset.dims[axis].attach_scale(scale)
    return dataset


def _scale(group, name, data, units, description, dimension):
    """A 1-D coordinate dataset made an HDF5 dimension scale named ``dimension``."""
    dataset = _dataset(group, name, data, units, description)
    dataset.make_scale(dimension)
    return dataset


def _write_attributes(handle, result, case_sha256, case_name):
    run = result.run
    handle.attrs["schema"] = FIELDS_SCHEMA
    handle.attrs["solver"] = "meep"
    handle.attrs["solver_version"] = str(_attr_value(run.get("meep_version")))
    handle.attrs["cells_per_wavelength"] = _attr_value(run.get("cells_per_wavelength"))
    handle.attrs["resolution"] = _attr_value(run.get("resolution_cells_per_m"))
    handle.attrs["resolution_units"] = "cells per metre"
    handle.attrs["wall_thickness_modelled_m"] = _attr_value(run.get("wall_thickness_modelled_m"))
    handle.attrs["case_sha256"] = str(case_sha256)
    handle.attrs["case_name"] = str(case_name)
    handle.attrs["hornproof_version"] = build_version()
    handle.attrs["created"] = _utc_now()
    handle.attrs["model_name"] = str(result.name)
    handle.attrs["dims"] = int(result.dims)


def _write_patterns(handle, result, nf):
    patterns = handle.create_group("patterns")
    theta = _array(result.theta_deg, "theta_deg")
    theta_scale = _scale(patterns, "theta_deg", theta, "deg", "cut angle from boresight", "theta")
    cuts = {"h_plane_dbi": result.h_plane_dbi, "e_plane_dbi": result.e_plane_dbi,
            "h_plane_cross_dbi": result.extra.get("h_plane_cross_dbi"),
            "e_plane_cross_dbi": result.extra.get("e_plane_cross_dbi")}
    for name, text in PATTERN_CUTS:
        if cuts[name] is not None:
            _dataset(patterns, name, _array(cuts[name], name, (nf, theta.size)), "dBi", text,
                     (handle["frequencies"], theta_scale))


def _write_full_pattern(handle, full, nf):
    group = handle.create_group("full_pattern")
    theta = _array(full["theta_deg"], "full_pattern.theta_deg")
    phi = _array(full["phi_deg"], "full_pattern.phi_deg")
    scales = (handle["frequencies"],
              _scale(group, "theta_deg", theta, "deg", "polar angle from boresight", "sphere_theta"),
              _scale(group, "phi_deg", phi, "deg", "azimuth from the H-plane (x)", "sphere_phi"))
    shape = (nf, theta.size, phi.size)
    _dataset(group, "directivity_dbi", _array(full["directivity_dbi"], "full_pattern.directivity_dbi", shape),
             "dBi", "directivity, all polarisations", scales)
    if full.get("co_polar_dbi") is not None:
        _dataset(group, "co_polar_dbi", _array(full["co_polar_dbi"], "full_pattern.co_polar_dbi", shape),
                 "dBi", "co-polar directivity (Ludwig 3, E along y)", scales)


def _write_s11(handle, extra, nf):
    s11 = np.asarray(extra["s11_real"], float) + 1j * np.asarray(extra["s11_imag"], float)
    if s11.shape != (nf,):
        raise ValueError(f"s11: shape {s11.shape}, expected ({nf},)")
    group = handle.create_group("s11")
    group.attrs["description"] = "TE10 mode reflection coefficient, normalised to the guide's TE10 wave impedance"
    _dataset(group, "real", s11.real, "1", "real part of S11", (handle["frequencies"],))
    _dataset(group, "imag", s11.imag, "1", "imaginary part of S11", (handle["frequencies"],))


def _write_power(handle, result, nf):
    units = result.run.get("power_units")
    units = DEFAULT_POWER_UNITS if units is None else str(units)
    present = {name: result.extra[key] for name, key in POWER_KEYS.items() if result.extra.get(key) is not None}
    if present:
        group = handle.create_group("power")
        for name, value in present.items():
            _dataset(group, name, _array(value, f"power.{name}", (nf,)), units, f"{name} power",
                     (handle["frequencies"],))


def _db(values):
    with np.errstate(divide="ignore"):
        return 20 * np.log10(np.abs(values))


def _write_feed(handle, feed, nf, flare_length_m):
    """``/feed``: the 45° cut (co/cross, dBi) and the principal planes' co-polar phase about the
    aperture centre (degrees, e^{+jωt}) of the FDTD feed field."""
    group = handle.create_group("feed")
    theta = _array(feed["theta_deg"], "feed.theta_deg")
    scales = (handle["frequencies"], _scale(group, "theta_deg", theta, "deg", "cut angle from boresight",
                                            "feed_theta"))
    shape = (nf, theta.size)
    co, cross = feed["cuts"]["d45"]
    _dataset(group, "d45_co_dbi", _array(_db(co), "feed.d45_co_dbi", shape), "dBi",
             "co-polar directivity, 45 degree cut (Ludwig 3, E along y)", scales)
    _dataset(group, "d45_cross_dbi", _array(_db(cross), "feed.d45_cross_dbi", shape), "dBi",
             "cross-polar directivity, 45 degree cut (Ludwig 3, E along y)", scales)
    shift = flare_length_m - float(feed["phase_reference_z_m"])  # reference -> aperture centre
    k = 2 * np.pi * np.asarray(handle["frequencies"][()], dtype=float) / SPEED_OF_LIGHT
    move = np.exp(-1j * k[:, None] * shift * np.cos(np.radians(theta))[None, :])
    for plane in ("h", "e"):
        phase = np.degrees(np.angle(np.asarray(feed["cuts"][plane][0]) * move))
        _dataset(group, f"{plane}_co_phase_deg", _array(phase, f"feed.{plane}_co_phase_deg", shape), "deg",
                 f"co-polar far-field phase about the aperture centre, {plane.upper()}-plane (exp(+j omega t))",
                 scales)
    group.attrs["phase_reference"] = "centre of the aperture plane"


def _write_dense_band(handle, dense):
    group = handle.create_group("dense_band")
    f = _array(dense["frequencies_hz"], "dense_band.frequencies")
    scale = _scale(group, "frequencies", f, "Hz", "frequency of the dense S11 band", "dense_frequency")
    s11 = np.asarray(dense["s11"], dtype=complex)
    _dataset(group, "s11_real", s11.real, "1", "real part of S11 (dense band)", (scale,))
    _dataset(group, "s11_imag", s11.imag, "1", "imaginary part of S11 (dense band)", (scale,))
    if dense.get("band_check_abs") is not None:
        _dataset(group, "band_check_abs", _array(dense["band_check_abs"], "dense_band.band_check_abs"), "1",
                 "|S11 on the guide axis - S11 of the full TE10 projection| at the band frequencies",
                 (handle["frequencies"],))


def write_fields_h5(path, result, *, case_sha256, case_name, flare_length_m=None):
    """Write the raw full-wave result to an HDF5 file atomically (schema ``hornproof.fields/1``).

    Parameters
    ----------
    path : str or os.PathLike
        Target file (``fields.h5``); its folder must exist.
    result : sim.result.SimResult
        See the module notes for what is read.
    case_sha256 : str
        Hash of the case definition (from the case file).
    case_name : str
    flare_length_m : float, optional
        The horn's flare length (the aperture plane), for the ``/feed`` phase reference;
        without it no ``/feed`` group is written.
    """
    import h5py  # lazy: h5py is slow to import and only this writer and its reader need it

    frequencies = _array(result.frequencies, "frequencies")
    if frequencies.ndim != 1 or frequencies.size == 0:
        raise ValueError("frequencies: expected a non-empty 1-D array (Hz)")
    nf = frequencies.size
    extra = result.extra
    with atomic_path(path) as temporary:
        with h5py.File(temporary, "w") as handle:
            _write_attributes(handle, result, case_sha256, case_name)
            _scale(handle, "frequencies", frequencies, "Hz", "band frequency", "frequency")
            _write_patterns(handle, result, nf)
            if result.full_pattern is not None:
                _write_full_pattern(handle, result.full_pattern, nf)
            if extra.get("s11_real") is not None and extra.get("s11_imag") is not None:
                _write_s11(handle, extra, nf)
            _write_power(handle, result, nf)
            if getattr(result, "feed_pattern", None) is not None and flare_length_m is not None:
                _write_feed(handle, result.feed_pattern, nf, float(flare_length_m))
            if getattr(result, "dense_band", None) is not None:
                _write_dense_band(handle, result.dense_band)
            # flush is implied by close; atomic_path fsyncs and renames afterwards


def read_fields_h5(path):
    """Read a ``fields.h5`` written by :func:`write_fields_h5`.

    Returns
    -------
    dict
        ``attributes`` (dict), ``frequencies`` (Hz), ``patterns`` (dict of arrays incl.
        ``theta_deg``), ``full_pattern`` (dict or None), ``s11`` (complex array or None),
        ``power`` (dict of arrays, possibly empty), ``units`` (dataset path -> unit string),
        ``feed`` and ``dense_band`` (dicts of arrays, or None).

    Raises
    ------
    InputError
        Missing file, not HDF5, or a schema this version does not read (with a hint).
    """
    import h5py  # lazy: see write_fields_h5

    path = os.fspath(path)
    try:
        handle = h5py.File(path, "r")
    except FileNotFoundError:
        raise InputError(f"{path}: no such file") from None
    except OSError as error:
        raise InputError(f"{path}: not a readable HDF5 file ({error})") from None
    with handle:
        schema = handle.attrs.get("schema")
        if isinstance(schema, bytes):
            schema = schema.decode()
        if schema != FIELDS_SCHEMA:
            refuse_schema(path, schema, FIELDS_SCHEMA)
        attributes = {}
        for key, value in handle.attrs.items():
            if isinstance(value, bytes):
                value = value.decode()
            elif isinstance(value, np.ndarray):
                value = value.tolist()
            elif isinstance(value, np.generic):
                value = value.item()
            attributes[key] = value
        units = {}

        def read_group(name):
            out = {}
            if name in handle:
                for key, ds in handle[name].items():
                    out[key] = ds[()]
                    units[f"/{name}/{key}"] = ds.attrs.get("units")
            return out

        frequencies = handle["frequencies"][()]
        units["/frequencies"] = handle["frequencies"].attrs.get("units")
        patterns = read_group("patterns")
        full_pattern = read_group("full_pattern") or None
        s11_group = read_group("s11")
        s11 = s11_group["real"] + 1j * s11_group["imag"] if s11_group else None
        power = read_group("power")
        feed = read_group("feed") or None
        dense = read_group("dense_band") or None
    return {"attributes": attributes, "frequencies": frequencies, "patterns": patterns,
            "full_pattern": full_pattern, "s11": s11, "power": power, "units": units,
            "feed": feed, "dense_band": dense}
