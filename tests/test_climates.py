"""The bundled fictional climates and their loader."""

from pathlib import Path

import numpy as np
import plantside
import pytest
from plantside.climate.bundled import (
    BUNDLED_CLIMATES,
    bundled_climate_description,
    load_bundled_climate,
)
from plantside.climate.fictional_sites import SITES, generate_year
from plantside.errors import InputRangeError

REPO = Path(__file__).resolve().parents[1]
PACKAGE_DATA = Path(plantside.__file__).parent / "data"


def test_names_and_files():
    assert len(BUNDLED_CLIMATES) >= 5
    for site in SITES.values():
        assert site.name in BUNDLED_CLIMATES
        assert (PACKAGE_DATA / f"{site.slug}.csv").is_file()


@pytest.mark.parametrize("name", BUNDLED_CLIMATES)
def test_each_climate_loads_as_a_full_year(name):
    weather = load_bundled_climate(name)
    assert weather.site == name
    assert weather.hours == 8760  # issue 3: a full 8,760-hour year
    assert np.all(np.isfinite(weather.drybulb))
    assert np.all(weather.month[[0, -1]] == [1, 12])
    assert weather.altitude == SITES[name.lower().replace(" ", "_")].altitude


@pytest.mark.parametrize("slug", list(SITES))
def test_loaded_year_equals_the_generated_year(slug):
    # The stored CSV is the generator's output at the stated precision: reading it back
    # gives the generated arrays (to float parsing).
    loaded, generated = load_bundled_climate(slug), generate_year(SITES[slug])
    np.testing.assert_allclose(loaded.drybulb, generated.drybulb, atol=1e-9)
    np.testing.assert_allclose(loaded.humidity_ratio, generated.humidity_ratio, atol=1e-12)
    np.testing.assert_allclose(loaded.pressure, generated.pressure, atol=1e-9)


def test_cached_and_immutable():
    a = load_bundled_climate("Salvia Flats")
    assert load_bundled_climate("salvia_flats") is a
    assert load_bundled_climate("SALVIA FLATS") is a
    with pytest.raises(ValueError, match="read-only"):
        a.drybulb[0] = 0.0


def test_unknown_name_lists_the_sites():
    with pytest.raises(InputRangeError) as error:
        load_bundled_climate("Atlantis")
    for name in BUNDLED_CLIMATES:
        assert name in str(error.value)


def test_example_data_copies_match_the_package():
    # Issue 3 asks for the demo years in example_data/; they are copies of the package data.
    folder = REPO / "example_data" / "climates"
    for slug in SITES:
        assert (folder / f"{slug}.csv").read_bytes() == (PACKAGE_DATA / f"{slug}.csv").read_bytes()


def test_description_says_fictional():
    for name in BUNDLED_CLIMATES:
        assert "fictional" in bundled_climate_description(name)
