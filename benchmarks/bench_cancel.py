"""How fast Cancel takes effect: each algorithm on the largest workload of its
benchmark, cancelled from another thread (as the dialog's button does) at
several moments of the run; prints the seconds from Cancel to the end of
the run (the target, issue 10: under a second).

    .venv/bin/python benchmarks/bench_cancel.py

Workloads: profile, 50 lines of 15 km on the 5 m DEM every 1 m (750,000
samples, points asked for); geologycrossings, the full map sheet of
bench_geology.py; projectboreholes, 2,000 holes of bench_boreholes.py;
projectattitudes, 100,000 attitudes onto 1,000 lines of bench_attitudes.py.
"""

import sys
import threading
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
import bench_attitudes  # noqa: E402
import bench_boreholes  # noqa: E402
import bench_data  # noqa: E402
import bench_geology  # noqa: E402
import bench_profile  # noqa: E402

sys.path.insert(0, str(HERE.parent / "test_data"))
import run_parameters as P  # noqa: E402

MOMENTS = (0.2, 0.4, 0.6, 0.8)  # when Cancel is pressed, as shares of the whole run


def workloads(data):
    dem = str(data / "dem_5m.tif")
    lines = str(data / "lines.fgb")
    units, contacts, geology_lines = bench_geology.geology(1.0)
    hole_lines, collars, surveys, intervals = bench_boreholes.tables(2000)
    attitude_layers = bench_attitudes.layers(*bench_attitudes.scenario(100_000, 1_000))
    return {
        "profile": {
            **P.lines(lines),
            "DEM": dem,
            "STEP": 1.0,
            **P.memory("OUTPUT_LINE", "OUTPUT", "OUTPUT_SECTION"),
        },
        "geologycrossings": {
            **P.lines(geology_lines),
            "DEM": dem,
            **P.geology(units, contacts),
            **P.memory("OUTPUT", "OUTPUT_INTERVALS"),
        },
        "projectboreholes": {
            **P.lines(hole_lines),
            **P.boreholes(collars, surveys, intervals),
            "MAX_DISTANCE": 250,
            **P.memory("OUTPUT", "OUTPUT_INTERVALS", "OUTPUT_TRACES"),
        },
        "projectattitudes": bench_attitudes.parameters(*attitude_layers),
    }


def run_once(processing, algorithm, parameters, cancel_after=None):
    """(seconds of the whole run, seconds from Cancel to its end or None)."""
    from qgis.core import QgsProcessingException, QgsProcessingFeedback

    feedback = QgsProcessingFeedback()
    pressed = []

    def press():
        pressed.append(time.perf_counter())
        feedback.cancel()

    timer = threading.Timer(cancel_after, press) if cancel_after is not None else None
    started = time.perf_counter()
    if timer:
        timer.start()
    try:
        processing.run(f"sectionwright:{algorithm}", parameters, feedback=feedback)
    except QgsProcessingException:
        pass
    ended = time.perf_counter()
    if timer:
        timer.cancel()
    return ended - started, (ended - pressed[0]) if pressed else None


def main():
    app, provider = bench_profile.start_qgis()  # keep the provider alive
    import processing

    data = bench_data.make(HERE / "data")
    print(f"{'algorithm':<18}{'whole run s':>12}  Cancel at → seconds to stop")
    for algorithm, parameters in workloads(data).items():
        whole, _ = run_once(processing, algorithm, parameters)
        stops = []
        for share in MOMENTS:
            _, latency = run_once(processing, algorithm, parameters, share * whole)
            stops.append(
                f"{share * whole:.1f} s → " + ("done" if latency is None else f"{latency:.2f}")
            )
        print(f"{algorithm:<18}{whole:>12.2f}  " + ", ".join(stops))
    app.exitQgis()


if __name__ == "__main__":
    main()
