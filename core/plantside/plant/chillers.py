"""Chillers against the weather: the performance-curve model, its defaults and its rating.

The curve form
--------------
The chiller model of building simulation (DOE-2; the electric chiller model of the
EnergyPlus Engineering Reference, "based on condenser entering temperature" [1], [2];
the form is published, the citations are from memory):

.. math::
    CAPFT = a + b\\,t_{chw} + c\\,t_{chw}^2 + d\\,t_{c} + e\\,t_{c}^2 + f\\,t_{chw} t_{c}

    EIRFT = \\text{same form}, \\qquad EIRFPLR = a + b\\,PLR + c\\,PLR^2

    Q_{avail} = Q_{ref}\\,CAPFT, \\quad PLR = Q / Q_{avail}, \\quad
    P = \\frac{Q_{ref}}{COP_{ref}}\\,CAPFT\\,EIRFT\\,EIRFPLR(PLR)

with :math:`t_{chw}` the leaving chilled-water temperature [°C] and :math:`t_c` the
entering condenser temperature [°C] (entering water for a water-cooled machine, the
outdoor dry bulb for an air-cooled one). CAPFT and EIRFT are 1 at the rating condition,
EIRFPLR is 1 at PLR = 1, so :math:`COP_{ref}` is the rated full-load COP.

Below the minimum part-load ratio the machine cycles at its minimum: power
:math:`P(PLR_{min})\\,PLR/PLR_{min}` (a project rule, common practice, no source).

Rating conditions (AHRI 550/590 (I-P)-2020, from memory)
--------------------------------------------------------
Leaving chilled water 44 °F (6.67 °C) at every point. Part-load points 100/75/50/25 %
at entering condenser water 85/75/65/65 °F (water-cooled) or entering air
95/80/65/55 °F (air-cooled). IPLV weights from :mod:`plantside.plant.efficiency`.

Default curves (plantside's own, marked)
----------------------------------------
- EIRFT: least-squares biquadratic fit to a reversed Carnot cycle at constant
  second-law efficiency, :math:`EIR \\propto (T_{cond} - T_{evap}) / T_{evap}` with
  :math:`T_{evap} = t_{chw} - 2` K and :math:`T_{cond} = t_c + 7` K (water-cooled:
  condenser range plus approach) or :math:`t_c + 14` K (air-cooled); the offsets are
  common practice, no source. A real machine gains less from a lower lift than an ideal
  cycle; the fit to the option's own part-load ratings absorbs the difference.
- CAPFT: linear, +3 %/K of leaving chilled water, -1 %/K (water-cooled) or -0.7 %/K
  (air-cooled) of entering condenser temperature (common practice, no source).
- EIRFPLR: :math:`0.15 + 0.25\\,PLR + 0.6\\,PLR^2` (common practice, no source), replaced
  by a fit whenever the option gives its part-load ratings or its IPLV.

Fitting to an option's ratings (:func:`fit_chiller_curves`)
-----------------------------------------------------------
CAPFT and EIRFT are normalised to 1 at the full-load rating condition; :math:`COP_{ref}`
is the rated full-load COP, so the full-load rating is reproduced exactly. Then:

- with the four part-load ratings (A, B, C, D): at each point
  :math:`EIRFPLR(PLR_i) = x_i\\,COP_{ref} / (COP_i\\,CAPFT_i\\,EIRFT_i)`, with
  :math:`PLR_i = x_i / CAPFT_i`; the quadratic through (1, 1) is fitted to B, C, D by least
  squares weighted with the IPLV weights. The curves' IPLV then differs from the rated
  one by the fit's residual (reported; :data:`IPLV_TOLERANCE`).
- with the IPLV only: :math:`EIRFPLR_k = EIRFPLR_{default} + k (1 - PLR)`, k found by
  bisection so the curves' IPLV equals the rated IPLV (each part-load power rises with k,
  so the IPLV falls monotonically); k is kept at or above :math:`-a` so the input at no
  load is not negative, which bounds the IPLV the family can reach.

References
----------
[1] EnergyPlus Engineering Reference (US DOE), "Electric Chiller Model Based on
    Condenser Entering Temperature" (from memory).
[2] Hydeman, M., et al., 2002. Development and testing of a reformulated regression-based
    electric chiller model. ASHRAE Transactions 108(2) (from memory).
[3] AHRI Standard 550/590 (I-P)-2020, section 5.4 and the part-load rating conditions
    (from memory).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import lru_cache

import numpy as np

from plantside.arrays import scalar_or_array as _out
from plantside.errors import InputRangeError, check_choice, check_range
from plantside.plant.efficiency import (
    IPLV_LOAD_POINTS,
    IPLV_WEIGHTS,
    cop_from_efficiency,
    integrated_part_load_value,
)

__all__ = [
    "CONDENSER_TYPES",
    "IPLV_TOLERANCE",
    "RATING_CHILLED_WATER_C",
    "RATING_CONDENSER_C",
    "ChillerCurves",
    "ChillerHours",
    "biquadratic",
    "carnot_eir",
    "chiller_hours",
    "condenser_entering_temperature",
    "default_chiller_curves",
    "fit_chiller_curves",
    "quadratic",
    "rating_point_cops",
]

#: Condenser types: water-cooled (cooling tower) or air-cooled.
CONDENSER_TYPES = ("water", "air")
#: Leaving chilled water at every AHRI 550/590 rating point [°C] (44 °F; from memory) [3].
RATING_CHILLED_WATER_C = (44.0 - 32.0) / 1.8
#: Entering condenser temperature at the 100/75/50/25 % points [°C] [3] (from memory):
#: water 85/75/65/65 °F, air 95/80/65/55 °F.
RATING_CONDENSER_C = {
    "water": tuple((f - 32.0) / 1.8 for f in (85.0, 75.0, 65.0, 65.0)),
    "air": tuple((f - 32.0) / 1.8 for f in (95.0, 80.0, 65.0, 55.0)),
}
#: Largest relative difference between the curves' IPLV and the rated IPLV accepted from
#: the four-point fit [-] (project tolerance: 3 %, about the spread of the ratings' own
#: test tolerance, from memory).
IPLV_TOLERANCE = 0.03
#: Evaporating temperature below leaving chilled water and condensing temperature above
#: the entering condenser temperature of the default EIRFT [K] (common practice, no source).
_EVAPORATOR_OFFSET_K = 2.0
_CONDENSER_OFFSET_K = {"water": 7.0, "air": 14.0}
#: Default CAPFT slopes [1/K] (common practice, no source).
_CAPFT_CHW_SLOPE = 0.03
_CAPFT_CONDENSER_SLOPE = {"water": -0.01, "air": -0.007}
#: Default EIRFPLR coefficients (common practice, no source).
DEFAULT_EIRFPLR = (0.15, 0.25, 0.6)
#: Fitting ranges of the default EIRFT [°C]: chilled water, condenser by type.
_FIT_CHW = (4.0, 16.0)
_FIT_CONDENSER = {"water": (12.0, 35.0), "air": (-5.0, 46.0)}


def _check_condenser(condenser: str) -> str:
    return check_choice("condenser", condenser, CONDENSER_TYPES)


def biquadratic(coefficients, x, y):
    """The biquadratic :math:`a + b x + c x^2 + d y + e y^2 + f x y` [-].

    Parameters
    ----------
    coefficients : sequence of 6 float
        a, b, c, d, e, f.
    x, y : float or array_like
        Leaving chilled water and entering condenser temperature [°C].

    Returns
    -------
    numpy.float64 or numpy.ndarray

    Examples
    --------
    >>> round(float(biquadratic((1, 0.1, 0, -0.01, 0, 0), 7.0, 30.0)), 6)
    1.4
    """
    a, b, c, d, e, f = (float(v) for v in coefficients)
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    return _out(a + b * x + c * x * x + d * y + e * y * y + f * x * y)


def quadratic(coefficients, x):
    """The quadratic :math:`a + b x + c x^2` [-].

    Examples
    --------
    >>> round(float(quadratic((0.15, 0.25, 0.6), 0.5)), 6)
    0.425
    """
    a, b, c = (float(v) for v in coefficients)
    x = np.asarray(x, dtype=float)
    return _out(a + b * x + c * x * x)


@dataclass(frozen=True)
class ChillerCurves:
    """A chiller's performance curves and rated full-load COP.

    Attributes
    ----------
    condenser : {"water", "air"}
    reference_cop : float
        Full-load COP at the rating condition [kW/kW].
    capft, eirft : tuple of 6 float
        Biquadratic coefficients in leaving chilled water and entering condenser [°C].
    eirfplr : tuple of 3 float
        Quadratic coefficients in part-load ratio.
    minimum_part_load_ratio : float
        Below it the machine cycles [-].
    """

    condenser: str
    reference_cop: float
    capft: tuple[float, ...]
    eirft: tuple[float, ...]
    eirfplr: tuple[float, ...]
    minimum_part_load_ratio: float = 0.15

    def __post_init__(self):
        _check_condenser(self.condenser)
        check_range("reference_cop", self.reference_cop, 0.5, 15.0, "kW/kW")
        check_range("minimum_part_load_ratio", self.minimum_part_load_ratio, 0.0, 1.0, "")
        for name, size in (("capft", 6), ("eirft", 6), ("eirfplr", 3)):
            values = np.asarray(getattr(self, name), dtype=float)
            if values.shape != (size,) or not np.all(np.isfinite(values)):
                raise InputRangeError(name, f"{name} must hold {size} finite coefficients", "")
            object.__setattr__(self, name, tuple(float(v) for v in values))

    @property
    def rating_condenser(self) -> tuple[float, ...]:
        """Entering condenser temperatures of the four rating points [°C]."""
        return RATING_CONDENSER_C[self.condenser]

    def capacity_ratio(self, chilled_water, condenser):
        """CAPFT: available capacity over rated capacity [-]."""
        return biquadratic(self.capft, chilled_water, condenser)

    def eir_ratio(self, chilled_water, condenser):
        """EIRFT: full-load input per output over the rated value [-]."""
        return biquadratic(self.eirft, chilled_water, condenser)

    def input_power_ratio(self, part_load_ratio, chilled_water, condenser):
        """Input power over rated input power, :math:`CAPFT\\,EIRFT\\,EIRFPLR` [-].

        With cycling below :attr:`minimum_part_load_ratio` (see module notes); 0 at no load.
        """
        plr = np.asarray(part_load_ratio, dtype=float)
        low = self.minimum_part_load_ratio
        running = np.maximum(plr, low)
        f = quadratic(self.eirfplr, running)
        if low > 0:
            f = np.where(plr < low, f * plr / low, f)
        product = self.capacity_ratio(chilled_water, condenser) * self.eir_ratio(
            chilled_water, condenser
        )
        return _out(np.where(plr > 0, product * f, 0.0))


def carnot_eir(chilled_water, condenser, condenser_type: str = "water"):
    """Input over output of a reversed Carnot cycle at the default offsets [-].

    Parameters
    ----------
    chilled_water : float or array_like
        Leaving chilled water [°C].
    condenser : float or array_like
        Entering condenser temperature [°C].
    condenser_type : {"water", "air"}

    Returns
    -------
    numpy.float64 or numpy.ndarray
        :math:`(T_{cond} - T_{evap}) / T_{evap}` [-] (the inverse of the Carnot COP).

    Examples
    --------
    >>> round(float(carnot_eir(6.67, 29.44)), 4)  # Carnot COP 8.74
    0.1144
    """
    _check_condenser(condenser_type)
    evap = np.asarray(chilled_water, float) - _EVAPORATOR_OFFSET_K + 273.15
    cond = np.asarray(condenser, float) + _CONDENSER_OFFSET_K[condenser_type] + 273.15
    return _out((cond - evap) / evap)


def _normalised(coefficients, x, y):
    value = float(biquadratic(coefficients, x, y))
    if not value > 0:
        raise InputRangeError(
            "curves", f"a curve is {value:g} at the rating condition; it must be > 0", "> 0"
        )
    return tuple(c / value for c in coefficients)


@lru_cache(maxsize=4)
def _default_eirft(condenser: str) -> tuple[float, ...]:
    chw = np.linspace(*_FIT_CHW, 13)
    cond = np.linspace(*_FIT_CONDENSER[condenser], 24)
    x, y = (v.ravel() for v in np.meshgrid(chw, cond))
    design = np.column_stack([np.ones_like(x), x, x * x, y, y * y, x * y])
    target = carnot_eir(x, y, condenser)
    coefficients = np.linalg.lstsq(design, target, rcond=None)[0]
    return _normalised(coefficients, RATING_CHILLED_WATER_C, RATING_CONDENSER_C[condenser][0])


def default_chiller_curves(condenser: str = "water", reference_cop: float = 6.1) -> ChillerCurves:
    """The default curve set of a condenser type (see module notes; plantside's own).

    Parameters
    ----------
    condenser : {"water", "air"}
    reference_cop : float
        Rated full-load COP [kW/kW] (default 6.1, about 0.58 kW/ton).

    Returns
    -------
    ChillerCurves
        CAPFT and EIRFT equal to 1 at the full-load rating condition.

    Examples
    --------
    >>> curves = default_chiller_curves("water")
    >>> round(float(curves.eir_ratio(RATING_CHILLED_WATER_C, 85.0 * 5 / 9 - 160 / 9)), 6)
    1.0
    """
    _check_condenser(condenser)
    t_chw, t_c = RATING_CHILLED_WATER_C, RATING_CONDENSER_C[condenser][0]
    slope = _CAPFT_CONDENSER_SLOPE[condenser]
    capft = (1.0 - _CAPFT_CHW_SLOPE * t_chw - slope * t_c, _CAPFT_CHW_SLOPE, 0.0, slope, 0.0, 0.0)
    return ChillerCurves(
        condenser, float(reference_cop), capft, _default_eirft(condenser), DEFAULT_EIRFPLR
    )


def rating_point_cops(curves: ChillerCurves) -> np.ndarray:
    """COP of the curves at the four AHRI 550/590 part-load rating points [kW/kW].

    Returns
    -------
    numpy.ndarray
        COP at 100, 75, 50 and 25 % of rated capacity, each at its rating condenser
        temperature: :math:`COP_i = x_i\\,COP_{ref} / (CAPFT_i\\,EIRFT_i\\,EIRFPLR(x_i/CAPFT_i))`.

    Examples
    --------
    >>> round(float(rating_point_cops(default_chiller_curves("water", 6.1))[0]), 3)
    6.1
    """
    x = np.asarray(IPLV_LOAD_POINTS)
    t_c = np.asarray(curves.rating_condenser)
    capft = curves.capacity_ratio(RATING_CHILLED_WATER_C, t_c)
    power = curves.input_power_ratio(x / capft, RATING_CHILLED_WATER_C, t_c)
    return x * curves.reference_cop / power


def _eirfplr_targets(curves: ChillerCurves, cops: np.ndarray):
    x = np.asarray(IPLV_LOAD_POINTS)
    t_c = np.asarray(curves.rating_condenser)
    capft = curves.capacity_ratio(RATING_CHILLED_WATER_C, t_c)
    eirft = curves.eir_ratio(RATING_CHILLED_WATER_C, t_c)
    return x / capft, x * curves.reference_cop / (cops * capft * eirft)


def fit_chiller_curves(
    full_load_efficiency: float,
    condenser: str = "water",
    metric: str = "cop",
    part_load_efficiencies=None,
    iplv: float | None = None,
    base: ChillerCurves | None = None,
    minimum_part_load_ratio: float = 0.15,
) -> ChillerCurves:
    """Curves that reproduce an option's rated full-load efficiency and its part-load rating.

    Parameters
    ----------
    full_load_efficiency : float
        Rated full-load efficiency at the AHRI 550/590 condition, in ``metric``.
    condenser : {"water", "air"}
    metric : {"cop", "eer", "kw_per_ton"}
    part_load_efficiencies : sequence of 4 float, optional
        Rated efficiencies at 100/75/50/25 % (the first should equal the full load).
    iplv : float, optional
        Rated IPLV in ``metric`` (used when the four points are not given).
    base : ChillerCurves, optional
        Curves to start from (the user's); default :func:`default_chiller_curves`.
    minimum_part_load_ratio : float
        Below it the machine cycles [-].

    Returns
    -------
    ChillerCurves

    Raises
    ------
    InputRangeError
        If the rated IPLV cannot be reached by the curve family (names the range).

    Examples
    --------
    >>> curves = fit_chiller_curves(0.56, "water", "kw_per_ton", iplv=0.52)
    >>> round(float(3.51685 / curves.reference_cop), 2)
    0.56
    """
    cop_full = float(cop_from_efficiency(full_load_efficiency, metric))
    start = base if base is not None else default_chiller_curves(condenser)
    _check_condenser(start.condenser)
    t_chw, t_c = RATING_CHILLED_WATER_C, RATING_CONDENSER_C[start.condenser][0]
    curves = replace(
        start,
        reference_cop=cop_full,
        capft=_normalised(start.capft, t_chw, t_c),
        eirft=_normalised(start.eirft, t_chw, t_c),
        minimum_part_load_ratio=minimum_part_load_ratio,
    )
    if part_load_efficiencies is not None:
        cops = np.asarray(cop_from_efficiency(part_load_efficiencies, metric), dtype=float)
        if cops.shape != (4,):
            raise InputRangeError(
                "part_load_efficiencies", "part_load_efficiencies must hold 4 values", "4 values"
            )
        cops = np.concatenate([[cop_full], cops[1:]])
        plr, target = _eirfplr_targets(curves, cops)
        # EIRFPLR = 1 + b (p - 1) + c (p² - 1): through (1, 1), weighted least squares.
        p, y, w = plr[1:], target[1:], np.sqrt(np.asarray(IPLV_WEIGHTS[1:]))
        design = np.column_stack([p - 1.0, p * p - 1.0]) * w[:, None]
        b, c = np.linalg.lstsq(design, (y - 1.0) * w, rcond=None)[0]
        return replace(curves, eirfplr=(1.0 - b - c, float(b), float(c)))
    if iplv is None:
        return curves
    target_cop = float(cop_from_efficiency(iplv, metric))
    return _fit_iplv(curves, target_cop, iplv, metric)


def _fit_iplv(curves: ChillerCurves, target_cop: float, iplv: float, metric: str):
    a, b, c = curves.eirfplr

    def with_k(k):
        return replace(curves, eirfplr=(a + k, b - k, c))

    def iplv_of(k):
        cops = rating_point_cops(with_k(k))
        return float(integrated_part_load_value(cops, "cop")) if np.all(cops > 0) else np.inf

    # input power at no load cannot be negative: EIRFPLR_k(0) = a + k >= 0
    low, high = -a, 3.0
    best, worst = iplv_of(low), iplv_of(high)
    if not worst <= target_cop <= best:
        raise InputRangeError(
            "iplv",
            f"iplv = {iplv:g} ({metric}) cannot be reached with these curves; "
            f"reachable IPLV COP {worst:.2f} to {best:.2f}",
            f"COP {worst:.2f} to {best:.2f}",
        )
    for _ in range(80):  # bisection on one scalar, not on hours
        mid = 0.5 * (low + high)
        if iplv_of(mid) > target_cop:
            low = mid
        else:
            high = mid
    return with_k(0.5 * (low + high))


def condenser_entering_temperature(
    condenser: str, wet_bulb=None, drybulb=None, tower_approach: float = 4.0, floor: float = 18.0
):
    """Entering condenser temperature each hour [°C].

    Parameters
    ----------
    condenser : {"water", "air"}
    wet_bulb : array_like
        Outdoor wet bulb [°C] (water-cooled).
    drybulb : array_like
        Outdoor dry bulb [°C] (air-cooled).
    tower_approach : float
        Tower leaving water minus wet bulb [K], 1 to 15, held at all loads (common practice).
    floor : float
        Lowest condenser water the tower controls to [°C], 5 to 30 (about 18 °C (65 °F),
        common practice, no source).

    Returns
    -------
    numpy.float64 or numpy.ndarray
        :math:`\\max(t_{wb} + approach, floor)` water-cooled; :math:`t_{db}` air-cooled.

    Examples
    --------
    >>> float(condenser_entering_temperature("water", wet_bulb=23.9, tower_approach=4.0))
    27.9
    """
    _check_condenser(condenser)
    if condenser == "air":
        if drybulb is None:
            raise InputRangeError(
                "drybulb",
                "drybulb is missing: an air-cooled condenser needs the outdoor dry bulb",
                "°C",
            )
        return _out(check_range("drybulb", drybulb, -60.0, 60.0, "°C"))
    if wet_bulb is None:
        raise InputRangeError(
            "wet_bulb",
            "wet_bulb is missing: a water-cooled condenser needs the outdoor wet bulb",
            "°C",
        )
    wb = check_range("wet_bulb", wet_bulb, -60.0, 40.0, "°C")
    approach = float(check_range("tower_approach", tower_approach, 1.0, 15.0, "K"))
    low = float(check_range("floor", floor, 5.0, 30.0, "°C"))
    return _out(np.maximum(wb + approach, low))


@dataclass(frozen=True)
class ChillerHours:
    """Hourly outcome of a group of running chillers.

    Attributes
    ----------
    available_capacity : numpy.ndarray
        Capacity of the running machines at the hour's temperatures [kW].
    part_load_ratio : numpy.ndarray
        Load over available capacity [-] (capped at 1).
    input_power : numpy.ndarray
        Compressor input [kW].
    served_load : numpy.ndarray
        Load the machines carry [kW] (at most the available capacity).
    """

    available_capacity: np.ndarray
    part_load_ratio: np.ndarray
    input_power: np.ndarray
    served_load: np.ndarray


def chiller_hours(load, running_capacity, chilled_water, condenser, curves: ChillerCurves):
    """Input power of running chillers sharing a load at the same part-load ratio.

    Parameters
    ----------
    load : array_like
        Load on the running machines [kW], >= 0.
    running_capacity : array_like
        Combined rated capacity of the running machines [kW], >= 0 (0: none run).
    chilled_water : float or array_like
        Leaving chilled water [°C].
    condenser : float or array_like
        Entering condenser temperature [°C].
    curves : ChillerCurves

    Returns
    -------
    ChillerHours

    Notes
    -----
    :math:`P = (C/COP_{ref})\\,CAPFT\\,EIRFT\\,EIRFPLR(Q / (C\\,CAPFT))` (module notes).

    Examples
    --------
    >>> hours = chiller_hours(500.0, 1000.0, 6.67, 23.9, default_chiller_curves("water"))
    >>> round(float(hours.part_load_ratio), 3)
    0.474
    """
    q = check_range("load", load, 0.0, None, "kW")
    cap = check_range("running_capacity", running_capacity, 0.0, None, "kW")
    capft = np.asarray(curves.capacity_ratio(chilled_water, condenser), dtype=float)
    available = cap * np.maximum(capft, 0.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        plr = np.where(available > 0, np.minimum(q / available, 1.0), 0.0)
    power = cap / curves.reference_cop * curves.input_power_ratio(plr, chilled_water, condenser)
    served = np.minimum(q, available)
    return ChillerHours(_out(available), _out(plr), _out(power), _out(served))
