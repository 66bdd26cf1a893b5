"""Units from names: the user's ``[tool.dimcheck.name-units]`` table and the shipped suffixes.

Contract, section 6. Two sources, asked in this order by ``NameUnits.unit_for``:

1. The user's patterns, shell-style (``fnmatch.fnmatchcase``: ``*``, ``?``, ``[abc]``),
   matched against the bare name, case-sensitively, applied whether or not
   ``suffix-units`` is on. They take precedence over the shipped table. Among them the
   FIRST pattern that matches, in the table's order (the order of the TOML table, which
   ``tomllib`` keeps), wins: put ``"flow_*_lpm"`` before ``"*_lpm"`` to override it.
2. The shipped suffix table (``suffix-units = true``): the name, lower-cased, ends with the
   suffix, which always starts with an underscore; the longest suffix that matches wins
   (``speed_m_s`` is m/s, not s). The part before the suffix (the stem) must hold a
   letter or digit: ``m``, ``_m``, ``__s`` have no unit.

Explicit declarations (annotation, comment, stub) and docstrings win over both; that
precedence is the caller's.

What is left out of the shipped table, and why
----------------------------------------------
A suffix is shipped only when, in engineering code, it nearly always means the unit. The
table is opt-in, but a wrong entry turns into false findings all over a project, while a
missing one only leaves values unknown (the user can add ``"*_h" = "hour"`` in one line).
Left out because the same letters are a common subscript or word:

* ``_k`` (kelvin): the iteration or summation index (``x_k``, ``alpha_k``, ``grad_k``).
* ``_g`` (gram): gas and gravity (``rho_g``, ``h_g``); ``_kg`` and ``_mg`` are shipped.
* ``_l`` (litre): liquid, left, lower (``rho_l``, ``h_l``); ``_lpm``, ``_lps``, ``_ml`` and
  ``_litre`` are shipped.
* ``_n`` (newton): a count or an index, and "normal" (``sigma_n``); ``_kn`` is shipped.
* ``_j`` (joule): an index; ``_w`` (watt): water and wall (``rho_w``, ``T_w``); ``_v``
  (volt): velocity, vapour; ``_a`` (ampere): area, air; ``_c``/``_f`` (Celsius,
  Fahrenheit): cold, critical, final, fluid; ``_d``: diameter, day; ``_t``: tonne, time.
* ``_h`` (hour): hot, high, hydraulic and enthalpy (``D_h``, ``T_h``, ``h_h``); ``_hr``,
  ``_hrs``, ``_hour``, ``_hours`` are shipped.
* ``_min`` (minute): minimum (``t_min``, ``p_min``) is far more common; ``_mins`` and
  ``_minutes`` are shipped.
* ``_ms`` (millisecond): also written for metres per second (``speed_ms``); ``_msec`` is
  shipped, ``_mps`` and ``_m_s`` are m/s.
* ``_in`` (inch): inlet (``T_in``, ``p_in``); ``_inch``, ``_inches`` are shipped.
* ``_lb``/``_lbs`` (pound): a lower bound (``x_lb``, ``x_ub`` in optimisation code);
  ``_lbf`` is shipped.
* ``_day``, ``_hour`` in the singular: a per-period quantity (``rain_day``, ``flow_hour``);
  the plurals and ``_hr``/``_hrs`` are shipped.
* ``_hp`` (horsepower): high pressure; ``_mw``, ``_mv``, ``_ma``: milli- or mega-?
  (case is lost when names are lower-cased); ``_nm``: nanometre or newton metre;
  ``_kv``: kilovolt or a valve's flow coefficient Kv.

Kept although they have known false friends (each is documented here so users can judge):

* ``_m`` (metre) and ``_s`` (second), named in the contract. ``_m`` is also "mean" and
  "mass", ``_s`` is "surface", "solid", "sound", "state" (``T_s``, ``c_s``, ``rho_s``);
  ``is_s`` would read as seconds. To cut the worst of these, a ONE-letter suffix
  (``_m``, ``_s``) needs a stem of at least two characters: ``x_m``, ``T_s``, ``u_m``
  are mathematical subscripts, ``depth_m``, ``dt_s`` are units.
* ``_rad`` (radian): also "radiation" (``q_rad``, ``h_rad``); angles dominate.
* ``_deg`` (degree of angle): also a polynomial's degree (``poly_deg``).
* ``_kn`` is kilonewton, not knot (``_knots`` is the knot).

``_per_``: a name ending in ``<stem>_per_<suffix>`` (``loss_per_m``, ``cost_per_kg``) is a
rate, not the suffix's unit: it has no unit unless the part before ``_per`` ends in a
shipped suffix too, giving the quotient (``flow_m3_per_s`` is m^3/s, ``drop_pa_per_m``
is Pa/m).
"""

from __future__ import annotations

import fnmatch
import re

SHIPPED_SUFFIXES: dict[str, str] = {
    # length
    "_um": "um", "_mm": "mm", "_cm": "cm", "_m": "m", "_km": "km",
    "_inch": "inch", "_inches": "inch", "_ft": "ft", "_feet": "ft", "_yd": "yd", "_miles": "mile",
    # area and volume
    "_mm2": "mm^2", "_cm2": "cm^2", "_m2": "m^2", "_km2": "km^2", "_ha": "hectare",
    "_mm3": "mm^3", "_cm3": "cm^3", "_m3": "m^3", "_ml": "mL", "_litre": "L", "_litres": "L",
    "_liter": "L", "_liters": "L",
    # time
    "_s": "s", "_sec": "s", "_secs": "s", "_seconds": "s", "_msec": "ms", "_mins": "min",
    "_minutes": "min", "_hr": "hour", "_hrs": "hour", "_hours": "hour", "_days": "day",
    # mass
    "_mg": "mg", "_kg": "kg", "_tonne": "tonne", "_tonnes": "tonne",
    # speed, flow
    "_mps": "m/s", "_m_s": "m/s", "_kmh": "km/hour", "_km_h": "km/hour", "_kph": "km/hour",
    "_mph": "mile/hour", "_knots": "knot",
    "_m3s": "m^3/s", "_m3_s": "m^3/s", "_m3h": "m^3/hour", "_m3_h": "m^3/hour",
    "_lpm": "L/min", "_l_min": "L/min", "_lps": "L/s", "_l_s": "L/s", "_gpm": "gallon/min",
    "_kgs": "kg/s", "_kg_s": "kg/s", "_kg_h": "kg/hour",
    # density, concentration
    "_kg_m3": "kg/m^3", "_mg_l": "mg/L", "_ppm": "ppm",
    # pressure, stress
    "_pa": "Pa", "_hpa": "hPa", "_kpa": "kPa", "_mpa": "MPa", "_gpa": "GPa",
    "_bar": "bar", "_bara": "bar", "_barg": "bar", "_mbar": "mbar", "_psi": "psi",
    "_psia": "psi", "_psig": "psi", "_atm": "atm",
    # temperature
    "_degc": "degC", "_celsius": "degC", "_degf": "degF", "_fahrenheit": "degF", "_kelvin": "K",
    # force, energy, power
    "_newton": "N", "_newtons": "N", "_kn": "kN", "_lbf": "lbf",
    "_kj": "kJ", "_mj": "MJ", "_wh": "W*hour", "_kwh": "kW*hour", "_mwh": "MW*hour",
    "_watt": "W", "_watts": "W", "_kw": "kW",
    # angle, rotation, frequency
    "_rad": "rad", "_radians": "rad", "_deg": "deg", "_degrees": "deg",
    "_hz": "Hz", "_khz": "kHz", "_rpm": "rpm",
    # electrical
    "_volts": "V", "_amps": "A", "_ohm": "ohm", "_ohms": "ohm", "_kva": "kVA",
    # amount, dimensionless
    "_mol": "mol", "_kmol": "kmol", "_pct": "percent", "_percent": "percent",
}

# Suffixes ordered longest first, so the first match is the longest.
_BY_LENGTH = sorted(SHIPPED_SUFFIXES, key=lambda suffix: (-len(suffix), suffix))
_HAS_ALNUM = re.compile(r"[A-Za-z0-9]")


class NameUnits:
    """Which unit a bare name declares by its spelling, if any (see the module docstring)."""

    def __init__(self, user_patterns: dict[str, str], use_shipped: bool):
        for pattern, unit in user_patterns.items():
            if not isinstance(pattern, str) or not isinstance(unit, str):
                raise TypeError(f"name-units: {pattern!r} = {unit!r} is not a string pattern "
                                "and a string unit")
        self.user_patterns: list[tuple[str, str]] = [
            (pattern, unit) for pattern, unit in user_patterns.items() if pattern]
        self.use_shipped = use_shipped
        self._memo: dict[str, tuple[str, str] | None] = {}

    @property
    def active(self) -> bool:
        """False when no name can ever get a unit (no user patterns, shipped table off)."""
        return bool(self.user_patterns) or self.use_shipped

    def unit_for(self, name: str) -> tuple[str, str] | None:
        """(unit text, what matched) for a bare name, or None.

        "What matched" is the user's pattern as written (``"*_mm"``) or
        ``"shipped suffix _mm"`` (``"shipped suffixes _m3 + _per_s"`` for a quotient).
        A dotted name is reduced to its last part (``self.width_mm`` -> ``width_mm``).
        The unit text is not parsed here; an unknown unit is the caller's DIM901.
        """
        found = self._memo.get(name, self)
        if found is self:
            found = self._lookup(name.rpartition(".")[2])
            if len(self._memo) > 100_000:
                self._memo.clear()
            self._memo[name] = found
        return found

    def _lookup(self, name: str) -> tuple[str, str] | None:
        for pattern, unit in self.user_patterns:
            if fnmatch.fnmatchcase(name, pattern):
                return unit, pattern
        if self.use_shipped:
            return shipped_unit(name)
        return None


def shipped_unit(name: str) -> tuple[str, str] | None:
    """The shipped table alone: (unit text, ``"shipped suffix _x"``) or None."""
    lowered = name.lower()
    match = _suffix_of(lowered)
    if match is None:
        return None
    suffix, stem = match
    if stem == "per" or stem.endswith("_per"):
        numerator = _suffix_of(stem[: -len("per")].rstrip("_"))
        if numerator is None:
            return None  # "loss_per_m": a rate of something unknown per metre
        top, _ = numerator
        unit = f"{_grouped(SHIPPED_SUFFIXES[top])}/{_grouped(SHIPPED_SUFFIXES[suffix])}"
        return unit, f"shipped suffixes {top} + _per{suffix}"
    return SHIPPED_SUFFIXES[suffix], f"shipped suffix {suffix}"


def _grouped(unit: str) -> str:
    return f"({unit})" if any(sign in unit for sign in "*/ ") else unit


def _suffix_of(lowered: str) -> tuple[str, str] | None:
    """The longest shipped suffix ending ``lowered`` with an acceptable stem, and the stem."""
    for suffix in _BY_LENGTH:
        if not lowered.endswith(suffix):
            continue
        stem = lowered[: -len(suffix)]
        if not _HAS_ALNUM.search(stem):
            continue
        if len(suffix) == 2 and len(stem.strip("_")) < 2:
            continue  # "x_m", "T_s": a subscript, not a unit
        return suffix, stem
    return None
