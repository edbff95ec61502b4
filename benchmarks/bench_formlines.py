"""Benchmark of sectionwright:formlines.

    .venv/bin/python benchmarks/bench_formlines.py

100 sections of 15 km (ground sampled every 10 m), each with 40 dips and 20
contacts of a folded sequence, through processing.run with temporary
outputs (form lines, axes, thickness table, skipped), kink and arc, best of
2; then the kink run with 10, 20, 40 and 80 dips per section, to show how
the time per section grows with the dips.
"""

import sys
import time
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
import bench_profile  # noqa: E402

SECTIONS = 100
LENGTH = 15000.0
STEP = 10.0
CONTACTS = 20
WAVELENGTH = 4000.0
AMPLITUDE = 400.0


def layers(dips_per_section, seed=7):
    """Profile (section view), attitudes and crossings of SECTIONS sections
    across a sinusoidal fold under hilly ground."""
    from qgis.core import (
        QgsCoordinateReferenceSystem,
        QgsFeature,
        QgsGeometry,
        QgsPointXY,
        QgsVectorLayer,
    )

    from sectionwright.algorithms.outputs.section_space import SECTION_CRS_WKT

    rng = np.random.default_rng(seed)
    profile = QgsVectorLayer("LineString?field=section:string&field=ve:double", "p", "memory")
    profile.setCrs(QgsCoordinateReferenceSystem.fromWkt(SECTION_CRS_WKT))
    fields = (
        "field=section:string&field=chainage:double&field=elev:double&field=app_dip:double"
        "&field=dips_to:string&field=dip:double&field=dip_dir:double&field=line_az:double"
        "&field=app_dip_sd:double"
    )
    attitudes = QgsVectorLayer(f"Point?crs=EPSG:32633&{fields}", "a", "memory")
    crossings = QgsVectorLayer(
        "Point?crs=EPSG:32633&field=section:string&field=chainage:double&field=elev:double"
        "&field=kind:string&field=unit_prev:string&field=unit_next:string",
        "c",
        "memory",
    )
    x = np.arange(0.0, LENGTH + STEP / 2, STEP)
    profile_features, attitude_features, crossing_features = [], [], []
    for s in range(SECTIONS):
        phase = rng.uniform(0, 2 * np.pi)
        ground = 600 + 80 * np.sin(x / 900 + phase) + 30 * np.sin(x / 230)
        feature = QgsFeature()
        feature.setGeometry(
            QgsGeometry.fromPolylineXY([QgsPointXY(a, b) for a, b in zip(x, ground)])
        )
        feature.setAttributes([f"S{s}", 1.0])
        profile_features.append(feature)
        at = np.sort(rng.uniform(0, LENGTH, dips_per_section))
        slope = AMPLITUDE * 2 * np.pi / WAVELENGTH * np.cos(2 * np.pi * at / WAVELENGTH + phase)
        dip = np.degrees(np.arctan(np.abs(slope)))
        for c, d, sl in zip(at, dip, slope):
            feature = QgsFeature()
            feature.setGeometry(QgsGeometry.fromPointXY(QgsPointXY(0, 0)))
            to = "start" if sl > 0 else "end"
            feature.setAttributes(
                [f"S{s}", float(c), float(np.interp(c, x, ground)), float(d), to, float(d),
                 90.0 if to == "end" else 270.0, 90.0, 2.0]
            )  # fmt: skip
            attitude_features.append(feature)
        at = np.sort(rng.uniform(0, LENGTH, CONTACTS))
        for k, c in enumerate(at):
            feature = QgsFeature()
            feature.setGeometry(QgsGeometry.fromPointXY(QgsPointXY(0, 0)))
            before, after = (f"U{k % 2}", f"U{(k + 1) % 2}")
            feature.setAttributes(
                [f"S{s}", float(c), float(np.interp(c, x, ground)), "unit boundary", before, after]
            )
            crossing_features.append(feature)
    profile.dataProvider().addFeatures(profile_features)
    attitudes.dataProvider().addFeatures(attitude_features)
    crossings.dataProvider().addFeatures(crossing_features)
    return profile, attitudes, crossings


def timed(processing, profile, attitudes, crossings, method):
    best, result = None, None
    for _repeat in range(2):
        started = time.perf_counter()
        result = processing.run(
            "sectionwright:formlines",
            {
                "ATTITUDES": attitudes,
                "CROSSINGS": crossings,
                "PROFILE": profile,
                "METHOD": method,
                "DEPTH": 2000,
                "OUTPUT": "memory:",
                "OUTPUT_AXES": "memory:",
                "OUTPUT_THICKNESS": "memory:",
                "SKIPPED": "memory:",
            },
        )
        elapsed = time.perf_counter() - started
        best = elapsed if best is None else min(best, elapsed)
    return best, result


def main():
    app, provider = bench_profile.start_qgis()  # keep the provider alive
    import processing

    print(
        f"{'method':>7}{'dips/sec':>9}{'sections':>9}{'seconds':>9}{'ms/section':>11}"
        f"{'form lines':>11}{'axes':>7}{'rows':>6}"
    )
    runs = [(0, 40), (1, 40), (0, 10), (0, 20), (0, 80)]
    for method, dips in runs:
        profile, attitudes, crossings = layers(dips)
        seconds, result = timed(processing, profile, attitudes, crossings, method)
        print(
            f"{('kink', 'arc')[method]:>7}{dips:>9d}{SECTIONS:>9d}{seconds:>9.2f}"
            f"{1000 * seconds / SECTIONS:>11.1f}{result['OUTPUT'].featureCount():>11d}"
            f"{result['OUTPUT_AXES'].featureCount():>7d}"
            f"{result['OUTPUT_THICKNESS'].featureCount():>6d}",
            flush=True,
        )


if __name__ == "__main__":
    main()
