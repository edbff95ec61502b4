"""Grid, true and magnetic north."""

import numpy as np
import pytest
from pyproj import CRS, Proj, Transformer

from sectionwright.algorithms.core.north import GRID, MAGNETIC, TRUE, meridian_convergence, to_grid

UTM33 = CRS.from_epsg(32633)


def test_convergence_matches_pyproj_far_from_the_central_meridian():
    # Source: PROJ via pyproj, Proj.get_factors(...).meridian_convergence
    # (REFERENCES.md; C. F. F. Karney, J. Geodesy 85:475, 2011). A point at
    # 17.9° E, 60° N is 2.9° east of zone 33's central meridian (15° E).
    to_utm = Transformer.from_crs(4326, 32633, always_xy=True)
    x, y = to_utm.transform(17.9, 60.0)
    expected = Proj(UTM33).get_factors(17.9, 60.0).meridian_convergence
    gamma = meridian_convergence(UTM33.to_wkt(), np.array([x]), np.array([y]))[0]
    assert gamma == pytest.approx(expected, abs=1e-9)
    # Sign and size against the textbook approximation γ ≈ Δλ · sin φ
    # (common practice): positive east of the central meridian in the north.
    assert gamma == pytest.approx(2.9 * np.sin(np.radians(60.0)), abs=0.02)


def test_sign_pinned_by_projecting_a_meridian():
    # Independent of get_factors: the grid bearing of true north at a point
    # is the grid azimuth of a short step up its meridian, and a true
    # azimuth becomes grid by subtracting γ (REFERENCES.md: sign verified
    # with pyproj 3.4 / PROJ 9.1).
    to_utm = Transformer.from_crs(4326, 32633, always_xy=True)
    (x0, x1), (y0, y1) = to_utm.transform([17.9, 17.9], [60.0, 60.0001])
    north_in_grid = np.degrees(np.arctan2(x1 - x0, y1 - y0)) % 360.0
    gamma = meridian_convergence(UTM33.to_wkt(), np.array([x0]), np.array([y0]))
    assert to_grid(np.array([0.0]), TRUE, gamma)[0] == pytest.approx(north_in_grid, abs=1e-4)


def test_magnetic_declination_east_positive():
    # Source: NOAA NCEI, "Magnetic Declination": true = magnetic + D (east
    # positive); then grid = true − γ.
    assert to_grid(np.array([100.0]), MAGNETIC, np.array([0.0]), 4.5)[0] == 104.5
    assert to_grid(np.array([100.0]), MAGNETIC, np.array([1.0]), -4.5)[0] == 94.5
    assert to_grid(np.array([359.0]), MAGNETIC, np.array([0.0]), 3.0)[0] == 2.0


def test_grid_reference_is_left_as_stored_and_geographic_crs_has_no_convergence():
    assert to_grid(np.array([360.0, 12.0]), GRID, np.array([5.0, 5.0])).tolist() == [0.0, 12.0]
    gamma = meridian_convergence(CRS.from_epsg(4326).to_wkt(), np.array([17.9]), np.array([60.0]))
    assert gamma.tolist() == [0.0]
