"""Frames of the psychrometric chart: its extent and grid, the design process, the year's hours.

:func:`psychrometric_extent` (axes that hold the data), :func:`psychrometric_grid_frame`
(saturation, relative-humidity and enthalpy lines), :func:`process_frame` (the design
hour's air states and the path between them, :data:`STATE_LABELS`) and
:func:`outdoor_density_frame` (the year's outdoor hours binned by dry bulb and humidity
ratio), all in display units.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from plantside.air import moist_air
from plantside.charts.frame_common import MAX_ROWS, _display, _finish, _system
from plantside.errors import InputRangeError, check_range
from plantside.units import UnitSystem, from_display, unit_label

__all__ = [
    "STATE_LABELS",
    "outdoor_density_frame",
    "process_frame",
    "psychrometric_extent",
    "psychrometric_grid_frame",
]


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
