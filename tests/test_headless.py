"""Every algorithm through QGIS's own headless runner, qgis_process, exactly
as the demo command runs them."""

import sys
from pathlib import Path

import numpy as np
import pytest
from osgeo import ogr

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "scripts"))
import headless  # noqa: E402
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
    assert data.GetLayerByName("profile_points") is None  # only when asked for
    lines = data.GetLayerByName("profile_line")
    assert lines.GetGeomType() == ogr.wkbMultiLineStringZM
    assert lines.GetFeatureCount() == 4
    for feature in lines:
        geometry = feature.GetGeometryRef()
        parts = [geometry.GetGeometryRef(i) for i in range(geometry.GetGeometryCount())]
        z = np.array([p.GetZ(i) for p in parts for i in range(p.GetPointCount())])
        m = np.array([p.GetM(i) for p in parts for i in range(p.GetPointCount())])
        assert len(z) > 7000 / 10
        assert z.min() == feature.GetField("min_elev") and z.max() == feature.GetField("max_elev")
        assert m[0] == 0 and np.all(np.diff(m) > 0) and m[-1] == feature.GetField("length")


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


def test_dip_domains_run_headless_on_the_carried_attitudes(demo_dir, tmp_path):
    out = tmp_path / "demo.gpkg"
    run_demo.run_attitudes(demo_dir, out)
    line = summary(run_demo.run_domains(demo_dir, out))
    data = ogr.Open(str(out))
    carried = data.GetLayerByName("attitudes").GetFeatureCount()
    assert line == f"Summary: read={carried} written={carried} skipped=0"
    points = data.GetLayerByName("attitude_domains")
    domains = data.GetLayerByName("domains")
    assert sum(f.GetField("represent") for f in points) == domains.GetFeatureCount()
    assert {f.GetField("section") for f in domains} == {"A", "B", "C", "D"}


def test_structural_trend_runs_headless(demo_dir, tmp_path):
    out = tmp_path / "demo.gpkg"
    report = run_demo.run_trend(demo_dir, out)
    assert summary(report) == "Summary: read=84 written=82 skipped=2"
    data = ogr.Open(str(out))
    (trend,) = list(data.GetLayerByName("trend"))
    assert trend.GetField("pattern") == "girdle"
    assert trend.GetGeometryRef().Length() > 5000
    lines = {
        f.GetField("section"): f.GetField("misfit") for f in data.GetLayerByName("trend_lines")
    }
    assert sorted(lines) == ["A", "B", "C", "D"]
    assert data.GetLayerByName("trend_skipped").GetFeatureCount() == 2


def test_formlines_run_headless(demo_dir, tmp_path):
    out = tmp_path / "demo.gpkg"
    for step in (run_demo.run_profile, run_demo.run_attitudes, run_demo.run_geology):
        step(demo_dir, out)
    line = summary(run_demo.run_formlines(demo_dir, out))
    data = ogr.Open(str(out))
    skipped = data.GetLayerByName("form_lines_skipped").GetFeatureCount()
    assert line.endswith(f"skipped={skipped}")
    kinds = {f.GetField("kind") for f in data.GetLayerByName("form_lines")}
    assert kinds == {"contact", "form line"}
    assert data.GetLayerByName("axial_surfaces").GetFeatureCount() > 10
    assert data.GetLayerByName("unit_thickness").GetFeatureCount() > 10
    assert {f.GetField("ve") for f in data.GetLayerByName("form_lines")} == {2.0}


def test_formlines_take_the_representatives_of_dip_domains(demo_dir, tmp_path):
    out = tmp_path / "demo.gpkg"
    for step in (run_demo.run_profile, run_demo.run_attitudes, run_demo.run_geology):
        step(demo_dir, out)
    run_demo.run_domains(demo_dir, out)
    report = headless.run(
        "sectionwright:formlines",
        {
            "ATTITUDES": f"{out}|layername=attitude_domains",
            "CROSSINGS": f"{out}|layername=geology_crossings",
            "PROFILE": f"{out}|layername=profile_section",
            "REPRESENTATIVES_ONLY": True,
            "VERTICAL_EXAGGERATION": 2,
            "OUTPUT": headless.gpkg_layer(out, "form_lines"),
            "OUTPUT_AXES": headless.gpkg_layer(out, "axial_surfaces"),
            "OUTPUT_THICKNESS": headless.gpkg_layer(out, "unit_thickness"),
        },
        demo_dir / ".headless-qgis",
    )
    data = ogr.Open(str(out))
    chosen = sum(f.GetField("represent") for f in data.GetLayerByName("attitude_domains"))
    carried = data.GetLayerByName("attitude_domains").GetFeatureCount()
    skipped = [line for line in report["log"]["info"] if line.startswith("Skipped:")][0]
    assert f"not representative={carried - chosen}" in skipped
