"""Model results -> small, tidy chart frames in display units.

Every function here takes SI results of the model (an air handler's hourly
year, its design point, a plant's loads) and returns a
:class:`pandas.DataFrame` that a chart builder draws as it is:

- values are already in the display units of ``system`` ("SI" or "IP"),
  converted with :func:`plantside.units.to_display` (power in kW or tons,
  energy in MWh or ton·h, temperature in °C or °F, humidity ratio in g/kg or
  gr/lb, enthalpy in kJ/kg or Btu/lb, each on its own system's reference);
- every frame is pre-aggregated: no frame has more than :data:`MAX_ROWS`
  rows, whatever the length of the year (8,760 hours become a few hundred
  bins or curve points);
- ``frame.attrs["system"]`` records the unit system, so builders label their
  axes with the right units without being told twice.

Column schemas are listed in each function's docstring and in
``notes/charts.md``. Frames from two scenarios are stacked with
:func:`plantside.charts.compare.combine_scenarios`.

This module is the display edge: it is the only place in the chart layer
that converts units.
"""

from __future__ import annotations

import json
from collections.abc import Mapping, Sequence

import numpy as np
import pandas as pd

from plantside.air import moist_air
from plantside.air_handler.results import zone_load
from plantside.errors import InputRangeError, check_range
from plantside.plant.efficiency import iplv_band_weights
from plantside.plant.part_load import load_duration_curve, part_load_bins
from plantside.units import UnitSystem, from_display, to_display, unit_label

__all__ = [
    "BREAKDOWN_COMPONENTS",
    "BREAKDOWN_OPTIONAL",
    "MAX_ROWS",
    "MODE_LABELS",
    "STATE_LABELS",
    "axis_title",
    "capacity_lines_frame",
    "design_breakdown_frame",
    "frame_system",
    "iplv_weights_frame",
    "load_duration_frame",
    "oa_marker_frame",
    "oa_sweep_frame",
    "oa_sweep_frame_from_sweep",
    "outdoor_density_frame",
    "part_load_frame",
    "process_frame",
    "psychrometric_extent",
    "psychrometric_grid_frame",
    "records",
    "value_format",
    "year_load_series",
    "year_scatter_frame",
]

#: Largest number of rows any chart frame may carry.
MAX_ROWS = 1000

#: Steps of the design-load waterfall: label and how the step is read from the model's loads
#: (keys of ``DesignPoint.loads`` / the hourly columns, SI [kW]). The economizer and energy
#: recovery effects are positive when they reduce the coil load, so the step is their negative.
BREAKDOWN_COMPONENTS = (
    ("Zone sensible", ("zone_sensible_kW",), 1.0),
    ("Zone latent", ("zone_latent_kW",), 1.0),
    ("Ventilation sensible", ("ventilation_sensible_kW",), 1.0),
    ("Ventilation latent", ("ventilation_latent_kW",), 1.0),
    ("Fan heat", ("fan_heat_kW",), 1.0),
    ("Economizer / recovery", ("economizer_effect_kW", "recovery_effect_kW"), -1.0),
)

#: Further terms of the air handler's energy balance, drawn as steps only where they are not
#: zero at the design hour (coil = zone + ventilation + fan heat - economizer - recovery
#: + terminal reheat + dehumidification reheat - condensate heat + preheat + heating coil;
#: see :mod:`plantside.air_handler.results`). The reheats are grouped as the coil schedule
#: groups them (:mod:`plantside.air_handler.coil_schedule`). The passive run-around
#: exchanger around a dehumidifying coil (``coil_runaround_heat_kW``) moves heat from the
#: air entering the coil to the air leaving it: it is on neither side of the balance, so it
#: is no step (what it saves shows as less dehumidification reheat). The sun on glazing is
#: part of the zone sensible load.
BREAKDOWN_OPTIONAL = (
    # the terminals' reheat on the heating plant: at the scheduled airflow, the cooling the
    # supply air gives beyond the zone load; after a coil driven colder to hold the zone
    # humidity (zone_relative_humidity_max), the lift back to what the zone needs
    ("Terminal reheat", ("reheat_kW", "humidity_control_reheat_kW"), 1.0),
    # a leaving-dew-point coil's air reheated to the supply set point in the unit, from
    # hot water or from the refrigeration condenser (after any run-around exchanger)
    ("Dehumidification reheat", ("dehumidification_reheat_kW", "condenser_heat_recovered_kW"), 1.0),
    ("Preheat and heating coil", ("preheat_kW", "heating_coil_kW"), 1.0),
    ("Condensate heat", ("condensate_heat_kW",), -1.0),
    # plant view only: pump work and pipe heat gain between the coils and the plant
    ("Distribution gain", ("distribution_gain_kW",), 1.0),
)

#: Words for the economizer modes of :data:`plantside.air.economizer.ECONOMIZER_MODES`.
MODE_LABELS = {
    "off": "Fan off",
    "minimum_outdoor_air": "Minimum outdoor air",
    "free_cooling": "Economizer, coil off",
    "integrated": "Economizer + coil",
    "locked_out": "Economizer locked out",
    "heating": "Heating",
    "all_outdoor_air": "100 % outdoor air",
}


# ---------------------------------------------------------------------------------------
# helpers
# ---------------------------------------------------------------------------------------
def _system(system) -> UnitSystem:
    return UnitSystem.parse(system)


def _finish(frame: pd.DataFrame, system: UnitSystem, kind: str) -> pd.DataFrame:
    if len(frame) > MAX_ROWS:  # guards the promise to the dashboard; bins keep it below
        raise InputRangeError(
            "rows", f"{kind} frame has {len(frame)} rows", f"at most {MAX_ROWS} rows"
        )
    frame.attrs["system"] = system.value
    frame.attrs["kind"] = kind
    return frame


def frame_system(frame: pd.DataFrame, system=None) -> UnitSystem:
    """Unit system of a chart frame: ``system`` if given, else ``frame.attrs["system"]``."""
    if system is not None:
        return _system(system)
    if "system" not in frame.attrs:
        raise InputRangeError(
            "system",
            "the chart frame does not say its unit system; build it with "
            "plantside.charts.frames or pass system='SI' or 'IP'",
            "'SI' or 'IP'",
        )
    return _system(frame.attrs["system"])


def axis_title(label: str, quantity: str, system) -> str:
    """Axis title in the trade's words with the display unit: ``"Coil load [tons]"``."""
    return f"{label} [{unit_label(quantity, system)}]"


def _display(quantity: str, value_si, system: UnitSystem) -> np.ndarray:
    return np.asarray(to_display(quantity, value_si, system)[0], dtype=float)


def _column(hourly: pd.DataFrame, name: str) -> np.ndarray:
    if name not in hourly.columns:
        raise InputRangeError(
            name,
            f"hourly results have no column {name!r}",
            f"a frame with column {name!r}",
        )
    return hourly[name].to_numpy(dtype=float)


def _nice_step(span: float, target_steps: int) -> float:
    """A 1-2-5 step that divides ``span`` into about ``target_steps`` parts."""
    if not np.isfinite(span) or span <= 0:
        return 1.0
    raw = span / target_steps
    power = 10.0 ** np.floor(np.log10(raw))
    for factor in (1.0, 2.0, 2.5, 5.0, 10.0):
        if raw <= factor * power:
            return float(factor * power)
    return float(10.0 * power)


# ---------------------------------------------------------------------------------------
# chart 1: design breakdown
# ---------------------------------------------------------------------------------------
def design_breakdown_frame(loads: Mapping[str, float], system="SI") -> pd.DataFrame:
    """Waterfall from zone load to coil load at the design hour.

    Parameters
    ----------
    loads : mapping
        The design point's loads, SI [kW], keyed as the air handler's hourly
        columns (``DesignPoint.loads``): ``zone_sensible_kW``,
        ``zone_latent_kW``, ``ventilation_sensible_kW``,
        ``ventilation_latent_kW``, ``fan_heat_kW``, ``economizer_effect_kW``
        and ``recovery_effect_kW`` (both positive when they reduce the coil
        load), and ``coil_total_kW``; where not zero, also the terms of
        :data:`BREAKDOWN_OPTIONAL` (terminal reheat: ``reheat_kW`` and
        ``humidity_control_reheat_kW``; dehumidification reheat:
        ``dehumidification_reheat_kW`` and ``condenser_heat_recovered_kW``; preheat
        and heating coil, condensate heat, and for a plant
        ``distribution_gain_kW``, the pump and pipe gain included in its coil
        load). A missing component counts as 0 kW. Whatever the
        steps do not explain is drawn as an "Other" step, so the waterfall
        always ends exactly on the model's coil load and never hides a
        discrepancy.
    system : {"SI", "IP"}
        Display unit system.

    Returns
    -------
    pandas.DataFrame
        One row per bar, in drawing order: ``component`` (str), ``kind``
        ("part" for a step, "total" for the zone-load subtotal and the
        coil-load total), ``start`` and ``end`` (the bar's span [display
        power]), ``load`` (signed size of the step, or the total [display
        power]), ``order`` (0..).
    """
    system = _system(system)
    if "coil_total_kW" not in loads:
        raise InputRangeError(
            "coil_total_kW", "the design loads have no coil_total_kW", "coil load [kW]"
        )

    def read(key):
        return float(check_range(key, loads.get(key, 0.0), None, None, "kW"))

    steps = [
        (label, sign * sum(read(key) for key in keys)) for label, keys, sign in BREAKDOWN_COMPONENTS
    ]
    coil = read("coil_total_kW")
    tiny = 1e-6 * max(1.0, abs(coil))
    for label, keys, sign in BREAKDOWN_OPTIONAL:
        value = sign * sum(read(key) for key in keys)
        if abs(value) > tiny:
            steps.append((label, value))
    other = coil - sum(value for _, value in steps)
    if abs(other) > tiny:
        steps.append(("Other", other))
    rows = []
    running = 0.0
    for label, value in steps:
        rows.append((label, "part", running, running + value, value))
        running += value
        if label == "Zone latent":
            rows.append(("Zone load", "total", 0.0, running, running))
    rows.append(("Coil load", "total", 0.0, coil, coil))
    frame = pd.DataFrame(rows, columns=["component", "kind", "start", "end", "load"])
    for column in ("start", "end", "load"):
        frame[column] = _display("power", frame[column].to_numpy(), system)
    frame["order"] = np.arange(len(frame))
    return _finish(frame, system, "design_breakdown")


# ---------------------------------------------------------------------------------------
# chart 2: the year, hour by hour, binned
# ---------------------------------------------------------------------------------------
def _hourly_zone_load(hourly: pd.DataFrame) -> np.ndarray:
    for name in ("zone_sensible_kW", "zone_latent_kW"):
        _column(hourly, name)  # a missing column is named in the error
    return zone_load(hourly)


def _operating(hourly: pd.DataFrame) -> np.ndarray:
    if "operating" in hourly.columns:
        return hourly["operating"].to_numpy(dtype=bool)
    if "economizer_mode" in hourly.columns:
        return hourly["economizer_mode"].astype(str).to_numpy() != "off"
    return np.ones(len(hourly), dtype=bool)


_SCATTER_NUMBERS = ("zone_load", "coil_load", "zone_low", "zone_high", "coil_low", "coil_high")


def year_scatter_frame(
    hourly: pd.DataFrame,
    system="SI",
    bins: int = 36,
    max_rows: int = 600,
    include_off: bool = False,
) -> pd.DataFrame:
    """Hours of the year counted in cells of zone load x coil load, per economizer mode.

    Parameters
    ----------
    hourly : pandas.DataFrame
        An air handler's year (``plantside.air_handler.year.hourly_year``), with
        columns ``coil_total_kW``, ``zone_sensible_kW``, ``zone_latent_kW``,
        ``economizer_mode`` and, if present, ``operating``.
    system : {"SI", "IP"}
        Display unit system.
    bins : int
        About how many cells along the longer axis. Both axes share one
        round cell width, so the coil-equals-zone diagonal stays a diagonal.
    max_rows : int
        Largest number of rows, 50 to 1000; cells are made coarser until the
        frame fits.
    include_off : bool
        Count the hours with the fan off (all loads 0) too. Default False:
        they are reported in ``attrs["hours_off"]`` instead.

    Returns
    -------
    pandas.DataFrame
        One row per occupied (zone cell, coil cell, mode): ``zone_load`` and
        ``coil_load`` (cell centres [display power]), ``zone_low``,
        ``zone_high``, ``coil_low``, ``coil_high`` (cell edges [display
        power]), ``mode`` (a :data:`plantside.air.economizer.ECONOMIZER_MODES`
        name), ``mode_label`` (its words), ``hours`` (int, > 0). Zone load is
        the load the unit meets (sensible + latent). Hours sum to the hours
        shown; ``attrs["hours_off"]`` holds the fan-off hours left out.
    """
    system = _system(system)
    zone_si = _hourly_zone_load(hourly)
    coil_si = _column(hourly, "coil_total_kW")
    if "economizer_mode" not in hourly.columns:
        raise InputRangeError(
            "economizer_mode", "hourly results have no column 'economizer_mode'", "mode names"
        )
    modes = hourly["economizer_mode"].astype(str).to_numpy()
    keep = np.ones(len(hourly), dtype=bool) if include_off else _operating(hourly)
    hours_off = int((~keep).sum())
    zone = _display("power", check_range("zone load", zone_si[keep], None, None, "kW"), system)
    coil = _display("power", check_range("coil_total_kW", coil_si[keep], None, None, "kW"), system)
    modes = modes[keep]
    bins = int(check_range("bins", bins, 2, 200, "bins"))
    # at one cell per axis (two edges' worth) every mode fits in 4 rows: 7 modes x 4 < 50
    max_rows = int(check_range("max_rows", max_rows, 50, MAX_ROWS, "rows"))
    if zone.size == 0:
        empty = {name: pd.Series(dtype=float) for name in _SCATTER_NUMBERS}
        frame = pd.DataFrame(empty).assign(
            mode=pd.Series(dtype=str), mode_label=pd.Series(dtype=str), hours=0
        )
        frame.attrs["hours_off"] = hours_off
        return _finish(frame, system, "year_scatter")
    mode_names, mode_code = np.unique(modes, return_inverse=True)
    while True:
        span = max(np.ptp(zone), np.ptp(coil), 1e-9)
        step = _nice_step(span, bins)
        zone_edges = _edges_with_step(zone, step)
        coil_edges = _edges_with_step(coil, step)
        nz, nc = zone_edges.size - 1, coil_edges.size - 1
        zone_index = np.clip(np.searchsorted(zone_edges, zone, "right") - 1, 0, nz - 1)
        coil_index = np.clip(np.searchsorted(coil_edges, coil, "right") - 1, 0, nc - 1)
        code = (mode_code * nz + zone_index) * nc + coil_index
        cells, hours = np.unique(code, return_counts=True)
        if cells.size <= max_rows or bins <= 1:
            break
        bins = max(1, int(bins * 0.8))
    coil_cell = cells % nc
    zone_cell = (cells // nc) % nz
    mode_cell = mode_names[cells // (nc * nz)]
    frame = pd.DataFrame(
        {
            "zone_load": 0.5 * (zone_edges[zone_cell] + zone_edges[zone_cell + 1]),
            "coil_load": 0.5 * (coil_edges[coil_cell] + coil_edges[coil_cell + 1]),
            "zone_low": zone_edges[zone_cell],
            "zone_high": zone_edges[zone_cell + 1],
            "coil_low": coil_edges[coil_cell],
            "coil_high": coil_edges[coil_cell + 1],
            "mode": mode_cell,
            "mode_label": [MODE_LABELS.get(m, m) for m in mode_cell],
            "hours": hours.astype(int),
        }
    )
    frame.attrs["hours_off"] = hours_off
    return _finish(frame, system, "year_scatter")


def _edges_with_step(values: np.ndarray, step: float) -> np.ndarray:
    start = np.floor(float(values.min()) / step) * step
    stop = np.floor(float(values.max()) / step) * step + step
    count = max(1, round((stop - start) / step))
    return start + step * np.arange(count + 1)


# ---------------------------------------------------------------------------------------
# chart 3: load duration, part-load bins, IPLV weights
# ---------------------------------------------------------------------------------------
def load_duration_frame(series: Mapping[str, object], system="SI", points: int = 200):
    """Load-duration curves of one or more hourly load series.

    Parameters
    ----------
    series : mapping of str to array_like
        Legend label -> hourly load [kW], e.g. ``{"Coil load": coil, "Zone
        load": zone}``. Negative hours (heating) are counted as no cooling
        load (0 kW): the curve is the cooling duty.
    system : {"SI", "IP"}
    points : int
        Points kept per curve (see :func:`plantside.plant.part_load.load_duration_curve`).

    Returns
    -------
    pandas.DataFrame
        ``series`` (str), ``hours_at_or_above`` (int), ``percent_of_hours``,
        ``load`` [display power]. Each curve starts at its peak at 1 hour.
    """
    system = _system(system)
    if not series:
        raise InputRangeError("series", "no load series given", "one or more hourly series")
    parts = []
    for label, values in series.items():
        arr = check_range(str(label), values, None, None, "kW")
        curve = load_duration_curve(np.maximum(arr, 0.0), points=points)
        parts.append(
            pd.DataFrame(
                {
                    "series": str(label),
                    "hours_at_or_above": curve["hours_at_or_above"].to_numpy(),
                    "percent_of_hours": curve["percent_of_hours"].to_numpy(),
                    "load": _display("power", curve["load_kW"].to_numpy(), system),
                }
            )
        )
    return _finish(pd.concat(parts, ignore_index=True), system, "load_duration")


def capacity_lines_frame(capacities: Sequence[float], system="SI") -> pd.DataFrame:
    """Horizontal lines for the plant capacity and for each stage of machines.

    Parameters
    ----------
    capacities : sequence of float
        Capacity of each machine [kW], > 0, in start order (lead first). One
        value is a single-machine plant.
    system : {"SI", "IP"}

    Returns
    -------
    pandas.DataFrame
        ``line`` (label, e.g. "1 machine", "2 machines", "Plant capacity"),
        ``kind`` ("stage" or "capacity"), ``machines`` (int) and ``load``
        [display power]: the combined capacity of the first n machines. The
        last row is the whole plant.
    """
    system = _system(system)
    caps = np.atleast_1d(
        check_range("capacities", capacities, 0.0, None, "kW", low_inclusive=False)
    )
    if caps.ndim != 1 or caps.size == 0:
        raise InputRangeError("capacities", "no machine capacities given", "one or more > 0 kW")
    cumulative = np.cumsum(caps)
    n = np.arange(1, caps.size + 1)
    labels = [f"{k} machine" if k == 1 else f"{k} machines" for k in n]
    kinds = ["stage"] * caps.size
    labels[-1] = "Plant capacity"
    kinds[-1] = "capacity"
    frame = pd.DataFrame(
        {
            "line": labels,
            "kind": kinds,
            "machines": n,
            "load": _display("power", cumulative, system),
        }
    )
    return _finish(frame, system, "capacity_lines")


def part_load_frame(
    loads, design_capacity: float, system="SI", band_width_percent: float = 10.0
) -> pd.DataFrame:
    """Hours and cooling energy in each band of the design capacity.

    Parameters
    ----------
    loads : array_like
        Hourly plant (or coil) load [kW], >= 0 (negative hours count as 0).
    design_capacity : float
        Capacity the bands are a percentage of [kW], > 0.
    system : {"SI", "IP"}
    band_width_percent : float
        Band width [%], a divisor of 100. Default 10.

    Returns
    -------
    pandas.DataFrame
        Rows "no load", "0-10 %", ..., "90-100 %", "above 100 %" (from
        :func:`plantside.plant.part_load.part_load_bins`): ``band``, ``order``,
        ``lower_percent``, ``upper_percent``, ``hours``, ``percent_of_hours``,
        ``energy`` [display energy: MWh or ton·h], ``percent_of_energy``.
    """
    system = _system(system)
    arr = np.maximum(check_range("loads", loads, None, None, "kW"), 0.0)
    bins = part_load_bins(arr, design_capacity, band_width_percent=band_width_percent)
    frame = pd.DataFrame(
        {
            "band": bins["band"].to_numpy(),
            "order": np.arange(len(bins)),
            "lower_percent": bins["lower_percent"].to_numpy(),
            "upper_percent": bins["upper_percent"].to_numpy(),
            "hours": bins["hours"].to_numpy(),
            "percent_of_hours": bins["percent_of_hours"].to_numpy(),
            "energy": _display("energy", bins["energy_kWh"].to_numpy(), system),
            "percent_of_energy": bins["percent_of_energy"].to_numpy(),
        }
    )
    frame.loc[~np.isfinite(frame["upper_percent"]), "upper_percent"] = np.nan
    return _finish(frame, system, "part_load")


def iplv_weights_frame(machine_loads, capacities, system="SI", basis: str = "energy"):
    """The building's weights at the four IPLV rating points beside AHRI 550/590's.

    Parameters
    ----------
    machine_loads : array_like
        Hourly load of each machine [kW], shape (hours,) or (hours,
        machines), e.g. ``StagingResult.machine_load``.
    capacities : float or sequence of float
        Rated capacity of each machine [kW].
    system : {"SI", "IP"}
        Kept for a uniform signature (weights have no unit).
    basis : {"energy", "hours"}
        The building's weights as shares of cooling energy or of running hours.

    Returns
    -------
    pandas.DataFrame
        8 rows: ``rating_point`` ("100 %", "75 %", "50 %", "25 %"),
        ``rating_point_percent``, ``source`` ("AHRI 550/590" or "This
        building"), ``weight_percent``. Weights from
        :func:`plantside.plant.efficiency.iplv_band_weights` (AHRI Standard
        550/590: 1, 42, 45, 12 %).
    """
    system = _system(system)
    if basis not in ("energy", "hours"):
        raise InputRangeError("basis", f"basis = {basis!r}", "'energy' or 'hours'")
    weights = iplv_band_weights(machine_loads, capacities)
    points = weights["rating_point_percent"].to_numpy()
    labels = [f"{p:g} %" for p in points]
    building = weights[f"building_{basis}_weight"].to_numpy()
    frame = pd.DataFrame(
        {
            "rating_point": labels * 2,
            "rating_point_percent": np.concatenate([points, points]),
            "source": ["AHRI 550/590"] * 4 + ["This building"] * 4,
            "weight_percent": 100.0
            * np.concatenate([weights["standard_weight"].to_numpy(), np.nan_to_num(building)]),
        }
    )
    frame.attrs["basis"] = basis
    return _finish(frame, system, "iplv_weights")


# ---------------------------------------------------------------------------------------
# chart 4: psychrometric chart
# ---------------------------------------------------------------------------------------
#: Default extents [°C] and [kg/kg] when no data widen them.
_DRYBULB_DEFAULT = (-10.0, 45.0)
_HUMIDITY_DEFAULT = 0.030


def psychrometric_extent(drybulb=(), humidity_ratio=(), system="SI"):
    """Axis extents of a psychrometric chart that hold the given states.

    Parameters
    ----------
    drybulb : array_like
        Dry bulbs to include [°C] (e.g. the year's outdoor air and the process).
    humidity_ratio : array_like
        Humidity ratios to include [kg/kg].
    system : {"SI", "IP"}
        Extents are rounded to 5 °C or 10 °F, and 5 g/kg or 25 gr/lb.

    Returns
    -------
    tuple
        ``(drybulb_min, drybulb_max, humidity_ratio_max)`` in SI [°C, °C, kg/kg].
    """
    system = _system(system)
    t = np.asarray(drybulb, dtype=float).ravel()
    w = np.asarray(humidity_ratio, dtype=float).ravel()
    t = t[np.isfinite(t)]
    w = w[np.isfinite(w)]
    low = min(_DRYBULB_DEFAULT[0], float(t.min())) if t.size else _DRYBULB_DEFAULT[0]
    high = max(_DRYBULB_DEFAULT[1], float(t.max())) if t.size else _DRYBULB_DEFAULT[1]
    wmax = max(_HUMIDITY_DEFAULT, float(w.max())) if w.size else _HUMIDITY_DEFAULT
    if system is UnitSystem.IP:
        low_d = np.floor(_display("temperature", low, system) / 10.0) * 10.0
        high_d = np.ceil(_display("temperature", high, system) / 10.0) * 10.0
        low, high = (float(x) for x in ((low_d - 32.0) / 1.8, (high_d - 32.0) / 1.8))
        w_d = np.ceil(_display("humidity_ratio", wmax * 1.05, system) / 25.0) * 25.0
        wmax = float(w_d / 7000.0)
    else:
        low = float(np.floor(low / 5.0) * 5.0)
        high = float(np.ceil(high / 5.0) * 5.0)
        wmax = float(np.ceil(wmax * 1.05 * 1000.0 / 5.0) * 5.0 / 1000.0)
    check_range("drybulb", [low, high], -60.0, 70.0, "°C")
    return low, high, wmax


def _clip_to_top(t, w, w_max):
    """Cut a polyline at w = w_max: drop points above, add the crossing point."""
    above = w > w_max
    if not above.any():
        return t, w
    first = int(np.argmax(above))
    if first == 0:
        return t[:0], w[:0]
    t0, t1, w0, w1 = t[first - 1], t[first], w[first - 1], w[first]
    tc = t0 + (w_max - w0) * (t1 - t0) / (w1 - w0)
    return np.append(t[:first], tc), np.append(w[:first], w_max)


def psychrometric_grid_frame(
    pressure: float,
    system="SI",
    extent: tuple[float, float, float] | None = None,
    points: int = 36,
) -> pd.DataFrame:
    """Saturation curve, relative-humidity lines and enthalpy lines at a site pressure.

    Parameters
    ----------
    pressure : float
        Site (station) pressure [Pa]; the chart is drawn for this pressure.
    system : {"SI", "IP"}
    extent : tuple, optional
        ``(drybulb_min, drybulb_max, humidity_ratio_max)`` [°C, °C, kg/kg]
        (from :func:`psychrometric_extent`). Default -10..45 °C, 30 g/kg.
    points : int
        Points along each curved line.

    Returns
    -------
    pandas.DataFrame
        ``family`` ("saturation", "relative humidity", "enthalpy"),
        ``line`` (label, e.g. "50 %", "60 kJ/kg"), ``value`` (RH [%] or
        enthalpy [display enthalpy]), ``order`` (point order along the line),
        ``drybulb`` [display temperature], ``humidity_ratio`` [display
        humidity ratio], ``label`` (True at the point where the line is
        labelled). Curves come from :mod:`plantside.air.moist_air` (ASHRAE
        Handbook Fundamentals 2017 Ch. 1, Eqs. 5-6 and 20-22, 32).
    """
    system = _system(system)
    p = float(check_range("pressure", pressure, 50_000.0, 110_000.0, "Pa"))
    t_min, t_max, w_max = extent if extent is not None else psychrometric_extent(system=system)
    check_range("humidity_ratio_max", w_max, 0.001, 0.2, "kg/kg")
    t = np.linspace(t_min, t_max, int(check_range("points", points, 4, 200, "points")))
    rows = []
    # relative-humidity lines, 10..90 %, and saturation (100 %)
    for rh in range(10, 101, 10):
        w = moist_air.humidity_ratio_from_relative_humidity(t, rh / 100.0, p, check=False)
        tt, ww = _clip_to_top(t, np.asarray(w), w_max)
        if tt.size < 2:
            continue
        family = "saturation" if rh == 100 else "relative humidity"
        label = "100 %" if rh == 100 else f"{rh} %"
        # label inside the plot: near the right edge, or just below the top edge for a
        # line that leaves through the top
        if ww[-1] >= w_max * (1 - 1e-9):
            at = max(0, tt.size - 3)
        else:
            at = int(np.searchsorted(tt, t_min + 0.96 * (t_max - t_min)))
            at = min(at, tt.size - 1)
        for k, (ti, wi) in enumerate(zip(tt, ww, strict=True)):
            rows.append((family, label, float(rh), k, ti, wi, k == at))
    # enthalpy lines at round display values, from dry air (or the chart's edge) to saturation
    h_low = moist_air.enthalpy_from_humidity_ratio(t_min, 0.0, check=False)
    w_top = moist_air.saturation_humidity_ratio(t_max, p, check=False)
    h_high = moist_air.enthalpy_from_humidity_ratio(t_max, min(w_top, w_max), check=False)
    h_low_d, h_high_d = _display("enthalpy", [h_low, h_high], system)
    step = 10.0 if system is UnitSystem.SI else 5.0
    values_d = np.arange(np.ceil(h_low_d / step) * step, h_high_d, step)
    values_si = np.asarray(from_display("enthalpy", values_d, system), dtype=float)
    unit = unit_label("enthalpy", system)
    if values_si.size:
        start_t, start_w, end_t, end_w = _enthalpy_segments(values_si, p, t_min, t_max, w_max)
        for value, t0, w0, t1, w1 in zip(values_d, start_t, start_w, end_t, end_w, strict=True):
            if not (np.isfinite(t0) and np.isfinite(t1)):
                continue
            label = f"{value:g} {unit}"
            rows.append(("enthalpy", label, float(value), 0, t0, w0, False))
            # labelled where the line meets saturation (not where the top edge cuts it)
            rows.append(("enthalpy", label, float(value), 1, t1, w1, bool(w1 < w_max)))
    frame = pd.DataFrame(
        rows,
        columns=["family", "line", "value", "order", "drybulb", "humidity_ratio", "label"],
    )
    frame["drybulb"] = _display("temperature", frame["drybulb"].to_numpy(), system)
    frame["humidity_ratio"] = _display("humidity_ratio", frame["humidity_ratio"].to_numpy(), system)
    frame.attrs["pressure_Pa"] = p
    return _finish(frame, system, "psychrometric_grid")


def _enthalpy_segments(enthalpy, p, t_min, t_max, w_max):
    """Ends of constant-enthalpy lines inside the chart: dry end and saturated end.

    The saturated end solves h(t, Ws(t)) = h by bisection on all lines at once
    (h rises with t along saturation, ASHRAE Fundamentals 2017 Ch. 1 Eq. 32).
    Lines are cut at the chart's edges (t_min, t_max, w_max).
    """
    h = np.asarray(enthalpy, dtype=float)
    lo = np.full(h.shape, -60.0)
    hi = np.asarray(moist_air.drybulb_from_enthalpy(h, 0.0, check=False), dtype=float)
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        ws = moist_air.saturation_humidity_ratio(mid, p, check=False)
        hs = moist_air.enthalpy_from_humidity_ratio(mid, ws, check=False)
        below = hs < h
        lo = np.where(below, mid, lo)
        hi = np.where(below, hi, mid)
    t_sat = 0.5 * (lo + hi)
    w_sat = np.asarray(moist_air.saturation_humidity_ratio(t_sat, p, check=False), dtype=float)
    # saturated (upper-left) end, moved down the line to w_max if above the chart
    end_w = np.minimum(w_sat, w_max)
    end_t = np.asarray(moist_air.drybulb_from_enthalpy(h, end_w, check=False), dtype=float)
    # dry (lower-right) end: W = 0, or where the line crosses t_max
    start_t = np.asarray(moist_air.drybulb_from_enthalpy(h, 0.0, check=False), dtype=float)
    start_w = np.zeros_like(h)
    past = start_t > t_max
    w_at_edge = np.asarray(moist_air.humidity_ratio_from_enthalpy(t_max, h, check=False))
    start_t = np.where(past, t_max, start_t)
    start_w = np.where(past, w_at_edge, start_w)
    outside = (end_t < t_min) | (start_w >= end_w) | (start_t < t_min)
    start_t = np.where(outside, np.nan, start_t)
    return start_t, start_w, end_t, end_w


#: Names of the air states of ``DesignPoint.states`` and their words on the chart.
STATE_LABELS = {
    "outdoor": "Outdoor",
    "recovered": "After recovery",
    "return": "Return",
    "mixed": "Mixed",
    "coil_entering": "Coil entering",
    "coil_leaving": "Coil leaving",
    "supply": "Supply",
    "zone": "Room",
}

#: Where the air goes from each state (the edges of the process drawn on the chart).
#: The supply air picks up the room load on its way to the room and the return.
_FLOW = {
    "outdoor": "recovered",
    "recovered": "mixed",
    "return": "mixed",
    "mixed": "coil_entering",
    "coil_entering": "coil_leaving",
    "coil_leaving": "supply",
    "supply": "zone",
    "zone": "return",
}
_ROOM_EDGES = {"supply", "zone"}
#: States named on the chart only where they differ from the point before them.
_OPTIONAL_STATES = {"recovered", "coil_entering", "zone"}


def _state_table(states) -> dict[str, tuple[float, float]]:
    if isinstance(states, pd.DataFrame):
        for column in ("drybulb_C", "humidity_ratio_kgkg"):
            if column not in states.columns:
                raise InputRangeError(
                    column, f"the design states have no column {column!r}", "DesignPoint.states"
                )
        return {
            str(name): (float(row["drybulb_C"]), float(row["humidity_ratio_kgkg"]))
            for name, row in states.iterrows()
        }
    return {str(name): (float(value[0]), float(value[1])) for name, value in states.items()}


def process_frame(states, system="SI", pressure: float = 101325.0) -> pd.DataFrame:
    """The design process as labelled points and the path the air takes between them.

    Parameters
    ----------
    states : pandas.DataFrame or mapping
        ``DesignPoint.states`` of :mod:`plantside.air_handler.year` (index
        outdoor, recovered, return, mixed, coil_entering, coil_leaving,
        supply, zone; columns ``drybulb_C`` and ``humidity_ratio_kgkg``), or
        a mapping of the same names to (dry bulb [°C], humidity ratio
        [kg/kg]). States that are NaN (e.g. no return air on a 100 %
        outdoor-air unit) are left out. States that coincide (within 0.05 K
        and 0.05 g/kg) are drawn as one point labelled with both names, e.g.
        "Outdoor = Mixed" at 100 % outdoor air; the optional states (after
        recovery, coil entering, room) are named only where they differ.
    system : {"SI", "IP"}
    pressure : float
        Site pressure [Pa], for the relative humidity shown in tooltips.

    Returns
    -------
    pandas.DataFrame
        One row per drawn point, in flow order: ``point`` (words), ``state``
        (first state name), ``order``, ``drybulb`` [display temperature],
        ``humidity_ratio`` [display humidity ratio], ``enthalpy`` [display
        enthalpy], ``relative_humidity`` [%], and the segment leaving the
        point: ``to_drybulb``, ``to_humidity_ratio`` (NaN at the end of the
        path) and ``segment`` ("air handler" or "room").
    """
    system = _system(system)
    p = float(check_range("pressure", pressure, 50_000.0, 110_000.0, "Pa"))
    table = _state_table(states)
    known = [name for name in STATE_LABELS if name in table]
    names = known + [name for name in table if name not in STATE_LABELS]
    names = [n for n in names if np.isfinite(table[n][0]) and np.isfinite(table[n][1])]
    if not names:
        raise InputRangeError("states", "no finite air states given", "one or more air states")
    t = check_range("drybulb", [table[n][0] for n in names], -60.0, 100.0, "°C")
    w = check_range("humidity_ratio", [table[n][1] for n in names], 0.0, 0.2, "kg/kg")
    # merge coinciding states into the first of them (in flow order)
    owner = {}
    kept = []
    for i, name in enumerate(names):
        match = next(
            (k for k in kept if abs(t[k] - t[i]) < 0.05 and abs(w[k] - w[i]) < 5e-5),
            None,
        )
        owner[name] = names[i] if match is None else names[match]
        if match is None:
            kept.append(i)
    labels = {names[k]: [] for k in kept}
    for name in names:
        if owner[name] == name or name not in _OPTIONAL_STATES:
            labels[owner[name]].append(STATE_LABELS.get(name, name))

    def destination(name):
        nxt = _FLOW.get(name)
        seen = set()
        while nxt is not None and nxt not in owner and nxt not in seen:
            seen.add(nxt)
            nxt = _FLOW.get(nxt)
        return owner.get(nxt) if nxt is not None else None

    to_index = {}
    for name in names:
        target = destination(name)
        source = owner[name]
        if target is not None and target != source and source not in to_index:
            to_index[source] = (
                names.index(target),
                "room" if name in _ROOM_EDGES else "air handler",
            )
    kept_names = [names[k] for k in kept]
    to_t = np.array([t[to_index[n][0]] if n in to_index else np.nan for n in kept_names])
    to_w = np.array([w[to_index[n][0]] if n in to_index else np.nan for n in kept_names])
    tk, wk = t[kept], w[kept]
    frame = pd.DataFrame(
        {
            "point": [" = ".join(labels[n]) for n in kept_names],
            "state": kept_names,
            "order": np.arange(len(kept)),
            "drybulb": _display("temperature", tk, system),
            "humidity_ratio": _display("humidity_ratio", wk, system),
            "enthalpy": _display(
                "enthalpy", moist_air.enthalpy_from_humidity_ratio(tk, wk, check=False), system
            ),
            "relative_humidity": 100.0
            * np.asarray(moist_air.relative_humidity_from_humidity_ratio(tk, wk, p, check=False)),
            "to_drybulb": _display("temperature", to_t, system),
            "to_humidity_ratio": _display("humidity_ratio", to_w, system),
            "segment": [to_index[n][1] if n in to_index else "" for n in kept_names],
        }
    )
    return _finish(frame, system, "process")


def outdoor_density_frame(
    drybulb, humidity_ratio, system="SI", extent=None, max_rows: int = 500
) -> pd.DataFrame:
    """The year's outdoor hours counted in dry-bulb x humidity-ratio cells.

    Parameters
    ----------
    drybulb : array_like
        Hourly outdoor dry bulb [°C].
    humidity_ratio : array_like
        Hourly outdoor humidity ratio [kg/kg].
    system : {"SI", "IP"}
        Cells are 2 K x 1 g/kg in SI and 4 °F x 7 gr/lb in IP, made coarser
        if needed to stay within ``max_rows``.
    extent : tuple, optional
        Chart extent (:func:`psychrometric_extent`); hours outside are
        counted in the edge cells.
    max_rows : int
        Largest number of occupied cells kept.

    Returns
    -------
    pandas.DataFrame
        One row per occupied cell: ``drybulb_low``, ``drybulb_high``
        [display temperature], ``humidity_low``, ``humidity_high`` [display
        humidity ratio], ``hours`` (int). Hours sum to the length of the year.
    """
    system = _system(system)
    t = _display("temperature", check_range("drybulb", drybulb, -90.0, 70.0, "°C"), system)
    w = _display("humidity_ratio", check_range("humidity_ratio", humidity_ratio, 0, 0.2), system)
    if t.shape != w.shape or t.ndim != 1 or t.size == 0:
        raise InputRangeError(
            "outdoor air", "drybulb and humidity_ratio must be hourly series of one length", ""
        )
    max_rows = int(check_range("max_rows", max_rows, 10, MAX_ROWS, "rows"))
    t_step, w_step = (2.0, 1.0) if system is UnitSystem.SI else (4.0, 7.0)
    if extent is not None:
        t_lo, t_hi = _display("temperature", [extent[0], extent[1]], system)
        w_hi = float(_display("humidity_ratio", extent[2], system))
        t = np.clip(t, t_lo, t_hi - 1e-9)
        w = np.clip(w, 0.0, w_hi - 1e-9)
    while True:
        ti = np.floor(t / t_step).astype(np.int64)
        wi = np.floor(w / w_step).astype(np.int64)
        span = int(wi.max() - wi.min() + 1)
        cells, hours = np.unique((ti - ti.min()) * span + (wi - wi.min()), return_counts=True)
        if cells.size <= max_rows:
            break
        t_step, w_step = t_step * 1.5, w_step * 1.5
    tc = cells // span + ti.min()
    wc = cells % span + wi.min()
    frame = pd.DataFrame(
        {
            "drybulb_low": tc * t_step,
            "drybulb_high": (tc + 1) * t_step,
            "humidity_low": wc * w_step,
            "humidity_high": (wc + 1) * w_step,
            "hours": hours.astype(int),
        }
    )
    return _finish(frame, system, "outdoor_density")


# ---------------------------------------------------------------------------------------
# chart 5: coil design load against outdoor-air fraction
# ---------------------------------------------------------------------------------------
def oa_sweep_frame(outdoor_air_fraction, loads: Mapping[str, object], system="SI") -> pd.DataFrame:
    """Coil design load over a sweep of outdoor-air fraction.

    Parameters
    ----------
    outdoor_air_fraction : array_like
        Outdoor-air fractions swept [-], 0 to 1.
    loads : mapping of str to array_like
        Series label -> design coil load at each fraction [kW], e.g.
        ``{"Coil total": total, "Coil sensible": sensible, "Coil latent": latent}``.
    system : {"SI", "IP"}

    Returns
    -------
    pandas.DataFrame
        ``outdoor_air_percent`` [%], ``series`` (str), ``load`` [display power].
    """
    system = _system(system)
    fraction = np.atleast_1d(check_range("outdoor_air_fraction", outdoor_air_fraction, 0.0, 1.0))
    if not loads:
        raise InputRangeError("loads", "no load series given", "one or more series")
    parts = []
    for label, values in loads.items():
        arr = np.atleast_1d(check_range(str(label), values, None, None, "kW"))
        if arr.shape != fraction.shape:
            raise InputRangeError(
                str(label),
                f"{label} has {arr.size} values for {fraction.size} outdoor-air fractions",
                f"{fraction.size} values",
            )
        parts.append(
            pd.DataFrame(
                {
                    "outdoor_air_percent": 100.0 * fraction,
                    "series": str(label),
                    "load": _display("power", arr, system),
                }
            )
        )
    return _finish(pd.concat(parts, ignore_index=True), system, "oa_sweep")


def records(frame: pd.DataFrame) -> list[dict]:
    """Rows of a chart frame as JSON-ready dicts (NaN and infinities become None).

    Builders hand these to Vega-Lite as named datasets, which skips Altair's
    own DataFrame sanitising (the larger part of a chart's serialisation time).
    Numbers keep 10 significant digits, far beyond what a chart can show.
    """
    return json.loads(frame.to_json(orient="records", double_precision=10))


def value_format(values) -> str:
    """A d3 number format for value labels: one decimal below 100, none above."""
    arr = np.abs(np.asarray(values, dtype=float))
    arr = arr[np.isfinite(arr)]
    largest = float(arr.max()) if arr.size else 0.0
    return ",.1f" if largest < 100.0 else ",.0f"


def oa_sweep_frame_from_sweep(sweep: pd.DataFrame, system="SI") -> pd.DataFrame:
    """:func:`oa_sweep_frame` from ``plantside.air_handler.year.outdoor_air_sweep`` results.

    Parameters
    ----------
    sweep : pandas.DataFrame
        Columns ``minimum_outdoor_air_fraction`` [-] and
        ``coil_total_peak_kW`` (the year's peak coil load at each setting).
    system : {"SI", "IP"}

    Returns
    -------
    pandas.DataFrame
        As :func:`oa_sweep_frame`, one series "Year's peak coil load".
    """
    fraction = _column(sweep, "minimum_outdoor_air_fraction")
    peak = _column(sweep, "coil_total_peak_kW")
    return oa_sweep_frame(fraction, {"Year's peak coil load": peak}, system)


def oa_marker_frame(sweep_frame: pd.DataFrame, current_fraction: float) -> pd.DataFrame:
    """The current outdoor-air setting on each curve of an outdoor-air sweep frame.

    Parameters
    ----------
    sweep_frame : pandas.DataFrame
        From :func:`oa_sweep_frame` (optionally with a ``scenario`` column).
    current_fraction : float
        The current (minimum) outdoor-air fraction [-], 0 to 1.

    Returns
    -------
    pandas.DataFrame
        One row per series (and scenario): ``outdoor_air_percent`` [%],
        ``series``, ``load`` [display power] interpolated linearly along the
        sweep (sweeps are fine-grained, 1 % steps by default).
    """
    current = 100.0 * float(check_range("current_fraction", current_fraction, 0.0, 1.0, "-"))
    keys = ["series"] + (["scenario"] if "scenario" in sweep_frame.columns else [])
    rows = []
    for key, part in sweep_frame.groupby(keys, sort=False):
        part = part.sort_values("outdoor_air_percent")
        load = np.interp(current, part["outdoor_air_percent"], part["load"])
        key = key if isinstance(key, tuple) else (key,)
        rows.append((current, *key, float(load)))
    frame = pd.DataFrame(rows, columns=["outdoor_air_percent", *keys, "load"])
    frame.attrs = dict(sweep_frame.attrs)
    frame.attrs["kind"] = "oa_marker"
    return frame


def year_load_series(hourly: pd.DataFrame) -> dict[str, np.ndarray]:
    """The two hourly series of the load-duration chart from an air handler's year.

    Returns
    -------
    dict
        ``{"Coil load": coil_total_kW, "Zone load": zone_sensible_kW + zone_latent_kW}``
        [kW], ready for :func:`load_duration_frame`.
    """
    return {"Coil load": _column(hourly, "coil_total_kW"), "Zone load": _hourly_zone_load(hourly)}
