"""Units at the edges: NIST SP 811 conversions, parsing, formatting and messages."""

import pytest

from rheoline.errors import UnitError
from rheoline.units import CMH2O, MMHG, format_quantity, parse_quantity, to_unit


@pytest.mark.parametrize(
    ("text", "kind", "si"),
    [
        ("1 mmHg", "pressure", 133.3224),  # NIST SP 811 Appendix B: 1 mmHg = 1.333224 E+02 Pa
        ("1 cmH2O", "pressure", 98.0665),  # NIST SP 811: 1 cmH2O (conventional) = 98.0665 Pa
        ("10 P", "viscosity", 1.0),  # NIST SP 811: 1 P = 0.1 Pa s
        ("1 cP", "viscosity", 1e-3),  # NIST SP 811: 1 cP = 1 mPa s
        ("1 mPa s", "viscosity", 1e-3),
        ("1 psi", "pressure", 6894.757),  # NIST SP 811: 1 psi = 6.894757 kPa
        ("1 bar", "pressure", 1e5),  # NIST SP 811: 1 bar = 100 kPa (exact)
        ("2 kPa", "pressure", 2000.0),
        ("150 mL/h", "flow", 150e-6 / 3600.0),
        ("1 mL/min", "flow", 1e-6 / 60.0),
        ("1 mL/s", "flow", 1e-6),
        ("1 L/min", "flow", 1e-3 / 60.0),
        ("22 degC", "temperature", 22.0),
        ("295.15 K", "temperature", 22.0),
        ("98.6 degF", "temperature", 37.0),  # NIST SP 811: t/degC = (t/degF - 32)/1.8
        ("1 dyn/cm^2", "stress", 0.1),  # NIST SP 811: 1 dyn/cm^2 = 0.1 Pa
        ("20 Fr", "length", 20e-3 / 3.0),  # ISO 10555-1 French scale: 1 Fr = 1/3 mm
        ("45 %", "dimensionless", 0.45),
    ],
)
def test_parse_against_nist_sp811(text, kind, si):
    # tolerance from the digits NIST gives (six or seven significant figures)
    assert parse_quantity(text, kind) == pytest.approx(si, rel=1e-6)


@pytest.mark.parametrize(
    ("text", "kind", "si"),
    [
        ("300 mm Hg", "pressure", 300 * 133.322387415),
        ("10 cm H2O", "pressure", 980.665),
        ("10 cmH20", "pressure", 980.665),
        ("1.1 mPas", "viscosity", 1.1e-3),
        ("1.1 mPa·s", "viscosity", 1.1e-3),
        ("1 g/cm3", "density", 1000.0),
        ("150 ml/hr", "flow", 150e-6 / 3600),
        ("37 °C", "temperature", 37.0),
        ("-5 degC", "temperature", -5.0),
    ],
)
def test_practitioner_spellings(text, kind, si):
    # the same NIST SP 811 factors, reached through the spellings found on forms and labels
    assert parse_quantity(text, kind) == pytest.approx(si, rel=1e-9)


def test_constants_nist():
    # NIST SP 811 (2008) Appendix B.8: mmHg 1.333224 E+02 Pa; cmH2O 9.80665 E+01 Pa
    assert MMHG == pytest.approx(133.3224, rel=1e-6)
    assert CMH2O == 98.0665


def test_format_round_trips():
    assert format_quantity(parse_quantity("300 mmHg", "pressure"), "pressure", "mmHg") == "300 mmHg"
    assert format_quantity(parse_quantity("1.2 cP", "viscosity"), "viscosity", "cP") == "1.2 cP"
    assert format_quantity(parse_quantity("150 mL/h", "flow"), "flow", "mL/h") == "150 mL/h"
    assert to_unit(1.0, "mmHg", "pressure") == pytest.approx(1 / 133.322387415)


def test_bare_number_with_default_unit():
    assert parse_quantity(300, "pressure", default_unit="mmHg") == pytest.approx(
        300 * 133.322387415
    )
    assert parse_quantity("300", "pressure", default_unit="mmHg") == pytest.approx(
        300 * 133.322387415
    )


def test_wrong_kind_names_field_and_units():
    with pytest.raises(
        UnitError, match=r"drive\.pressure: 'mL' is not a unit of pressure \(Pa, kPa, mmHg"
    ):
        parse_quantity("300 mL", "pressure", field="drive.pressure")


def test_missing_unit_names_field():
    with pytest.raises(
        UnitError, match=r"drive\.pressure: '300' has no unit; write it with one of Pa"
    ):
        parse_quantity("300", "pressure", field="drive.pressure")
    with pytest.raises(UnitError, match=r"flow: a bare number 5 needs a unit.*'5 mL/h'"):
        parse_quantity(5, "flow", field="flow")


def test_unknown_unit_and_garbage():
    with pytest.raises(
        UnitError, match=r"viscosity: unknown unit 'cPz'; use one of Pa s, mPa s, cP, P"
    ):
        parse_quantity("1 cPz", "viscosity", field="viscosity")
    with pytest.raises(UnitError, match=r"cannot read 'abc' as a number with a unit"):
        parse_quantity("abc", "pressure")
    with pytest.raises(UnitError, match="unknown quantity kind 'speed'"):
        parse_quantity("1 m/s", "speed")
    with pytest.raises(UnitError, match="expected a pressure such as '300 mmHg', got True"):
        parse_quantity(True, "pressure")


def test_formatting_in_a_wrong_or_unknown_unit_is_a_unit_error():
    # pint's DimensionalityError / UndefinedUnitError never reach the user (bug U2)
    with pytest.raises(UnitError, match=r"'m' is not a unit of pressure \(Pa, kPa, mmHg"):
        format_quantity(1.0, "pressure", "m")
    with pytest.raises(UnitError, match=r"'furlong' is not a unit of pressure"):
        format_quantity(1.0, "pressure", "furlong")
    with pytest.raises(UnitError, match=r"unknown unit 'blah'; use one of mL/h.*\(a flow\)"):
        to_unit(1e-6, "blah", "flow")
    with pytest.raises(UnitError, match=r"unknown unit '9\*\*9\*\*9'"):
        to_unit(1.0, "9**9**9", "pressure")
    with pytest.raises(UnitError, match="unknown quantity kind 'speed'"):
        to_unit(1.0, "m/s", "speed")
    with pytest.raises(UnitError, match=r"expected a plain number or %, got unit 'mm'"):
        to_unit(0.45, "mm", "dimensionless")
    # NIST SP 811: 1 mmHg = 133.322 Pa, degF = 9/5 degC + 32
    assert format_quantity(133.322387415 * 300, "pressure", "mmHg") == "300 mmHg"
    assert to_unit(37.0, "degF", "temperature") == pytest.approx(98.6)
    assert format_quantity(0.45, "dimensionless", "%") == "45 %"


def test_conventional_mmhg_is_mercury_density_times_standard_gravity():
    # the conventional millimetre of mercury: 13 595.1 kg/m^3 times 9.806 65 m/s^2 times 1 mm
    # (from memory: the defining density of mercury at 0 degC); NIST SP 811 (2008) Appendix
    # B.8 gives the same to seven digits (1.333 224 E+02 Pa), and pint's definition agrees
    import pint

    assert MMHG == pytest.approx(13595.1 * 9.80665 * 1e-3, rel=1e-15)
    assert MMHG == pytest.approx(pint.UnitRegistry().Quantity(1, "mmHg").to("Pa").magnitude)


def test_the_unit_cache_refuses_what_the_parser_refuses_every_time():
    """Parsed units are cached per (text, kind) for speed (benchmarks/load_file.py); a unit
    of another kind, an unknown or unsafe one is refused on every call, with the field of
    that call, and a cached conversion gives pint's own value to the last bit."""
    from rheoline.errors import UnitError
    from rheoline.units import KINDS, _units_of, from_unit, parse_quantity, registry

    assert parse_quantity("300 mmHg", "pressure") == parse_quantity("300 mmHg", "pressure")
    for _ in range(2):
        with pytest.raises(UnitError, match="first: 'mmHg' is not a unit of length"):
            parse_quantity("300 mmHg", "length", field="first")
        with pytest.raises(UnitError, match="second: unknown unit '9.9.9'"):
            parse_quantity("1 9.9.9", "length", field="second")
        with pytest.raises(UnitError, match="third: unknown unit"):
            parse_quantity("1 m**99999", "length", field="third")
    for kind, unit in [
        ("pressure", "psi"),
        ("flow", "mL/h"),
        ("length", "Fr"),
        ("viscosity", "cP"),
    ]:
        for x in (0.1, 1.0, 22.5, 2.0 / 3.0, 7.3e5):
            exact = registry().Quantity(x, _units_of(unit, kind, "f")).to(KINDS[kind][0]).magnitude
            assert from_unit(x, unit, kind) == exact
    assert parse_quantity("98.6 degF", "temperature") == pytest.approx(37.0)  # offset: pint


def _fresh_registry_values(monkeypatch, **env):
    """Conversions read from a registry built now (the module's cached one cleared)."""
    from rheoline import units

    for key, value in env.items():
        monkeypatch.setenv(key, value)
    units.registry.cache_clear()
    units._checked_unit.cache_clear()
    try:
        ureg = units.registry()
        return [
            ureg.Quantity(text).to_base_units().magnitude
            for text in ("300 mmHg_conv", "20 cmH2O_conv", "18 Fr", "1 psi", "37 degC")
        ]
    finally:
        units.registry.cache_clear()
        units._checked_unit.cache_clear()


def test_registry_from_pints_disk_cache_equals_the_one_built_from_definitions(monkeypatch):
    # NIST SP 811 (2008) Appendix B: 1 mmHg (conventional) = 133.322 387 415 Pa,
    # 1 cmH2O (conventional) = 98.0665 Pa, 1 psi = 6894.757 Pa; ISO 10555-1: 1 Fr = 1/3 mm
    cached = _fresh_registry_values(monkeypatch, RHEOLINE_UNIT_CACHE="1")
    again = _fresh_registry_values(monkeypatch, RHEOLINE_UNIT_CACHE="1")  # read from disk
    built = _fresh_registry_values(monkeypatch, RHEOLINE_UNIT_CACHE="0")
    assert cached == again == built
    assert built[0] == pytest.approx(300 * 133.322387415, rel=1e-12)
    assert built[1] == pytest.approx(20 * 98.0665, rel=1e-12)
    assert built[2] == pytest.approx(6e-3, rel=1e-12)
    assert built[3] == pytest.approx(6894.757, rel=1e-6)
    assert built[4] == pytest.approx(310.15, rel=1e-12)


def test_a_cache_that_fails_builds_the_registry_from_its_definitions(monkeypatch):
    import pint

    real = pint.UnitRegistry
    calls = []

    def registry(*args, **kwargs):
        calls.append(kwargs.get("cache_folder"))
        if kwargs.get("cache_folder"):
            raise PermissionError("cache folder not writable")
        return real(*args, **kwargs)

    monkeypatch.setattr(pint, "UnitRegistry", registry)
    values = _fresh_registry_values(monkeypatch, RHEOLINE_UNIT_CACHE="1")
    assert calls == [":auto:", None]
    assert values[0] == pytest.approx(300 * 133.322387415, rel=1e-12)
