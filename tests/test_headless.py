"""Every algorithm through QGIS's own headless runner, qgis_process, exactly
as the demo command runs them."""

import sys
from pathlib import Path

import pytest
from osgeo import ogr

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "scripts"))
import run_demo  # noqa: E402

pytestmark = pytest.mark.headless


def summary(report):
    return next(line for line in report["log"]["info"] if line.startswith("Summary:"))


def test_profile_runs_headless_and_writes_a_geopackage(demo_dir, tmp_path):
    out = tmp_path / "demo.gpkg"
    assert summary(run_demo.run_profile(demo_dir, out)) == "Summary: read=4 written=4 skipped=0"
    data = ogr.Open(str(out))
    sections = {f.GetField("section") for f in data.GetLayerByName("profile_section")}
    assert sorted(sections) == ["A", "B", "C", "D"]
    points = data.GetLayerByName("profile_points")
    assert points.GetGeomType() == ogr.wkbPoint25D
    assert points.GetFeatureCount() > 4 * 7000 / 10
    for feature in points:
        assert feature.GetGeometryRef().GetZ() == feature.GetField("elev")


def test_attitudes_run_headless(demo_dir, tmp_path):
    out = tmp_path / "demo.gpkg"
    line = summary(run_demo.run_attitudes(demo_dir, out))
    data = ogr.Open(str(out))
    carried = data.GetLayerByName("attitudes").GetFeatureCount()
    skipped = data.GetLayerByName("attitudes_skipped").GetFeatureCount()
    assert line == f"Summary: read=80 written={carried} skipped={skipped}"
    assert carried > 20


def test_geology_runs_headless(demo_dir, tmp_path):
    out = tmp_path / "demo.gpkg"
    assert summary(run_demo.run_geology(demo_dir, out)) == "Summary: read=4 written=4 skipped=0"
    data = ogr.Open(str(out))
    assert data.GetLayerByName("geology_crossings").GetFeatureCount() > 40
    units = {f.GetField("unit") for f in data.GetLayerByName("geology_strip")}
    assert units == {"HWM", "BRS", "COL", "DNG", "ASH"}


def test_boreholes_run_headless(demo_dir, tmp_path):
    out = tmp_path / "demo.gpkg"
    line = summary(run_demo.run_boreholes(demo_dir, out))
    data = ogr.Open(str(out))
    assert data.GetLayerByName("boreholes").GetFeatureCount() == 7
    skipped = data.GetLayerByName("boreholes_skipped").GetFeatureCount()
    assert skipped == 2 and line.endswith(f"skipped={skipped}")
