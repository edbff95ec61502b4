"""sectionwright:profile through QGIS's own headless runner, qgis_process."""

import sys
from pathlib import Path

from osgeo import ogr

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "scripts"))
import headless  # noqa: E402


def test_profile_runs_headless_and_writes_a_geopackage(demo_dir, tmp_path):
    out = tmp_path / "profile.gpkg"
    report = headless.run(
        "sectionwright:profile",
        {
            "INPUT": f"{demo_dir}/tarrowgill.gpkg|layername=sections",
            "LINE_ID_FIELD": "name",
            "DEM": f"{demo_dir}/dem.tif",
            "STEP": 50,
            "OUTPUT": headless.gpkg_layer(out, "points"),
            "OUTPUT_SECTION": headless.gpkg_layer(out, "sections"),
        },
        tmp_path / "qgis",
    )
    assert report["log"]["info"][-1] == "Summary: read=4 written=4 skipped=0"
    data = ogr.Open(str(out))
    sections = {f.GetField("section"): f for f in data.GetLayerByName("sections")}
    assert sorted(sections) == ["A", "B", "C", "D"]
    points = data.GetLayerByName("points")
    assert points.GetGeomType() == ogr.wkbPoint25D
    assert points.GetFeatureCount() > 4 * 7000 / 50
    for feature in points:
        assert feature.GetGeometryRef().GetZ() == feature.GetField("elev")


def test_attitudes_run_headless(demo_dir, tmp_path):
    out = tmp_path / "attitudes.gpkg"
    report = headless.run(
        "sectionwright:projectattitudes",
        {
            "INPUT": f"{demo_dir}/tarrowgill.gpkg|layername=sections",
            "LINE_ID_FIELD": "name",
            "ATTITUDES": f"{demo_dir}/tarrowgill.gpkg|layername=attitudes",
            "CONVENTION": 3,
            "TEXT_FIELD": "attitude",
            "MAX_DISTANCE": 500,
            "DEM": f"{demo_dir}/dem.tif",
            "OUTPUT": headless.gpkg_layer(out, "carried"),
            "OUTPUT_TICKS": headless.gpkg_layer(out, "ticks"),
            "SKIPPED": headless.gpkg_layer(out, "skipped"),
        },
        tmp_path / "qgis",
    )
    summary = next(line for line in report["log"]["info"] if line.startswith("Summary:"))
    data = ogr.Open(str(out))
    carried = data.GetLayerByName("carried").GetFeatureCount()
    skipped = data.GetLayerByName("skipped").GetFeatureCount()
    assert summary == f"Summary: read=80 written={carried} skipped={skipped}"
    assert carried > 20


def test_geology_runs_headless(demo_dir, tmp_path):
    out = tmp_path / "geology.gpkg"
    report = headless.run(
        "sectionwright:geologycrossings",
        {
            "INPUT": f"{demo_dir}/tarrowgill.gpkg|layername=sections",
            "LINE_ID_FIELD": "name",
            "DEM": f"{demo_dir}/dem.tif",
            "UNITS": f"{demo_dir}/tarrowgill.gpkg|layername=units",
            "UNIT_FIELD": "unit",
            "CONTACTS": f"{demo_dir}/tarrowgill.gpkg|layername=contacts",
            "CONTACT_TYPE_FIELD": "type",
            "TRACE_WINDOW": 800,
            "OUTPUT": headless.gpkg_layer(out, "crossings"),
            "OUTPUT_INTERVALS": headless.gpkg_layer(out, "strip"),
        },
        tmp_path / "qgis",
    )
    assert report["log"]["info"][-1] == "Summary: read=4 written=4 skipped=0"
    data = ogr.Open(str(out))
    assert data.GetLayerByName("crossings").GetFeatureCount() > 40
    assert {f.GetField("unit") for f in data.GetLayerByName("strip")} == {
        "HWM",
        "BRS",
        "COL",
        "DNG",
        "ASH",
    }


def test_boreholes_run_headless(demo_dir, tmp_path):
    out = tmp_path / "holes.gpkg"
    table = f"{demo_dir}/tarrowgill.gpkg|layername="
    report = headless.run(
        "sectionwright:projectboreholes",
        {
            "INPUT": table + "sections",
            "LINE_ID_FIELD": "name",
            "COLLARS": table + "collars",
            "HOLE_ID_FIELD": "hole_id",
            "AZIMUTH_FIELD": "azimuth",
            "INCLINATION_FIELD": "incl",
            "DEPTH_FIELD": "depth",
            "SURVEYS": table + "surveys",
            "SURVEY_HOLE_FIELD": "hole_id",
            "SURVEY_DEPTH_FIELD": "depth",
            "SURVEY_AZIMUTH_FIELD": "azimuth",
            "SURVEY_INCLINATION_FIELD": "incl",
            "MAX_DISTANCE": 600,
            "OUTPUT": headless.gpkg_layer(out, "holes"),
        },
        tmp_path / "qgis",
    )
    assert report["log"]["info"][-2].startswith("Summary: read=")
    assert ogr.Open(str(out)).GetLayerByName("holes").GetFeatureCount() == 7
