"""``hornproof report RESULT_DIR``: rebuild report.html from stored results."""

from pathlib import Path

from ...errors import InputError
from ..output.result_json import read_result_json
from ..output.terminal import emit


def setup_arguments(parser):
    parser.add_argument("result_dir", help="a folder holding result.json, sweep.json or map.json "
                                           "(from verify, sweep or map)")


def run(args):
    # lazy: the report builder imports matplotlib (slow), which the parser of every command
    # would otherwise load
    from ..report.html import build_report, build_sweep_report
    from ..report.map_page import build_map_report

    folder = Path(args.result_dir)
    if not folder.is_dir():
        raise InputError(f"{folder}: not a folder (give the folder that holds result.json, sweep.json or map.json)")
    if (folder / "sweep.json").is_file():
        path = build_sweep_report(folder)
    elif (folder / "map.json").is_file():
        path = build_map_report(folder)
    elif (folder / "result.json").is_file():
        read_result_json(folder / "result.json")
        path = build_report(folder)
    else:
        raise InputError(f"{folder}: no result.json, sweep.json or map.json in this folder")
    emit(path)
    return 0
