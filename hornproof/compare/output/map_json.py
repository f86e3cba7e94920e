"""``map.json``: the document of a two-parameter map (schema ``hornproof.map/1``).

Keys (all values in the units their names or the axis records say; NaN written as null):
``case``, ``title``, ``case_sha256``, ``model`` (3D, or the 2D principal-plane first look),
``dims``, ``frequency_ghz``, ``figure``, ``tolerance`` (dB); ``x`` and ``y`` (``name``,
``label``, ``unit``, FDTD ``values``, dense ``analytic`` axis); ``analytic`` (dense grids
[ny][nx]: ``closed_form``, ``exact_phase``, ``phase_approximation_error``, ``phase_error_h_wl``,
``phase_error_e_wl``); ``points`` (one record per FDTD pair: both models, ``fdtd``,
``uncertainty``, the three errors, ``status``, ``reason``, seconds); ``breakdown`` (per error
kind, per y value: an interval ``earliest``/``latest`` along x, or ``at`` for the analytic
phase-approximation error; a number, ``"below range"`` or null = never within the map);
``estimate``; ``failed_points``; ``solver``; ``warnings``; ``safety``; ``hornproof_version``.
"""

from ...atomic import write_text_atomic
from .json_document import dumps, read_json_document, stamped

MAP_SCHEMA = "hornproof.map/1"


def write_map_json(path, document):
    """Write ``map.json`` atomically with ``"schema": "hornproof.map/1"``; returns the document."""
    document = stamped(document, MAP_SCHEMA)
    write_text_atomic(path, dumps(document))
    return document


def read_map_json(path):
    """Read a ``map.json``; refuse other schemas with a one-line ``InputError`` and a hint."""
    return read_json_document(path, MAP_SCHEMA)
