"""``SimResult``: one FDTD run over the band, a ``ModelResult`` plus the run's metadata."""

from dataclasses import dataclass, field, fields

from ..analytic.model_result import ModelResult


@dataclass
class SimResult(ModelResult):
    """One FDTD run over the band: a ``ModelResult`` (name ``"fdtd"``) plus run metadata.

    Arrays [nf] unless stated; cuts [nf, nθ] in dBi (dB of D₂ for dims = 2), NaN where a 2D
    model has no such plane. ``run`` holds the metadata (see ``sim.run.simulate``).
    ``full_pattern`` is None or a dict with ``theta_deg``, ``phi_deg`` and ``directivity_dbi``
    [nf, nθ, nφ]. ``feed_pattern`` is None (2D) or the complex co/cross-polar far fields of
    ``sim.postprocess.feed_pattern`` (cuts at φ = 0°, 90°, 45° and a quadrant of the sphere).
    ``dense_band`` is None (one-frequency band) or {``frequencies_hz``, ``s11`` (complex),
    ``fit_residual``} at ``sim.feed.DENSE_BAND_POINTS`` frequencies of the same run, read on
    the guide axis, and ``band_check_abs`` [nf]: |S11 axis − S11 plane| at the band frequencies.
    """

    run: dict = field(default_factory=dict)
    full_pattern: dict = None
    feed_pattern: dict = None
    dense_band: dict = None

    def to_model_result(self):
        """The plain ``ModelResult`` part, with the run metadata as its attributes."""
        names = [f.name for f in fields(ModelResult) if f.name != "attributes"]
        return ModelResult(**{k: getattr(self, k) for k in names}, attributes=dict(self.run))
