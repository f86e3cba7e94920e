"""ModelResult: one model's figures and principal-plane cuts over the band.

The common shape of every model's output (closed form, exact phase, FDTD), as in
DEVELOPERS.md ("Interfaces between the packages").
"""

from dataclasses import dataclass, field

import numpy as np

__all__ = ["ModelResult", "FIGURE_FIELDS"]

#: per-frequency fields, in the order they appear in ``figures()``
FIGURE_FIELDS = (
    "directivity_dbi", "hpbw_h_deg", "hpbw_e_deg", "first_null_h_deg", "first_null_e_deg",
    "sll_h_db", "sll_e_db",
)


def _json_ready(value):
    """Nested lists of floats with NaN/±inf -> None; dicts recursively."""
    if isinstance(value, dict):
        return {str(k): _json_ready(v) for k, v in value.items()}
    arr = np.asarray(value)
    if arr.dtype.kind in "fc":
        if arr.dtype.kind == "c":
            raise ValueError("complex arrays are not JSON-ready: store real and imaginary parts")
        obj = arr.astype(object)
        obj[~np.isfinite(arr)] = None
        return obj.tolist()
    return arr.tolist()


@dataclass
class ModelResult:
    """One model's results over frequency.

    Parameters
    ----------
    name : str
        ``"closed_form"``, ``"exact_phase"`` or ``"fdtd"``.
    dims : {2, 3}
        3: a horn radiating in 3D (directivity in dBi). 2: the 2D (line-source) counterpart of
        a sectoral horn's flared plane — directivity per unit length relative to an isotropic
        line source, in dB; only the flared plane's cut exists, the other cut is NaN.
    frequencies : array, shape [nf]
        Hz.
    theta_deg : array, shape [nθ]
        Cut angles, degrees from boresight (−180…180; negative = −x or −y side).
    h_plane_dbi, e_plane_dbi : array, shape [nf, nθ]
        Co-polar directivity cuts (dBi; dB of 2D directivity for dims = 2), H-plane (φ = 0) and
        E-plane (φ = 90°); NaN where the model has no such plane.
    directivity_dbi : array, shape [nf]
        Boresight directivity, dBi (2D directivity in dB for dims = 2).
    hpbw_h_deg, hpbw_e_deg, first_null_h_deg, first_null_e_deg, sll_h_db, sll_e_db : array, [nf]
        Beam metrics of the cuts (``pattern_metrics``).
    extra : dict of array [nf] (or nested dicts of them)
        Further per-frequency figures (e.g. FDTD ``gain_dbi``, ``s11_db``; analytic phase errors).
    attributes : dict
        Per-run scalars and strings (modelled wall thickness, resolution, solver version, run
        time, model options); not per frequency.
    """

    name: str
    dims: int
    frequencies: np.ndarray
    theta_deg: np.ndarray
    h_plane_dbi: np.ndarray
    e_plane_dbi: np.ndarray
    directivity_dbi: np.ndarray
    hpbw_h_deg: np.ndarray
    hpbw_e_deg: np.ndarray
    first_null_h_deg: np.ndarray
    first_null_e_deg: np.ndarray
    sll_h_db: np.ndarray
    sll_e_db: np.ndarray
    extra: dict = field(default_factory=dict)
    attributes: dict = field(default_factory=dict)

    def __post_init__(self):
        if self.dims not in (2, 3):
            raise ValueError(f"dims must be 2 or 3, got {self.dims!r}")
        self.frequencies = np.atleast_1d(np.asarray(self.frequencies, dtype=float))
        self.theta_deg = np.atleast_1d(np.asarray(self.theta_deg, dtype=float))
        nf, nt = self.frequencies.size, self.theta_deg.size
        if self.frequencies.ndim != 1:
            raise ValueError(f"frequencies must be one-dimensional, got shape {self.frequencies.shape}")
        for name in ("h_plane_dbi", "e_plane_dbi"):
            value = np.asarray(getattr(self, name), dtype=float)
            if value.shape != (nf, nt):
                raise ValueError(f"{name} must have shape (frequencies, theta) = {(nf, nt)}, got {value.shape}")
            setattr(self, name, value)
        for name in FIGURE_FIELDS:
            value = np.asarray(getattr(self, name), dtype=float).reshape(-1)
            if value.shape != (nf,):
                raise ValueError(f"{name} must have one value per frequency ({nf}), got shape {value.shape}")
            setattr(self, name, value)
        self.extra = {k: self._check_extra(k, v, nf) for k, v in dict(self.extra).items()}
        self.attributes = dict(self.attributes)

    @staticmethod
    def _check_extra(key, value, nf):
        if isinstance(value, dict):
            return {k: ModelResult._check_extra(f"{key}.{k}", v, nf) for k, v in value.items()}
        arr = np.asarray(value)
        if arr.shape[:1] != (nf,):
            raise ValueError(f"extra[{key!r}] must have one value per frequency ({nf}), got shape {arr.shape}")
        return arr

    @property
    def directivity_key(self):
        """``"directivity_dbi"`` (dims 3) or ``"directivity_2d_db"`` (dims 2)."""
        return "directivity_dbi" if self.dims == 3 else "directivity_2d_db"

    def figures(self, include_cuts=False):
        """JSON-ready dict of lists (NaN -> None) for ``result.json``'s ``models`` block.

        Keys: the directivity (``directivity_dbi``, or ``directivity_2d_db`` for dims = 2),
        ``hpbw_h_deg``, ``hpbw_e_deg``, ``first_null_h_deg``, ``first_null_e_deg``,
        ``sll_h_db``, ``sll_e_db`` and every ``extra`` entry, each a list aligned with the
        frequencies. ``include_cuts=True`` adds ``theta_deg`` and the cuts as nested lists
        (keys ``h_plane_dbi``/``e_plane_dbi``, or ``h_plane_2d_db``/``e_plane_2d_db``).
        """
        out = {}
        for name in FIGURE_FIELDS:
            key = self.directivity_key if name == "directivity_dbi" else name
            out[key] = _json_ready(getattr(self, name))
        for key, value in self.extra.items():
            if key in out:
                raise ValueError(f"extra[{key!r}] collides with a standard figure")
            out[key] = _json_ready(value)
        if include_cuts:
            suffix = "dbi" if self.dims == 3 else "2d_db"
            out["theta_deg"] = _json_ready(self.theta_deg)
            out[f"h_plane_{suffix}"] = _json_ready(self.h_plane_dbi)
            out[f"e_plane_{suffix}"] = _json_ready(self.e_plane_dbi)
        return out
