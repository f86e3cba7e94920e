"""One-port Touchstone files (.s1p): the feed's reflection coefficient over frequency.

Format: Touchstone File Format Specification (IBIS Open Forum), version 1.1 and version 2.0.
A version 1 file is comment lines (``!``), one option line ``# <freq unit> S <format> R <ohm>``
and one data line per frequency: ``freq re(S11) im(S11)`` for the ``RI`` format. Version 2.0
adds keyword lines (``[Version] 2.0``, ``[Number of Ports]``, ``[Number of Frequencies]``,
``[Network Data]``, ``[End]``) around the same option and data lines.

What our S11 is
---------------
S11 here is the reflection coefficient of the TE10 *waveguide mode* at the feed's reference
plane: the complex amplitude of the backward TE10 wave divided by that of the forward wave,
both taken from the solver's fields by projection onto the mode profile. A wave ratio in a
guide is normalised to the mode's own wave impedance Z_TE = η0 / √(1 − (f_c/f)²), which varies
with frequency; there is no 50 Ω anywhere in the model. Touchstone's option line can hold only
one constant resistance, so we write ``R 1`` there (configurable) — the values are *normalised*
— and say in the comments what they are normalised to: the guide's TE10 wave impedance,
listed per frequency when the caller gives it. A reader must therefore use them as they are
and must **not** renormalise them to another impedance: |S11|, return loss and VSWR are the
physically meaningful figures. (Earlier files wrote ``R 50``, which a reader could take for a
50 Ω port: it was not one.)
"""

import datetime
import math
import re
from dataclasses import dataclass, field

import numpy as np

from ...version import build_version
from ...atomic import write_text_atomic
from ...units import GHZ

__all__ = ["OnePortData", "write_s1p", "read_s1p"]

#: Touchstone frequency-unit keywords and their size in Hz (spec: option line).
FREQUENCY_UNITS = {"HZ": 1.0, "KHZ": 1e3, "MHZ": 1e6, "GHZ": GHZ}

REFERENCE_NOTE = ("reference: the feed guide's TE10 wave impedance Z_TE(f) = eta0 / sqrt(1 - (fc/f)^2), "
                  "not 50 ohm; the option line's R holds one constant only, so R there marks "
                  "normalised values and is not an impedance of the model")


@dataclass
class OnePortData:
    """The contents of a one-port Touchstone file, SI inside.

    Attributes
    ----------
    frequencies : ndarray
        Hz, shape [nf].
    s11 : ndarray of complex
        Reflection coefficient, shape [nf].
    reference_resistance : float
        Ohm, from the option line (nominal for our files; see the module notes).
    version : str
        "1" or "2.0".
    comments : list of str
        Comment text without the leading ``!``.
    """

    frequencies: np.ndarray
    s11: np.ndarray
    reference_resistance: float
    version: str
    comments: list = field(default_factory=list)


def _clean_comment(text):
    """One comment line: no line breaks, so a case name cannot inject data lines."""
    return " ".join(str(text).split())


def write_s1p(path, frequencies, s11, *, case_name, solver_version, version=1,
              reference_resistance=1.0, created=None, comments=(), wave_impedances=None):
    """Write a one-port Touchstone file atomically.

    Parameters
    ----------
    path : str or os.PathLike
        Target file; by convention it ends in ``.s1p``.
    frequencies : array_like
        Hz, strictly increasing, positive (the spec requires increasing frequencies).
    s11 : array_like of complex
        TE10 reflection coefficient at each frequency (finite).
    case_name : str
        Written in a comment line.
    solver_version : str
        E.g. ``"meep 1.25.0"``; written in a comment line.
    version : {1, 2}
        Touchstone version 1 (option line only) or 2.0 (keyword lines).
    reference_resistance : float
        The option line's R (1: normalised values; see the module notes).
    wave_impedances : array_like, optional
        The TE10 wave impedance (ohm) at each frequency, listed in the comments as the true
        reference of each value.
    created : datetime.datetime, optional
        Time stamp for the comments (UTC now by default).
    comments : iterable of str
        Further comment lines.

    Returns
    -------
    str
        The text written.
    """
    frequencies = np.asarray(frequencies, dtype=float)
    s11 = np.asarray(s11, dtype=complex)
    if frequencies.ndim != 1 or frequencies.size == 0:
        raise ValueError("frequencies: expected a non-empty 1-D array (Hz)")
    if s11.shape != frequencies.shape:
        raise ValueError(f"s11: shape {s11.shape} does not match frequencies {frequencies.shape}")
    if not np.all(np.isfinite(frequencies)) or np.any(frequencies <= 0):
        raise ValueError("frequencies: must be finite and positive (Hz)")
    if np.any(np.diff(frequencies) <= 0):
        raise ValueError("frequencies: must be strictly increasing (Touchstone requires it)")
    if not np.all(np.isfinite(s11)):
        raise ValueError("s11: must be finite (Touchstone has no missing-value marker)")
    if version not in (1, 2):
        raise ValueError(f"version: expected 1 or 2, got {version!r}")
    if not (reference_resistance > 0 and math.isfinite(reference_resistance)):
        raise ValueError("reference_resistance: must be a positive number of ohm")
    created = created or datetime.datetime.now(datetime.timezone.utc)
    lines = [
        f"! hornproof {build_version()} one-port reflection of the horn feed",
        f"! case: {_clean_comment(case_name)}",
        f"! solver: {_clean_comment(solver_version)}",
        f"! created: {created.isoformat(timespec='seconds')}",
        f"! {REFERENCE_NOTE}",
        "! S11 is the TE10 mode reflection (backward/forward wave); do not renormalise to R.",
    ]
    if wave_impedances is not None:
        impedances = np.asarray(wave_impedances, dtype=float)
        if impedances.shape != frequencies.shape:
            raise ValueError("wave_impedances: one value per frequency expected")
        lines.append("! Z_TE (ohm) per frequency: " + ", ".join(
            f"{f / GHZ:.6g} GHz {z:.2f}" for f, z in zip(frequencies, impedances)))
    lines += [f"! {_clean_comment(c)}" for c in comments]
    option = f"# GHZ S RI R {reference_resistance:g}"
    if version == 2:
        lines += [
            "[Version] 2.0",
            option,
            "[Number of Ports] 1",
            f"[Number of Frequencies] {frequencies.size}",
            f"[Reference] {reference_resistance:g}",
            "[Network Data]",
        ]
    else:
        lines.append(option)
    lines.append("! freq_GHz  re(S11)  im(S11)")
    for f, s in zip(frequencies, s11):
        lines.append(f"{f / GHZ:.15g} {s.real:.17g} {s.imag:.17g}")
    if version == 2:
        lines.append("[End]")
    text = "\n".join(lines) + "\n"
    write_text_atomic(path, text, encoding="ascii")
    return text


_KEYWORD = re.compile(r"^\[([^\]]+)\]\s*(.*)$")
#: keywords of Touchstone 2.0 that carry nothing a one-port reader needs
_IGNORED_KEYWORDS = ("network data", "matrix format", "begin information", "end information",
                     "two-port data order")


def _read_keyword(keyword, header, where):
    """Apply one ``[Keyword] value`` line to ``header`` (Touchstone 2.0)."""
    name, value = keyword.group(1).strip().lower(), keyword.group(2).strip()
    if name == "version":
        header["version"] = value
    elif name == "number of ports":
        header["declared_ports"] = int(value)
    elif name == "number of frequencies":
        header["declared_frequencies"] = int(value)
    elif name == "reference":
        header["resistance"] = float(value.split()[0])
    elif name == "end":
        header["ended"] = True
    elif name not in _IGNORED_KEYWORDS:
        raise ValueError(f"{where}: unsupported keyword [{keyword.group(1)}]")


def _read_option_line(text, header, where):
    """Apply the option line ``# <unit> <parameter> <format> R <ohm>`` to ``header``."""
    if header["option_seen"]:
        raise ValueError(f"{where}: second option line")
    header["option_seen"] = True
    tokens = text[1:].upper().split()
    i = 0
    while i < len(tokens):
        token = tokens[i]
        if token in FREQUENCY_UNITS:
            header["unit"] = token
        elif token in ("RI", "MA", "DB"):
            header["data_format"] = token
        elif token in ("S", "Y", "Z", "H", "G"):
            header["parameter"] = token
        elif token == "R" and i + 1 < len(tokens):
            header["resistance"] = float(tokens[i + 1])
            i += 1
        else:
            raise ValueError(f"{where}: unknown option {token!r}")
        i += 1


def _complex_values(first, second, data_format):
    """S from a data line's two numbers: RI (re, im), MA (|S|, deg) or DB (20 log10 |S|, deg)."""
    if data_format == "RI":
        return first + 1j * second
    if data_format == "MA":
        return first * np.exp(1j * np.radians(second))
    return 10.0 ** (first / 20.0) * np.exp(1j * np.radians(second))


def _checked_table(path, header, numbers):
    """The data as rows (freq, value, value), checked against the header."""
    if header["parameter"] != "S":
        raise ValueError(f"{path}: only S parameters are supported, file has {header['parameter']}")
    if header["declared_ports"] not in (None, 1):
        raise ValueError(f"{path}: [Number of Ports] is {header['declared_ports']}, expected 1")
    if len(numbers) % 3:
        raise ValueError(f"{path}: data is not in triples (freq, value, value)")
    table = np.array(numbers, dtype=float).reshape(-1, 3)
    declared = header["declared_frequencies"]
    if declared is not None and declared != len(table):
        raise ValueError(f"{path}: [Number of Frequencies] says {declared}, found {len(table)}")
    return table


def read_s1p(path):
    """Read a one-port Touchstone file (version 1 or 2.0; formats RI, MA, DB).

    Made for hornproof's own files, and strict: anything it does not understand is a
    ``ValueError`` naming the file and line.

    Returns
    -------
    OnePortData
    """
    path = str(path)
    with open(path, encoding="ascii", errors="replace") as handle:
        raw_lines = handle.read().splitlines()
    comments, numbers = [], []
    header = {"unit": "GHZ", "data_format": "MA", "parameter": "S", "resistance": 50.0,  # spec defaults
              "version": "1", "option_seen": False, "ended": False,
              "declared_ports": None, "declared_frequencies": None}
    for number, raw in enumerate(raw_lines, start=1):
        where = f"{path}: line {number}"
        text, has_comment, comment = raw.partition("!")
        if has_comment:
            comments.append(comment.strip())
        text = text.strip()
        if not text or header["ended"]:
            continue
        keyword = _KEYWORD.match(text)
        if keyword:
            _read_keyword(keyword, header, where)
        elif text.startswith("#"):
            _read_option_line(text, header, where)
        else:
            try:
                numbers.extend(float(t) for t in text.split())
            except ValueError:
                raise ValueError(f"{where}: expected numbers, got {text!r}") from None
    table = _checked_table(path, header, numbers)
    frequencies = table[:, 0] * FREQUENCY_UNITS[header["unit"]]
    s11 = _complex_values(table[:, 1], table[:, 2], header["data_format"])
    return OnePortData(frequencies, s11, header["resistance"], header["version"], comments)
