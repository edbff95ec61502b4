"""Benchmark of carrying attitudes onto many section lines.

    .venv/bin/python benchmarks/bench_attitudes.py

Extreme density: 100,000 attitudes onto 1,000 section lines of 15 km (2–4
vertices) in a 20 km square, MAX_DISTANCE 500 m (~40 candidate lines per
point); and 10,000 and 100,000 attitudes onto 50 lines, so that growth
in points (at one density) and in line density show apart. Measured
side by side in one run: Sectionwright's core (perpendicular and along
strike), the same through processing.run with temporary outputs, and the
straightforward shapely approach (tree query within reach + distance +
line_locate_point on every pair) as a reference.
"""

import sys
import time
from pathlib import Path

import numpy as np
import shapely

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
import bench_data  # noqa: E402
import bench_profile  # noqa: E402

REACH = 500.0


def scenario(points, lines, seed=7):
    rng = np.random.default_rng(seed)
    coords = [bench_data.line_vertices(rng) for _ in range(lines)]
    xy = np.array(bench_data.ORIGIN) + rng.uniform(0, bench_data.SIDE, (points, 2))
    dip_direction = rng.uniform(0, 360, points)
    dip = rng.uniform(5, 80, points)
    return coords, xy, dip_direction, dip


def best_of(repeat, function):
    times = []
    for _ in range(repeat):
        started = time.perf_counter()
        result = function()
        times.append(time.perf_counter() - started)
    return min(times), result


def core(coords, xy, dip_direction, dip, method):
    from sectionwright.algorithms.core.carry import CarryOptions, carry_attitudes
    from sectionwright.algorithms.core.projection import SectionNetwork

    network = SectionNetwork(coords, 2 * REACH)
    record = carry_attitudes(
        network,
        xy,
        np.full(len(xy), 500.0),
        dip_direction,
        dip,
        CarryOptions(method=method, max_distance=REACH),
    )
    return int((record["line"] >= 0).sum())


def shapely_reference(coords, xy):
    lines = np.array([shapely.LineString(c) for c in coords], dtype=object)
    points = shapely.points(xy)
    point, line = shapely.STRtree(lines).query(points, predicate="dwithin", distance=REACH)
    distance = shapely.distance(points[point], lines[line])
    order = np.lexsort((distance, point))
    first = order[np.r_[True, point[order][1:] != point[order][:-1]]]
    shapely.line_locate_point(lines[line[first]], points[point[first]])
    return len(first)


def layers(coords, xy, dip_direction, dip, z=None):
    """Memory layers of the section lines and the attitude points; with
    ``z`` the points are 3-D, so that every carried attitude has an
    elevation and gets its dip tick."""
    from qgis.core import QgsFeature, QgsGeometry, QgsPoint, QgsPointXY, QgsVectorLayer

    lines = QgsVectorLayer("LineString?crs=EPSG:32633&field=name:string", "l", "memory")
    features = []
    for i, c in enumerate(coords):
        f = QgsFeature()
        f.setGeometry(QgsGeometry.fromPolylineXY([QgsPointXY(x, y) for x, y in c]))
        f.setAttributes([f"S{i}"])
        features.append(f)
    lines.dataProvider().addFeatures(features)
    kind = "Point" if z is None else "PointZ"
    uri = f"{kind}?crs=EPSG:32633&field=az:double&field=dip:double"
    points = QgsVectorLayer(uri, "p", "memory")
    heights = [None] * len(xy) if z is None else z.tolist()
    features = []
    for (x, y), h, a, d in zip(xy.tolist(), heights, dip_direction.tolist(), dip.tolist()):
        f = QgsFeature()
        f.setGeometry(QgsGeometry(QgsPoint(x, y) if h is None else QgsPoint(x, y, h)))
        f.setAttributes([a, d])
        features.append(f)
    points.dataProvider().addFeatures(features)
    return lines, points


def parameters(lines, points):
    """projectattitudes on the benchmark layers, temporary outputs."""
    return {
        "INPUT": lines,
        "LINE_ID_FIELD": "name",
        "ATTITUDES": points,
        "CONVENTION": 0,
        "AZIMUTH_FIELD": "az",
        "DIP_FIELD": "dip",
        "MAX_DISTANCE": REACH,
        "OUTPUT": "memory:",
        "OUTPUT_TICKS": "memory:",
    }


def through_processing(coords, xy, dip_direction, dip, z=None):
    """processing.run on memory layers (see layers)."""
    import processing

    lines, points = layers(coords, xy, dip_direction, dip, z)

    def run():
        result = processing.run("sectionwright:projectattitudes", parameters(lines, points))
        return result["OUTPUT"].featureCount()

    return run


def main():
    app, provider = bench_profile.start_qgis()  # keep the provider alive
    print(f"{'points':>8}{'lines':>7}  {'method':<36}{'seconds':>9}{'carried':>9}{'µs/point':>10}")
    seconds_of = {}
    for points, lines in ((10_000, 50), (100_000, 50), (100_000, 1_000)):
        coords, xy, dip_direction, dip = scenario(points, lines)
        # Each row builds what it needs when its turn comes: the QGIS layers
        # of the last row would otherwise slow the others (garbage collector).
        rows = [
            ("core, perpendicular", lambda: lambda: core(coords, xy, dip_direction, dip, 0)),
            ("core, along strike", lambda: lambda: core(coords, xy, dip_direction, dip, 1)),
            ("shapely reference (perpendicular)", lambda: lambda: shapely_reference(coords, xy)),
            (
                "processing.run, perpendicular",
                lambda: through_processing(coords, xy, dip_direction, dip),
            ),
        ]
        if lines == 1_000:
            heights = np.random.default_rng(11).uniform(100, 900, points)
            rows.append(
                (
                    "processing.run, 3-D points (ticks)",
                    lambda: through_processing(coords, xy, dip_direction, dip, heights),
                )
            )
        for name, prepare in rows:
            seconds, carried = best_of(1 if "processing" in name else 3, prepare())
            seconds_of[(points, lines, name)] = seconds
            print(
                f"{points:>8}{lines:>7}  {name:<36}{seconds:>9.3f}{carried:>9}"
                f"{1e6 * seconds / points:>10.2f}"
            )
    for points, lines, name in (
        (100_000, 50, "processing.run, perpendicular"),
        (100_000, 1_000, "processing.run, perpendicular"),
        (100_000, 1_000, "processing.run, 3-D points (ticks)"),
    ):
        whole = seconds_of[(points, lines, name)]
        core_seconds = seconds_of[(points, lines, "core, perpendicular")]
        targeted = lines == 1_000 and name.endswith("perpendicular")
        goal = " (targets: < 2 s, ≤ 1.8)" if targeted else ""
        print(
            f"{points} attitudes onto {lines} lines, {name[16:]}: {whole:.2f} s, "
            f"{whole / core_seconds:.2f}× the core's time{goal}"
        )
    app.exitQgis()


if __name__ == "__main__":
    main()
