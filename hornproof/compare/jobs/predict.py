"""Both analytic models of a case, as the opening part of a ``hornproof.result/1`` summary."""

from ...analytic.predict import predict
from ..output.summary import base_summary


def predict_case(case, equivalent="huygens"):
    """Summary dict with the ``closed_form`` and ``exact_phase`` models of ``case``.

    Returns
    -------
    (dict, dict)
        The summary and the models (``{"closed_form": ModelResult, "exact_phase": ModelResult}``).
    """
    summary = base_summary(case)
    models = predict(case.horn, case.frequencies, equivalent=equivalent, dims=case.fdtd.dims)
    summary["models"] = {name: model.figures() for name, model in models.items()}
    summary["aperture_equivalent"] = equivalent
    return summary, models
