"""Display conversion to US customary units against NIST SP 811 (2008) Appendix B factors.

Published factors (read from the table, rounded as printed there):
1 ft = 0.3048 m; 1 psf = 47.880 26 Pa; 1 pcf (lbf/ft³) = 157.087 5 N/m³;
1 kip/ft = 14.593 90 kN/m; 1 yd³ = 0.764 554 9 m³; 1 lb = 0.453 592 37 kg.
"""

from __future__ import annotations

import pytest

from screening.model.units import Display, convert


@pytest.mark.parametrize(
    ("si", "unit", "us", "label"),
    [
        (0.3048, "m", 1.0, "ft"),
        (0.04788026, "kPa", 1.0, "psf"),
        (0.1570875, "kN/m3", 1.0, "pcf"),
        (14.59390, "kN/m", 1.0, "kip/ft"),
        (0.7645549, "m3", 1.0, "yd³"),
        (0.45359237, "kg", 1.0, "lb"),
        (25.4, "mm", 1.0, "in"),
    ],
)
def test_factors_match_nist(si, unit, us, label):
    value, shown = convert(si, unit, "us")
    assert value == pytest.approx(us, rel=2e-6)
    assert shown == label


def test_si_is_unchanged_and_unknown_units_pass_through():
    assert convert(4.2, "m", "si") == (4.2, "m")
    assert convert(34.0, "deg", "us") == (34.0, "deg")
    assert convert(19.0, "kN/m3", "si") == (19.0, "kN/m³")


def test_display_formats_and_refuses_unknown_systems():
    assert Display("us").format(3.0, "m") == "9.84 ft"
    assert Display("si").format(19.0, "kN/m3") == "19.0 kN/m³"
    assert Display("us").format(20.0, "kPa") == "417.7 psf"  # 20 kPa / 47.88 Pa
    with pytest.raises(ValueError, match="use one of si, us"):
        Display("imperial")
