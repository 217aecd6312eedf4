"""Unit conversion at the edges: input parsing, display and export.

The core works in SI only (°C, kg/kg, kJ/kg, Pa, m³/s, kW). The functions here
convert what a plant engineer types or reads in either system. The unit system
shown to a user is a parameter (:class:`UnitSystem`), never global state.

Factors come from :mod:`plantside.constants` (NIST SP 811; AHRI 550/590 for the ton).
"""

from __future__ import annotations

import re
from enum import StrEnum

import numpy as np

from plantside.constants import (
    GRAINS_PER_LB,
    KJKG_PER_BTULB,
    KW_PER_TON,
    M3_PER_US_GALLON,
    M3S_PER_CFM,
    M_PER_FT,
    PA_PER_INHG,
    PA_PER_PSI,
    W_PER_BTUH,
)
from plantside.errors import InputRangeError

__all__ = [
    "MESSAGE_QUANTITIES",
    "QUANTITIES",
    "UnitSystem",
    "UnitText",
    "btuh_from_kw",
    "btulb_from_kjkg",
    "celsius_from_fahrenheit",
    "cfm_from_m3s",
    "delta_btulb_from_kjkg",
    "delta_celsius_from_fahrenheit",
    "delta_fahrenheit_from_celsius",
    "delta_kjkg_from_btulb",
    "display_text",
    "fahrenheit_from_celsius",
    "feet_from_meters",
    "from_display",
    "g_per_kg_from_grains_per_lb",
    "gpm_from_m3s",
    "grains_per_lb_from_g_per_kg",
    "inhg_from_pa",
    "kjkg_from_btulb",
    "kw_from_btuh",
    "kw_from_mbh",
    "kw_from_tons",
    "lps_from_m3s",
    "m3s_from_cfm",
    "m3s_from_gpm",
    "m3s_from_lps",
    "mbh_from_kw",
    "meters_from_feet",
    "pa_from_inhg",
    "pa_from_psia",
    "psia_from_pa",
    "to_display",
    "tons_from_kw",
    "unit_label",
]


class UnitSystem(StrEnum):
    """The unit system a user reads and types: ``"SI"`` or ``"IP"``."""

    SI = "SI"
    IP = "IP"

    @classmethod
    def parse(cls, value) -> UnitSystem:
        """Accept ``"SI"``/``"IP"`` in any case; raise a clear error otherwise."""
        text = str(value).strip().upper()
        if text in ("IP", "I-P", "US"):
            return cls.IP
        if text == "SI":
            return cls.SI
        raise InputRangeError(
            "unit_system", f"unit_system = {value!r}; allowed 'SI' or 'IP'", "'SI' or 'IP'"
        )


def _f(x):
    return np.asarray(x, dtype=float)


# temperature
def fahrenheit_from_celsius(celsius):
    """Temperature [°F] from [°C]."""
    return _f(celsius) * 1.8 + 32.0


def celsius_from_fahrenheit(fahrenheit):
    """Temperature [°C] from [°F]."""
    return (_f(fahrenheit) - 32.0) / 1.8


def delta_fahrenheit_from_celsius(kelvin_difference):
    """Temperature difference [°F] from [K]."""
    return _f(kelvin_difference) * 1.8


def delta_celsius_from_fahrenheit(fahrenheit_difference):
    """Temperature difference [K] from [°F]."""
    return _f(fahrenheit_difference) / 1.8


# power
def btuh_from_kw(kw):
    """Heat rate [Btu/h] from [kW]."""
    return _f(kw) * 1000.0 / W_PER_BTUH


def kw_from_btuh(btuh):
    """Heat rate [kW] from [Btu/h]."""
    return _f(btuh) * W_PER_BTUH / 1000.0


def mbh_from_kw(kw):
    """Heat rate [MBH, thousands of Btu/h] from [kW]."""
    return btuh_from_kw(kw) / 1000.0


def kw_from_mbh(mbh):
    """Heat rate [kW] from [MBH]."""
    return kw_from_btuh(_f(mbh) * 1000.0)


def tons_from_kw(kw):
    """Refrigeration [tons, 12,000 Btu/h] from [kW]."""
    return _f(kw) / KW_PER_TON


def kw_from_tons(tons):
    """Refrigeration [kW] from [tons]."""
    return _f(tons) * KW_PER_TON


# airflow
def cfm_from_m3s(m3s):
    """Airflow [cfm] from [m³/s]."""
    return _f(m3s) / M3S_PER_CFM


def m3s_from_cfm(cfm):
    """Airflow [m³/s] from [cfm]."""
    return _f(cfm) * M3S_PER_CFM


def lps_from_m3s(m3s):
    """Airflow [L/s] from [m³/s]."""
    return _f(m3s) * 1000.0


def m3s_from_lps(lps):
    """Airflow [m³/s] from [L/s]."""
    return _f(lps) / 1000.0


def gpm_from_m3s(m3s):
    """Water flow [US gal/min] from [m³/s] (1 US gallon = 3.785411784 L, NIST SP 811)."""
    return _f(m3s) * 60.0 / M3_PER_US_GALLON


def m3s_from_gpm(gpm):
    """Water flow [m³/s] from [US gal/min]."""
    return _f(gpm) * M3_PER_US_GALLON / 60.0


# enthalpy and humidity
#: Offset between the IP enthalpy scale (dry air at 0 °F, liquid water at 32 °F) and the
#: SI scale (dry air and liquid water at 0 °C) [Btu/lb]: 1.006 kJ/(kg K) x 17.78 K / 2.326.
#: ASHRAE Handbook Fundamentals 2017 Ch. 1, Eq. 30 in SI and in I-P (h = 0.240 t + W(1061 +
#: 0.444 t)); the vapour terms coincide, the dry-air terms differ by this constant.
IP_ENTHALPY_OFFSET_BTULB = 1.006 * (32.0 / 1.8) / KJKG_PER_BTULB


def btulb_from_kjkg(kjkg):
    """Moist-air enthalpy [Btu/lb, I-P reference 0 °F] from [kJ/kg, SI reference 0 °C].

    The two scales have different zeros (ASHRAE Handbook Fundamentals 2017 Ch. 1, Eq. 30 in
    SI and I-P), so a state of 47.3 kJ/kg reads 28.0 Btu/lb, as the I-P tables print it. For a
    difference of enthalpies use :func:`delta_btulb_from_kjkg`.
    """
    return _f(kjkg) / KJKG_PER_BTULB + IP_ENTHALPY_OFFSET_BTULB


def kjkg_from_btulb(btulb):
    """Moist-air enthalpy [kJ/kg, SI reference] from [Btu/lb, I-P reference] (inverse of
    :func:`btulb_from_kjkg`)."""
    return (_f(btulb) - IP_ENTHALPY_OFFSET_BTULB) * KJKG_PER_BTULB


def delta_btulb_from_kjkg(kjkg):
    """Enthalpy difference [Btu/lb] from [kJ/kg] (exact factor 2.326, NIST SP 811)."""
    return _f(kjkg) / KJKG_PER_BTULB


def delta_kjkg_from_btulb(btulb):
    """Enthalpy difference [kJ/kg] from [Btu/lb]."""
    return _f(btulb) * KJKG_PER_BTULB


def grains_per_lb_from_g_per_kg(g_per_kg):
    """Humidity ratio [grains/lb] from [g/kg]."""
    return _f(g_per_kg) * GRAINS_PER_LB / 1000.0


def g_per_kg_from_grains_per_lb(grains):
    """Humidity ratio [g/kg] from [grains/lb]."""
    return _f(grains) * 1000.0 / GRAINS_PER_LB


# length and pressure
def feet_from_meters(m):
    """Length [ft] from [m]."""
    return _f(m) / M_PER_FT


def meters_from_feet(ft):
    """Length [m] from [ft]."""
    return _f(ft) * M_PER_FT


def psia_from_pa(pa):
    """Pressure [psia] from [Pa]."""
    return _f(pa) / PA_PER_PSI


def pa_from_psia(psia):
    """Pressure [Pa] from [psia]."""
    return _f(psia) * PA_PER_PSI


def inhg_from_pa(pa):
    """Pressure [inHg] from [Pa]."""
    return _f(pa) / PA_PER_INHG


def pa_from_inhg(inhg):
    """Pressure [Pa] from [inHg]."""
    return _f(inhg) * PA_PER_INHG


def _identity(x):
    return _f(x)


# quantity -> SI unit, IP unit, SI->display (SI), display->SI (SI), SI->IP, IP->SI.
# SI display units are chosen for the trade: humidity in g/kg, pressure in kPa, airflow in L/s.
QUANTITIES = {
    "temperature": (
        "°C",
        "°F",
        _identity,
        _identity,
        fahrenheit_from_celsius,
        celsius_from_fahrenheit,
    ),
    "temperature_difference": (
        "K",
        "°F",
        _identity,
        _identity,
        delta_fahrenheit_from_celsius,
        delta_celsius_from_fahrenheit,
    ),
    "power": ("kW", "tons", _identity, _identity, tons_from_kw, kw_from_tons),
    "heating_power": ("kW", "MBH", _identity, _identity, mbh_from_kw, kw_from_mbh),
    "energy": (
        "MWh",
        "ton·h",
        lambda kwh: _f(kwh) / 1000.0,
        lambda mwh: _f(mwh) * 1000.0,
        tons_from_kw,
        kw_from_tons,
    ),
    "heating_energy": (
        "MWh",
        "MMBtu",
        lambda kwh: _f(kwh) / 1000.0,
        lambda mwh: _f(mwh) * 1000.0,
        lambda kwh: btuh_from_kw(kwh) / 1e6,
        lambda mmbtu: kw_from_btuh(_f(mmbtu) * 1e6),
    ),
    "airflow": ("L/s", "cfm", lps_from_m3s, m3s_from_lps, cfm_from_m3s, m3s_from_cfm),
    "water_flow": ("L/s", "gpm", lps_from_m3s, m3s_from_lps, gpm_from_m3s, m3s_from_gpm),
    "enthalpy": ("kJ/kg", "Btu/lb", _identity, _identity, btulb_from_kjkg, kjkg_from_btulb),
    "enthalpy_difference": (
        "kJ/kg",
        "Btu/lb",
        _identity,
        _identity,
        delta_btulb_from_kjkg,
        delta_kjkg_from_btulb,
    ),
    "humidity_ratio": (
        "g/kg",
        "gr/lb",
        lambda w: _f(w) * 1000.0,
        lambda g: _f(g) / 1000.0,
        lambda w: grains_per_lb_from_g_per_kg(_f(w) * 1000.0),
        lambda gr: g_per_kg_from_grains_per_lb(gr) / 1000.0,
    ),
    "length": ("m", "ft", _identity, _identity, feet_from_meters, meters_from_feet),
    "pressure": (
        "kPa",
        "inHg",
        lambda pa: _f(pa) / 1000.0,
        lambda kpa: _f(kpa) * 1000.0,
        inhg_from_pa,
        pa_from_inhg,
    ),
    "mass_flow": (
        "kg/s",
        "lb/h",
        _identity,
        _identity,
        lambda kgs: _f(kgs) * 3600.0 / 0.45359237,
        lambda lbh: _f(lbh) * 0.45359237 / 3600.0,
    ),
    "area": (
        "m²",
        "ft²",
        _identity,
        _identity,
        lambda m2: _f(m2) / M_PER_FT**2,
        lambda ft2: _f(ft2) * M_PER_FT**2,
    ),
}


def _lookup(quantity):
    try:
        return QUANTITIES[quantity]
    except KeyError:
        allowed = ", ".join(sorted(QUANTITIES))
        raise InputRangeError(
            "quantity", f"unknown quantity {quantity!r}; allowed: {allowed}", allowed
        ) from None


def unit_label(quantity: str, system) -> str:
    """Display unit of ``quantity`` in ``system``."""
    si, ip, *_ = _lookup(quantity)
    return ip if UnitSystem.parse(system) is UnitSystem.IP else si


def to_display(quantity: str, value_si, system):
    """Convert an SI core value to what the user reads.

    Parameters
    ----------
    quantity : str
        One of :data:`QUANTITIES` (e.g. ``"power"``; its SI core unit is kW, and
        ``"energy"`` is kWh in the core).
    value_si : array_like
        Value in the core's SI unit.
    system : UnitSystem or str
        ``"SI"`` or ``"IP"``.

    Returns
    -------
    tuple
        (value in display units as numpy array, unit label).
    """
    si, ip, to_si_display, _, to_ip, _ = _lookup(quantity)
    if UnitSystem.parse(system) is UnitSystem.IP:
        return to_ip(value_si), ip
    return to_si_display(value_si), si


def from_display(quantity: str, value, system):
    """Convert what the user typed (display units) to the core's SI unit."""
    _, _, _, from_si_display, _, from_ip = _lookup(quantity)
    if UnitSystem.parse(system) is UnitSystem.IP:
        return from_ip(value)
    return from_si_display(value)


# ---------------------------------------------------------------------------------------
# messages
# ---------------------------------------------------------------------------------------
#: Core unit the model writes in a message -> the quantity it measures, by default. The
#: model writes "... 3 °C ...", "... 12.5 kW unmet ...", "... 80 kWh ...", "0.05 m³/s".
MESSAGE_QUANTITIES = {
    "°C": "temperature",
    "kWh": "energy",
    "kW": "power",
    "m³/s": "airflow",
    "m²": "area",
    "kJ/kg": "enthalpy",
}


#: Core units a message keeps in SI although the page's SI unit differs: a caution's
#: "80 kWh" reads better than "0.08 MWh".
_SI_KEPT = frozenset({"kWh"})


class UnitText(str):
    """A message written in both unit systems: the SI text, with ``ip`` the I-P one.

    :func:`display_text` picks the one asked for instead of converting figures
    already rounded in SI (which would not match the figures on screen), or
    figures whose quantity the unit alone does not say (kW of heating is MBH, not
    tons).
    """

    ip: str

    def __new__(cls, si: str, ip: str):
        text = super().__new__(cls, si)
        text.ip = ip
        return text


_FIGURE = r"-?\d[\d,]*(?:\.\d+)?"


#: A figure the model wrote with three or more decimals, before a unit kept in SI: the
#: model keeps the digits an I-P conversion needs (78.631 kW -> 268.3 MBH, where 78.6 kW
#: would give 268.2), and the SI text shows it rounded as the other figures are.
_PRECISE = re.compile(r"(?P<a>-?\d[\d,]*\.\d{3,})(?P<rest> ?(?:kW|°C|kJ/kg)(?![\w/²³]))")


def _figure_text(value: float) -> str:
    """A converted figure: one decimal from 10 up, three significant digits below."""
    if value != 0.0 and abs(value) < 10.0:
        return f"{value:.3g}"
    return f"{value:,.1f}"


def display_text(text: str, system, quantities: dict[str, str] | None = None) -> str:
    """A model message or caution (written in core units) with its figures in ``system``.

    Parameters
    ----------
    text : str
        The message. Figures followed by a core unit ("3 °C", "12.5 kW", ranges
        "4 to 23.5 °C", "0.05–100 m³/s") are converted; other text is left as it is.
        A :class:`UnitText` carries its own I-P text, which is used as it is.
    system : UnitSystem or str
        "SI" or "IP". In SI the model's units stay, except m³/s, which reads as
        L/s (the airflow unit of SI files and pages); a figure written with three or
        more decimals (kept for the I-P conversion) is rounded as shown figures are.
    quantities : dict of str to str, optional
        Core unit -> quantity of :data:`QUANTITIES` (default
        :data:`MESSAGE_QUANTITIES`; e.g. ``{"kW": "heating_power"}`` for a heating
        message).

    Returns
    -------
    str

    Examples
    --------
    >>> display_text("supply air 12.8 °C; 4 to 23.5 °C allowed", "IP")
    'supply air 55.0 °F; 39.2 to 74.3 °F allowed'
    """
    ip = UnitSystem.parse(system) is UnitSystem.IP
    if isinstance(text, UnitText):
        return text.ip if ip else str(text)
    if not text:
        return text
    quantities = MESSAGE_QUANTITIES if quantities is None else quantities
    changed = {
        unit: quantity
        for unit, quantity in quantities.items()
        if unit_label(quantity, system) != unit and (ip or unit not in _SI_KEPT)
    }
    if not ip:  # figures the model wrote finer than shown (kept for the I-P conversion)
        text = _PRECISE.sub(
            lambda m: _figure_text(float(m["a"].replace(",", ""))) + m["rest"], text
        )
    if not changed:
        return text
    units = "|".join(re.escape(u) for u in sorted(changed, key=len, reverse=True))
    pattern = re.compile(
        rf"(?P<a>{_FIGURE})(?:(?P<joint> to | and |–)(?P<b>{_FIGURE}))?"
        rf" ?(?P<unit>{units})(?![\w/²³])"
    )

    def convert(match):
        quantity = changed[match["unit"]]

        def one(figure):
            value = float(figure.replace(",", ""))
            shown, unit = to_display(quantity, value, system)
            return _figure_text(float(shown)), unit

        first, unit = one(match["a"])
        if match["b"] is None:
            return f"{first} {unit}"
        return f"{first}{match['joint']}{one(match['b'])[0]} {unit}"

    return pattern.sub(convert, text)
