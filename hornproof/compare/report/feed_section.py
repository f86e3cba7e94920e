"""The feed section of a verify result (result.json's ``feed`` block) for people: the HTML
report's table (``templates/feed_section.html.j2``) and the terminal's lines.

One row per feed figure and frequency: closed form, exact phase, FDTD ± its ladder
uncertainty ("?" or "(not confident)" when the ladder cannot support it: two rungs, an
oscillating or diverging ladder) and the ladder's health; the verdicts of checked figures are
in the verdict table. A missing value reads "n/a".
"""

from .format import MISSING_VALUE, number

#: row order and trade words of the feed figures (key -> (label, unit, decimals))
FEED_ROWS = {
    "phase_centre_h_mm": ("Phase centre behind aperture, H-plane", "mm", 1),
    "phase_centre_e_mm": ("Phase centre behind aperture, E-plane", "mm", 1),
    "phase_centre_from_throat_h_mm": ("Phase centre from throat, H-plane", "mm", 1),
    "phase_centre_from_throat_e_mm": ("Phase centre from throat, E-plane", "mm", 1),
    "phase_ripple_h_deg": ("Phase ripple left (RMS), H-plane", "deg", 1),
    "phase_ripple_e_deg": ("Phase ripple left (RMS), E-plane", "deg", 1),
    "beamwidth_10db_h_deg": ("−10 dB beamwidth, H-plane", "deg", 1),
    "beamwidth_10db_e_deg": ("−10 dB beamwidth, E-plane", "deg", 1),
    "beamwidth_level_h_deg": ("Beamwidth at the [feed] level, H-plane", "deg", 1),
    "beamwidth_level_e_deg": ("Beamwidth at the [feed] level, E-plane", "deg", 1),
    "beam_asymmetry_10db_deg": ("Beam asymmetry at −10 dB (E − H)", "deg", 1),
    "cross_polar_45_db": ("Peak cross-polar level, 45° cut", "dB", 1),
    "cross_polar_45_angle_deg": ("Angle of the cross-polar peak", "deg", 1),
    "edge_taper_h_db": ("Edge taper at the rim, H-plane", "dB", 2),
    "edge_taper_e_db": ("Edge taper at the rim, E-plane", "dB", 2),
    "spillover_efficiency_pct": ("Spillover efficiency", "%", 1),
    "taper_efficiency_pct": ("Taper (illumination) efficiency", "%", 1),
    "polarisation_efficiency_pct": ("Polarisation efficiency", "%", 1),
    "phase_efficiency_pct": ("Phase efficiency", "%", 1),
    "reflector_efficiency_pct": ("Aperture efficiency (product)", "%", 1),
    "reflector_focus_mm": ("Best feed position (focus) behind aperture", "mm", 1),
}


def _at(values, i):
    if not values or i >= len(values):
        return None
    return values[i]


def feed_rows(result):
    """Plain rows for the template: label, unit, f GHz, closed form, exact phase, FDTD, ±."""
    block = result.get("feed") or {}
    figures = block.get("figures") or {}
    freqs = result.get("frequencies_ghz") or []
    rows = []
    for key, (label, unit, digits) in FEED_ROWS.items():
        entry = figures.get(key)
        if not entry:
            continue
        for i, f in enumerate(freqs):
            u = _at(entry.get("fdtd_uncertainty"), i)
            confident = _at(entry.get("fdtd_confident"), i)
            rows.append({"label": label, "unit": unit, "frequency": number(f, 3),
                         "closed_form": number(_at(entry.get("closed_form"), i), digits),
                         "exact_phase": number(_at(entry.get("exact_phase"), i), digits),
                         "fdtd": number(_at(entry.get("fdtd"), i), digits),
                         "uncertainty": MISSING_VALUE if u is None else
                         number(u, digits + 1) + ("" if confident else " (not confident)"),
                         "ladder": _at(entry.get("fdtd_ladder"), i) or MISSING_VALUE})
    return rows


def feed_context(result):
    """The template's ``feed`` data: notes and rows; None when the result has no feed block."""
    block = result.get("feed")
    if not block:
        return None
    spec = block.get("spec") or {}
    conventions = block.get("conventions") or {}
    notes = [f"Phase centre: {conventions.get('phase_centre', '')}; least-squares fit over the main lobe "
             f"down to {number(conventions.get('phase_centre_window_db'), 0)} dB.",
             f"Cross-polarisation: {conventions.get('cross_polarisation', '')}. "
             f"{conventions.get('aperture_cross_polar_note', '')}."]
    if spec.get("half_angle_deg") is not None:
        notes.append(f"Reflector: focus-fed paraboloid, rim half-angle {number(spec['half_angle_deg'], 1)}° "
                     f"(f/D {number(spec.get('f_over_d'), 3)}); space attenuation at the rim "
                     f"{number(block.get('space_attenuation_db'), 2)} dB. {conventions.get('efficiencies', '')}.")
    else:
        notes.append("No [feed] table with a reflector in the case: no edge taper or efficiencies.")
    return {"notes": notes, "rows": feed_rows(result)}


def feed_lines(summary):
    """Terminal lines of the feed section (empty when the summary has no feed block)."""
    block = summary.get("feed")
    if not block:
        return []
    freqs = summary.get("frequencies_ghz") or []
    lines = ["  feed figures (closed form, exact phase, FDTD and its ladder uncertainty; checked ones are judged above):",
             f"  {'figure':<46} {'f GHz':>7} {'closed':>8} {'exact':>8} {'FDTD':>8} {'+-':>8}  ladder"]
    figures = block.get("figures") or {}
    for key, (label, unit, digits) in FEED_ROWS.items():
        entry = figures.get(key)
        if not entry:
            continue
        for i, f in enumerate(freqs):
            cells = [_at(entry.get(m), i) for m in ("closed_form", "exact_phase", "fdtd", "fdtd_uncertainty")]
            text = [MISSING_VALUE.rjust(8) if v is None else f"{v:8.{digits}f}" for v in cells[:3]]
            mark = "" if _at(entry.get("fdtd_confident"), i) else "?"
            text.append(MISSING_VALUE.rjust(8) if cells[3] is None else f"{cells[3]:.{digits + 1}f}{mark}".rjust(8))
            lines.append(f"  {label + ' (' + unit + ')':<46} {f:7.3f} {' '.join(text)}  "
                         f"{_at(entry.get('fdtd_ladder'), i) or ''}")
    return lines
