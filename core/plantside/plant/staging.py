"""Staging of a plant of N machines (chillers or boilers) over the year's hourly loads.

The staging rule
----------------
Machines are given in their start order: machine 1 is the lead, machine 2 the
first lag, and so on. Each machine has a capacity [kW] and a minimum turndown,
the lowest load it can carry steadily as a fraction of its capacity. For each
hour with load (load above the no-load threshold of
:func:`plantside.plant.part_load.no_load_threshold_from_loads`):

1. **Stage up only when the running machines cannot meet the load.** The
   number running is the smallest n whose combined capacity
   :math:`C_n = c_1 + \\dots + c_n` is at least the load. So the lead machine
   alone carries every load up to its own capacity.
2. **Share in proportion to capacity.** The n running machines all run at
   the same part-load ratio :math:`PLR = \\min(Q/C_n, 1)`; machine j carries
   :math:`PLR \\cdot c_j`.
3. **Load beyond the whole plant is unmet.** If the load exceeds
   :math:`C_N`, all machines run at 100 % and :math:`Q - C_N` is unmet.
4. **Below minimum turndown.** A running machine whose PLR is below its
   minimum turndown cannot run steadily: it cycles on and off or is falsely
   loaded (e.g. hot-gas bypass). Such hours are counted; the machine is still
   taken to deliver the load.
5. Each hour is staged on its own (no hysteresis, no minimum run time): hourly
   data cannot resolve a controller's dead bands, so machine starts counted
   here are a lower bound.

Put the machine that should run alone at low load first: with 1 x 40 % and
1 x 60 %, listing the 40 % machine first keeps low loads on the small machine.
Comparing both orders is a quick way to see what the sequence does.

This is a planning rule of our own (common practice, no source), not a
controls sequence: the real sequence, its dead bands and its safeties are the
controls engineer's to set. Results support, and do not replace, the judgement
of a licensed engineer under the local codes.

Everything is vectorised over hours (searchsorted on the cumulative
capacities); a loop runs only over plant options.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from functools import cached_property

import numpy as np
import pandas as pd

from plantside.errors import InputRangeError, check_range
from plantside.plant.loads import hourly_loads
from plantside.plant.part_load import (
    band_edges,
    band_index_from_ratio,
    bands_from_width,
    no_load_threshold_from_loads,
)

__all__ = [
    "DEFAULT_MINIMUM_TURNDOWN",
    "PlantOption",
    "StagingResult",
    "compare_plant_options",
    "compare_stage_hours",
    "stage_machines",
    "staging_result",
]

#: Minimum turndown of a machine when a plant option does not give one [-]: a machine
#: that unloads to 15 % of its capacity (common practice (no source) for screw and
#: centrifugal chillers and modulating boilers at the preliminary stage).
DEFAULT_MINIMUM_TURNDOWN = 0.15


def _machine_arrays(capacities, minimum_turndown) -> tuple[np.ndarray, np.ndarray]:
    caps = np.atleast_1d(np.array(capacities, dtype=float))
    if caps.ndim != 1 or caps.size == 0:
        raise InputRangeError(
            "capacities",
            f"capacities must be a list of machine capacities [kW]; got shape {caps.shape}",
            "one or more capacities > 0 kW",
        )
    check_range("capacities", caps, 0.0, None, "kW", low_inclusive=False)
    turndown = np.atleast_1d(np.array(minimum_turndown, dtype=float))
    if turndown.size == 1:
        turndown = np.full(caps.shape, float(turndown[0]))
    if turndown.shape != caps.shape:
        raise InputRangeError(
            "minimum_turndown",
            f"minimum_turndown has {turndown.size} values but there are {caps.size} machines",
            f"one value, or {caps.size} values",
        )
    check_range("minimum_turndown", turndown, 0.0, 1.0, "(fraction of capacity)")
    return caps, turndown


@dataclass(frozen=True)
class PlantOption:
    """One way to make up a plant: machine capacities in start order and their turndowns.

    Parameters
    ----------
    name : str
        Label of the option in comparison tables.
    capacities : sequence of float
        Capacity of each machine [kW], > 0, in start order (lead first).
    minimum_turndown : float or sequence of float
        Lowest steady load of each machine as a fraction of its capacity
        [-], 0 to 1 (0.15 for a machine that unloads to 15 %). One value
        applies to every machine.
    """

    name: str
    capacities: tuple[float, ...]
    minimum_turndown: tuple[float, ...] | float

    def __post_init__(self):
        caps, turndown = _machine_arrays(self.capacities, self.minimum_turndown)
        object.__setattr__(self, "capacities", tuple(float(c) for c in caps))
        object.__setattr__(self, "minimum_turndown", tuple(float(t) for t in turndown))

    @classmethod
    def from_fractions(
        cls, name: str, design_capacity: float, fractions: Sequence[float], minimum_turndown
    ) -> PlantOption:
        """An option whose machines are fractions of a design capacity.

        ``from_fractions("2 x 50 %", 1000, [0.5, 0.5], 0.15)`` is two 500 kW
        machines. Fractions need not add up to 1 (e.g. 2 x 60 % for partial
        standby).

        Parameters
        ----------
        design_capacity : float
            Plant design capacity [kW], > 0.
        fractions : sequence of float
            Each machine's share of the design capacity [-], > 0, lead first.
        minimum_turndown : float or sequence of float
            As for the class.
        """
        capacity = float(
            check_range("design_capacity", design_capacity, 0.0, None, "kW", low_inclusive=False)
        )
        shares = check_range(
            "fractions", np.atleast_1d(fractions), 0.0, None, "", low_inclusive=False
        )
        return cls(name, tuple(capacity * shares), minimum_turndown)

    @property
    def total_capacity(self) -> float:
        """Combined capacity of all machines [kW]."""
        return float(sum(self.capacities))

    @property
    def description(self) -> str:
        """Machines in start order, e.g. ``"2 x 500 kW"`` or ``"400 kW + 600 kW"``."""
        parts, caps = [], list(self.capacities)
        i = 0
        while i < len(caps):  # groups runs of equal machines (a handful of items)
            j = i
            while j < len(caps) and np.isclose(caps[j], caps[i]):
                j += 1
            count = j - i
            parts.append(f"{count} x {caps[i]:.0f} kW" if count > 1 else f"{caps[i]:.0f} kW")
            i = j
        return " + ".join(parts)


def _read_only(array: np.ndarray) -> np.ndarray:
    array.setflags(write=False)
    return array


@dataclass(frozen=True, eq=False)
class StagingResult:
    """Hour-by-hour outcome of :func:`stage_machines`, with tidy summaries.

    Attributes
    ----------
    loads : numpy.ndarray
        Plant load [kW], shape (hours,).
    capacities, minimum_turndown : numpy.ndarray
        Machine capacities [kW] and minimum turndowns [-], start order, shape (machines,).
    no_load_threshold : float
        Load [kW] at or below which no machine runs.
    machines_running : numpy.ndarray of int
        Number of machines running each hour (0 in hours without load).
    part_load_ratio : numpy.ndarray
        Common part-load ratio of the running machines [-] (0 when none run).
    unmet_load : numpy.ndarray
        Load beyond the whole plant's capacity [kW].
    """

    loads: np.ndarray
    capacities: np.ndarray
    minimum_turndown: np.ndarray
    no_load_threshold: float
    machines_running: np.ndarray
    part_load_ratio: np.ndarray
    unmet_load: np.ndarray

    @cached_property
    def running(self) -> np.ndarray:
        """Boolean (hours, machines): whether each machine runs."""
        return _read_only(np.arange(self.capacities.size)[None, :] < self.machines_running[:, None])

    @cached_property
    def machine_load(self) -> np.ndarray:
        """Load carried by each machine [kW], shape (hours, machines)."""
        load = self.part_load_ratio[:, None] * self.capacities[None, :]
        return _read_only(np.where(self.running, load, 0.0))

    @cached_property
    def machine_part_load_ratio(self) -> np.ndarray:
        """Part-load ratio of each machine [-], shape (hours, machines), 0 when off."""
        return _read_only(np.where(self.running, self.part_load_ratio[:, None], 0.0))

    @property
    def has_load(self) -> np.ndarray:
        """Boolean (hours,): load above the no-load threshold."""
        return self.machines_running > 0

    @property
    def lowest_stable_load(self) -> float:
        """Lowest load any single machine carries steadily, min of turndown x capacity [kW]."""
        return float(np.min(self.minimum_turndown * self.capacities))

    @cached_property
    def below_turndown(self) -> np.ndarray:
        """Boolean (hours,): a running machine is below its own minimum turndown (rule 4)."""
        highest_turndown_so_far = np.maximum.accumulate(self.minimum_turndown)
        needed = highest_turndown_so_far[np.maximum(self.machines_running - 1, 0)]
        return _read_only(self.has_load & (self.part_load_ratio < needed))

    @cached_property
    def below_lowest_stable_load(self) -> np.ndarray:
        """Boolean (hours,): load below :attr:`lowest_stable_load`; no machine of the
        plant could carry it steadily, whatever the sequence."""
        return _read_only(self.has_load & (self.loads < self.lowest_stable_load))

    def hours_by_machines_running(self) -> pd.DataFrame:
        """Hours and load energy with 0, 1, ..., N machines running.

        Returns
        -------
        pandas.DataFrame
            ``machines_running``, ``hours``, ``percent_of_hours`` and
            ``load_energy_kWh`` (plant load in those hours, each hour 1 h).
            Hours with 1..N machines sum to the hours with load.
        """
        count = self.capacities.size + 1
        hours = np.bincount(self.machines_running, minlength=count)
        energy = np.bincount(self.machines_running, weights=self.loads, minlength=count)
        return pd.DataFrame(
            {
                "machines_running": np.arange(count),
                "hours": hours.astype(int),
                "percent_of_hours": 100.0 * hours / self.loads.size,
                "load_energy_kWh": energy,
            }
        )

    def machine_part_load_bins(self, band_width_percent: float = 10.0) -> pd.DataFrame:
        """Each machine's running hours and energy in bands of its own capacity.

        Bands follow :func:`plantside.plant.part_load.part_load_bins` (upper edge
        included). A machine never runs above 100 % under the staging rule.

        Returns
        -------
        pandas.DataFrame
            ``machine`` (1-based start position), ``capacity_kW``, ``band``,
            ``lower_percent``, ``upper_percent``, ``hours``, ``energy_kWh``.
        """
        bands = bands_from_width(band_width_percent)
        machines = self.capacities.size
        running = self.running
        # band 1..bands (PLR <= 1 under the rule), shifted to 0..bands-1 per machine
        # (a running machine whose ratio underflows to 0, e.g. a load of 5e-324 kW with
        # no threshold, still belongs to the lowest band)
        band = np.maximum(band_index_from_ratio(self.part_load_ratio, bands) - 1, 0)
        codes = (np.arange(machines)[None, :] * bands + band[:, None])[running]
        size = machines * bands
        hours = np.bincount(codes, minlength=size)
        energy = np.bincount(codes, weights=self.machine_load[running], minlength=size)
        labels, lower, upper = band_edges(bands)
        return pd.DataFrame(
            {
                "machine": np.repeat(np.arange(1, machines + 1), bands),
                "capacity_kW": np.repeat(self.capacities, bands),
                "band": labels * machines,
                "lower_percent": np.tile(lower, machines),
                "upper_percent": np.tile(upper, machines),
                "hours": hours.astype(int),
                "energy_kWh": energy,
            }
        )

    def machine_table(self) -> pd.DataFrame:
        """One row per machine: running hours, energy, mean part-load ratio, hours below turndown.

        Returns
        -------
        pandas.DataFrame
            ``machine``, ``capacity_kW``, ``minimum_turndown``, ``running_hours``,
            ``energy_kWh``, ``mean_part_load_ratio`` (energy over capacity x
            running hours; NaN if never run) and ``hours_below_turndown``.
        """
        running = self.running
        hours = running.sum(axis=0)
        energy = self.machine_load.sum(axis=0)
        below = running & (self.part_load_ratio[:, None] < self.minimum_turndown[None, :])
        with np.errstate(invalid="ignore", divide="ignore"):
            mean_ratio = np.where(hours > 0, energy / (self.capacities * hours), np.nan)
        return pd.DataFrame(
            {
                "machine": np.arange(1, self.capacities.size + 1),
                "capacity_kW": self.capacities,
                "minimum_turndown": self.minimum_turndown,
                "running_hours": hours.astype(int),
                "energy_kWh": energy,
                "mean_part_load_ratio": mean_ratio,
                "hours_below_turndown": below.sum(axis=0).astype(int),
            }
        )

    def summary(self) -> dict:
        """Scalar figures of the year (SI, unit-suffixed keys).

        Keys: ``hours``, ``hours_with_load``, ``load_energy_kWh``,
        ``served_energy_kWh``, ``no_load_energy_kWh`` (load at or below the
        threshold, not served by any machine), ``unmet_hours``,
        ``unmet_energy_kWh``, ``largest_unmet_kW``, ``lowest_stable_load_kW``,
        ``hours_below_lowest_stable_load``, ``hours_below_turndown``,
        ``mean_machines_running`` (over hours with load), ``machine_hours``,
        ``machine_starts`` (times a machine is started, counted from the
        hourly stage changes: a lower bound), ``hours_all_running`` and
        ``peak_met_with_largest_out`` (the year's peak is covered with the
        largest machine out of service; common practice, no source, for
        "N+1").
        """
        n = self.machines_running
        has_load = n > 0
        hours_with_load = int(has_load.sum())
        previous = np.concatenate([[0], n[:-1]])
        served = float(self.machine_load.sum())
        return {
            "hours": int(n.size),
            "hours_with_load": hours_with_load,
            "load_energy_kWh": float(self.loads.sum()),
            "served_energy_kWh": served,
            "no_load_energy_kWh": float(self.loads[~has_load].sum()),
            "unmet_hours": int((self.unmet_load > 0).sum()),
            "unmet_energy_kWh": float(self.unmet_load.sum()),
            "largest_unmet_kW": float(self.unmet_load.max()),
            "lowest_stable_load_kW": self.lowest_stable_load,
            "hours_below_lowest_stable_load": int(self.below_lowest_stable_load.sum()),
            "hours_below_turndown": int(self.below_turndown.sum()),
            "mean_machines_running": float(n[has_load].mean()) if hours_with_load else 0.0,
            "machine_hours": int(n.sum()),
            "machine_starts": int(np.maximum(n - previous, 0).sum()),
            "hours_all_running": int((n == self.capacities.size).sum()),
            "peak_met_with_largest_out": bool(
                self.capacities.sum() - self.capacities.max() >= self.loads.max()
            ),
        }

    def cautions(self) -> list[str]:
        """Plain-language cautions for unmet load, cycling and missing standby."""
        s = self.summary()
        notes = []
        if s["unmet_hours"]:
            notes.append(
                f"The plant cannot meet the load in {s['unmet_hours']} hour(s): "
                f"{s['unmet_energy_kWh']:.0f} kWh unmet, "
                f"up to {s['largest_unmet_kW']:.1f} kW short."
            )
        if s["hours_below_lowest_stable_load"]:
            notes.append(
                f"In {s['hours_below_lowest_stable_load']} hour(s) the load is below the lowest "
                f"steady load of any machine ({s['lowest_stable_load_kW']:.1f} kW): a machine "
                "will cycle on and off or need false loading. Consider a smaller machine, more "
                "turndown or buffer volume."
            )
        extra = s["hours_below_turndown"] - s["hours_below_lowest_stable_load"]
        if extra > 0:
            notes.append(
                f"In {extra} further hour(s) this start order runs a machine below its minimum "
                "turndown; another order or machine mix may avoid it."
            )
        if not s["peak_met_with_largest_out"] and self.capacities.size > 0:
            notes.append(
                "With the largest machine out of service the plant cannot meet the year's peak "
                "(no N+1 standby)."
            )
        if notes:
            notes.append(
                "These figures support, and do not replace, the judgement of a licensed engineer "
                "under the local codes."
            )
        return notes


def stage_machines(
    loads, capacities, minimum_turndown, no_load_threshold: float | None = None
) -> StagingResult:
    """Stage a plant of N machines over hourly loads by the rule of the module notes.

    Parameters
    ----------
    loads : array_like
        Hourly plant load [kW], >= 0, each element one hour.
    capacities : sequence of float
        Machine capacities [kW], > 0, in start order (lead first).
    minimum_turndown : float or sequence of float
        Lowest steady load of each machine as a fraction of its capacity [-], 0 to 1.
    no_load_threshold : float, optional
        Load [kW] at or below which no machine runs. Default: 0.1 % of the
        year's peak (:func:`plantside.plant.part_load.no_load_threshold_from_loads`).

    Returns
    -------
    StagingResult

    Raises
    ------
    InputRangeError
        For a negative or non-finite load, a capacity <= 0, a turndown outside
        0-1 or a turndown list of the wrong length.
    """
    arr = hourly_loads(loads)
    caps, turndown = _machine_arrays(capacities, minimum_turndown)
    threshold = no_load_threshold_from_loads(arr, no_load_threshold)
    cumulative = np.cumsum(caps)
    staged = np.minimum(np.searchsorted(cumulative, arr, side="left") + 1, caps.size)
    running = np.where(arr > threshold, staged, 0)
    return staging_result(arr, caps, turndown, threshold, running)


def staging_result(loads, capacities, minimum_turndown, no_load_threshold, machines_running):
    """A :class:`StagingResult` from the machines running each hour (rules 2-4).

    Running machines share the load at one part-load ratio, load beyond the whole plant
    is unmet. Used by :func:`stage_machines` and by the other staging rules
    (:mod:`plantside.plant.efficient_staging`). Inputs already validated.
    """
    cumulative = np.cumsum(capacities)
    running = np.asarray(machines_running)
    running_capacity = cumulative[np.maximum(running - 1, 0)]
    part_load_ratio = np.where(running > 0, np.minimum(loads / running_capacity, 1.0), 0.0)
    unmet = np.where(running > 0, np.maximum(loads - cumulative[-1], 0.0), 0.0)
    return StagingResult(
        loads=_read_only(np.array(loads, dtype=float)),
        capacities=_read_only(capacities),
        minimum_turndown=_read_only(minimum_turndown),
        no_load_threshold=no_load_threshold,
        machines_running=_read_only(np.array(running)),
        part_load_ratio=_read_only(part_load_ratio),
        unmet_load=_read_only(unmet),
    )


def _check_options(options) -> list[PlantOption]:
    options = list(options)
    if not options:
        raise InputRangeError("options", "options is empty", "one or more PlantOption")
    for i, option in enumerate(options):
        if not isinstance(option, PlantOption):
            raise InputRangeError(
                f"options[{i}]",
                f"options[{i}] is a {type(option).__name__}, not a PlantOption",
                "PlantOption",
            )
    return options


def _staged_options(loads, options, no_load_threshold):
    """(option, its :func:`stage_machines` result) for each option, every option staged
    on the same hourly loads and no-load threshold."""
    arr = hourly_loads(loads)
    options = _check_options(options)
    threshold = no_load_threshold_from_loads(arr, no_load_threshold)
    return [
        (option, stage_machines(arr, option.capacities, option.minimum_turndown, threshold))
        for option in options
    ]


def compare_plant_options(
    loads, options: Sequence[PlantOption], no_load_threshold: float | None = None
) -> pd.DataFrame:
    """Stage two or more plant options over the same year and set them side by side.

    Parameters
    ----------
    loads : array_like
        Hourly plant load [kW].
    options : sequence of PlantOption
        The options to compare (e.g. 2 x 50 %, 3 x 33 %, 1 x 40 % + 1 x 60 %).
    no_load_threshold : float, optional
        As for :func:`stage_machines`; one threshold serves every option so
        that "hours with load" agree across the table.

    Returns
    -------
    pandas.DataFrame
        One row per option: ``option``, ``machines`` (description),
        ``machine_count``, ``total_capacity_kW``, ``largest_machine_kW`` and
        every key of :meth:`StagingResult.summary`.
    """
    rows = []
    for option, result in _staged_options(loads, options, no_load_threshold):
        rows.append(
            {
                "option": option.name,
                "machines": option.description,
                "machine_count": len(option.capacities),
                "total_capacity_kW": option.total_capacity,
                "largest_machine_kW": max(option.capacities),
                **result.summary(),
            }
        )
    return pd.DataFrame(rows)


def compare_stage_hours(
    loads, options: Sequence[PlantOption], no_load_threshold: float | None = None
) -> pd.DataFrame:
    """Hours with each number of machines running, for several options (long, tidy form).

    Returns
    -------
    pandas.DataFrame
        ``option``, ``machines_running``, ``hours``, ``percent_of_hours``,
        ``load_energy_kWh``: one row per option and machine count (0..N).
    """
    frames = []
    for option, result in _staged_options(loads, options, no_load_threshold):
        frame = result.hours_by_machines_running()
        frame.insert(0, "option", option.name)
        frames.append(frame)
    return pd.concat(frames, ignore_index=True)
