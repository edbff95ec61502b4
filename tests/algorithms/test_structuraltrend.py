"""sectionwright:structuraltrend through processing.run."""

import demo_world as W
import numpy as np
import processing
import pytest
import run_parameters as P
from angles import axial_angle
from feedback import LogFeedback
from layers import attributes, is_null, point_layer
from qgis.core import QgsProcessingException, QgsVectorLayer

X0, Y0 = W.ORIGIN
DESIGN_FIELDS = [
    "area",
    "n",
    "mean_dd",
    "mean_dip",
    "axis_tr",
    "axis_pl",
    "e1",
    "e2",
    "e3",
    "shape",
    "best_az",
    "pattern",
]
LINE_FIELDS = ["section", "area", "line_az", "best_az", "misfit", "n_near", "n_oblique", "advice"]


def run(points, feedback=None, **extra):
    parameters = {
        **P.numeric_attitudes(points),
        **P.memory("OUTPUT", "OUTPUT_LINES", "SKIPPED"),
    }
    parameters.update(extra)
    return processing.run("sectionwright:structuraltrend", parameters, feedback=feedback)


def numeric_points(rows):
    """Points with az/dip fields: rows are (x, y, az, dip) in local demo coordinates."""
    return point_layer(
        [(f"POINT({X0 + x} {Y0 + y})", [float(az), float(dip)]) for x, y, az, dip in rows],
        [("az", "double"), ("dip", "double")],
    )


def polygon_layer(named_wkts):
    layer = QgsVectorLayer("Polygon?crs=EPSG:32633&field=name:string", "areas", "memory")
    from qgis.core import QgsFeature, QgsGeometry

    features = []
    for name, wkt in named_wkts:
        feature = QgsFeature(layer.fields())
        feature.setGeometry(QgsGeometry.fromWkt(wkt))
        feature.setAttributes([name])
        features.append(feature)
    layer.dataProvider().addFeatures(features)
    return layer


def box(x0, y0, x1, y1):
    return (
        f"POLYGON(({X0 + x0} {Y0 + y0},{X0 + x1} {Y0 + y0},{X0 + x1} {Y0 + y1},"
        f"{X0 + x0} {Y0 + y1},{X0 + x0} {Y0 + y0}))"
    )


def test_demo_fold_axis_recommended_azimuth_and_the_demo_lines(provider, demo_dir):
    # Ground truth: test_data/demo_world.py (axis 035/08, cylindrical); the
    # notebook rounds attitudes to whole degrees, so within 2°.
    feedback = LogFeedback()
    result = run(P.demo_layer(demo_dir, "attitudes"), feedback, **P.demo_structuraltrend(demo_dir))
    (row,) = attributes(result["OUTPUT"])
    assert list(row) == DESIGN_FIELDS
    assert row["area"] == "all" and row["n"] == 78 and row["pattern"] == "girdle"
    assert axial_angle(row["axis_tr"], row["axis_pl"], W.FOLD_TREND, W.FOLD_PLUNGE) < 2.0
    assert row["best_az"] == pytest.approx(W.FOLD_TREND + 90.0, abs=2.0)
    assert row["e1"] >= row["e2"] >= row["e3"] and row["e1"] + row["e2"] + row[
        "e3"
    ] == pytest.approx(1)
    assert row["shape"] < 1.0
    (suggested,) = result["OUTPUT"].getFeatures()
    line = suggested.geometry().asPolyline()
    azimuth = np.degrees(np.arctan2(line[-1].x() - line[0].x(), line[-1].y() - line[0].y()))
    assert azimuth % 180 == pytest.approx(row["best_az"], abs=1e-6)
    checked = {r["section"]: r for r in attributes(result["OUTPUT_LINES"])}
    assert sorted(checked) == ["A", "B", "C", "D"]
    assert list(checked["A"]) == LINE_FIELDS
    for label, points in W.SECTION_LINES.items():
        (x0, y0), (x1, y1) = points[0], points[-1]
        line_az = np.degrees(np.arctan2(x1 - x0, y1 - y0)) % 360
        d = abs(line_az - row["best_az"]) % 180
        assert checked[label]["line_az"] == pytest.approx(line_az)
        assert checked[label]["misfit"] == pytest.approx(min(d, 180 - d))
    # D runs nearly along the axis: a poor line, and said so.
    assert checked["D"]["advice"].startswith("poor")
    assert checked["D"]["n_oblique"] > checked["D"]["n_near"] / 2
    assert checked["A"]["misfit"] < 15 and checked["A"]["advice"].startswith("good")
    log = feedback.algorithm_log()
    assert log[-2] == "Summary: read=84 written=82 skipped=2"
    assert log[-1] == "Skipped: missing text=1, unparsed text=1"


def homocline(rng, x0, y0, count, dd=120.0, dip=30.0):
    return [
        (
            x0 + rng.uniform(0, 900),
            y0 + rng.uniform(0, 900),
            dd + rng.normal(0, 3),
            dip + rng.normal(0, 2),
        )
        for _ in range(count)
    ]


def test_areas_each_get_their_own_result_and_everything_is_accounted_for(provider):
    rng = np.random.default_rng(2)
    rows = homocline(rng, 0, 0, 20)
    random_poles = rng.normal(size=(40, 3))
    random_poles /= np.linalg.norm(random_poles, axis=1)[:, None]
    down = np.where(random_poles[:, 2:] > 0, -random_poles, random_poles)
    trend = np.degrees(np.arctan2(down[:, 0], down[:, 1])) % 360
    plunge = np.degrees(np.arcsin(-down[:, 2]))
    rows += [
        (2000 + rng.uniform(0, 900), rng.uniform(0, 900), (t + 180) % 360, 90 - p)
        for t, p in zip(trend, plunge)
    ]
    rows += [(4100.0, 100.0, 10.0, 20.0), (4200.0, 200.0, 15.0, 25.0)]  # a nearly empty area
    rows += [(7000.0, 7000.0, 10.0, 20.0), (100.0, 100.0, 10.0, 95.0)]  # outside; bad dip
    areas = polygon_layer(
        [
            ("west", box(0, 0, 1000, 1000)),
            ("east", box(2000, 0, 3000, 1000)),
            ("few", box(4000, 0, 5000, 1000)),
        ]
    )
    feedback = LogFeedback()
    result = run(numeric_points(rows), feedback, AREAS=areas, AREA_FIELD="name")
    out = {r["area"]: r for r in attributes(result["OUTPUT"])}
    assert sorted(out) == ["east", "west"]
    assert out["west"]["pattern"] == "cluster" and out["west"]["n"] == 20
    assert out["west"]["best_az"] == pytest.approx(120.0, abs=2.0)
    assert out["east"]["pattern"] == "scattered" and is_null(out["east"]["best_az"])
    skipped = sorted((r["table"], r["reason"]) for r in attributes(result["SKIPPED"]))
    assert skipped == [
        ("areas", "area with fewer than 3 attitudes: few"),
        ("attitudes", "area with fewer than 3 attitudes"),
        ("attitudes", "area with fewer than 3 attitudes"),
        ("attitudes", "dip out of range"),
        ("attitudes", "outside every area"),
    ]
    log = feedback.algorithm_log()
    assert log[-2] == "Summary: read=67 written=62 skipped=5"


def test_conventions_and_north_references_read_as_in_projectattitudes(provider):
    rng = np.random.default_rng(5)
    rows = homocline(rng, 0, 0, 15, dd=200.0, dip=40.0)
    by_dip_direction = attributes(run(numeric_points(rows))["OUTPUT"])[0]
    strikes = [(x, y, (dd - 90) % 360, dip) for x, y, dd, dip in rows]
    by_strike = attributes(run(numeric_points(strikes), CONVENTION=1)["OUTPUT"])[0]
    assert by_strike["best_az"] == pytest.approx(by_dip_direction["best_az"])
    # Magnetic north with a declination of +4°: azimuths turn 4° clockwise
    # (true = magnetic + D, NOAA), then by the grid convergence here.
    magnetic = attributes(run(numeric_points(rows), NORTH_REFERENCE=2, DECLINATION=4.0)["OUTPUT"])[
        0
    ]
    assert magnetic["mean_dd"] - by_dip_direction["mean_dd"] == pytest.approx(4.0, abs=1.0)


def test_a_missing_attitude_field_is_an_error_not_an_empty_result(provider):
    with pytest.raises(QgsProcessingException, match="need this field"):
        run(numeric_points([(0, 0, 10, 20)]), DIP_FIELD="")


def test_runs_in_a_graphical_model(provider, demo_dir):
    from qgis.core import (
        QgsProcessingModelAlgorithm,
        QgsProcessingModelChildAlgorithm,
        QgsProcessingModelChildParameterSource,
        QgsProcessingModelOutput,
        QgsProcessingModelParameter,
        QgsProcessingParameterFeatureSource,
    )

    model = QgsProcessingModelAlgorithm("trend", "tests")
    model.addModelParameter(
        QgsProcessingParameterFeatureSource("points", "points"),
        QgsProcessingModelParameter("points"),
    )
    child = QgsProcessingModelChildAlgorithm("sectionwright:structuraltrend")
    child.setChildId("trend")
    child.addParameterSources(
        "ATTITUDES", [QgsProcessingModelChildParameterSource.fromModelParameter("points")]
    )
    for name, value in (("CONVENTION", 3), ("TEXT_FIELD", "attitude")):
        child.addParameterSources(
            name, [QgsProcessingModelChildParameterSource.fromStaticValue(value)]
        )
    output = QgsProcessingModelOutput("trend_out")
    output.setChildOutputName("OUTPUT")
    child.setModelOutputs({"trend_out": output})
    model.addChildAlgorithm(child)
    result = processing.run(
        model,
        {"points": P.demo_layer(demo_dir, "attitudes"), "trend:trend_out": "memory:"},
    )
    layer = result["trend:trend_out"]
    layer = QgsVectorLayer(layer) if isinstance(layer, str) else layer
    (feature,) = layer.getFeatures()
    assert feature["pattern"] == "girdle"


def test_too_few_attitudes_give_no_row_and_say_why(provider):
    feedback = LogFeedback()
    result = run(numeric_points([(0, 0, 10.0, 20.0), (50, 50, 12.0, 22.0)]), feedback)
    assert result["OUTPUT"].featureCount() == 0
    assert [r["reason"] for r in attributes(result["SKIPPED"])] == [
        "area with fewer than 3 attitudes"
    ] * 2
    empty = run(numeric_points([]), LogFeedback())
    assert empty["OUTPUT"].featureCount() == 0
