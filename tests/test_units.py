"""Units to SI, and the AWG sizes against ASTM B258 and the handbook wire tables."""

import math

import pytest

from groundcheck.physics.impedance import resistivity
from groundcheck.core.errors import PlanErrors
from groundcheck.core.units import UnitError, awg_area, awg_diameter, format_si, parse_quantity
from groundcheck.language.loader import load_text

# ASTM B258 diameters and areas (NBS Handbook 100, *Copper Wire Tables*, agrees within 0.1 %),
# typed here from the published table.
AWG_TABLE = [  # AWG, d (mm), A (mm²), Ω/km at 20 °C
    (10, 2.588, 5.261, 3.277),
    (12, 2.053, 3.309, 5.211),
    (14, 1.628, 2.081, 8.286),
    (16, 1.291, 1.309, 13.17),
    (18, 1.024, 0.8231, 20.95),
    (20, 0.8118, 0.5176, 33.31),
    (22, 0.6438, 0.3255, 52.96),
    (24, 0.5106, 0.2047, 84.22),
]


@pytest.mark.parametrize("n,d,a,rkm", AWG_TABLE)
def test_awg_against_astm_b258_table(n, d, a, rkm):
    assert awg_diameter(n) * 1e3 == pytest.approx(d, rel=1e-3)
    assert awg_area(n) * 1e6 == pytest.approx(a, rel=1e-3)
    # resistance per km of annealed copper (IEC 60028 resistivity) against the handbook table
    assert resistivity("copper") / awg_area(n) * 1e3 == pytest.approx(rkm, rel=2e-3)


def test_awg_formula_definition():
    # ASTM B258: 36 AWG is 0.127 mm exactly and 39 gauges make a factor of 92 in diameter
    assert awg_diameter(36) == pytest.approx(0.127e-3)
    assert awg_diameter(-3) / awg_diameter(36) == pytest.approx(92.0)


@pytest.mark.parametrize(
    "num,unit,value,kind",
    [
        ("80", "mm", 0.08, "length"),
        ("2", "cm", 0.02, "length"),
        ("1", "in", 0.0254, "length"),
        ("0.75", "mm2", 0.75e-6, "area"),
        ("1.5", "mm²", 1.5e-6, "area"),
        ("0.5", "mohm", 0.5e-3, "resistance"),
        ("10", "Ω", 10.0, "resistance"),
        ("4.7", "kohm", 4700.0, "resistance"),
        ("500", "mA", 0.5, "current"),
        ("230", "V", 230.0, "voltage"),
        ("50", "Hz", 50.0, "frequency"),
        ("40", "uT", 40e-6, "flux density"),
        ("40", "µT", 40e-6, "flux density"),
        ("47", "uF", 47e-6, "capacitance"),
        ("100", "nF", 100e-9, "capacitance"),
        ("30", "dB", 30.0, "level"),
        ("25", "C", 25.0, "temperature"),
        ("25", "°C", 25.0, "temperature"),
        ("300", "K", 300 - 273.15, "temperature"),
        ("18", "AWG", awg_area(18), "area"),
    ],
)
def test_parse_quantity(num, unit, value, kind):
    v, k = parse_quantity(num, unit)
    assert k == kind
    assert v == pytest.approx(value)


def test_unknown_unit_has_hint():
    with pytest.raises(UnitError) as e:
        parse_quantity("3", "MM")
    assert "did you mean 'mm'" in e.value.hint
    with pytest.raises(UnitError):
        parse_quantity("3", "furlong")


def test_copper_temperature_coefficient():
    # IEC 60028: α20 = 0.00393 /K for annealed copper
    assert resistivity("copper", 70.0) / resistivity("copper", 20.0) == pytest.approx(
        1 + 0.00393 * 50
    )


def test_format_si():
    assert format_si(0.0123, "Ω") == "12.3 mΩ"
    assert format_si(4.7e-6, "F") == "4.7 µF"
    assert format_si(-0.0, "Ω") == "0 Ω" and format_si(float("nan"), "V") == "not computed"
    # the prefix follows the figure as printed: 999.96 µA to three digits is 1 mA, not "1e+03 µA"
    assert format_si(0.00099996, "A") == "1 mA" and format_si(-999.96, "V") == "-1 kV"
    assert format_si(0.0009994, "A") == "999 µA" and format_si(2.2e12, "Ω") == "2.2 TΩ"


def test_figures_for_a_reader_never_show_a_signed_zero_or_a_python_value():
    from groundcheck.core.plain import readable, unsigned_zero

    assert readable(-0.04, "+.1f") == "0.0" and readable(-0.0, ".4g") == "0"
    assert readable(-0.06, "+.1f") == "-0.1" and readable(2.5, "+.1f") == "+2.5"
    assert readable(-0.01, "8.1f") == "     0.0"  # the width kept
    assert readable(None) == "–" and readable(float("inf"), missing="absent") == "absent"
    assert (
        unsigned_zero("-0.0 dB, +0.00 dB, -0 V, -0.05 dB, x-0.0")
        == "0.0 dB, 0.00 dB, 0 V, -0.05 dB, x-0.0"
    )
    assert math.isfinite(parse_quantity("1e-3", "V")[0])


@pytest.mark.parametrize(
    "alloy,iacs",
    [
        # electrical conductivity in % IACS of the tempers sheet is sold in (ASM Handbook vol. 2,
        # from memory): 5052-H32 35 %, 6061-T6 43 %; 100 % IACS is 1.7241e-8 Ω·m (IEC 60028)
        ("aluminium-5052", 35.0),
        ("aluminium-6061", 43.0),
    ],
)
def test_aluminium_alloys_against_their_conductivity(alloy, iacs):
    assert resistivity(alloy) == pytest.approx(1.7241e-8 / (iacs / 100), rel=0.02)


def test_a_new_wires_size_is_written_as_its_gauge_or_to_three_figures():
    # ASTM B258: d = 0.127 mm × 92^((36 − n)/39), worked here by hand for 20 AWG (0.8118 mm,
    # 0.5176 mm²); a size that is no gauge is shown to three significant figures
    from groundcheck.core.units import wire_size

    d = 0.127e-3 * 92 ** ((36 - 20) / 39)
    assert d == pytest.approx(0.8118e-3, rel=1e-4)
    assert wire_size(math.pi * d * d / 4) == ("20 AWG", "20 AWG")
    assert wire_size(0.5e-6) == ("0.5 mm2", "0.5 mm²")
    # 00 AWG (2/0): 0.3648 in, 67.4 mm² (ASTM B258 table); a wire as thick as the one read is
    # written as the trade writes it, not as "-1 AWG"
    area00 = parse_quantity("00", "AWG")[0]
    assert area00 == pytest.approx(67.4e-6, rel=1e-3)
    assert wire_size(area00) == ("00 AWG", "00 AWG")
    assert wire_size(math.pi * (0.46 * 25.4e-3) ** 2 / 4)[0] == "0000 AWG"  # 0.4600 in
    assert wire_size(0.5176e-6) == ("0.518 mm2", "0.518 mm²")


def test_awg_written_either_way_is_one_size_and_five_zeros_is_none():
    """'00 AWG' and 'AWG 00' are both 2/0 (0.3648 in, 67.4 mm², ASTM B258 table); 'AWG 00' was
    read as the number 0 (53.5 mm²).  '00000' is no gauge: a located error, not 0 AWG."""
    head = 'plan "t"\nmetal ch: aluminium 1 mm, 100 x 100 mm\npoint a: stud, on ch\n'
    for size in ("00 AWG", "AWG 00"):
        plan = load_text(head + f"wire w: a to ch, 10 mm, {size}\n", "t.gplan")
        assert plan.conductors[0].area * 1e6 == pytest.approx(67.4, rel=2e-3), size
    for size in ("00000 AWG", "AWG 00000"):
        with pytest.raises(PlanErrors) as e:
            load_text(head + f"wire w: a to ch, 10 mm, {size}\n", "t.gplan")
        err = e.value.errors[0]
        assert "00000 is no gauge" in err.message and err.location.line == 4
        assert "0000 (4/0)" in err.hint
