"""Staging on efficiency: a staging fraction, "two use less than one", machines for flow.

Extends the rule of :mod:`plantside.plant.staging` (which starts the next machine only
when the running ones cannot meet the load) and returns the same
:class:`~plantside.plant.staging.StagingResult`, so hours per stage
(``hours_by_machines_running``), starts (``summary()["machine_starts"]``) and the other
tables read the same. Each hour the number of machines running is the largest of:

1. **for load**: the smallest n whose combined capacity :math:`C_n` reaches the load
   (today's rule);
2. **staging fraction** :math:`f`: the smallest n with :math:`Q \\le f\\,C_n` (the next
   machine starts when the running ones pass :math:`f` of their capacity); :math:`f = 1`
   is today's rule;
3. **efficiency**: from the number for load, one more machine starts while n + 1 running
   use less input power than n (needs the machines' power model);
4. **flow**: a number needed for flow (low ΔT; :func:`plantside.plant.water.machines_for_flow`).

All are capped at the number of machines; running machines share the load at one
part-load ratio as before. The fraction and the power rule are planning rules of our own
(common practice, no source), not a controls sequence. For chillers whose capacity
changes with the weather, pass the load over the hour's capacity ratio (CAPFT) as the
load, so :math:`C_n` is compared in rated terms.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from plantside.errors import InputRangeError, check_range
from plantside.plant.loads import hourly_loads
from plantside.plant.part_load import no_load_threshold_from_loads
from plantside.plant.staging import StagingResult, _machine_arrays, _read_only, staging_result

__all__ = ["EfficientStaging", "stage_on_efficiency"]

#: Input power of running machines: (load [kW] shape (hours, 1), running capacity [kW]
#: shape (1, machines)) -> input power [kW] shape (hours, machines).
InputPower = Callable[[np.ndarray, np.ndarray], np.ndarray]


@dataclass(frozen=True, eq=False)
class EfficientStaging:
    """Staging with the reasons each extra machine runs.

    Attributes
    ----------
    staging : StagingResult
        Machines running, part-load ratio, unmet load; its summaries.
    for_load : numpy.ndarray of int
        Machines the load alone needs each hour.
    extra_for_fraction, extra_for_efficiency, extra_for_flow : numpy.ndarray of bool
        Hours in which the staging fraction, the power rule or the flow needs more
        machines than the load.
    """

    staging: StagingResult
    for_load: np.ndarray
    extra_for_fraction: np.ndarray
    extra_for_efficiency: np.ndarray
    extra_for_flow: np.ndarray

    def summary(self) -> dict:
        """The staging summary plus hours with more machines than the load needs, by reason."""
        return {
            **self.staging.summary(),
            "hours_extra_for_fraction": int(self.extra_for_fraction.sum()),
            "hours_extra_for_efficiency": int(self.extra_for_efficiency.sum()),
            "hours_extra_for_flow": int(self.extra_for_flow.sum()),
        }


def _smallest_reaching(cumulative, values):
    return np.minimum(np.searchsorted(cumulative, values, side="left") + 1, cumulative.size)


def stage_on_efficiency(
    loads,
    capacities,
    minimum_turndown,
    staging_fraction: float = 1.0,
    input_power: InputPower | None = None,
    minimum_machines=None,
    no_load_threshold: float | None = None,
) -> EfficientStaging:
    """Stage N machines by load, staging fraction, efficiency and flow (module notes).

    Parameters
    ----------
    loads : array_like
        Hourly plant load [kW], >= 0.
    capacities : sequence of float
        Machine capacities [kW], > 0, start order.
    minimum_turndown : float or sequence of float
        As for :func:`plantside.plant.staging.stage_machines`.
    staging_fraction : float
        Share of the running capacity at which the next machine starts [-], 0.3 to 1.
    input_power : callable, optional
        Input power of the running machines, ``input_power(load[:, None], C[None, :])``
        -> kW (hours, machines); enables the power rule.
    minimum_machines : array_like of int, optional
        Machines needed each hour for another reason (flow).
    no_load_threshold : float, optional
        As for :func:`plantside.plant.staging.stage_machines`.

    Returns
    -------
    EfficientStaging

    Examples
    --------
    >>> result = stage_on_efficiency([450.0], [500.0, 500.0], 0.15, staging_fraction=0.8)
    >>> int(result.staging.machines_running[0])
    2
    """
    arr = hourly_loads(loads)
    caps, turndown = _machine_arrays(capacities, minimum_turndown)
    f = float(check_range("staging_fraction", staging_fraction, 0.3, 1.0, ""))
    threshold = no_load_threshold_from_loads(arr, no_load_threshold)
    cumulative = np.cumsum(caps)
    count = caps.size
    for_load = _smallest_reaching(cumulative, arr)
    for_fraction = _smallest_reaching(cumulative * f, arr)
    for_power = for_load
    if input_power is not None and count > 1:
        power = np.asarray(input_power(arr[:, None], cumulative[None, :]), dtype=float)
        if power.shape != (arr.size, count):
            raise InputRangeError(
                "input_power",
                f"input_power returned shape {power.shape}, expected {(arr.size, count)}",
                "(hours, machines)",
            )
        step_up = power[:, 1:] < power[:, :-1]  # k+2 machines use less than k+1
        k = np.arange(count - 1)[None, :]
        blocked = ~step_up & (k >= for_load[:, None] - 1)
        blocked = np.concatenate([blocked, np.ones((arr.size, 1), bool)], axis=1)
        for_power = np.argmax(blocked, axis=1) + 1
        for_power = np.maximum(for_power, for_load)
    for_flow = np.zeros_like(for_load)
    if minimum_machines is not None:
        for_flow = np.minimum(
            np.broadcast_to(np.asarray(minimum_machines, dtype=int), arr.shape), count
        )
    staged = np.maximum.reduce([for_load, for_fraction, for_power, for_flow])
    has_load = arr > threshold
    running = np.where(has_load, staged, 0)
    staging = staging_result(arr, caps, turndown, threshold, running)
    return EfficientStaging(
        staging,
        _read_only(np.where(has_load, for_load, 0)),
        _read_only(has_load & (for_fraction > for_load)),
        _read_only(has_load & (for_power > for_load)),
        _read_only(has_load & (for_flow > for_load)),
    )
