"""Benchmark of sectionwright:projectboreholes.

    .venv/bin/python benchmarks/bench_boreholes.py

2,000 holes with 50 survey stations and 20 intervals each, 100 section
lines of 15 km in the 20 km benchmark square, through processing.run with
temporary outputs (best of 2); and the same with 500 holes to show growth.
"""

import sys
import time
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
import bench_data  # noqa: E402
import bench_profile  # noqa: E402

sys.path.insert(0, str(HERE.parent / "test_data"))
import run_parameters as P  # noqa: E402


def tables(holes, seed=5):
    from qgis.core import QgsFeature, QgsGeometry, QgsPoint, QgsVectorLayer

    rng = np.random.default_rng(seed)
    origin = np.array(bench_data.ORIGIN)
    collars = QgsVectorLayer(
        f"PointZ?crs=EPSG:{bench_data.EPSG}&field=hole:string&field=az:double"
        "&field=incl:double&field=depth:double",
        "collars",
        "memory",
    )
    surveys = QgsVectorLayer(
        "None?field=hole:string&field=depth:double&field=az:double&field=incl:double",
        "surveys",
        "memory",
    )
    intervals = QgsVectorLayer(
        "None?field=hole:string&field=from:double&field=to:double&field=code:string",
        "intervals",
        "memory",
    )
    collar_features, survey_features, interval_features = [], [], []
    for h in range(holes):
        name = f"H{h:05d}"
        x, y = origin + rng.uniform(500, bench_data.SIDE - 500, 2)
        azimuth, incl, depth = rng.uniform(0, 360), rng.uniform(-85, -45), rng.uniform(200, 600)
        f = QgsFeature()
        f.setGeometry(QgsGeometry(QgsPoint(x, y, 500.0)))
        f.setAttributes([name, azimuth, incl, depth])
        collar_features.append(f)
        for k, station in enumerate(np.linspace(0, depth, 50)):
            f = QgsFeature()
            f.setAttributes([name, float(station), azimuth + 0.2 * k, incl + 0.1 * k])
            survey_features.append(f)
        cuts = np.sort(rng.uniform(0, depth, 19))
        for top, bottom in zip(np.r_[0.0, cuts], np.r_[cuts, depth]):
            f = QgsFeature()
            f.setAttributes([name, float(top), float(bottom), f"L{rng.integers(0, 8)}"])
            interval_features.append(f)
    collars.dataProvider().addFeatures(collar_features)
    surveys.dataProvider().addFeatures(survey_features)
    intervals.dataProvider().addFeatures(interval_features)
    lines = QgsVectorLayer(
        f"LineString?crs=EPSG:{bench_data.EPSG}&field=name:string", "l", "memory"
    )
    features = []
    for i in range(100):
        f = QgsFeature()
        f.setGeometry(
            QgsGeometry.fromWkt(
                "LINESTRING("
                + ", ".join(f"{x} {y}" for x, y in bench_data.line_vertices(rng))
                + ")"
            )
        )
        f.setAttributes([f"S{i}"])
        features.append(f)
    lines.dataProvider().addFeatures(features)
    return lines, collars, surveys, intervals


def main():
    app, provider = bench_profile.start_qgis()  # keep the provider alive
    import processing

    print(f"{'holes':>7}{'stations':>10}{'intervals':>11}{'lines':>7}{'seconds':>9}{'drawn':>7}")
    for holes in (500, 2000):
        lines, collars, surveys, intervals = tables(holes)
        best = None
        for _repeat in range(2):
            started = time.perf_counter()
            result = processing.run(
                "sectionwright:projectboreholes",
                {
                    **P.lines(lines),
                    **P.boreholes(collars, surveys, intervals),
                    "MAX_DISTANCE": 250,
                    **P.memory("OUTPUT", "OUTPUT_INTERVALS", "OUTPUT_TRACES"),
                },
            )
            seconds = time.perf_counter() - started
            best = seconds if best is None else min(best, seconds)
        print(
            f"{holes:>7}{surveys.featureCount():>10}{intervals.featureCount():>11}"
            f"{lines.featureCount():>7}{best:>9.2f}{result['OUTPUT'].featureCount():>7}"
        )
    app.exitQgis()


if __name__ == "__main__":
    main()
