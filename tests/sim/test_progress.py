"""Progress reporter: throttling, ETA arithmetic, TTY detection (suggested tests/sim/test_progress.py)."""

import io
import math

import pytest

from hornproof.sim.progress import ProgressReporter, decay_fraction, format_duration, time_fraction


class FakeClock:
    def __init__(self):
        self.now = 100.0

    def __call__(self):
        return self.now


class Terminal(io.StringIO):
    def isatty(self):
        return True


def test_eta_is_elapsed_times_remaining_over_done():
    # steady rate: 25 % done after 10 s leaves 30 s (arithmetic)
    clock = FakeClock()
    reporter = ProgressReporter(stream=io.StringIO(), enabled=True, clock=clock, master_only=False)
    clock.now += 10.0
    assert reporter.eta(0.25) == pytest.approx(30.0)
    assert reporter.eta(0.0) is None


def test_at_most_one_line_per_interval():
    clock = FakeClock()
    stream = io.StringIO()
    reporter = ProgressReporter("case", stream=stream, enabled=True, clock=clock,
                                master_only=False, interval=2.0)
    for i in range(100):  # 100 updates over 9.9 s
        reporter.update(i / 100)
        clock.now += 0.1
    # lines at t = 0, 2, 4, 6, 8 s (within float rounding of the 0.1 s steps: 5 or 6)
    assert 5 <= reporter.lines_written <= 6
    assert reporter.finish() is True  # the last line is never throttled
    assert stream.getvalue().splitlines()[-1].startswith("case: 100 %")


def test_silent_unless_a_terminal_or_asked():
    assert ProgressReporter(stream=io.StringIO()).update(0.5) is False
    terminal = Terminal()
    assert ProgressReporter(stream=terminal, master_only=False).update(0.5) is True
    assert ProgressReporter(stream=terminal, enabled=False).update(0.5) is False


def test_accepts_simulate_progress_dicts():
    stream = io.StringIO()
    reporter = ProgressReporter(stream=stream, enabled=True, master_only=False)
    reporter({"stage": "stepping", "meep_time": 50.0, "time_cap": 200.0, "elapsed_s": 1.0})
    assert " 25 %" in stream.getvalue() and "bound" in stream.getvalue()


def test_fractions():
    assert time_fraction(5.0, 20.0) == 0.25
    assert time_fraction(30.0, 20.0) == 1.0
    # 1e-2 is half of the decades from 1 down to 1e-4 (log arithmetic)
    assert decay_fraction(1e-2, 1e-4) == pytest.approx(0.5)
    assert decay_fraction(2.0, 1e-4) == 0.0
    with pytest.raises(ValueError, match="decay_by"):
        decay_fraction(0.5, 2.0)
    assert format_duration(65) == "1 min 05 s" and format_duration(math.nan) == "?"
