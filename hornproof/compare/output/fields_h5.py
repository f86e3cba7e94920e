"""Raw results of a full-wave run on disk: ``fields.h5`` (HDF5) and ``result.json``.

``fields.h5`` (schema ``hornproof.fields/1``), every dataset with a ``units`` attribute::

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
                                              TE10 wave impedance; see sim/touchstone.py)
    /power/incident, /power/reflected, /power/radiated   [nf], units from the result

File attributes: ``schema``, ``solver`` ("meep"), ``solver_version``, ``cells_per_wavelength``,
``resolution`` (cells per metre), ``wall_thickness_modelled_m``, ``case_sha256``,
``case_name``, ``hornproof_version``, ``created`` (UTC, ISO 8601), ``dims``, ``model_name``.
(dB/deg are edge units: this file is read by people and plotting tools as well as by us.)

What a result object must offer
-------------------------------
``write_fields_h5`` takes any object (or dict) with the field names of
``analytic.model_result.ModelResult`` — read with ``getattr`` (or ``dict.get``) and defaults:

* required: ``frequencies`` (Hz, [nf]);
* optional: ``name``, ``dims``, ``theta_deg``, ``h_plane_dbi``, ``e_plane_dbi``,
  ``h_plane_cross_dbi``, ``e_plane_cross_dbi``, ``full_pattern`` (object or dict with
  ``theta_deg``, ``phi_deg``, ``directivity_dbi``), ``extra`` (dict of [nf] arrays);
* S11 from ``extra["s11_real"]`` and ``extra["s11_imag"]`` (or ``extra["s11"]`` complex, or an
  attribute ``s11``);
* power from ``extra`` keys ``incident_power``, ``reflected_power``, ``radiated_power``
  (aliases ``power_incident``… accepted), unit string ``power_units`` (attribute or extra);
* metadata attributes (or entries of the dicts ``extra``, ``run`` — as in ``sim.run.SimResult``
  — or ``metadata``): ``solver_version`` (alias ``meep_version``), ``cells_per_wavelength``,
  ``resolution`` (cells per metre; alias ``resolution_cells_per_m``),
  ``wall_thickness_modelled`` (m; alias ``wall_thickness_modelled_m``).
"""

import datetime
import json
import math
import os

import numpy as np

from ...atomic import atomic_path, write_text_atomic
from ...errors import InputError

__all__ = [
    "FIELDS_SCHEMA",
    "RESULT_SCHEMA",
    "write_fields_h5",
    "read_fields_h5",
    "write_result_json",
    "read_result_json",
    "json_ready",
    "s11_of",
    "write_result_s1p",
]

FIELDS_SCHEMA = "hornproof.fields/1"
RESULT_SCHEMA = "hornproof.result/1"

_POWER_KEYS = {
    "incident": ("incident_power", "power_incident", "incident"),
    "reflected": ("reflected_power", "power_reflected", "reflected"),
    "radiated": ("radiated_power", "power_radiated", "radiated"),
}


# --- reading attributes of a result-like object ---------------------------------------------
def _get(result, name, default=None):
    if isinstance(result, dict):
        return result.get(name, default)
    return getattr(result, name, default)


def _extra(result):
    extra = _get(result, "extra")
    return extra if isinstance(extra, dict) else {}


def _metadata(result, *names, default=None):
    """First of ``names`` found as an attribute, in ``extra`` or in ``metadata``."""
    sources = [result, _extra(result), _get(result, "run") or {}, _get(result, "metadata") or {}]
    for name in names:
        for source in sources:
            value = _get(source, name)
            if value is not None:
                return value
    return default


def s11_of(result):
    """The complex TE10 reflection coefficient [nf] of a result-like object, or None."""
    extra = _extra(result)
    if extra.get("s11_real") is not None and extra.get("s11_imag") is not None:
        return np.asarray(extra["s11_real"], float) + 1j * np.asarray(extra["s11_imag"], float)
    for value in (extra.get("s11"), _get(result, "s11")):
        if value is not None:
            return np.asarray(value, dtype=complex)
    return None


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


# --- fields.h5 ------------------------------------------------------------------------------
def write_fields_h5(path, sim_result_like, *, case_sha256, case_name):
    """Write the raw full-wave result to an HDF5 file atomically (schema ``hornproof.fields/1``).

    Parameters
    ----------
    path : str or os.PathLike
        Target file (``fields.h5``); its folder must exist.
    sim_result_like : object or dict
        See the module notes for the attributes read.
    case_sha256 : str
        Hash of the case definition (from ``compare.casefile``).
    case_name : str
    """
    import h5py

    from ... import __version__ as hornproof_version

    result = sim_result_like
    frequencies = _array(_get(result, "frequencies"), "frequencies")
    if frequencies.ndim != 1 or frequencies.size == 0:
        raise ValueError("frequencies: expected a non-empty 1-D array (Hz)")
    nf = frequencies.size

    def dataset(group, name, data, units, description=None):
        ds = group.create_dataset(name, data=data)
        ds.attrs["units"] = units
        if description:
            ds.attrs["description"] = description
        return ds

    with atomic_path(path) as temporary:
        with h5py.File(temporary, "w") as handle:
            handle.attrs["schema"] = FIELDS_SCHEMA
            handle.attrs["solver"] = "meep"
            handle.attrs["solver_version"] = str(_metadata(result, "solver_version",
                                                           "meep_version", default="unknown"))
            handle.attrs["cells_per_wavelength"] = _attr_value(
                _metadata(result, "cells_per_wavelength"))
            handle.attrs["resolution"] = _attr_value(
                _metadata(result, "resolution", "resolution_cells_per_m"))
            handle.attrs["resolution_units"] = "cells per metre"
            handle.attrs["wall_thickness_modelled_m"] = _attr_value(
                _metadata(result, "wall_thickness_modelled", "wall_thickness_modelled_m"))
            handle.attrs["case_sha256"] = str(case_sha256)
            handle.attrs["case_name"] = str(case_name)
            handle.attrs["hornproof_version"] = hornproof_version
            handle.attrs["created"] = _utc_now()
            handle.attrs["model_name"] = str(_get(result, "name", "fdtd"))
            handle.attrs["dims"] = int(_get(result, "dims", 3) or 3)

            dataset(handle, "frequencies", frequencies, "Hz")

            theta = _get(result, "theta_deg")
            patterns = handle.create_group("patterns")
            if theta is not None:
                theta = _array(theta, "theta_deg")
                dataset(patterns, "theta_deg", theta, "deg", "cut angle from boresight")
                for name, text in (("h_plane_dbi", "co-polar directivity, H-plane (xz)"),
                                   ("e_plane_dbi", "co-polar directivity, E-plane (yz)"),
                                   ("h_plane_cross_dbi", "cross-polar directivity, H-plane"),
                                   ("e_plane_cross_dbi", "cross-polar directivity, E-plane")):
                    value = _get(result, name)
                    if value is None:
                        value = _extra(result).get(name)
                    if value is not None:
                        dataset(patterns, name, _array(value, name, (nf, theta.size)),
                                "dBi", text)

            full = _get(result, "full_pattern")
            if full is not None:
                group = handle.create_group("full_pattern")
                full_theta = _array(_get(full, "theta_deg"), "full_pattern.theta_deg")
                full_phi = _array(_get(full, "phi_deg"), "full_pattern.phi_deg")
                dataset(group, "theta_deg", full_theta, "deg", "polar angle from boresight")
                dataset(group, "phi_deg", full_phi, "deg", "azimuth from the H-plane (x)")
                shape = (nf, full_theta.size, full_phi.size)
                dataset(group, "directivity_dbi",
                        _array(_get(full, "directivity_dbi"), "full_pattern.directivity_dbi",
                               shape), "dBi", "directivity, all polarisations")
                co_polar = _get(full, "co_polar_dbi")
                if co_polar is not None:
                    dataset(group, "co_polar_dbi",
                            _array(co_polar, "full_pattern.co_polar_dbi", shape), "dBi",
                            "co-polar directivity (Ludwig 3, E along y)")

            s11 = s11_of(result)
            if s11 is not None:
                if s11.shape != (nf,):
                    raise ValueError(f"s11: shape {s11.shape}, expected ({nf},)")
                group = handle.create_group("s11")
                group.attrs["description"] = (
                    "TE10 mode reflection coefficient, normalised to the guide's TE10 wave "
                    "impedance")
                dataset(group, "real", s11.real, "1")
                dataset(group, "imag", s11.imag, "1")

            extra = _extra(result)
            power_units = str(_metadata(result, "power_units",
                                        default="solver units (only ratios are meaningful)"))
            power = None
            for key, aliases in _POWER_KEYS.items():
                value = next((extra[a] for a in aliases if extra.get(a) is not None), None)
                if value is None:
                    continue
                if power is None:
                    power = handle.create_group("power")
                dataset(power, key, _array(value, f"power.{key}", (nf,)), power_units)
            # flush is implied by close; atomic_path fsyncs and renames afterwards


def _refuse_schema(path, found, expected):
    family = expected.split("/")[0]
    if isinstance(found, bytes):
        found = found.decode("utf-8", "replace")
    if not found:
        raise InputError(f"{path}: no schema attribute; not a hornproof file "
                         f"(expected {expected})")
    if not str(found).startswith(family + "/"):
        raise InputError(f"{path}: schema {found!r} is not {family}; not a file of this kind")
    raise InputError(f"{path}: schema {found!r} is not supported (this hornproof reads "
                     f"{expected}); re-run the case with this version, or upgrade hornproof")


def read_fields_h5(path):
    """Read a ``fields.h5`` written by :func:`write_fields_h5`.

    Returns
    -------
    dict
        ``attributes`` (dict), ``frequencies`` (Hz), ``patterns`` (dict of arrays incl.
        ``theta_deg``), ``full_pattern`` (dict or None), ``s11`` (complex array or None),
        ``power`` (dict of arrays, possibly empty), ``units`` (dataset path -> unit string).

    Raises
    ------
    InputError
        Missing file, not HDF5, or a schema this version does not read (with a hint).
    """
    import h5py

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
            _refuse_schema(path, schema, FIELDS_SCHEMA)
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
    return {"attributes": attributes, "frequencies": frequencies, "patterns": patterns,
            "full_pattern": full_pattern, "s11": s11, "power": power, "units": units}


def write_result_s1p(path, sim_result_like, *, case_name, version=1):
    """Write the result's S11 (TE10 reflection) as a one-port Touchstone file, atomically.

    Raises ``ValueError`` if the result carries no S11.
    """
    from .touchstone import write_s1p

    s11 = s11_of(sim_result_like)
    if s11 is None:
        raise ValueError("sim_result_like: no S11 (extra['s11_real'/'s11_imag'] or s11)")
    meep_version = _metadata(sim_result_like, "solver_version", "meep_version", default="unknown")
    solver = f"meep {meep_version}"
    return write_s1p(path, _array(_get(sim_result_like, "frequencies"), "frequencies"), s11,
                     case_name=case_name, solver_version=solver, version=version)


# --- result.json ----------------------------------------------------------------------------
def json_ready(value):
    """Plain-JSON copy of ``value``: numpy arrays/scalars to lists/numbers, NaN and ±inf to
    None (JSON has no NaN; a strict parser refuses it), tuples to lists, keys to str."""
    if isinstance(value, dict):
        return {str(k): json_ready(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [json_ready(v) for v in value]
    if isinstance(value, np.ndarray):
        return json_ready(value.tolist())
    if isinstance(value, np.generic):
        return json_ready(value.item())
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, complex):
        raise ValueError("complex value in the summary: store real and imaginary parts")
    return value


def write_result_json(path, summary_dict):
    """Write the summary ``result.json`` atomically with ``"schema": "hornproof.result/1"``.

    NaN and infinities become ``null``. A summary carrying a different schema is refused
    (``ValueError``): it was built for another format version.
    """
    if not isinstance(summary_dict, dict):
        raise ValueError("summary_dict: expected a dict")
    found = summary_dict.get("schema", RESULT_SCHEMA)
    if found != RESULT_SCHEMA:
        raise ValueError(f"summary_dict: schema {found!r}, this writer writes {RESULT_SCHEMA}")
    summary = {"schema": RESULT_SCHEMA}
    summary.update(json_ready(summary_dict))
    text = json.dumps(summary, indent=2, allow_nan=False, ensure_ascii=False) + "\n"
    write_text_atomic(path, text)
    return summary


def read_result_json(path):
    """Read a ``result.json``; refuse unknown schema versions with a hint (``InputError``)."""
    path = os.fspath(path)
    try:
        with open(path, encoding="utf-8") as handle:
            summary = json.load(handle)
    except FileNotFoundError:
        raise InputError(f"{path}: no such file") from None
    except json.JSONDecodeError as error:
        raise InputError(f"{path}: not valid JSON (line {error.lineno}: {error.msg})") from None
    if not isinstance(summary, dict) or summary.get("schema") != RESULT_SCHEMA:
        found = summary.get("schema") if isinstance(summary, dict) else None
        _refuse_schema(path, found, RESULT_SCHEMA)
    return summary
