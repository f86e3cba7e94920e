"""The figures hornproof reports and compares, and which ``[checks]`` tolerance judges each.

One table, read by the case-file loader (which check keys exist), verify (which comparison
metric a check applies to), regress (which tolerance a figure gets) and the report (labels,
units). Keys are those of ``result.json`` (schema ``hornproof.result/1``) and never change
without a schema bump.
"""

from dataclasses import dataclass


@dataclass(frozen=True)
class Figure:
    """One figure of a model over the band.

    Attributes
    ----------
    key : str
        Its key among a model's figures in ``result.json`` (``models.<model>.<key>``).
    metric : str or None
        Its key in the ``comparison`` block, where verify compares it (None: not compared).
    label : str
        Trade words for people (tables, plots, reports).
    unit : str
        ``"dB"``, ``"deg"``, ``"mm"`` or ``"%"``.
    tolerance_keys : tuple of str
        ``[checks]`` keys that set its tolerance, first match wins (regress).
    """

    key: str
    metric: str | None
    label: str
    unit: str
    tolerance_keys: tuple


FIGURES = {figure.key: figure for figure in (
    Figure("directivity_dbi", "directivity_db", "Directivity", "dB", ("directivity_dbi", "directivity_db")),
    Figure("directivity_2d_db", "directivity_2d_db", "2D directivity", "dB",
           ("directivity_2d_db", "directivity_db")),
    Figure("gain_dbi", None, "Gain", "dB", ("gain_dbi", "gain_db", "directivity_db")),
    Figure("realized_gain_dbi", "realized_gain_db", "Realized gain", "dB",
           ("realized_gain_dbi", "realized_gain_db", "gain_db", "directivity_db")),
    Figure("hpbw_h_deg", "hpbw_h_deg", "HPBW, H-plane", "deg", ("hpbw_h_deg", "hpbw_deg")),
    Figure("hpbw_e_deg", "hpbw_e_deg", "HPBW, E-plane", "deg", ("hpbw_e_deg", "hpbw_deg")),
    Figure("first_null_h_deg", "first_null_h_deg", "First null, H-plane", "deg",
           ("first_null_h_deg", "first_null_deg")),
    Figure("first_null_e_deg", "first_null_e_deg", "First null, E-plane", "deg",
           ("first_null_e_deg", "first_null_deg")),
    Figure("sll_h_db", "sll_h_db", "Sidelobe level, H-plane", "dB", ("sll_h_db", "sll_db")),
    Figure("sll_e_db", "sll_e_db", "Sidelobe level, E-plane", "dB", ("sll_e_db", "sll_db")),
    Figure("s11_db", None, "S11 (return loss)", "dB", ("s11_db",)),
    # feed figures (compare/jobs/feed_figures.py): 3D models only
    Figure("phase_centre_h_mm", "phase_centre_h_mm", "Phase centre behind aperture, H-plane", "mm",
           ("phase_centre_h_mm", "phase_centre_mm")),
    Figure("phase_centre_e_mm", "phase_centre_e_mm", "Phase centre behind aperture, E-plane", "mm",
           ("phase_centre_e_mm", "phase_centre_mm")),
    Figure("beamwidth_10db_h_deg", "beamwidth_10db_h_deg", "-10 dB beamwidth, H-plane", "deg",
           ("beamwidth_10db_h_deg", "beamwidth_10db_deg")),
    Figure("beamwidth_10db_e_deg", "beamwidth_10db_e_deg", "-10 dB beamwidth, E-plane", "deg",
           ("beamwidth_10db_e_deg", "beamwidth_10db_deg")),
    Figure("cross_polar_45_db", "cross_polar_45_db", "Peak cross-polar level, 45° cut", "dB",
           ("cross_polar_45_db", "cross_polar_db")),
    Figure("edge_taper_h_db", "edge_taper_h_db", "Edge taper at the rim, H-plane", "dB",
           ("edge_taper_h_db", "edge_taper_db")),
    Figure("edge_taper_e_db", "edge_taper_e_db", "Edge taper at the rim, E-plane", "dB",
           ("edge_taper_e_db", "edge_taper_db")),
    Figure("reflector_efficiency_pct", "reflector_efficiency_pct", "Reflector aperture efficiency", "%",
           ("reflector_efficiency_pct", "efficiency_pct")),
)}

#: comparison metric -> figure (the ``comparison`` block's keys)
METRICS = {figure.metric: figure for figure in FIGURES.values() if figure.metric}

#: ``[checks]`` tolerance key -> comparison metrics it judges in verify
CHECK_METRICS = {
    "directivity_db": ("directivity_db",),
    "gain_db": ("realized_gain_db",),
    "hpbw_deg": ("hpbw_h_deg", "hpbw_e_deg"),
    "first_null_deg": ("first_null_h_deg", "first_null_e_deg"),
    "sll_db": ("sll_h_db", "sll_e_db"),
    "phase_centre_mm": ("phase_centre_h_mm", "phase_centre_e_mm"),
    "beamwidth_10db_deg": ("beamwidth_10db_h_deg", "beamwidth_10db_e_deg"),
    "cross_polar_db": ("cross_polar_45_db",),
    "edge_taper_db": ("edge_taper_h_db", "edge_taper_e_db"),
    "efficiency_pct": ("reflector_efficiency_pct",),
}

#: every ``[checks]`` tolerance key a case file may hold (dB for *_db, degrees for *_deg, mm for
#: *_mm, percentage points for *_pct);
#: pattern_rms_db and s11_db are judged outside the figure comparison
CHECK_TOLERANCE_KEYS = tuple(CHECK_METRICS) + ("pattern_rms_db", "s11_db")


def directivity_key(dims):
    """The directivity figure of a model of ``dims`` dimensions: dBi in 3D, dB in 2D (a ratio of per-unit-length quantities)
    (``directivity_2d_db``) in 2D."""
    return "directivity_2d_db" if int(dims) == 2 else "directivity_dbi"
