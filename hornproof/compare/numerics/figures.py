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
        ``"dB"`` or ``"deg"``.
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
}

#: every ``[checks]`` tolerance key a case file may hold (dB for *_db, degrees for *_deg);
#: pattern_rms_db and s11_db are judged outside the figure comparison
CHECK_TOLERANCE_KEYS = tuple(CHECK_METRICS) + ("pattern_rms_db", "s11_db")


def directivity_key(dims):
    """The directivity figure of a model of ``dims`` dimensions: dBi in 3D, dB in 2D (a ratio of per-unit-length quantities)
    (``directivity_2d_db``) in 2D."""
    return "directivity_2d_db" if int(dims) == 2 else "directivity_dbi"
