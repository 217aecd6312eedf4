"""Air-side economizer control: high-limit shutoff and damper position, vectorised.

High-limit shutoff control types follow ASHRAE Standard 90.1-2019 [1], section
6.5.1.1.3 "High-Limit Shutoff" and Table 6.5.1.1.3 "High-Limit Shutoff Control
Settings for Air Economizers". The economizer is *enabled* unless the outdoor air
exceeds the high limit of the selected type (values from memory of [1]; the
designer should check the edition the local code adopts):

===========================  =================================================
control type                 economizer disabled when
===========================  =================================================
``fixed_drybulb``            T_OA > T_limit (75 °F/23.9 °C in climate zones 1B,
                             2B, 3B, 3C, 4B, 4C, 5B, 5C, 6B, 7, 8; 70 °F/21.1 °C
                             in 5A, 6A; 65 °F/18.3 °C in 1A, 2A, 3A, 4A)
``differential_drybulb``     T_OA > T_RA (not allowed in 1A, 2A, 3A, 4A)
``fixed_enthalpy``           h_OA > 28 Btu/lb (47.3 kJ/kg, see below) or
                             T_OA > 75 °F (23.9 °C)
``differential_enthalpy``    h_OA > h_RA or T_OA > 75 °F (23.9 °C)
===========================  =================================================

Conversion of the enthalpy limit: IP enthalpy is referenced to dry air at 0 °F,
SI to dry air at 0 °C, and 0.240 Btu/(lb °F) x 32 °F = 7.68 Btu/lb, so
h[kJ/kg] = 2.326 (h[Btu/lb] - 7.68); 28 Btu/lb -> 47.3 kJ/kg (ASHRAE Handbook
Fundamentals 2017 Ch. 1, Eq. 30 in both unit systems).

Damper control when enabled: the dampers modulate to hold the mixed-air set point
(the coil-leaving target minus any blow-through fan rise) and never close below
the minimum outdoor air. When the outdoor air is warmer than the set point,
an *integrated* economizer keeps 100 % outdoor air while the cooling coil runs;
a *non-integrated* one locks out to the minimum as soon as mechanical cooling is
needed. In hours where the zone needs heat the dampers stay at the minimum.

Modes (integer codes, index into :data:`ECONOMIZER_MODES`):

- ``off``: supply fan off.
- ``minimum_outdoor_air``: dampers at the minimum: no economizer fitted, or the
  outdoor air is so cold that the mix at minimum is already at or below the set point.
- ``free_cooling``: dampers modulating (above the minimum) to hold the set point; coil off.
- ``integrated``: 100 % outdoor air with the cooling coil running.
- ``locked_out``: economizer fitted but held at the minimum (high limit exceeded,
  or a non-integrated economizer while mechanical cooling runs).
- ``heating``: the zone needs heat; dampers at the minimum.
- ``all_outdoor_air``: a 100 % outdoor-air unit in cooling.

References
----------
[1] ANSI/ASHRAE/IES Standard 90.1-2019, Energy Standard for Buildings Except
    Low-Rise Residential Buildings, section 6.5.1.1.3 and Table 6.5.1.1.3.
"""

from __future__ import annotations

from enum import StrEnum
from typing import NamedTuple

import numpy as np

from plantside.air.mixing import _enthalpy
from plantside.constants import CP_DRY_AIR, CP_WATER_VAPOR, KJKG_PER_BTULB, LATENT_HEAT_0C
from plantside.errors import InputRangeError

__all__ = [
    "DEFAULT_DRYBULB_LIMIT",
    "DEFAULT_ENTHALPY_LIMIT",
    "DRYBULB_LIMIT_BY_CLIMATE_ZONE",
    "ECONOMIZER_MODES",
    "MODE_ALL_OUTDOOR_AIR",
    "MODE_FREE_COOLING",
    "MODE_HEATING",
    "MODE_INTEGRATED",
    "MODE_LOCKED_OUT",
    "MODE_MINIMUM_OUTDOOR_AIR",
    "MODE_OFF",
    "EconomizerControl",
    "EconomizerPosition",
    "economizer_enabled",
    "economizer_outdoor_air_fraction",
    "enthalpy_si_from_ip_table",
]


class EconomizerControl(StrEnum):
    """High-limit shutoff control type (ASHRAE 90.1-2019 Table 6.5.1.1.3), or none."""

    NONE = "none"
    FIXED_DRYBULB = "fixed_drybulb"
    DIFFERENTIAL_DRYBULB = "differential_drybulb"
    FIXED_ENTHALPY = "fixed_enthalpy"
    DIFFERENTIAL_ENTHALPY = "differential_enthalpy"

    @classmethod
    def parse(cls, value, field: str = "economizer") -> EconomizerControl:
        """Accept a member or its value; raise InputRangeError naming ``field`` otherwise."""
        try:
            return cls(str(value).strip().lower())
        except ValueError:
            allowed = ", ".join(m.value for m in cls)
            raise InputRangeError(
                field, f"{field} = {value!r} is not a control type; allowed: {allowed}", allowed
            ) from None


#: Mode names; the integer mode code of an hour is the index into this tuple.
ECONOMIZER_MODES = (
    "off",
    "minimum_outdoor_air",
    "free_cooling",
    "integrated",
    "locked_out",
    "heating",
    "all_outdoor_air",
)
(
    MODE_OFF,
    MODE_MINIMUM_OUTDOOR_AIR,
    MODE_FREE_COOLING,
    MODE_INTEGRATED,
    MODE_LOCKED_OUT,
    MODE_HEATING,
    MODE_ALL_OUTDOOR_AIR,
) = range(len(ECONOMIZER_MODES))


class EconomizerPosition(NamedTuple):
    """Damper position and economizer mode of each hour."""

    fraction: np.ndarray  #: outdoor-air mass fraction [-]
    mode: np.ndarray  #: mode code (int8), index into :data:`ECONOMIZER_MODES`


def enthalpy_si_from_ip_table(enthalpy_btulb):
    r"""SI enthalpy [kJ/kg, dry air at 0 °C] from an IP table value [Btu/lb, dry air at 0 °F].

    h_SI = 2.326 (h_IP - 0.240 x 32); both scales use liquid water at 0 °C (32 °F) for
    the vapour term, so only the dry-air reference differs (ASHRAE Handbook
    Fundamentals 2017 Ch. 1, Eq. 30 in SI and IP).

    Notes
    -----
    .. math::

        h_{SI} = 2.326 \, (h_{IP} - 0.240 \times 32)

    Examples
    --------
    >>> round(float(enthalpy_si_from_ip_table(28.0)), 1)  # 28 Btu/lb -> kJ/kg
    47.3
    """
    return KJKG_PER_BTULB * (np.asarray(enthalpy_btulb, dtype=float) - 0.240 * 32.0)


#: Fixed dry-bulb high limit of 75 °F [°C] (ASHRAE 90.1-2019 Table 6.5.1.1.3, from memory).
DEFAULT_DRYBULB_LIMIT = round((75.0 - 32.0) / 1.8, 1)
#: Fixed enthalpy high limit of 28 Btu/lb in SI [kJ/kg] (ASHRAE 90.1-2019 Table 6.5.1.1.3,
#: from memory), converted with :func:`enthalpy_si_from_ip_table`.
DEFAULT_ENTHALPY_LIMIT = round(float(enthalpy_si_from_ip_table(28.0)), 1)
#: Fixed dry-bulb high limit by climate zone [°C] (ASHRAE 90.1-2019 Table 6.5.1.1.3,
#: from memory: 75 °F, 70 °F, 65 °F).
DRYBULB_LIMIT_BY_CLIMATE_ZONE = {
    **{zone: DEFAULT_DRYBULB_LIMIT for zone in "1B 2B 3B 3C 4B 4C 5B 5C 6B 7 8".split()},
    **{zone: round((70.0 - 32.0) / 1.8, 1) for zone in ("5A", "6A")},
    **{zone: round((65.0 - 32.0) / 1.8, 1) for zone in ("1A", "2A", "3A", "4A")},
}


def economizer_enabled(
    control,
    outdoor_drybulb,
    outdoor_enthalpy,
    return_drybulb,
    return_enthalpy,
    drybulb_limit=DEFAULT_DRYBULB_LIMIT,
    enthalpy_limit=DEFAULT_ENTHALPY_LIMIT,
):
    r"""Whether the economizer may open beyond the minimum (high limit not exceeded).

    Parameters
    ----------
    control : EconomizerControl or str
        High-limit control type.
    outdoor_drybulb, return_drybulb : array_like
        Outdoor and return dry bulb [°C].
    outdoor_enthalpy, return_enthalpy : array_like
        Outdoor and return enthalpy [kJ/kg dry air].
    drybulb_limit : float
        Fixed dry-bulb high limit [°C] (also the dry-bulb limit of the enthalpy types).
    enthalpy_limit : float
        Fixed enthalpy high limit [kJ/kg dry air].

    Returns
    -------
    numpy.ndarray of bool
        True where the economizer is enabled. At exactly the limit the economizer stays
        enabled (shutoff is when the outdoor value *exceeds* the limit).

    Notes
    -----
    .. math::

        \text{disabled where}\quad
        \begin{cases}
        t_{o} > t_{limit} & \text{fixed dry bulb} \\
        t_{o} > t_{r} & \text{differential dry bulb} \\
        h_{o} > h_{limit} \ \lor\ t_{o} > t_{limit} & \text{fixed enthalpy} \\
        h_{o} > h_{r} \ \lor\ t_{o} > t_{limit} & \text{differential enthalpy}
        \end{cases}

    References
    ----------
    ASHRAE Standard 90.1-2019, section 6.5.1.1.3 and Table 6.5.1.1.3.

    Examples
    --------
    >>> economizer_enabled("fixed_drybulb", [20.0, 26.0], 40.0, 24.0, 47.0).tolist()
    [True, False]
    """
    control = EconomizerControl.parse(control)
    t_o = np.asarray(outdoor_drybulb, dtype=float)
    h_o = np.asarray(outdoor_enthalpy, dtype=float)
    t_r = np.asarray(return_drybulb, dtype=float)
    h_r = np.asarray(return_enthalpy, dtype=float)
    shape = np.broadcast_shapes(t_o.shape, h_o.shape, t_r.shape, h_r.shape)
    if control is EconomizerControl.NONE:
        return np.zeros(shape, dtype=bool)
    exceeded = _high_limit_exceeded(control, t_o, h_o, t_r, h_r, drybulb_limit, enthalpy_limit)
    return np.broadcast_to(~exceeded, shape)


def _high_limit_exceeded(control, t_o, h_o, t_r, h_r, t_limit, h_limit):
    """The high-limit shutoff decision of Table 6.5.1.1.3, written once.

    True where the outdoor air exceeds the limit of ``control`` (not ``NONE``): used by
    :func:`economizer_enabled` and by the damper control of the year model.
    """
    if control is EconomizerControl.FIXED_DRYBULB:
        return t_o > t_limit
    if control is EconomizerControl.DIFFERENTIAL_DRYBULB:
        return t_o > t_r
    if control is EconomizerControl.FIXED_ENTHALPY:
        return (h_o > h_limit) | (t_o > t_limit)
    # differential enthalpy with the fixed dry-bulb limit
    return (h_o > h_r) | (t_o > t_limit)


def economizer_outdoor_air_fraction(
    control,
    integrated,
    minimum_fraction,
    mixed_air_setpoint,
    outdoor_drybulb,
    outdoor_humidity_ratio,
    return_drybulb,
    return_humidity_ratio,
    drybulb_limit=DEFAULT_DRYBULB_LIMIT,
    enthalpy_limit=DEFAULT_ENTHALPY_LIMIT,
    heating=False,
):
    """Outdoor-air mass fraction and economizer mode of each hour.

    Parameters
    ----------
    control : EconomizerControl or str
        High-limit control type (``"none"`` keeps the dampers at the minimum).
    integrated : bool
        True: 100 % outdoor air while the cooling coil runs; False: lock out to the
        minimum when mechanical cooling is needed.
    minimum_fraction : array_like
        Minimum outdoor-air mass fraction [-], 0 to 1.
    mixed_air_setpoint : array_like
        Mixed-air dry-bulb set point [°C].
    outdoor_drybulb, return_drybulb : array_like
        Dry bulb [°C].
    outdoor_humidity_ratio, return_humidity_ratio : array_like
        Humidity ratio [kg/kg dry air].
    drybulb_limit : float
        Dry-bulb high limit [°C].
    enthalpy_limit : float
        Enthalpy high limit [kJ/kg dry air].
    heating : array_like of bool
        True where the zone needs heat (dampers at minimum, mode ``heating``).

    Returns
    -------
    EconomizerPosition
        Named tuple of ``fraction``, the outdoor-air mass fraction [-], and ``mode``,
        the int8 mode code (index into :data:`ECONOMIZER_MODES`).

    Notes
    -----
    The modulating fraction is the exact mass-basis solution of t_mix = set point
    (:func:`plantside.air.mixing.outdoor_fraction_for_mixed_drybulb`), clipped to
    [minimum, 1].

    References
    ----------
    ASHRAE Standard 90.1-2019, section 6.5.1.1.3 and Table 6.5.1.1.3 (high limits);
    section 6.5.1.3 (integrated economizer control), from memory.
    """
    control = EconomizerControl.parse(control)
    x_min = np.asarray(minimum_fraction, dtype=float)
    ts = np.asarray(mixed_air_setpoint, dtype=float)
    t_o = np.asarray(outdoor_drybulb, dtype=float)
    w_o = np.asarray(outdoor_humidity_ratio, dtype=float)
    t_r = np.asarray(return_drybulb, dtype=float)
    w_r = np.asarray(return_humidity_ratio, dtype=float)
    heating = np.asarray(heating, dtype=bool)
    shape = np.broadcast_shapes(x_min.shape, ts.shape, t_o.shape, w_o.shape, t_r.shape, w_r.shape)
    shape = np.broadcast_shapes(shape, heating.shape)
    fraction, mode = _damper_control(
        control,
        integrated,
        x_min,
        ts,
        t_o,
        w_o,
        _enthalpy(t_o, w_o),
        t_r,
        w_r,
        _enthalpy(t_r, w_r),
        drybulb_limit,
        enthalpy_limit,
        heating,
    )
    return EconomizerPosition(
        np.broadcast_to(fraction, shape).astype(float),
        np.broadcast_to(mode, shape).astype(np.int8),
    )


def _damper_control(
    control,
    integrated,
    x_min,
    ts,
    t_o,
    w_o,
    h_o,
    t_r,
    w_r,
    h_r,
    t_limit,
    h_limit,
    heating,
    mode=None,
):
    """Core of :func:`economizer_outdoor_air_fraction` on validated arrays with enthalpies.

    With ``mode`` given (codes decided earlier), the decision is kept and only the damper
    position is recomputed: modulating hours follow the set point, the others stay at
    100 % or at the minimum.
    """
    if control is EconomizerControl.NONE:
        return x_min, np.where(heating, MODE_HEATING, MODE_MINIMUM_OUTDOOR_AIR).astype(np.int8)
    # Modulating: the damper position for the set point, never below the minimum.
    x_need = _fraction_for_setpoint(ts, w_o, h_o, w_r, h_r)
    x_mod = np.fmin(np.fmax(x_need, x_min), 1.0)  # fmax: NaN (no solution) -> minimum
    if mode is not None:
        fraction = np.where(
            mode == MODE_FREE_COOLING, x_mod, np.where(mode == MODE_INTEGRATED, 1.0, x_min)
        )
        return fraction, mode
    exceeded = _high_limit_exceeded(control, t_o, h_o, t_r, h_r, t_limit, h_limit)
    cold = t_o <= ts
    closed = exceeded | heating
    fraction = np.where(closed, x_min, np.where(cold, x_mod, 1.0 if integrated else x_min))
    # the codes chosen as int8 from the start (no int64 arrays to convert)
    code = np.int8
    mode_open = np.where(
        cold,
        np.where(x_mod > x_min, code(MODE_FREE_COOLING), code(MODE_MINIMUM_OUTDOOR_AIR)),
        code(MODE_INTEGRATED if integrated else MODE_LOCKED_OUT),
    )
    mode = np.where(
        heating, code(MODE_HEATING), np.where(exceeded, code(MODE_LOCKED_OUT), mode_open)
    )
    return fraction, mode.astype(np.int8, copy=False)


def _fraction_for_setpoint(ts, w_o, h_o, w_r, h_r):
    """Exact mass-basis damper position for t_mix = set point (see plantside.air.mixing)."""
    # numerator = h_r - L W_r - t_s (c_a + c_v W_r),
    # denominator = (L + c_v t_s)(W_o - W_r) - (h_o - h_r): in place, in that order, on
    # three arrays of the broadcast shape instead of thirteen
    shape = np.broadcast_shapes(*(np.shape(a) for a in (ts, w_o, h_o, w_r, h_r)))
    numerator = np.multiply(LATENT_HEAT_0C, w_r, out=np.empty(shape))
    np.subtract(h_r, numerator, out=numerator)
    work = np.multiply(CP_WATER_VAPOR, w_r, out=np.empty(shape))
    work += CP_DRY_AIR
    work *= ts
    numerator -= work
    denominator = np.multiply(CP_WATER_VAPOR, ts, out=work)
    denominator += LATENT_HEAT_0C
    difference = np.subtract(w_o, w_r, out=np.empty(shape))
    denominator *= difference
    denominator -= np.subtract(h_o, h_r, out=difference)
    with np.errstate(divide="ignore", invalid="ignore"):
        numerator /= denominator
    return numerator if shape else numerator[()]
