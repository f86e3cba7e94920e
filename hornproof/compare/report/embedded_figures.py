"""The figures of a result folder, read as base64 PNG data for a self-contained page.

Order: :data:`hornproof.compare.report.plots.STANDARD_STEMS` first, then any other ``*.png``
alphabetically (hidden files, such as temporary ones, are skipped).
"""

import base64
from pathlib import Path

from .plots import STANDARD_STEMS


def ordered_pngs(folder):
    """The PNG files of ``folder`` in report order."""
    pngs = sorted(p for p in Path(folder).glob("*.png") if not p.name.startswith("."))
    return sorted(pngs, key=lambda p: (STANDARD_STEMS.index(p.stem) if p.stem in STANDARD_STEMS
                                       else len(STANDARD_STEMS), p.name))


def embedded_figures(folder, captions):
    """``[{"alt", "data", "caption"}]`` for each PNG in ``folder``; ``captions`` maps a stem to its
    caption (a stem without one is captioned with its words)."""
    out = []
    for path in ordered_pngs(folder):
        words = path.stem.replace("_", " ")
        out.append({"alt": words, "caption": captions.get(path.stem, words),
                    "data": base64.b64encode(path.read_bytes()).decode("ascii")})
    return out
