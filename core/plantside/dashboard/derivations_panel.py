"""The dashboard's "How this is worked out" disclosures: one per headline figure and chart.

:class:`DerivationsPanel` holds an ``ipywidgets.HTML`` with the headline figures'
disclosures (:attr:`DerivationsPanel.figures`) and one per chart
(:meth:`DerivationsPanel.for_chart`). :meth:`DerivationsPanel.update` refreshes
them from the state's current result and units: the derivations read the numbers of
that result (:func:`plantside.charts.derivation_html.view_derivations`, the same
figures, loads and design points the cards and charts show) and only build strings;
an unchanged result and unit system is skipped.
"""

from __future__ import annotations

from collections.abc import Callable

import ipywidgets as widgets

from plantside.charts.derivation_html import derivation_html, derivations_html, view_derivations
from plantside.errors import InputRangeError, PlantsideError
from plantside.study.derivations import CHART_KEYS, HEADLINE_KEYS

__all__ = ["DerivationsPanel"]


class DerivationsPanel:
    """The derivations of the figures and charts on show.

    Parameters
    ----------
    state : DashboardState
        The dashboard's state (its ``result``, ``scenario`` and ``inputs``).
    plant : bool
        True on the plant page (the plant's figures), False on an air handler's.
    water_side : callable, optional
        Returns the water side of the state's result (the water-side panel's
        ``water_side``, so it is run once); used by ``update(water=True)``, without
        it there is no ``"water"`` disclosure.
    """

    def __init__(self, state, plant: bool, water_side: Callable | None = None):
        if bool(plant) != (state.view == "plant"):
            raise InputRangeError(
                "plant",
                f"plant = {plant!r} on a state whose view is {state.view!r}",
                "True with the plant view, False with an air handler's",
            )
        self.state = state
        self.plant = bool(plant)
        self._water_side = water_side
        self.figures = widgets.HTML("")
        self.figures.add_class("plantside-derivations")
        self._charts = {name: widgets.HTML("") for name in CHART_KEYS}
        for box in self._charts.values():
            box.add_class("plantside-derivations")
        self._key = None
        self.derivations: dict = {}
        self.update()

    def for_chart(self, name: str) -> widgets.HTML:
        """The disclosure under chart ``name`` (one of
        :data:`plantside.study.derivations.CHART_KEYS`)."""
        if name not in self._charts:
            raise KeyError(f"unknown chart {name!r}; one of {', '.join(CHART_KEYS)}")
        return self._charts[name]

    def update(self, water: bool = False) -> bool:
        """Refresh from the state's current result and unit system.

        Parameters
        ----------
        water : bool
            Also the water side's disclosure (plant page, with ``water_side``): ask
            for it when the water side is on show, so the water-side year is never
            run just for its derivation.

        Returns
        -------
        bool
            True when the disclosures were rebuilt (False: the same result, units and
            water side).
        """
        state = self.state
        result = state.result
        system = state.inputs.unit_system
        water = bool(water and self.plant and self._water_side is not None)
        kept = self._key
        if kept is not None and kept[0] is result and kept[1:] == (system, water):
            return False
        water_side = None
        if water:
            try:
                water_side = self._water_side()
            except PlantsideError:  # the water-side panel says why; no disclosure here
                water_side = None
        units = [unit.study for unit in result.units]
        # the scenario as the result's figures used it (margins and design condition
        # set on the page)
        scenario = result.inputs.plant_scenario(state.scenario)
        self.derivations = view_derivations(
            scenario, units, result.chart_view, system, water_side=water_side
        )
        self.figures.value = derivations_html(
            (self.derivations[k] for k in HEADLINE_KEYS), plant=self.plant
        )
        for name, box in self._charts.items():
            box.value = (
                derivation_html(self.derivations[name], plant=self.plant)
                if name in self.derivations
                else ""
            )
        self._key = (result, system, water)  # the result itself: an id could be reused
        return True
