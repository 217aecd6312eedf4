"""The docstrings' Examples sections run, and the main physics functions have them.

Every module of ``plantside.air``, ``plantside.climate``, ``plantside.air_handler``
and ``plantside.plant`` (and the ``plantside`` facade) is run through :mod:`doctest`;
any failing example fails its module's test. The psychrometric example values are
psychrolib 2.5's (each example names it where it quotes it), computed in SI at
101 325 Pa; the others are the functions' own results on round inputs, so a change in
a function shows up here as well as in its own tests.

The contributor guide asks the main physics functions to show their equation (a
``.. math::`` block in Notes) and a short worked example (``>>>`` in Examples);
:data:`SHOWN` lists them and the last test checks that each still does.
"""

import doctest
import importlib
import inspect
import pkgutil

import plantside
import pytest

SUBPACKAGES = ("air", "climate", "air_handler", "plant")


def _modules():
    names = ["plantside", "plantside.arrays", "plantside.errors"]
    for sub in SUBPACKAGES:
        package = importlib.import_module(f"plantside.{sub}")
        names.append(package.__name__)
        names += [
            f"{package.__name__}.{info.name}"
            for info in pkgutil.iter_modules(package.__path__)
            if not info.name.startswith("_")
        ]
    return names


MODULES = _modules()

#: module -> the main physics functions that show their equation and an example.
SHOWN = {
    "plantside.air.moist_air": (
        "saturation_vapor_pressure",
        "saturation_vapor_pressure_over_ice",
        "saturation_vapor_pressure_over_water",
        "pressure_from_altitude",
        "humidity_ratio_from_vapor_pressure",
        "vapor_pressure_from_humidity_ratio",
        "saturation_humidity_ratio",
        "humidity_ratio_from_relative_humidity",
        "relative_humidity_from_humidity_ratio",
        "humidity_ratio_from_dew_point",
        "dew_point_from_vapor_pressure",
        "dew_point_from_humidity_ratio",
        "humidity_ratio_from_wet_bulb",
        "wet_bulb_from_humidity_ratio",
        "enthalpy_from_humidity_ratio",
        "drybulb_from_enthalpy",
        "humidity_ratio_from_enthalpy",
        "specific_volume_from_humidity_ratio",
        "density_from_humidity_ratio",
        "degree_of_saturation",
    ),
    "plantside.air.mixing": (
        "mixed_state",
        "mixed_state_from_flows",
        "outdoor_fraction_for_mixed_drybulb",
    ),
    "plantside.air.coils": (
        "apparatus_dew_point_from_bypass_factor",
        "bypass_factor_from_apparatus_dew_point",
        "cooling_coil_leaving_humidity_ratio",
        "cooling_coil_load",
        "heating_coil_load",
    ),
    "plantside.air.economizer": ("economizer_enabled", "enthalpy_si_from_ip_table"),
    "plantside.air.energy_recovery": ("recovery_leaving_state", "total_effectiveness"),
    "plantside.air_handler.zone_loads": ("zone_loads_from_model",),
    "plantside.plant.efficiency": ("integrated_part_load_value", "project_weighted_efficiency"),
    "plantside.climate.design_conditions": ("value_exceeded_by_percent",),
    "plantside.climate.design_day": ("design_day_from_condition",),
}


@pytest.mark.parametrize("name", MODULES)
def test_examples_in_docstrings_pass(name):
    module = importlib.import_module(name)
    finder = doctest.DocTestFinder(exclude_empty=True)
    runner = doctest.DocTestRunner(optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    report = []
    for test in finder.find(module, name):
        runner.run(test, out=report.append)
    results = runner.summarize(verbose=False)
    assert results.failed == 0, "".join(report)


def test_the_facade_example_is_collected():
    # The facade's example must be found (a module-level docstring example), or the
    # test above would pass on nothing.
    tests = doctest.DocTestFinder(exclude_empty=True).find(plantside, "plantside")
    assert sum(len(t.examples) for t in tests) >= 3


@pytest.mark.parametrize(
    ("module_name", "function_name"),
    [(module, function) for module, functions in SHOWN.items() for function in functions],
)
def test_main_physics_functions_show_equation_and_example(module_name, function_name):
    module = importlib.import_module(module_name)
    doc = inspect.getdoc(getattr(module, function_name)) or ""
    assert ".. math::" in doc, f"{module_name}.{function_name}: no equation in Notes"
    assert "Examples\n--------\n>>> " in doc, f"{module_name}.{function_name}: no example"
    tests = doctest.DocTestFinder().find(getattr(module, function_name), function_name)
    assert sum(len(t.examples) for t in tests) >= 1
