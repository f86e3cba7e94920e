"""The far-zone (r → ∞) transform of equivalent currents sampled on the Yee grid, in numpy.

This is the "fast" far-field route (``FdtdSettings.farfield_method``): the radiation-vector sums
over the same Yee-grid samples and quadrature weights that Meep's near2far uses, evaluated in
numpy. The DFT monitors that feed it are added and read in :mod:`hornproof.sim.surface`; the
result, E and H at ``sim.layout.FAR_FIELD_DISTANCE``, goes to :mod:`hornproof.sim.pattern`.
Power convention as in :mod:`hornproof.sim.pattern` (Re E* × H, no factor ½).
"""

from dataclasses import dataclass

import numpy as np

# Surface equivalence: on a closed surface S with outward normal n̂ the fields outside are those
# radiated by J = n̂ × H and M = −n̂ × E on S. In the far zone (r → ∞) with Meep's e^{−iωt}
# convention and ε0 = μ0 = 1 (η = 1, k = ω = 2πf):
#
#   N(r̂) = ∮ J(r') e^{−ik r̂·r'} dA',   L(r̂) = ∮ M(r') e^{−ik r̂·r'} dA'   (radiation vectors)
#   E = G (N⊥ − r̂ × L),   H = r̂ × E = G (r̂ × N + L⊥)
#
# with G = i k e^{ikr} / (4π r) in 3D and G = −(k/4) H0⁽¹⁾(kr) ≈ −(k/4) √(2/(πkr)) e^{i(kr − π/4)}
# in 2D (fields per unit length, ∝ 1/√r). References: C. A. Balanis, *Antenna Theory*, 3rd ed.,
# ch. 12, "radiation equations" (radiation vectors; E_θ = −jk e^{−jkr}/(4πr) (L_φ + η N_θ) in the
# e^{+jωt} convention; section from memory), and M. Abramowitz & I. A. Stegun, *Handbook of
# Mathematical Functions*, 9.2.3 (H0⁽¹⁾(x) → √(2/(πx)) e^{i(x − π/4)}). These are the far-zone
# limits of the point-source Green's functions Meep's own near2far sums (its green3d / green2d).
#
# Discretisation (kept identical to Meep's near2far so the two agree): every tangential field
# component is sampled at its own Yee-grid points (DFT monitors with ``yee_grid=True``); along the
# surface each sample carries the weight of integrating the piecewise-linear interpolant of that
# component over the face, across it the weight of linear interpolation onto the face plane, and
# each of the two bracketing layers keeps its own position in the phase factor.

#: Yee offsets: component → parity per axis (0: on whole cells, 1: half a cell off); Meep docs,
#: "Yee lattice": E_d is offset along d, H_d along the two other axes
_YEE_PARITY = {"ex": (1, 0, 0), "ey": (0, 1, 0), "ez": (0, 0, 1),
               "hx": (0, 1, 1), "hy": (1, 0, 1), "hz": (1, 1, 0)}
#: margins (in cells) tried for a monitor bound, so that no bound sits near a Yee sample of either
#: parity (Meep's own floor/ceil bracketing of a bound is then unambiguous in floating point)
_MARGINS_CELLS = (0.25, 0.15, 0.35, 0.1, 0.4, 0.2, 0.3)
#: directions per block in the radiation-vector sums (bounds memory: block × points per face row)
_DIRECTION_BLOCK = 2048


def tangential_axes(normal_axis):
    """The two axes tangential to a face normal to ``normal_axis`` (0 x, 1 y, 2 z) in cyclic order.

    In 2D Meep's out-of-plane axis is z (index 2); a face normal to x or y has tangents (y, z) or
    (z, x), the same cyclic order as in 3D.
    """
    return ((1, 2), (2, 0), (0, 1))[normal_axis]


def lattice_positions(lower, upper, step, parity):
    """Yee-lattice coordinates of one component bracketing [lower, upper] along one axis (Meep units).

    The component's samples sit at (m + parity/2)·step. Meep keeps the largest sample ≤ ``lower``
    and the smallest ≥ ``upper`` (a sample exactly on a bound is kept alone). Returns a 1D array.
    """
    offset = 0.5 * parity
    first = np.floor(lower / step - offset + 1e-9)
    last = np.ceil(upper / step - offset - 1e-9)
    return (np.arange(first, last + 1) + offset) * step


def monitor_bounds(lower, upper, step):
    """[lower, upper] widened by a fraction of a cell so neither bound is near a Yee sample.

    Samples of both parities sit at multiples of step/2; a bound within 5 % of a cell of one
    may be bracketed either way by Meep's floating-point rounding. Returns (lower′, upper′).
    """
    def clear(x):
        frac = (x / (0.5 * step)) % 1.0
        return 0.1 <= frac <= 0.9

    low = next(lower - m * step for m in _MARGINS_CELLS if clear(lower - m * step))
    high = next(upper + m * step for m in _MARGINS_CELLS if clear(upper + m * step))
    return low, high


def fit_to_lattice(data, expected_shape):
    """``data`` cut to ``expected_shape``, dropping surplus all-zero slices at an axis end.

    With mirror symmetries Meep's get_dft_array can return, for a face lying wholly in a
    mirrored (not stored) half, an array longer along some axes than the face's samples, padded
    with exact zeros towards the mirror plane (seen with Meep 1.25). Anything else is an error.
    """
    data = np.asarray(data)
    if data.ndim != len(expected_shape):
        raise RuntimeError(f"DFT array has shape {data.shape}, expected {tuple(expected_shape)}")
    for axis, (have, want) in enumerate(zip(data.shape, expected_shape)):
        if have == want:
            continue
        if have < want:
            raise RuntimeError(f"DFT array has shape {data.shape}, expected {tuple(expected_shape)}")
        surplus = have - want
        moved = np.moveaxis(data, axis, 0)
        if not np.any(moved[want:]):
            data = np.moveaxis(moved[:want], 0, axis)
        elif not np.any(moved[:surplus]):
            data = np.moveaxis(moved[surplus:], 0, axis)
        else:
            raise RuntimeError(f"DFT array has shape {data.shape}, expected {tuple(expected_shape)}, "
                               "and the surplus samples are not zero padding")
    return data


def hat_weights(positions, lower, upper, step):
    """Weights of integrating the piecewise-linear interpolant of samples over [lower, upper].

    Each sample contributes ∫ Λ((x − x_n)/step) dx over the interval (Λ the unit hat function),
    the rule Meep's loop_in_chunks uses for its integration weights (exact for linear functions).
    For ``lower == upper`` it returns the linear-interpolation weights at that point (no length).
    ``positions`` in the same units as ``step``; returns an array like ``positions``.
    """
    x = np.asarray(positions, dtype=float)
    if upper == lower:
        return np.clip(1.0 - np.abs(lower - x) / step, 0.0, None)

    def hat_integral(t):  # ∫_{-∞}^{t} Λ(u) du, t in units of step
        t = np.clip(t, -1.0, 1.0)
        return np.where(t < 0, 0.5 * (1 + t) ** 2, 1.0 - 0.5 * (1 - t) ** 2)

    return step * (hat_integral((upper - x) / step) - hat_integral((lower - x) / step))


@dataclass(frozen=True)
class CurrentSheet:
    """Samples of one equivalent-current component on one layer of one face (Meep units).

    ``axes`` the two in-face axes (one, with ``coordinates[1]`` empty, in 2D), ``coordinates``
    their sample coordinates, ``normal_axis`` and ``normal_position`` the layer's plane,
    ``direction`` the current's unit vector (3,), ``magnetic`` True for M, and ``amplitude``
    [nf, n1(, n2)] the field sample times sign and quadrature weight.
    """

    axes: tuple
    coordinates: tuple
    normal_axis: int
    normal_position: float
    direction: np.ndarray
    magnetic: bool
    amplitude: np.ndarray


def face_current_sheets(field_arrays, centre, size, sign, dims, step):
    """Equivalent-current sheets of one face from its tangential DFT fields on the Yee grid.

    ``field_arrays`` maps "ex", "ey", … to complex arrays [nf, …] as Meep returns them for a slab
    that brackets the face (axes in x, y, z order, the normal axis holding the bracketing layers);
    missing or empty entries count as zero. ``centre``, ``size`` the face (Meep units, length 3 in
    3D, 2 in 2D), ``sign`` ±1 for an outward normal along ±axis. J = n̂ × H, M = −n̂ × E.
    """
    centre = tuple(centre) + (0.0,) * (3 - len(centre))
    size = tuple(size) + (0.0,) * (3 - len(size))
    normal_axis = next(a for a in range(dims) if size[a] == 0.0)
    in_plane = [a for a in range(dims) if a != normal_axis]
    normal = np.zeros(3)
    normal[normal_axis] = sign
    sheets = []
    for axis in tangential_axes(normal_axis):
        for kind in ("e", "h"):
            name = kind + "xyz"[axis]
            data = field_arrays.get(name)
            if data is None or np.size(data) == 0:
                continue
            unit = np.zeros(3)
            unit[axis] = 1.0
            # J = n̂ × (H_t t̂), M = −n̂ × (E_t t̂)
            direction = np.cross(normal, unit) * (1.0 if kind == "h" else -1.0)
            parity = _YEE_PARITY[name]
            grids = {a: lattice_positions(*slab_bounds(centre, size, a, step), step, parity[a])
                     for a in range(dims)}
            expected = (np.shape(data)[0],) + tuple(grids[a].size for a in range(dims))
            data = fit_to_lattice(data, expected)
            weights = [hat_weights(grids[a], centre[a] - size[a] / 2, centre[a] + size[a] / 2, step)
                       for a in in_plane]
            layer_w = hat_weights(grids[normal_axis], centre[normal_axis], centre[normal_axis], step)
            area = weights[0][:, None] * weights[1][None, :] if len(weights) == 2 else weights[0]
            for layer, w_layer in enumerate(layer_w):
                if w_layer == 0.0:
                    continue
                values = np.take(data, layer, axis=1 + normal_axis)
                coordinates = tuple(grids[a] for a in in_plane)
                sheets.append(CurrentSheet(axes=tuple(in_plane), coordinates=coordinates,
                                           normal_axis=normal_axis,
                                           normal_position=float(grids[normal_axis][layer]),
                                           direction=direction, magnetic=kind == "e",
                                           amplitude=values * (w_layer * area)[None]))
    return sheets


def normal_bounds(position, step):
    """Thin slab across a face plane at ``position`` that Meep brackets by exactly two layers.

    For either parity Meep keeps the largest sample ≤ the slab's low bound and the smallest ≥
    its high bound. A slab just above the plane and short of the next sample (of either parity)
    therefore keeps the two samples bracketing the plane, or the sample on it and the next one.
    """
    half = 0.5 * step
    frac = (position / half) % 1.0
    if frac < 1e-6 or frac > 1 - 1e-6:  # on a sample plane
        base = np.round(position / half) * half
        return base + 0.2 * half, base + 0.4 * half
    gap = half * (1.0 - frac)  # to the next sample above
    return position + 0.3 * gap, position + 0.6 * gap


def slab_bounds(centre, size, axis, step):
    """Bounds along ``axis`` of the DFT slab monitoring a face (``normal_bounds`` across the
    face, ``monitor_bounds`` along it)."""
    if size[axis] == 0.0:
        return normal_bounds(centre[axis], step)
    return monitor_bounds(centre[axis] - size[axis] / 2, centre[axis] + size[axis] / 2, step)


def _axis_factor(coordinates, direction_component, k):
    """e^{−ik r̂_a a} [n, nd], or None when every direction has r̂_a = 0 (the factor is 1)."""
    if not np.any(direction_component):
        return None
    return np.exp(-1j * k * np.outer(coordinates, direction_component))


def _in_plane_sums(amplitudes, coordinates, axes, directions, k):
    """Σ over the face of amplitude · e^{−ik (r̂_a a + r̂_b b)} for sheets on one tensor grid.

    ``amplitudes`` [ns, n1(, n2)] at one frequency; returns [ns, nd]. Separable phase: the double
    sum is one matrix product, and an axis every direction is normal to (r̂_a = 0, as along a
    principal-plane cut) is summed out first.
    """
    nd = directions.shape[0]
    factors = [_axis_factor(c, directions[:, a], k) for c, a in zip(coordinates, axes)]
    for axis in range(len(factors) - 1, -1, -1):  # sum out axes with no phase (last first)
        if factors[axis] is None:
            amplitudes = amplitudes.sum(axis=1 + axis)
    active = [f for f in factors if f is not None]
    if not active:
        return np.repeat(amplitudes[:, None], nd, axis=1)
    if len(active) == 1:
        return amplitudes @ active[0]
    partial = amplitudes @ active[1]  # [ns, n1, nd]
    return np.einsum("sid,id->sd", partial, active[0])


def _grid_key(sheet):
    return (sheet.axes, sheet.normal_axis) + tuple(c.tobytes() for c in sheet.coordinates)


def sheet_sums(sheets, directions, wavenumbers):
    """Σ amplitude · e^{−ik r̂·r'} per sheet: complex [ns, nf, nd] (``sheets`` share one grid).

    ``directions`` [nd, 3] unit vectors, ``wavenumbers`` [nf] (rad per Meep unit).
    """
    directions = np.asarray(directions, dtype=float)
    first = sheets[0]
    out = np.empty((len(sheets), len(wavenumbers), directions.shape[0]), dtype=complex)
    for f, k in enumerate(wavenumbers):
        amplitudes = np.stack([sheet.amplitude[f] for sheet in sheets])
        in_plane = _in_plane_sums(amplitudes, first.coordinates, first.axes, directions, k)
        for i, sheet in enumerate(sheets):
            normal_phase = np.exp(-1j * k * directions[:, sheet.normal_axis] * sheet.normal_position)
            out[i, f] = normal_phase * in_plane[i]
    return out


def radiation_vectors(sheets, directions, wavenumbers):
    """N(r̂) and L(r̂) (Balanis ch. 12, in Meep's e^{−iωt}): complex [nf, nd, 3] each, in blocks of directions.

    Sheets on the same grid (the components sharing Yee offsets on a face, and their two layers)
    are summed together, so their phase factors are computed once.
    """
    directions = np.asarray(directions, dtype=float)
    nf, nd = len(wavenumbers), directions.shape[0]
    n_vec = np.zeros((nf, nd, 3), dtype=complex)
    l_vec = np.zeros_like(n_vec)
    groups = {}
    for sheet in sheets:
        groups.setdefault(_grid_key(sheet), []).append(sheet)
    for start in range(0, nd, _DIRECTION_BLOCK):
        block = slice(start, min(nd, start + _DIRECTION_BLOCK))
        for group in groups.values():
            sums = sheet_sums(group, directions[block], wavenumbers)
            for sheet, s in zip(group, sums):
                target = l_vec if sheet.magnetic else n_vec
                target[:, block, :] += s[:, :, None] * sheet.direction[None, None, :]
    return n_vec, l_vec


def far_zone_green(wavenumbers, distance, dims):
    """Scalar far-zone factor G [nf]: i k e^{ikr}/(4πr) (3D) or −(k/4)√(2/(πkr)) e^{i(kr−π/4)} (2D).

    3D: the far limit of the electric-dipole field E = iωμ e^{ikr}/(4πr) p⊥ for a current moment p
    (e^{−iωt}); 2D: the large-argument Hankel asymptote H0⁽¹⁾(x) ≈ √(2/(πx)) e^{i(x − π/4)} in the
    line-source field E_z = −(ωμ/4) H0⁽¹⁾(kr) I (the 2D Green's function Meep's near2far uses;
    Abramowitz & Stegun 9.2.3 for the asymptote). Meep units: μ = ε = 1, ω = k.
    """
    k = np.asarray(wavenumbers, dtype=float)
    kr = k * distance
    if dims == 3:
        return 1j * k * np.exp(1j * kr) / (4 * np.pi * distance)
    return -(k / 4) * np.sqrt(2 / (np.pi * kr)) * np.exp(1j * (kr - np.pi / 4))


def far_zone_fields(n_vec, l_vec, directions, wavenumbers, distance, dims):
    """E and H at ``distance`` along ``directions`` from the radiation vectors: [nf, nd, 3] each.

    E = G (N⊥ − r̂ × L), H = r̂ × E (plane wave, η = 1). In θ/φ components this is
    E_θ = G (N_θ + L_φ), E_φ = G (N_φ − L_θ) (Balanis ch. 12 with η = 1, e^{−iωt}).
    """
    r_hat = np.asarray(directions, dtype=float)[None, :, :]
    n_perp = n_vec - np.sum(n_vec * r_hat, axis=2, keepdims=True) * r_hat
    green = far_zone_green(wavenumbers, distance, dims)[:, None, None]
    e = green * (n_perp - np.cross(r_hat, l_vec))
    h = np.cross(r_hat, e)
    return e, h


def fast_far_fields(sheets, directions, meep_frequencies, distance, dims):
    """Far E and H [nf, nd, 3] at ``distance`` (Meep units) along unit ``directions`` [nd, 3].

    The numpy far-zone transform; drop-in for ``far_fields`` (which calls Meep's get_farfield).
    """
    k = 2 * np.pi * np.asarray(meep_frequencies, dtype=float)
    n_vec, l_vec = radiation_vectors(sheets, directions, k)
    return far_zone_fields(n_vec, l_vec, directions, k, distance, dims)
