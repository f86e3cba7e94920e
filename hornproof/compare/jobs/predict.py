"""Both analytic models of a case, as the opening part of a ``hornproof.result/1`` summary."""

from ...analytic.predict import predict
from ..output.summary import base_summary

#: what the ``horn_3d`` block of a 2D case is, in words (result.json and the report)
HORN_3D_NOTE = ("the 3D horn's closed-form and exact-phase aperture models (directivity in dBi), "
                "beside the 2D model's per-unit-length figures (dB) of the flared plane alone")


def horn_3d_block(case, equivalent="huygens"):
    """The ``horn_3d`` block of a 2D case's summary: both aperture models of the real (3D) horn.

    ``{"note", "unit": "dBi", "closed_form": {...}, "exact_phase": {...}}``, each model's
    figures as in ``models`` (``directivity_dbi``, beamwidths, ...; ``ModelResult.figures``),
    from ``analytic.predict(horn, frequencies, dims=3)`` on the same horn. None for a 3D case
    (its ``models`` already are the 3D horn's).
    """
    if int(case.fdtd.dims) != 2:
        return None
    models = predict(case.horn, case.frequencies, equivalent=equivalent, dims=3)
    return {"note": HORN_3D_NOTE, "unit": "dBi", **{name: model.figures() for name, model in models.items()}}


def predict_case(case, equivalent="huygens"):
    """Summary dict with the ``closed_form`` and ``exact_phase`` models of ``case``.

    For a 2D case (a sectoral horn's flared plane) the summary also holds ``horn_3d``
    (:func:`horn_3d_block`): the 3D horn's aperture models in dBi beside the 2D figures.

    Returns
    -------
    (dict, dict)
        The summary and the models (``{"closed_form": ModelResult, "exact_phase": ModelResult}``,
        of the case's own dims).
    """
    summary = base_summary(case)
    models = predict(case.horn, case.frequencies, equivalent=equivalent, dims=case.fdtd.dims)
    summary["models"] = {name: model.figures() for name, model in models.items()}
    summary["aperture_equivalent"] = equivalent
    horn_3d = horn_3d_block(case, equivalent)
    if horn_3d is not None:
        summary["horn_3d"] = horn_3d
    return summary, models
