"""Benchmark of the analytic models: prints measured speed against the targets.

Not a timed test: run it by hand or in CI and read the ratios.

    .venv/bin/python bench/bench_analytic.py

Targets (hornproof's own performance goals, a project decision):
* closed-form boresight directivity, vectorised: ≥ 1e6 evaluations/s
* exact-phase principal-plane cut (H and E planes), 361 angles: < 50 ms
* full (θ, φ) pattern on a 2° grid (θ 0…180°, φ 0…358°): < 1 s
Each figure is the best of several repetitions after a warm-up call (first calls pay for
page faults and imports, not for the model).
"""

import time

import numpy as np

from hornproof.analytic import closed_form, exact_phase
from hornproof.analytic.geometry import HornGeometry
from hornproof.analytic.predict import predict
from hornproof.analytic.waveguide import waveguide_size
from hornproof.units import SPEED_OF_LIGHT


def best_time(func, repeat=7):
    func()  # warm-up
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        func()
        times.append(time.perf_counter() - start)
    return min(times)


def report(label, measured, target, unit, higher_is_better):
    ratio = measured / target if higher_is_better else target / measured
    verdict = "ok" if ratio >= 1 else "SLOW"
    print(f"{label:<60s} {measured:>12.4g} {unit:<7s} target {'≥' if higher_is_better else '<'} "
          f"{target:<8.3g} ratio {ratio:7.2f}  {verdict}")
    return ratio


def main():
    a, b = waveguide_size("WR-90")
    f = 11.5e9
    lam = SPEED_OF_LIGHT / f
    horns = {
        "X-band pyramidal 90×70 mm": HornGeometry("pyramidal", a, b, 0.090, 0.070, 0.160),
        "large pyramidal 30λ×24λ": HornGeometry("pyramidal", a, b, 30 * lam, 24 * lam, 120 * lam),
    }
    ratios = []

    # 1. closed-form boresight directivity, vectorised over a million horns × wavelengths
    n = 1_000_000
    rng = np.random.default_rng(0)
    sizes_a = rng.uniform(0.05, 0.30, n)
    sizes_b = rng.uniform(0.04, 0.25, n)
    apex_h = rng.uniform(0.10, 2.0, n)
    apex_e = rng.uniform(0.10, 2.0, n)
    wl = rng.uniform(0.02, 0.04, n)
    seconds = best_time(lambda: closed_form.boresight_directivity(sizes_a, sizes_b, apex_h, apex_e, wl), repeat=5)
    ratios.append(report("closed-form boresight directivity, 10^6 horns", n / seconds, 1e6, "eval/s", True))

    theta = np.linspace(-180, 180, 361)
    th, ph = np.meshgrid(np.arange(0, 181, 2.0), np.arange(0, 360, 2.0), indexing="ij")  # 91 × 180
    for name, horn in horns.items():
        # 2. exact-phase principal-plane cuts (both planes in one call), 361 angles
        seconds = best_time(lambda: exact_phase.principal_plane_cuts(horn, f, theta))
        ratios.append(report(f"exact-phase H+E cuts, 361 angles [{name}]", seconds * 1e3, 50.0, "ms", False))
        # 3. full pattern on a 2° grid, both models
        seconds = best_time(lambda: exact_phase.pattern(horn, f, th, ph), repeat=3)
        ratios.append(report(f"exact-phase full pattern 2° [{name}]", seconds, 1.0, "s", False))
        seconds = best_time(lambda: closed_form.pattern(horn, f, th, ph), repeat=3)
        ratios.append(report(f"closed-form full pattern 2° [{name}]", seconds, 1.0, "s", False))

    # context, no target: predict() over a 5-point band with the default 721-angle grid
    freqs = np.linspace(9.5e9, 11.5e9, 5)
    seconds = best_time(lambda: predict(horns["X-band pyramidal 90×70 mm"], freqs), repeat=3)
    print(f"{'predict(): 5 frequencies × 721 angles, both models':<60s} {seconds * 1e3:>12.4g} ms      (no target)")
    print(f"worst ratio {min(ratios):.2f} ({'all targets met' if min(ratios) >= 1 else 'some targets missed'})")


if __name__ == "__main__":
    main()
