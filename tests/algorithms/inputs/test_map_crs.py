"""A layer labelled with a degrees CRS whose coordinates are no longitudes
and latitudes is refused, whichever coordinate is out of range."""

import pytest
from qgis.core import QgsRectangle

from sectionwright.algorithms.framework.run_guard import ParameterProblem
from sectionwright.algorithms.inputs.map_crs import require_lonlat


@pytest.mark.parametrize(
    "extent",
    [
        (400_000, 5_000_000, 410_000, 5_010_000),  # eastings and northings
        (-200, 40, 10, 50),  # longitude west of -180
        (10, -95, 20, 40),  # latitude south of -90
        (10, 50, 20, 900),  # latitude north of 90 (northings of a few hundred metres)
    ],
)
def test_coordinates_that_are_no_longitudes_and_latitudes_are_refused(qgis_app, extent):
    with pytest.raises(ParameterProblem, match="geographic CRS .* no longitudes"):
        require_lonlat(QgsRectangle(*extent), "INPUT", "the section lines")


@pytest.mark.parametrize(
    "extent", [(-180, -90, 180, 90), (0, 0, 360, 10), (14.2, 46.0, 14.9, 46.3)]
)
def test_longitudes_and_latitudes_pass(qgis_app, extent):
    require_lonlat(QgsRectangle(*extent), "INPUT", "the section lines")
