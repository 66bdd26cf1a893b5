"""Units from names: the user's patterns and the shipped suffix table."""

from __future__ import annotations

import ast
import re
from pathlib import Path

import pytest

from dimcheck import check_source
from dimcheck.declarations.names import SHIPPED_SUFFIXES, NameUnits, shipped_unit
from dimcheck.units import load_unit_table, parse_unit

FLUME = Path(__file__).resolve().parents[2] / "fixtures" / "names" / "flume.py"

SHIPPED = NameUnits({}, use_shipped=True)


@pytest.fixture(scope="module")
def table():
    return load_unit_table()


# -- the shipped table -------------------------------------------------------------------------

def test_every_shipped_unit_parses(table):
    for suffix, unit in SHIPPED_SUFFIXES.items():
        parse_unit(unit, table)  # raises UnitError if not


def test_every_suffix_is_lower_case_and_starts_with_an_underscore():
    for suffix in SHIPPED_SUFFIXES:
        assert suffix.startswith("_") and suffix == suffix.lower() and len(suffix) >= 2


@pytest.mark.parametrize("suffix", sorted(SHIPPED_SUFFIXES))
def test_each_suffix_matches_on_a_name(suffix):
    assert SHIPPED.unit_for(f"value{suffix}") == (SHIPPED_SUFFIXES[suffix], f"shipped suffix {suffix}")


@pytest.mark.parametrize("name, unit", [
    ("width_mm", "mm"), ("depth_m", "m"), ("reach_km", "km"), ("p_kpa", "kPa"), ("p_pa", "Pa"),
    ("sigma_mpa", "MPa"), ("p_bar", "bar"), ("dt_s", "s"), ("t_msec", "ms"), ("soak_mins", "min"),
    ("run_hr", "hour"), ("water_degc", "degC"), ("air_degf", "degF"), ("mass_kg", "kg"),
    ("load_kn", "kN"), ("heat_kj", "kJ"), ("pump_kw", "kW"), ("area_m2", "m^2"), ("vol_m3", "m^3"),
    ("u_mps", "m/s"), ("theta_rad", "rad"), ("theta_deg", "deg"), ("f_hz", "Hz"),
    ("flow_lpm", "L/min"), ("shaft_rpm", "rpm"), ("tank_litres", "L"),
])
def test_common_suffixes(name, unit):
    assert SHIPPED.unit_for(name)[0] == unit


def test_matching_ignores_case():
    assert SHIPPED.unit_for("WIDTH_MM") == ("mm", "shipped suffix _mm")
    assert SHIPPED.unit_for("Depth_M")[0] == "m"
    assert SHIPPED.unit_for("T_degC")[0] == "degC"
    assert SHIPPED.unit_for("p_kPa")[0] == "kPa"


@pytest.mark.parametrize("name, unit, suffix", [
    ("speed_m_s", "m/s", "_m_s"),          # not _s
    ("rho_kg_m3", "kg/m^3", "_kg_m3"),     # not _m3
    ("flow_m3_s", "m^3/s", "_m3_s"),
    ("nitrate_mg_l", "mg/L", "_mg_l"),
    ("flow_l_min", "L/min", "_l_min"),
    ("area_mm2", "mm^2", "_mm2"),
    ("p_psig", "psi", "_psig"),
])
def test_the_longest_suffix_wins(name, unit, suffix):
    assert SHIPPED.unit_for(name) == (unit, f"shipped suffix {suffix}")


@pytest.mark.parametrize("name", ["m", "s", "mm", "kg", "_m", "__s", "_mm", "__kg", "m_s", "_m_s"])
def test_a_name_that_is_only_the_suffix_has_no_unit(name):
    assert SHIPPED.unit_for(name) is None


@pytest.mark.parametrize("name", ["mass", "gas", "items", "norm", "film", "ohms_law_x", "alarm",
                                  "speedms", "widthmm", "hertz_table"])
def test_the_suffix_must_follow_an_underscore(name):
    assert SHIPPED.unit_for(name) is None


@pytest.mark.parametrize("name", ["x_m", "T_s", "c_s", "u_m", "_x_m", "v_s", "X_M"])
def test_a_one_letter_suffix_after_a_one_letter_stem_is_a_subscript(name):
    assert SHIPPED.unit_for(name) is None


@pytest.mark.parametrize("name, unit", [("dt_s", "s"), ("x2_m", "m"), ("t_mm", "mm"), ("q_kw", "kW"),
                                        ("is_s", "s")])
def test_longer_suffixes_and_two_letter_stems_still_match(name, unit):
    # "is_s" reads as seconds: a known false friend, documented in the module
    assert SHIPPED.unit_for(name)[0] == unit


@pytest.mark.parametrize("name", [
    "x_k", "alpha_k", "temp_k", "rho_g", "h_g", "rho_l", "h_l", "sigma_n", "force_n", "x_j",
    "rho_w", "T_w", "v_v", "area_a", "temp_c", "temp_f", "pipe_d", "duration_h", "D_h",
    "t_min", "p_min", "speed_ms", "temp_in", "p_in", "x_lb", "x_lbs", "p_hp", "power_mw",
    "signal_mv", "current_ma", "wavelength_nm", "valve_kv", "rain_day", "flow_hour", "load_t",
])
def test_ambiguous_suffixes_are_not_shipped(name):
    assert SHIPPED.unit_for(name) is None


def test_ambiguous_suffixes_are_absent_from_the_table():
    for suffix in ("_k", "_g", "_l", "_n", "_j", "_w", "_v", "_a", "_c", "_f", "_d", "_h", "_t",
                   "_min", "_ms", "_in", "_lb", "_lbs", "_hp", "_mw", "_mv", "_ma", "_nm", "_kv",
                   "_day", "_hour"):
        assert suffix not in SHIPPED_SUFFIXES


@pytest.mark.parametrize("name", ["loss_per_m", "cost_per_kg", "heat_per_s", "count_per_m2", "per_m"])
def test_a_rate_of_something_unknown_has_no_unit(name):
    assert SHIPPED.unit_for(name) is None


@pytest.mark.parametrize("name, unit, pattern", [
    ("flow_m3_per_s", "m^3/s", "shipped suffixes _m3 + _per_s"),
    ("drop_pa_per_m", "Pa/m", "shipped suffixes _pa + _per_m"),
    ("yield_kwh_per_m2", "(kW*hour)/m^2", "shipped suffixes _kwh + _per_m2"),
    ("warming_degc_per_hr", "degC/hour", "shipped suffixes _degc + _per_hr"),
    ("use_l_min_per_kg", "(L/min)/kg", "shipped suffixes _l_min + _per_kg"),
])
def test_a_quotient_of_two_suffixes(name, unit, pattern, table):
    assert SHIPPED.unit_for(name) == (unit, pattern)
    parse_unit(unit, table)


def test_quotient_dimensions(table):
    drop = parse_unit(SHIPPED.unit_for("drop_pa_per_m")[0], table)
    assert drop.dimension == parse_unit("Pa/m", table).dimension
    warming = parse_unit(SHIPPED.unit_for("warming_degc_per_hr")[0], table)
    assert warming.offset == 0  # a rate of temperature change, not a temperature


def test_dotted_names_use_the_last_part():
    assert SHIPPED.unit_for("self.width_mm") == ("mm", "shipped suffix _mm")
    assert SHIPPED.unit_for("pump.head_m")[0] == "m"
    assert SHIPPED.unit_for("width_mm.real") is None


def test_shipped_unit_function_is_the_table_alone():
    assert shipped_unit("depth_m") == ("m", "shipped suffix _m")
    assert shipped_unit("depth") is None


# -- the user's patterns -----------------------------------------------------------------------

def test_user_patterns_apply_without_the_shipped_table():
    names = NameUnits({"*_mm": "mm", "head_*": "m"}, use_shipped=False)
    assert names.unit_for("gap_mm") == ("mm", "*_mm")
    assert names.unit_for("head_pump") == ("m", "head_*")
    assert names.unit_for("depth_m") is None  # shipped off


def test_shipped_table_is_off_unless_asked():
    assert NameUnits({}, use_shipped=False).unit_for("depth_m") is None


def test_user_patterns_take_precedence_over_the_shipped_table():
    names = NameUnits({"*_m": "mile"}, use_shipped=True)
    assert names.unit_for("reach_m") == ("mile", "*_m")
    assert names.unit_for("reach_km") == ("km", "shipped suffix _km")


def test_the_first_matching_user_pattern_wins():
    names = NameUnits({"flow_*_lpm": "L/s", "*_lpm": "L/min", "flow_*": "m^3/s"}, use_shipped=True)
    assert names.unit_for("flow_in_lpm") == ("L/s", "flow_*_lpm")
    assert names.unit_for("pump_lpm") == ("L/min", "*_lpm")
    assert names.unit_for("flow_total") == ("m^3/s", "flow_*")
    reordered = NameUnits({"*_lpm": "L/min", "flow_*_lpm": "L/s"}, use_shipped=False)
    assert reordered.unit_for("flow_in_lpm") == ("L/min", "*_lpm")


def test_user_patterns_are_case_sensitive_and_shell_style():
    names = NameUnits({"T_*_K": "K", "[xyz]_m": "m", "p?": "Pa"}, use_shipped=False)
    assert names.unit_for("T_wall_K") == ("K", "T_*_K")
    assert names.unit_for("t_wall_k") is None
    assert names.unit_for("x_m") == ("m", "[xyz]_m")  # the user may opt in to what is not shipped
    assert names.unit_for("w_m") is None
    assert names.unit_for("p1") == ("Pa", "p?")
    assert names.unit_for("p12") is None


def test_user_patterns_match_the_whole_name():
    names = NameUnits({"mm": "mm"}, use_shipped=False)
    assert names.unit_for("mm") == ("mm", "mm")
    assert names.unit_for("gap_mm") is None


def test_the_unit_text_is_returned_as_written():
    # parsing it (and reporting DIM901 if it is unknown) is the caller's job
    names = NameUnits({"*_wombat": "wombats/s"}, use_shipped=False)
    assert names.unit_for("rate_wombat") == ("wombats/s", "*_wombat")


def test_active():
    assert not NameUnits({}, use_shipped=False).active
    assert NameUnits({}, use_shipped=True).active
    assert NameUnits({"*_mm": "mm"}, use_shipped=False).active


def test_bad_tables_are_refused():
    with pytest.raises(TypeError):
        NameUnits({"*_mm": 3}, use_shipped=False)
    with pytest.raises(TypeError):
        NameUnits({1: "mm"}, use_shipped=False)


def test_answers_are_memoised_and_consistent():
    names = NameUnits({"*_x": "m"}, use_shipped=True)
    first = names.unit_for("a_x")
    assert names.unit_for("a_x") == first == ("m", "*_x")
    assert names.unit_for("nothing") is None
    assert names.unit_for("nothing") is None


# -- the fixture -------------------------------------------------------------------------------

def _named_units(source: str) -> dict[str, str]:
    tree = ast.parse(source)
    found = {}
    for node in ast.walk(tree):
        name = None
        if isinstance(node, ast.arg):
            name = node.arg
        elif isinstance(node, ast.Name) and isinstance(node.ctx, ast.Store):
            name = node.id
        if name is not None:
            unit = SHIPPED.unit_for(name)
            if unit is not None:
                found[name] = unit[0]
    return found


def test_fixture_names_read_as_intended():
    assert _named_units(FLUME.read_text(encoding="utf-8")) == {
        "THROAT_WIDTH_MM": "mm", "surface_velocity_mps": "m/s", "velocity_mps": "m/s",
        "width_mm": "mm", "depth_m": "m", "area_m2": "m^2", "flow_m3_s": "m^3/s",
        "flow_lpm": "L/min", "tank_litres": "L", "fill_time_mins": "min", "float_speed_mps": "m/s",
    }


def _annotated_twin(source: str) -> str:
    """The fixture with each suffix written as an ``Annotated`` declaration, lines unchanged."""
    units = _named_units(source)
    out = []
    for line in source.split("\n"):
        if line == "import math":
            line = "import math; from typing import Annotated"
        signature = re.match(r"(\s*def \w+\()([^)]*)(\):.*)", line)
        if signature:
            params = [p.strip() for p in signature.group(2).split(",")]
            params = [f'{p}: Annotated[float, "{units[p]}"]' if p in units else p for p in params]
            line = signature.group(1) + ", ".join(params) + signature.group(3)
        assignment = re.match(r"(\s*)(\w+) = (.*)", line)
        if assignment and assignment.group(2) in units:
            indent, name, value = assignment.groups()
            line = f'{indent}{name}: Annotated[float, "{units[name]}"] = {value}'
        out.append(line)
    return "\n".join(out)


def test_fixture_bug_with_the_suffixes_written_as_annotations():
    source = FLUME.read_text(encoding="utf-8")
    twin = _annotated_twin(source)
    assert twin.count("Annotated[") == 20  # 8 parameters, 12 assignments
    found = [(f.line, f.code) for f in check_source(twin, "flume.py")]
    assert found == [(26, "DIM201")]
    assert source.split("\n")[25].strip() == "area_m2 = width_mm * depth_m"
    assert source.split("\n")[25].index("width_mm") + 1 == 15


def test_fixture_without_suffix_units_has_no_finding():
    assert check_source(FLUME.read_text(encoding="utf-8"), "flume.py") == []
