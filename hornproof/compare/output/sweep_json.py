"""Reading ``sweep.json`` (schema ``hornproof.sweep/1``), the summary of ``hornproof sweep``.

Its keys are described in :mod:`hornproof.compare.report.sweep_page`. Readers refuse any
other schema string with one line naming the file and the schema this version reads.
"""

from .result_json import read_schema_json

SWEEP_SCHEMA = "hornproof.sweep/1"


def read_sweep_json(path):
    """The ``hornproof.sweep/1`` summary in ``path`` as a dict (refuses other schemas)."""
    return read_schema_json(path, SWEEP_SCHEMA)
