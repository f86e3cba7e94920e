"""``hornproof report RESULT_DIR``: rebuild report.html from stored results."""

from pathlib import Path

from ...errors import InputError
from ..output.folders import path_text
from ..output.ownership import is_published_result, read_marker
from ..output.result_json import read_result_json
from ..output.terminal import emit


def setup_arguments(parser):
    parser.add_argument("result_dir", help="a published result folder of verify, simulate, sweep or map")


def run(args):
    # lazy: the report builder imports matplotlib (slow), which the parser of every command
    # would otherwise load
    from ..report.html import build_report, build_sweep_report
    from ..report.map_page import build_map_report

    folder = Path(args.result_dir)
    text = path_text(args.result_dir)
    if not folder.is_dir():
        raise InputError(f"{text}: not a folder (give the folder that holds result.json, sweep.json or map.json)")
    if not is_published_result(folder):
        raise InputError(f"{text}: not a published hornproof result folder (a leftover of a killed run, "
                         "or a folder hornproof did not write); refusing to build a report from it")
    kind = read_marker(folder)["kind"]
    if kind == "sweep" and (folder / "sweep.json").is_file():
        path = build_sweep_report(folder)
    elif kind == "map" and (folder / "map.json").is_file():
        path = build_map_report(folder)
    elif kind not in ("sweep", "map") and (folder / "result.json").is_file():
        read_result_json(folder / "result.json")
        try:
            path = build_report(folder)
        except (KeyError, TypeError, ValueError, IndexError, AttributeError) as error:
            raise InputError(f"{text}/result.json: cannot build a report from it: the summary is "
                             f"malformed ({type(error).__name__}: {error})") from None
    else:
        raise InputError(f"{text}: no result.json, sweep.json or map.json in this folder")
    emit(path)
    return 0
