"""A progress line with an ETA on stderr while Meep steps.

Progress is a fraction in [0, 1], from one of two measures:

* simulated time against a target: ``time_fraction(meep_time, target_time)``;
* decay of the DFT fields towards the stop criterion of ``stop_when_dft_decayed``: the
  relative change falls from about 1 to ``decay_by``, roughly exponentially, so the fraction
  is the share of decades covered, ``log(change) / log(decay_by)`` (``decay_fraction``).

The reporter prints at most one line per ``interval`` seconds (2 s by default), only on the
master process under MPI, and only to a terminal unless ``enabled=True`` is given (so logs
and CI output stay clean). ETA = elapsed · (1 − f) / f, which assumes a steady rate.
"""

import math
import sys
import time

from . import mpi

__all__ = ["time_fraction", "decay_fraction", "format_duration", "ProgressReporter"]


def time_fraction(meep_time, target_time):
    """Share of the target simulated time done, clipped to [0, 1]."""
    if not target_time > 0:
        raise ValueError("target_time: must be > 0")
    return min(1.0, max(0.0, meep_time / target_time))


def decay_fraction(relative_change, decay_by):
    """Share of the decades from 1 down to ``decay_by`` covered by ``relative_change``.

    Parameters
    ----------
    relative_change : float
        Current relative change of the DFT fields (1 at the start, falls as they settle).
    decay_by : float
        Stop threshold, 0 < decay_by < 1 (e.g. 1e-4).
    """
    if not 0 < decay_by < 1:
        raise ValueError("decay_by: must be between 0 and 1")
    if not relative_change > 0 or not math.isfinite(relative_change):
        return 1.0 if relative_change == 0 else 0.0
    return min(1.0, max(0.0, math.log(relative_change) / math.log(decay_by)))


def format_duration(seconds):
    """``"42 s"``, ``"3 min 05 s"``, ``"1 h 07 min"``; ``"?"`` when unknown."""
    if seconds is None or not math.isfinite(seconds) or seconds < 0:
        return "?"
    seconds = int(round(seconds))
    if seconds < 60:
        return f"{seconds} s"
    if seconds < 3600:
        return f"{seconds // 60} min {seconds % 60:02d} s"
    return f"{seconds // 3600} h {(seconds % 3600) // 60:02d} min"


def _on_master():
    """Rank 0? Asks Meep only if it is already imported: importing it just for this would
    print Meep's MPI banner on stdout; before that, the launcher's environment tells."""
    if "meep" in sys.modules:
        return mpi.is_master()
    return mpi._environment_rank() == 0


class ProgressReporter:
    """Throttled progress lines ``<label>: 37 % … elapsed 12 s, ETA 20 s`` on stderr.

    Parameters
    ----------
    label : str
        Start of each line (e.g. the case name and resolution).
    stream : file, optional
        Default ``sys.stderr``.
    interval : float
        Minimum seconds between two lines.
    enabled : bool, optional
        True: always print; False: never; None (default): only if ``stream`` is a terminal.
    master_only : bool
        Print only on MPI rank 0 (default).
    clock : callable
        Monotonic clock in seconds (tests pass their own).
    """

    def __init__(self, label="fdtd", *, stream=None, interval=2.0, enabled=None,
                 master_only=True, clock=time.monotonic):
        self.label = label
        self.stream = stream if stream is not None else sys.stderr
        self.interval = float(interval)
        self.clock = clock
        if enabled is None:
            isatty = getattr(self.stream, "isatty", None)
            enabled = bool(isatty and isatty())
        if enabled and master_only:
            enabled = _on_master()
        self.enabled = bool(enabled)
        self.start = clock()
        self._last_line = None
        self.lines_written = 0

    def eta(self, fraction, now=None):
        """Seconds left at ``fraction`` done (None before any progress)."""
        now = self.clock() if now is None else now
        if not fraction > 0:
            return None
        return (now - self.start) * (1.0 - fraction) / fraction

    def update(self, fraction, note="", *, force=False):
        """Report ``fraction`` in [0, 1]; prints if enabled and the interval has passed."""
        if not self.enabled:
            return False
        now = self.clock()
        if not force and self._last_line is not None and now - self._last_line < self.interval:
            return False
        fraction = min(1.0, max(0.0, float(fraction)))
        eta = format_duration(self.eta(fraction, now))
        text = (f"{self.label}: {100 * fraction:3.0f} %  elapsed "
                f"{format_duration(now - self.start)}, ETA {eta}")
        if note:
            text += f"  ({note})"
        self.stream.write(text + "\n")
        self.stream.flush()
        self._last_line = now
        self.lines_written += 1
        return True

    def __call__(self, report, note=""):
        """Take a fraction, or the dict that ``sim.run.simulate`` passes to ``progress``
        (``stage``, ``meep_time``, ``time_cap``, ``elapsed_s``). The cap is the longest the
        run may take (it usually stops earlier on DFT decay), so the ETA is an upper bound."""
        if not isinstance(report, dict):
            return self.update(report, note)
        if report.get("stage") == "done":
            return self.finish()
        meep_time, cap = report.get("meep_time"), report.get("time_cap")
        if meep_time is None or not cap:
            return False
        return self.update(time_fraction(meep_time, cap),
                           note or f"t = {meep_time:.0f} of at most {cap:.0f}; ETA is a bound")

    def meep_time_step(self, target_time):
        """A Meep step function (``sim.run(reporter.meep_time_step(T), until=T)``)."""

        def step(simulation):
            self.update(time_fraction(simulation.meep_time(), target_time),
                        f"t = {simulation.meep_time():.1f} of {target_time:.1f}")

        return step

    def finish(self, note="done"):
        """A last line at 100 % (always printed when enabled)."""
        return self.update(1.0, note, force=True)
