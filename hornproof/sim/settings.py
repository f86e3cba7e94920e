"""Settings of a full-wave run (pure data; importing this does not import Meep)."""

from dataclasses import dataclass, field


@dataclass(frozen=True)
class FdtdSettings:
    """How to build and run one FDTD model. Lengths in wavelengths at the top band frequency.

    Parameters
    ----------
    dims : {2, 3}
        3: full model. 2: principal-plane model of a sectoral horn (the flared plane).
    cells_per_wavelength : tuple of float
        Grid density at f_max; several values make a convergence ladder (compare runs each).
    pml_wavelengths : float
        PML thickness, in wavelengths at f_min.
    padding_wavelengths : float
        Free space between the horn and the near-to-far box, and between the box and the PML.
    feed_length_wavelengths : float
        Length of straight feed guide behind the throat, in guide wavelengths at f_min.
    decay_by : float
        Stop when the DFT fields have decayed by this factor (``stop_when_dft_decayed``).
    max_time_periods : float
        Hard cap on run time, in periods of f_min (exit 3 if reached without convergence).
    use_symmetry : bool
        Apply the two mirror planes of TE10 on a symmetric horn.
    pattern_step_deg : float
        Angular step of the principal-plane cuts.
    full_pattern_step_deg : float or None
        Step of the full (θ, φ) far-field grid; None skips it.
    target_uncertainty_db : float or None
        ``verify`` adds finer rungs until every checked dB figure's uncertainty is at most this
        and no checked figure is unresolved (None: the ladder as given).
    farfield_method : {"fast", "meep"}
        Far-field transform: "fast", the numpy far-zone transform of the Yee-grid surface
        currents (``sim.farfield_transform.fast_far_fields``), or "meep", Meep's ``get_farfield`` point by
        point (the reference; about 40 ms per direction and frequency on a small horn).
    """

    dims: int = 3
    cells_per_wavelength: tuple = (12.0,)
    pml_wavelengths: float = 0.5
    padding_wavelengths: float = 0.3
    feed_length_wavelengths: float = 1.0
    decay_by: float = 1e-4
    max_time_periods: float = 400.0
    use_symmetry: bool = True
    pattern_step_deg: float = 1.0
    full_pattern_step_deg: float = None
    farfield_method: str = "fast"
    target_uncertainty_db: float = None
    extra: dict = field(default_factory=dict)
