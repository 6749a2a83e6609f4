"""Unit parsing against the definitions of the units themselves.

Sources: SI prefixes (BIPM, The International System of Units, 9th ed., 2019); the inch
is exactly 25.4 mm (international yard and pound agreement, 1959), so 1 mil = 25.4 um
exactly; 1 oz copper = 1.37 mil = 34.8 um thick (common practice of board fabricators).
"""

from __future__ import annotations

import math

import pytest

from losslane.errors import LossLaneError
from losslane.units import (
    format_frequency,
    format_length,
    parse_capacitance,
    parse_conductivity,
    parse_data_rate,
    parse_decibel,
    parse_frequency,
    parse_frequency_list,
    parse_inductance,
    parse_length,
    parse_quantity,
    parse_resistance,
)

# (text, metres) -- SI prefixes (BIPM SI brochure) and the 1959 inch (25.4 mm exactly)
LENGTHS = [
    ("1 m", 1.0),
    ("2.5m", 2.5),
    ("10 cm", 0.1),
    ("0.127 mm", 0.127e-3),
    ("35 um", 35e-6),
    ("35 \u00b5m", 35e-6),  # micro sign
    ("35 \u03bcm", 35e-6),  # Greek small mu
    ("100 nm", 100e-9),
    ("1 mil", 25.4e-6),
    ("5 mils", 5 * 25.4e-6),
    ("3 thou", 3 * 25.4e-6),
    ("1 in", 25.4e-3),
    ("1.2 inch", 1.2 * 25.4e-3),
    ('2"', 2 * 25.4e-3),
    ("1e-3 m", 1e-3),
    (".5 mm", 0.5e-3),
    ("  6mil  ", 6 * 25.4e-6),
]


@pytest.mark.parametrize(("text", "metres"), LENGTHS)
def test_lengths(text: str, metres: float) -> None:
    assert parse_length(text) == pytest.approx(metres, rel=1e-15)


def test_mil_is_a_thousandth_of_the_1959_inch() -> None:
    # 1 in = 25.4 mm exactly (1959 agreement); 1 mil = 1/1000 in
    assert parse_length("1000 mil") == pytest.approx(parse_length("1 in"), rel=1e-15)
    assert parse_length("1 in") == pytest.approx(parse_length("25.4 mm"), rel=1e-15)


@pytest.mark.parametrize(
    ("text", "metres"), [("1 oz", 34.8e-6), ("0.5 oz", 17.4e-6), ("2oz", 69.6e-6)]
)
def test_ounce_copper(text: str, metres: float) -> None:
    # 1 oz/ft^2 copper foil is 1.37 mil = 34.8 um thick (common practice). The mass-based
    # figure (28.35 g over 1 ft^2 at 8.96 g/cm^3) is 34.1 um; the trade rounds to 1.37 mil.
    assert parse_length(text) == pytest.approx(metres, rel=1e-12)
    assert parse_length("1 oz") == pytest.approx(parse_length("1.37 mil"), rel=2e-3)


@pytest.mark.parametrize(
    ("text", "hz"),
    [
        ("0 Hz", 0.0),
        ("1 Hz", 1.0),
        ("50 kHz", 5e4),
        ("500 MHz", 5e8),
        ("10 GHz", 1e10),
        ("1.5 THz", 1.5e12),
        ("10ghz", 1e10),  # nobody means millihertz: frequency units are caseless
        ("10 GHZ", 1e10),
        ("2.4e9 Hz", 2.4e9),
    ],
)
def test_frequencies(text: str, hz: float) -> None:
    # SI prefixes k, M, G, T (BIPM)
    assert parse_frequency(text) == pytest.approx(hz, rel=1e-15)


def test_frequency_list_shares_a_trailing_unit() -> None:
    assert parse_frequency_list("1GHz,10GHz,28GHz") == pytest.approx([1e9, 1e10, 2.8e10])
    assert parse_frequency_list("1,10,28 GHz") == pytest.approx([1e9, 1e10, 2.8e10])
    assert parse_frequency_list(["1 MHz", "2 MHz"]) == pytest.approx([1e6, 2e6])
    with pytest.raises(LossLaneError, match="empty item"):
        parse_frequency_list("1GHz,,2GHz")
    with pytest.raises(LossLaneError, match="bare number"):
        parse_frequency_list("1,10,28")


@pytest.mark.parametrize(
    ("func", "text", "si"),
    [
        (parse_resistance, "50 ohm", 50.0),
        (parse_resistance, "10 mohm", 0.01),
        (parse_resistance, "1 kohm", 1e3),
        (parse_resistance, "2 Mohm", 2e6),
        (parse_resistance, "75 \u03a9", 75.0),
        (parse_capacitance, "100 nF", 1e-7),
        (parse_capacitance, "0.2 pF", 0.2e-12),
        (parse_capacitance, "1 uF", 1e-6),
        (parse_capacitance, "5 fF", 5e-15),
        (parse_inductance, "0.4 nH", 0.4e-9),
        (parse_inductance, "10 pH", 10e-12),
        (parse_inductance, "1 uH", 1e-6),
        (parse_data_rate, "32 Gb/s", 32e9),
        (parse_data_rate, "16 GT/s", 16e9),
        (parse_data_rate, "100 Mbps", 1e8),
        (parse_data_rate, "1.6 Tb/s", 1.6e12),
        (parse_decibel, "28 dB", 28.0),
        (parse_decibel, "-3 dB", -3.0),
        (parse_conductivity, "58 MS/m", 5.8e7),
        (parse_conductivity, "5.8e7 S/m", 5.8e7),
        (parse_conductivity, "5.8e7", 5.8e7),  # S/m is the only unit in use
    ],
)
def test_other_quantities(func, text: str, si: float) -> None:
    # SI prefixes (BIPM); "GT/s" counts transfers, one bit each on a serial lane
    assert func(text) == pytest.approx(si, rel=1e-15)


@pytest.mark.parametrize("bare", ["5", 5, 5.0, " 12 "])
def test_bare_length_is_an_error_that_shows_the_accepted_forms(bare) -> None:
    with pytest.raises(LossLaneError) as info:
        parse_length(bare, "width")
    msg = str(info.value)
    assert "width" in msg and "bare number" in msg
    for unit in ("mil", "mm", "um", "in", "oz"):
        assert unit in msg


@pytest.mark.parametrize("bare", ["10", 10, 1e9])
def test_bare_frequency_is_an_error_that_shows_the_accepted_forms(bare) -> None:
    with pytest.raises(LossLaneError) as info:
        parse_frequency(bare, "at")
    msg = str(info.value)
    assert "at" in msg and "bare number" in msg
    for unit in ("Hz", "kHz", "MHz", "GHz", "THz"):
        assert unit in msg


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        ("5 furlong", "unknown length unit"),
        ("five mil", "not a number with a unit"),
        ("", "not a number with a unit"),
        ("1e400 m", "not a finite"),
        ("5 GHz", "unknown length unit"),
    ],
)
def test_bad_lengths(text: str, fragment: str) -> None:
    with pytest.raises(LossLaneError, match=fragment):
        parse_length(text, "height")


def test_wrong_types_are_errors() -> None:
    for value in (None, True, [1, 2], {"a": 1}):
        with pytest.raises(LossLaneError):
            parse_length(value)
    with pytest.raises(KeyError):
        parse_quantity("1 m", "mass")


def test_formatting_round_trip() -> None:
    assert format_length(parse_length("6 mil")).startswith("6 mil")
    assert "0.1524 mm" in format_length(parse_length("6 mil"))
    assert format_frequency(28e9) == "28 GHz"
    assert format_frequency(0.0) == "0 Hz"
    assert math.isclose(parse_frequency(format_frequency(2.5e6)), 2.5e6)
