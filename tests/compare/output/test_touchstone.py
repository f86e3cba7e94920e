"""One-port Touchstone files: checked against scikit-rf (a reference reader on PyPI) and the
Touchstone File Format Specification (IBIS Open Forum, versions 1.1 and 2.0)."""

import datetime
import os

import numpy as np
import pytest

skrf = pytest.importorskip("skrf")

from hornproof.compare.output.touchstone import read_s1p, write_s1p  # noqa: E402


def _band():
    # An arbitrary complex reflection over X band (invented values: |S11| < 1, varied phase).
    frequencies = np.linspace(8.2e9, 12.4e9, 9)
    s11 = (0.05 + 0.3 * np.linspace(0, 1, 9)) * np.exp(1j * np.linspace(-3.0, 3.0, 9))
    return frequencies, s11


@pytest.mark.parametrize("version", [1, 2])
def test_written_file_reads_back_through_scikit_rf(tmp_path, version):
    frequencies, s11 = _band()
    path = tmp_path / "feed.s1p"
    write_s1p(path, frequencies, s11, case_name="x-band check", solver_version="meep 1.25.0",
              version=version)
    network = skrf.Network(str(path))  # reference library reading the spec's format
    assert network.nports == 1
    # tolerance: 1e-9 absolute on S11 (we write 17 significant digits), 1e-12 relative on f
    np.testing.assert_allclose(network.f, frequencies, rtol=1e-12)
    np.testing.assert_allclose(network.s[:, 0, 0], s11, rtol=0, atol=1e-9)
    # the option line's R 1 (normalised values) is what skrf reports as the port reference
    # (spec: "R n"); hornproof's S11 is normalised to the guide, not to 50 ohm
    np.testing.assert_allclose(network.z0[:, 0].real, 1.0)
    ours = read_s1p(path)
    np.testing.assert_allclose(ours.frequencies, network.f, rtol=1e-12)
    np.testing.assert_allclose(ours.s11, network.s[:, 0, 0], rtol=0, atol=1e-12)
    assert ours.version == ("2.0" if version == 2 else "1")


def test_option_line_and_comments(tmp_path):
    frequencies, s11 = _band()
    path = tmp_path / "feed.s1p"
    when = datetime.datetime(2026, 1, 2, 3, 4, 5, tzinfo=datetime.timezone.utc)
    text = write_s1p(path, frequencies, s11, case_name="two\nlines", solver_version="meep 1.25.0",
                     created=when)
    lines = text.splitlines()
    # spec 1.1: exactly one option line "# <freq unit> <parameter> <format> R <n>"
    options = [line for line in lines if line.startswith("#")]
    assert options == ["# GHZ S RI R 1"]  # normalised: the guide's reference is no 50 ohm
    # spec: comments start with "!"; a line break in the case name must not make a data line
    assert "! case: two lines" in lines
    assert "! created: 2026-01-02T03:04:05+00:00" in lines
    assert any("TE10 wave impedance" in line and "not 50 ohm" in line for line in lines)
    data = [line for line in lines if line and line[0] not in "!#"]
    assert len(data) == len(frequencies)
    assert open(path).read() == text


def test_version_2_keywords_in_the_order_of_the_spec(tmp_path):
    frequencies, s11 = _band()
    text = write_s1p(tmp_path / "v2.s1p", frequencies, s11, case_name="c",
                     solver_version="meep", version=2)
    keywords = [line.split("]")[0] + "]" for line in text.splitlines() if line.startswith("[")]
    # Touchstone 2.0: [Version] first, then the option line, [Number of Ports],
    # [Number of Frequencies], [Reference], [Network Data], ..., [End] last (from memory of
    # the spec's keyword order)
    assert keywords == ["[Version]", "[Number of Ports]", "[Number of Frequencies]",
                        "[Reference]", "[Network Data]", "[End]"]
    non_comment = [line for line in text.splitlines() if not line.startswith("!")]
    assert non_comment[0] == "[Version] 2.0"
    assert non_comment[1].startswith("#")
    assert "[Number of Frequencies] 9" in text


def test_specification_one_port_example(tmp_path):
    # Touchstone specification, "Example 1 (Version 1.0)": one-port S-parameters, one
    # frequency, magnitude-angle format. Rebuilt FROM MEMORY (text and numbers may differ
    # slightly from the published example; the check is that both readers agree on it).
    text = ("!1-port S-parameter file, single frequency point\n"
            "# MHz S MA R 50\n"
            "!freq magS11 angS11\n"
            "2.000 0.894 -12.136\n")
    path = tmp_path / "example1.s1p"
    path.write_text(text)
    network = skrf.Network(str(path))
    ours = read_s1p(path)
    expected = 0.894 * np.exp(1j * np.radians(-12.136))  # MA: magnitude, angle in degrees
    np.testing.assert_allclose(network.f, [2.0e6])
    np.testing.assert_allclose(ours.frequencies, [2.0e6])
    np.testing.assert_allclose(network.s[0, 0, 0], expected, atol=1e-12)
    np.testing.assert_allclose(ours.s11[0], network.s[0, 0, 0], atol=1e-12)
    assert ours.reference_resistance == 50.0


def test_db_format_agrees_with_scikit_rf(tmp_path):
    # spec: DB format = 20·log10|S| and angle in degrees; the values are our own
    text = "# Hz S DB R 50\n1e9 -6.0206 90\n2e9 -20 -45\n"
    path = tmp_path / "db.s1p"
    path.write_text(text)
    np.testing.assert_allclose(read_s1p(path).s11, skrf.Network(str(path)).s[:, 0, 0],
                               atol=1e-12)


@pytest.mark.parametrize("frequencies, s11, message", [
    ([10e9, 9e9], [0.1, 0.1], "increasing"),
    ([9e9, 10e9], [0.1, np.nan], "finite"),
    ([9e9, 10e9], [0.1], "shape"),
    ([-1.0, 10e9], [0.1, 0.1], "positive"),
])
def test_bad_input_is_refused_and_leaves_nothing(tmp_path, frequencies, s11, message):
    path = tmp_path / "bad.s1p"
    with pytest.raises(ValueError, match=message):
        write_s1p(path, frequencies, s11, case_name="c", solver_version="meep")
    assert os.listdir(tmp_path) == []


def test_reader_refuses_a_two_port_file(tmp_path):
    path = tmp_path / "two.s1p"
    path.write_text("[Version] 2.0\n# GHz S RI R 50\n[Number of Ports] 2\n"
                    "[Two-Port Data Order] 12_21\n[Number of Frequencies] 1\n[Network Data]\n"
                    "1 0 0 0 0 0 0 0 0\n[End]\n")
    with pytest.raises(ValueError, match="Number of Ports"):
        read_s1p(path)


def test_header_lists_the_guide_wave_impedance_as_the_reference(tmp_path):
    # The TE10 wave impedance eta0 / sqrt(1 - (fc/f)^2) (Pozar, Microwave Engineering, 4th ed.,
    # sec. 3.3) of WR-90 (a = 22.86 mm, fc = c/2a = 6.5572 GHz) at 10 GHz, by hand:
    # (fc/f)^2 = 0.42997, sqrt(0.57003) = 0.75500, 376.73 / 0.75500 = 499.0 ohm.
    # The header must name that reference, never a 50 ohm port.
    from hornproof.analytic.waveguide import te10_wave_impedance

    frequencies = np.array([10e9, 11e9])
    impedances = te10_wave_impedance(frequencies, 22.86e-3)
    assert impedances[0] == pytest.approx(499.0, abs=0.2)
    text = write_s1p(tmp_path / "g.s1p", frequencies, np.array([0.1, 0.2j]), case_name="c",
                     solver_version="meep", wave_impedances=impedances)
    header = [line for line in text.splitlines() if line.startswith("!")]
    assert any("10 GHz 498.97" in line for line in header)
    assert "R 50" not in text
