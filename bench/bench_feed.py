"""Benchmark of the feed figures: prints measured overhead ratios (a benchmark, not a test).

Targets (issue "what a feed engineer reads off a horn"):

  feed     phase centres, 45° cut and feed efficiencies add at most 5 % to a ``verify`` of the
           shipped pyramidal case (feed field evaluation in every rung's post-processing, the
           figures of the aperture models and of every rung, the feed block, the CSV tables)
  dense    101 S11 points (a second guide mode monitor) add at most 3 % to a run

Method: one ``verify`` of ``cases/pyramidal.toml`` (its default ladder; ``--quick``: a two-rung
14/17 ladder) with timing wrappers around the feed steps, so the feed share is measured inside
the same run; then the coarsest rung run with, without and again without the dense monitor (A/B, the
dense S11 read-out timed inside). Times are CPU time of this process (``time.process_time``;
Meep runs in it, one rank), steadier than wall time on a shared machine. Everything is
written into a temporary folder.
Usage: ``.venv/bin/python bench/bench_feed.py [--quick]``.
"""

import argparse
import os
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

TARGETS = {"feed": 0.05, "dense": 0.03}


def timed(module, name, bucket, key, condition=None):
    """Wrap ``module.name`` so its wall time adds to ``bucket[key]`` (when ``condition(args)``)."""
    original = getattr(module, name)

    def wrapper(*args, **kwargs):
        started = time.process_time()
        try:
            return original(*args, **kwargs)
        finally:
            if condition is None or condition(args):
                bucket[key] = bucket.get(key, 0.0) + time.process_time() - started
    setattr(module, name, wrapper)
    return original


def feed_share(quick):
    from hornproof.compare.case.casefile import load_case
    from hornproof.compare.jobs import verify
    from hornproof.sim import postprocess

    bucket = {}
    timed(postprocess, "feed_pattern", bucket, "feed field (every rung)")
    timed(postprocess, "axis_reflection", bucket, "dense S11 read-out")
    timed(verify, "add_feed_figures", bucket, "feed figures (models + rungs)")
    timed(verify, "feed_block", bucket, "feed block")
    timed(verify, "write_csv_tables", bucket, "CSV tables")
    case = load_case(ROOT / "cases" / "pyramidal.toml")
    if quick:
        case = case.with_cells([14, 17])
    with tempfile.TemporaryDirectory(prefix="bench-feed-") as folder:
        started = time.process_time()
        verify.verify_case(case, Path(folder) / "out")
        total = time.process_time() - started
    return total, bucket


def dense_ab(cells):
    import numpy as np

    from hornproof.compare.case.casefile import load_case
    from hornproof.sim import run

    case = load_case(ROOT / "cases" / "pyramidal.toml")
    original = run.dense_band
    times = {}
    for label, band in (("without", lambda f: None), ("with", original), ("without again", lambda f: None)):
        run.dense_band = band
        started = time.process_time()
        result = run.simulate(case.horn, case.frequencies, case.fdtd, cells)
        times[label] = time.process_time() - started
        if label == "with":
            assert result.dense_band is not None and len(result.dense_band["frequencies_hz"]) >= 101
    run.dense_band = original
    base = float(np.mean([times["without"], times["without again"]]))
    return times, base


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="two coarse rungs instead of the default ladder")
    args = parser.parse_args()
    os.environ.setdefault("MPLBACKEND", "Agg")
    total, bucket = feed_share(args.quick)
    print(f"verify of cases/pyramidal.toml{' (quick ladder 14/17)' if args.quick else ''}: {total:.1f} s")
    feed = sum(v for k, v in bucket.items() if not k.startswith("dense"))
    for key, value in bucket.items():
        print(f"  {key:<32} {value:7.2f} s  ({100 * value / total:.2f} %)")
    ratio = feed / max(total - feed, 1e-9)
    print(f"feed: overhead {100 * ratio:.2f} % of the run without it (target <= {100 * TARGETS['feed']:.0f} %): "
          f"{'met' if ratio <= TARGETS['feed'] else 'NOT met'}")
    times, base = dense_ab(14.0 if args.quick else 17.2)
    dense_post = bucket.get("dense S11 read-out", 0.0)
    print("dense band A/B on one rung: " + ", ".join(f"{k} {v:.2f} s" for k, v in times.items()))
    ratio = (times["with"] - base) / base
    print(f"dense: overhead {100 * ratio:+.2f} % of the run (target <= {100 * TARGETS['dense']:.0f} %; CPU-time "
          f"noise of repeated runs is a few %); dense read-out inside verify "
          f"{100 * dense_post / total:.2f} % of it")


if __name__ == "__main__":
    main()
