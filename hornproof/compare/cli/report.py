"""``hornproof report RESULT_DIR``: rebuild report.html from stored results."""

from pathlib import Path

from ...errors import InputError
from ..output.result_json import read_result_json
from ..output.terminal import emit


def report_command(args):
    folder = Path(args.result_dir)
    if not folder.is_dir():
        raise InputError(f"{folder}: not a folder (give the folder that holds result.json or sweep.json)")
    if (folder / "sweep.json").is_file():
        from ..report.html import build_sweep_report

        path = build_sweep_report(folder)
    elif (folder / "result.json").is_file():
        from ..report.html import build_report

        read_result_json(folder / "result.json")
        path = build_report(folder)
    else:
        raise InputError(f"{folder}: no result.json or sweep.json in this folder")
    emit(path)
    return 0
