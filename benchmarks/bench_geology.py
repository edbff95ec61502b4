"""Benchmark of sectionwright:geologycrossings on a map sheet's worth of
geology.

    .venv/bin/python benchmarks/bench_geology.py

Full size: 5,000 unit polygons (a Voronoi tiling of a 20 km square, 12
units), 20,000 contact lines (wandering lines of 300–900 m), 100 section
lines of 15 km, on the 5 m benchmark DEM; then half and a quarter of the
geology on the same lines, to show how the time grows with the map. Whole algorithm through
processing.run, temporary outputs, best of 2.
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

sys.path.insert(0, str(HERE.parent / "test_data"))
import run_parameters as P  # noqa: E402


def memory_layer(kind, geometries, fields, rows):
    from qgis.core import QgsFeature, QgsVectorLayer

    from sectionwright.algorithms.outputs.geometry_io import to_qgis

    spec = "&".join(f"field={name}:string" for name in fields)
    layer = QgsVectorLayer(f"{kind}?crs=EPSG:{bench_data.EPSG}&{spec}", kind, "memory")
    features = []
    for geometry, values in zip(geometries, rows):
        feature = QgsFeature()
        feature.setGeometry(to_qgis(geometry))
        feature.setAttributes(list(values))
        features.append(feature)
    layer.dataProvider().addFeatures(features)
    return layer


def geology(scale, seed=3):
    rng = np.random.default_rng(seed)
    origin = np.array(bench_data.ORIGIN)
    side = bench_data.SIDE
    seeds = shapely.multipoints(origin + rng.uniform(0, side, (int(5000 * scale), 2)))
    box = shapely.box(*origin, *(origin + side))
    cells = shapely.intersection(shapely.get_parts(shapely.voronoi_polygons(seeds)), box)
    units = [(f"U{rng.integers(0, 12):02d}",) for _ in cells]
    walks = []
    for _ in range(int(20000 * scale)):
        steps = rng.normal(0, 1, (rng.integers(4, 10), 2)) * rng.uniform(60, 120)
        walks.append(origin + rng.uniform(1000, side - 1000, 2) + np.cumsum(steps, axis=0))
    contacts = shapely.linestrings(
        np.concatenate(walks), indices=np.repeat(np.arange(len(walks)), [len(w) for w in walks])
    )
    kinds = [("fault" if rng.random() < 0.2 else "contact",) for _ in walks]
    lines = [shapely.LineString(bench_data.line_vertices(rng)) for _ in range(100)]
    return (
        memory_layer("Polygon", cells, ["unit"], units),
        memory_layer("LineString", contacts, ["type"], kinds),
        memory_layer("LineString", lines, ["name"], [(f"S{i}",) for i in range(len(lines))]),
    )


def main():
    app, provider = bench_profile.start_qgis()  # keep the provider alive
    import processing

    dem = str(bench_data.make(HERE / "data") / "dem_5m.tif")
    print(
        f"{'scale':>6}{'polygons':>10}{'contacts':>10}{'lines':>7}{'seconds':>9}"
        f"{'crossings':>11}{'intervals':>11}"
    )
    for scale in (0.25, 0.5, 1.0):
        units, contacts, lines = geology(scale)
        best = None
        for _repeat in range(2):
            started = time.perf_counter()
            result = processing.run(
                "sectionwright:geologycrossings",
                {
                    **P.lines(lines),
                    "DEM": dem,
                    **P.geology(units, contacts),
                    **P.memory("OUTPUT", "OUTPUT_INTERVALS"),
                },
            )
            seconds = time.perf_counter() - started
            best = seconds if best is None else min(best, seconds)
        print(
            f"{scale:>6}{units.featureCount():>10}{contacts.featureCount():>10}"
            f"{lines.featureCount():>7}{best:>9.2f}{result['OUTPUT'].featureCount():>11}"
            f"{result['OUTPUT_INTERVALS'].featureCount():>11}"
        )
    app.exitQgis()


if __name__ == "__main__":
    main()
