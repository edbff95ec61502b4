"""sectionwright:profile through QGIS's own headless runner, qgis_process."""
import sys
from pathlib import Path

from osgeo import ogr

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "scripts"))
import headless  # noqa: E402


def test_profile_runs_headless_and_writes_a_geopackage(demo_dir, tmp_path):
    out = tmp_path / "profile.gpkg"
    report = headless.run("sectionwright:profile", {
        "INPUT": f"{demo_dir}/tarrowgill.gpkg|layername=sections", "LINE_ID_FIELD": "name",
        "DEM": f"{demo_dir}/dem.tif", "STEP": 50,
        "OUTPUT": headless.gpkg_layer(out, "points"),
        "OUTPUT_SECTION": headless.gpkg_layer(out, "sections")}, tmp_path / "qgis")
    assert report["log"]["info"][-1] == "Summary: read=4 written=4 skipped=0"
    data = ogr.Open(str(out))
    sections = {f.GetField("section"): f for f in data.GetLayerByName("sections")}
    assert sorted(sections) == ["A", "B", "C", "D"]
    points = data.GetLayerByName("points")
    assert points.GetGeomType() == ogr.wkbPoint25D
    assert points.GetFeatureCount() > 4 * 7000 / 50
    for feature in points:
        assert feature.GetGeometryRef().GetZ() == feature.GetField("elev")
