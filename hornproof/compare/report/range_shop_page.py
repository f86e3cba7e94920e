"""The range and shop section of a verify report: plain data for ``templates/range_shop.html.j2``.

Read from result.json's ``wall_loss``, ``finite_range`` and ``tolerance`` blocks (written by
:mod:`hornproof.compare.jobs.range_and_shop`); None for a result without them, so the section
is absent.
"""

from .format import number


def wall_loss_rows(result):
    block = result.get("wall_loss")
    if not block:
        return None
    f_ghz = result.get("frequencies_ghz") or []
    fdtd = (result.get("models") or {}).get("fdtd") or {}
    realized = fdtd.get("realized_gain_dbi") if result.get("dims", 3) == 3 else None
    rows = []
    for i, f in enumerate(f_ghz):
        rows.append({"frequency": number(f), "guide": number(block["feed_guide_db_per_m"][i], 3),
                     "feed": number(block["feed_guide_db"][i], 3), "flare": number(block["flare_db"][i], 3),
                     "total": number(block["total_db"][i], 3), "approx": number(block["approximation_db"][i], 4),
                     "efficiency": number(block["radiation_efficiency"][i], 4),
                     "gain_cf": number(block["gain_3d_dbi"]["closed_form"][i], 2),
                     "gain_ex": number(block["gain_3d_dbi"]["exact_phase"][i], 2),
                     "realized": number(realized[i] if realized else None, 2)})
    material = block["material"]
    return {"material": material["name"], "conductivity": f"{material['conductivity_s_per_m']:.4g}",
            "source": material["source"], "roughness": number(material["roughness_rms_um"], 2),
            "roughness_model": block.get("roughness_model"), "feed_length": number(block["feed_guide_length_mm"], 1),
            "approximation": block["approximation"], "rows": rows}


def _with_uncertainty(fdtd, key, i, digits):
    """"value ± u" of an FDTD range figure, "(not confident)" as in the verdict table."""
    if not fdtd:
        return number(None)
    value = fdtd["gain_dbi" if key == "gain" else "correction_db"][i]
    u = fdtd[f"{key}_uncertainty_db"][i]
    confident = (fdtd.get(f"{key}_uncertainty_confident") or [False] * (i + 1))[i]
    if u is None:
        return number(value, digits)
    return f"{number(value, digits)} ± {number(u, digits)}" + ("" if confident else " (not confident)")


def range_rows(result):
    block = result.get("finite_range")
    if not block:
        return None
    f_ghz = result.get("frequencies_ghz") or []
    rows = []
    for row in block["distances"]:
        fdtd = row.get("fdtd") or {}
        for i, f in enumerate(f_ghz):
            rows.append({"distance": number(row["distance_m"], 2), "frequency": number(f),
                         "closed_form": number(row["closed_form_gain_dbi"][i], 2),
                         "exact_phase": number(row["exact_phase_gain_dbi"][i], 2),
                         "correction": number(row["correction_db"][i], 3),
                         "uncertainty": number(row["correction_uncertainty_db"][i], 3),
                         "fdtd_gain": _with_uncertainty(fdtd, "gain", i, 2),
                         "fdtd_correction": _with_uncertainty(fdtd, "correction", i, 3),
                         "fdtd_ladder": (fdtd.get("correction_ladder") or [None] * (i + 1))[i] or ""})
    criteria = [{"name": name, "low": number(min(values), 2), "high": number(max(values), 2)}
                for name, values in block["far_field_distance_m"].items()]
    return {"rows": rows, "criteria": criteria, "note": block["note"], "uncertainty_note": block["uncertainty_note"],
            "gain_is": block["gain_is"], "fdtd": block["fdtd"],
            "has_fdtd": any("fdtd" in row for row in block["distances"])}


def tolerance_rows(result):
    block = result.get("tolerance")
    if not block:
        return None
    f_ghz = result.get("frequencies_ghz") or []
    dims = list(block["tolerances_mm"])
    rows = []
    for name, figure in block["figures"].items():
        for i, f in enumerate(f_ghz):
            rows.append({"figure": f"{figure['label']} ({figure['unit']})", "frequency": number(f),
                         "nominal": number(figure["nominal"][i], 2),
                         "mc_std": number(figure["monte_carlo_std"][i], 3),
                         "delta_std": number(figure["delta_method_std"][i], 3),
                         "low": number(figure["monte_carlo_p2_5"][i], 2),
                         "high": number(figure["monte_carlo_p97_5"][i], 2),
                         "corner_low": number(figure["worst_corners"][i]["low"]["value"], 2),
                         "corner_high": number(figure["worst_corners"][i]["high"]["value"], 2),
                         "slopes": [number(figure["sensitivity_per_mm"][d][i], 3) for d in dims]})
    return {"model": block["model"].replace("_", " "), "samples": block["samples"],
            "rejected": block["rejected_samples"], "seed": block["seed"],
            "tolerances": ", ".join(f"{block['dimension_names'][d]} ±{v:g} mm" for d, v in block["tolerances_mm"].items()),
            "dimensions": dims, "rows": rows, "not_covered": block["not_covered"]}


def range_shop_context(result):
    """``{"range_shop": {...}}`` for the template, or ``{"range_shop": None}``."""
    parts = {"wall_loss": wall_loss_rows(result), "finite_range": range_rows(result),
             "tolerance": tolerance_rows(result)}
    return {"range_shop": parts if any(parts.values()) else None}


def range_shop_captions(result):
    """Caption of the tolerance figure, when the result has a tolerance study."""
    if not result.get("tolerance"):
        return {}
    return {"tolerance": "Tolerance study: each figure's nominal value over the band with the Monte Carlo "
                         "2.5–97.5 % range (band) and the delta-method ±2σ (bars), and the linear sensitivities "
                         "per mm at the band centre."}
