"""Terminal lines of the range and shop blocks of a summary: wall loss, finite range, tolerances.

Plain text for ``verify``'s table (the same numbers as result.json's ``wall_loss``,
``finite_range`` and ``tolerance`` blocks and the report's section).
"""

from ..report.format import MISSING_VALUE


def _fmt(value, width, digits=2):
    return MISSING_VALUE.rjust(width) if value is None else f"{value:{width}.{digits}f}"


def _uncertain(fdtd, key, i):
    """An FDTD uncertainty cell, '?' when not confident (as in verify's table)."""
    value = fdtd[f"{key}_uncertainty_db"][i]
    confident = (fdtd.get(f"{key}_uncertainty_confident") or [False] * (i + 1))[i]
    return (_fmt(value, 6, 3) + ("" if confident or value is None else "?")).rjust(7)


def wall_loss_lines(summary):
    block = summary.get("wall_loss")
    if not block:
        return []
    material = block["material"]
    models = summary.get("models", {})
    fdtd = models.get("fdtd", {})
    rough = f", roughness {material['roughness_rms_um']:g} um RMS (x{min(block['roughness_factor']):.2f}-" \
            f"{max(block['roughness_factor']):.2f}, Hammerstad-Jensen)" if material["roughness_rms_um"] else ""
    lines = ["", f"  Wall loss: {material['name']} ({material['conductivity_s_per_m']:.3g} S/m){rough}; "
                 f"feed guide {block['feed_guide_length_mm']:g} mm; flare as local TE10 guides",
             f"  {'f GHz':>7} {'guide dB/m':>10} {'loss dB':>8} {'+-approx':>8} {'D dBi':>8} {'G dBi':>8}"
             f" {'G_r dBi':>8}   (D, G: exact-phase model; G_r: FDTD realized gain, 3D only)"]
    exact_gain = block["gain_3d_dbi"]["exact_phase"]
    exact_d = summary.get("horn_3d", models).get("exact_phase", {}).get("directivity_dbi") or [None] * len(exact_gain)
    realized = fdtd.get("realized_gain_dbi") if int(summary.get("dims", 3)) == 3 else None
    for i, frequency in enumerate(summary["frequencies_ghz"]):
        lines.append(f"  {frequency:7.3f} {_fmt(block['feed_guide_db_per_m'][i], 10, 3)} "
                     f"{_fmt(block['total_db'][i], 8, 3)} {_fmt(block['approximation_db'][i], 8, 3)} "
                     f"{_fmt(exact_d[i], 8)} {_fmt(exact_gain[i], 8)} "
                     f"{_fmt(realized[i] if realized else None, 8)}")
    return lines


def range_lines(summary):
    block = summary.get("finite_range")
    if not block:
        return []
    freqs = summary["frequencies_ghz"]
    criteria = block["far_field_distance_m"]
    lines = ["", "  Finite-range gain (on axis, what a probe at R infers; correction = far-field - range gain, "
                 "+- = spread between the aperture models):"]
    for name, values in criteria.items():
        lines.append(f"    far-field criterion {name}: {min(values):.2f}-{max(values):.2f} m over the band")
    lines.append(f"  {'R m':>8} {'f GHz':>7} {'G_R cf':>8} {'G_R ex':>8} {'corr dB':>8} {'+-':>6}"
                 f" {'G_R FDTD':>9} {'+-':>7} {'corr FDTD':>9} {'+-':>7}  FDTD correction ladder")
    for row in block["distances"]:
        fdtd = row.get("fdtd")
        for i, frequency in enumerate(freqs):
            text = (f"  {row['distance_m']:8.2f} {frequency:7.3f} {_fmt(row['closed_form_gain_dbi'][i], 8)} "
                    f"{_fmt(row['exact_phase_gain_dbi'][i], 8)} {_fmt(row['correction_db'][i], 8, 3)} "
                    f"{_fmt(row['correction_uncertainty_db'][i], 6, 3)}")
            if fdtd:
                text += (f" {_fmt(fdtd['gain_dbi'][i], 9)} {_uncertain(fdtd, 'gain', i)} "
                         f"{_fmt(fdtd['correction_db'][i], 9, 3)} {_uncertain(fdtd, 'correction', i)}"
                         f"  {fdtd['correction_ladder'][i]}")
            lines.append(text)
    lines.append(f"    FDTD: {block['fdtd']}")
    return lines


def tolerance_lines(summary):
    block = summary.get("tolerance")
    if not block:
        return []
    freqs = summary["frequencies_ghz"]
    tolerances = ", ".join(f"{d} +-{v:g}" for d, v in block["tolerances_mm"].items())
    lines = ["", f"  Tolerance study ({block['model']} model, {block['samples']} horns, uniform within "
                 f"{tolerances} mm; {block['rejected_samples']} not buildable):",
             f"  {'figure':<16} {'f GHz':>7} {'nominal':>8} {'MC std':>7} {'lin std':>7} {'2.5%':>8} "
             f"{'97.5%':>8}  sensitivity per mm"]
    for name, figure in block["figures"].items():
        for i, frequency in enumerate(freqs):
            slopes = " ".join(f"{d}:{v[i]:+.3f}" for d, v in figure["sensitivity_per_mm"].items())
            lines.append(f"  {figure['label'] + ' ' + figure['unit']:<16} {frequency:7.3f} "
                         f"{_fmt(figure['nominal'][i], 8)} {_fmt(figure['monte_carlo_std'][i], 7, 3)} "
                         f"{_fmt(figure['delta_method_std'][i], 7, 3)} {_fmt(figure['monte_carlo_p2_5'][i], 8)} "
                         f"{_fmt(figure['monte_carlo_p97_5'][i], 8)}  {slopes}")
    lines.append(f"    not covered: {block['not_covered']}")
    return lines


def range_shop_lines(summary):
    """All three sections' lines (empty when the summary has none of the blocks)."""
    return wall_loss_lines(summary) + range_lines(summary) + tolerance_lines(summary)
