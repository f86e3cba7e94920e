"""The RF-exposure caution that every report and README-like output carries, in one place.

Plain text (no markup); callers escape it for HTML. The wording is hornproof's own; the
limits it points to are IEEE C95.1-2019 and the ICNIRP (2020) guidelines.

References
----------
IEEE Std C95.1-2019, IEEE Standard for Safety Levels with Respect to Human Exposure to
Electric, Magnetic, and Electromagnetic Fields, 0 Hz to 300 GHz.
International Commission on Non-Ionizing Radiation Protection, "Guidelines for limiting
exposure to electromagnetic fields (100 kHz to 300 GHz)", Health Physics 118 (2020) 483–524.
"""

#: Heading for the caution block.
RF_EXPOSURE_HEADING = "RF exposure caution"

#: The caution itself, plain text, one paragraph.
RF_EXPOSURE_CAUTION = (
    "A horn concentrates its power into a narrow beam: the field in front of an energised "
    "horn, and inside or near its aperture, can exceed human exposure limits even at modest "
    "transmitter power. Before anyone works near an energised horn, assess the exposure "
    "against the limits of IEEE C95.1-2019 and the ICNIRP (2020) guidelines, and follow the "
    "local regulations and the practice of licensed RF professionals where they differ or "
    "go further. The figures computed by hornproof are a design aid: they are not a "
    "substitute for measurement of the built antenna before it is deployed."
)
