"""The harness: case files, running both sides, metrics, convergence, verdicts, reports, CLI."""
