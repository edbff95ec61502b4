"""The main job on the Tarrowgill demo world, headless.

    python scripts/run_demo.py [OUT_DIR]     (default: demo/)

Makes the demo world, runs the Sectionwright algorithms on every demo
section line through qgis_process — the topographic profile, the attitudes
carried onto the sections and their dip domains, the map geology along them,
the boreholes, the structural trend with the section azimuth it
recommends, and the form lines below the ground with the thickness check —
writes ``sections.gpkg`` and prints a short summary per section; then
stands every section view up along its line in 3-D (``sectionsin3d``: the
``fence_*`` layers) for QGIS's 3-D map view.
"""

import sys
from pathlib import Path

from osgeo import ogr

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent / "test_data"))
import headless  # noqa: E402
import make_demo  # noqa: E402
import run_parameters as P  # noqa: E402


def run_step(algorithm, parameters, out, work_dir=None, **layers):
    """``sectionwright:algorithm`` through qgis_process, writing each output
    of ``layers`` (output parameter = layer name) into the GeoPackage ``out``."""
    outputs = {parameter: headless.gpkg_layer(out, name) for parameter, name in layers.items()}
    return headless.run(f"sectionwright:{algorithm}", {**parameters, **outputs}, work_dir)


def run_profile(world, out):
    return run_step(
        "profile",
        {**P.demo_profile(world), "VERTICAL_EXAGGERATION": 2},
        out,
        OUTPUT_LINE="profile_line",
        OUTPUT_SECTION="profile_section",
        SKIPPED="profile_skipped",
    )


def run_attitudes(world, out):
    return run_step(
        "projectattitudes",
        {**P.demo_projectattitudes(world), **P.demo_units(world), "VERTICAL_EXAGGERATION": 2},
        out,
        OUTPUT="attitudes",
        OUTPUT_TICKS="attitude_ticks",
        OUTPUT_CONNECTORS="attitude_connectors",
        SKIPPED="attitudes_skipped",
    )


def run_domains(world, out):
    return run_step(
        "dipdomains",
        {"ATTITUDES": f"{out}|layername=attitudes", "ANGLE_TOLERANCE": 10},
        out,
        world / ".headless-qgis",
        OUTPUT="attitude_domains",
        OUTPUT_DOMAINS="domains",
        SKIPPED="domains_skipped",
    )


def run_trend(world, out):
    return run_step(
        "structuraltrend",
        P.demo_structuraltrend(world),
        out,
        world / ".headless-qgis",
        OUTPUT="trend",
        OUTPUT_LINES="trend_lines",
        SKIPPED="trend_skipped",
    )


def run_geology(world, out):
    return run_step(
        "geologycrossings",
        {**P.demo_geologycrossings(world), "TRACE_WINDOW": 1000, "VERTICAL_EXAGGERATION": 2},
        out,
        OUTPUT="geology_crossings",
        OUTPUT_INTERVALS="geology_strip",
        SKIPPED="geology_skipped",
    )


def run_boreholes(world, out):
    return run_step(
        "projectboreholes",
        {**P.demo_projectboreholes(world), "VERTICAL_EXAGGERATION": 2},
        out,
        OUTPUT="boreholes",
        OUTPUT_INTERVALS="borehole_intervals",
        OUTPUT_TRACES="borehole_traces",
        SKIPPED="boreholes_skipped",
    )


# Section views stood up along their lines for the 3-D view: (section-view
# layer, its fence layer), all in sections.gpkg.
FENCES = (
    ("profile_section", "fence_ground"),
    ("geology_strip", "fence_strip"),
    ("boreholes", "fence_boreholes"),
    ("borehole_intervals", "fence_intervals"),
    ("form_lines", "fence_form_lines"),
    ("axial_surfaces", "fence_axes"),
)


def run_fences(world, out):
    """sectionsin3d on every section view; one report per fence layer."""
    return [
        run_step(
            "sectionsin3d",
            {**P.demo_lines(world), "SECTION_LAYER": f"{out}|layername={view}"},
            out,
            world / ".headless-qgis",
            OUTPUT=fence,
        )
        for view, fence in FENCES
    ]


def run_formlines(world, out):
    """Needs the profile, attitudes and geology steps' layers in ``out``."""
    return run_step(
        "formlines",
        {
            "ATTITUDES": f"{out}|layername=attitudes",
            "CROSSINGS": f"{out}|layername=geology_crossings",
            "PROFILE": f"{out}|layername=profile_section",
            "METHOD": 0,
            "DEPTH": 1500,
            "SPACING": 50,
            "VERTICAL_EXAGGERATION": 2,
        },
        out,
        world / ".headless-qgis",
        OUTPUT="form_lines",
        OUTPUT_AXES="axial_surfaces",
        OUTPUT_THICKNESS="unit_thickness",
        SKIPPED="form_lines_skipped",
    )


def count_by_section(layer, condition=lambda feature: True):
    counts = {}
    for feature in layer:
        if condition(feature):
            counts[feature.GetField("section")] = counts.get(feature.GetField("section"), 0) + 1
    return counts


def vertices_by_section(layer):
    """Samples with an elevation: the vertices of each draped profile line."""
    counts = {}
    for feature in layer:
        lines = feature.GetGeometryRef()
        vertices = sum(
            lines.GetGeometryRef(i).GetPointCount() for i in range(lines.GetGeometryCount())
        )
        counts[feature.GetField("section")] = vertices
    return counts


def print_summary(out):
    data = ogr.Open(str(out))
    samples = vertices_by_section(data.GetLayerByName("profile_line"))
    attitudes = data.GetLayerByName("attitudes")
    carried = count_by_section(attitudes)
    flagged = count_by_section(attitudes, lambda f: bool(f.GetField("flags")))
    crossings = data.GetLayerByName("geology_crossings")
    contacts = count_by_section(crossings, lambda f: f.GetField("kind") != "unit boundary")
    crossings.ResetReading()
    boundaries = count_by_section(crossings, lambda f: f.GetField("kind") == "unit boundary")
    holes = count_by_section(data.GetLayerByName("boreholes"))
    domains = count_by_section(data.GetLayerByName("domains"))
    checked = {f.GetField("section"): f for f in data.GetLayerByName("trend_lines")}
    form_lines = count_by_section(data.GetLayerByName("form_lines"))
    changes = count_by_section(
        data.GetLayerByName("unit_thickness"),
        lambda f: "thickness_changes" in (f.GetField("flags") or ""),
    )
    print_trend(data.GetLayerByName("trend"))
    print(
        f"{'section':<8}{'length m':>10}{'samples':>9}{'min elev':>10}{'max elev':>10}"
        f"{'attitudes':>11}{'flagged':>9}{'domains':>9}{'unit bdys':>11}{'contacts':>10}"
        f"{'holes':>7}{'forms':>7}{'thick chg':>10}{'misfit':>8}  advice"
    )
    for feature in data.GetLayerByName("profile_section"):
        label = feature.GetField("section")
        print(
            f"{label:<8}{feature.GetField('length'):>10.1f}{samples[label]:>9d}"
            f"{feature.GetField('min_elev'):>10.1f}{feature.GetField('max_elev'):>10.1f}"
            f"{carried.get(label, 0):>11d}{flagged.get(label, 0):>9d}"
            f"{domains.get(label, 0):>9d}"
            f"{boundaries.get(label, 0):>11d}{contacts.get(label, 0):>10d}"
            f"{holes.get(label, 0):>7d}{form_lines.get(label, 0):>7d}{changes.get(label, 0):>10d}"
            f"{checked[label].GetField('misfit'):>7.0f}°"
            f"  {checked[label].GetField('advice')}"
        )


def print_trend(trend):
    for feature in trend:
        line = feature.GetGeometryRef()
        (x0, y0, *_), (x1, y1, *_) = line.GetPoint(0), line.GetPoint(line.GetPointCount() - 1)
        print(
            f"Structural trend ({feature.GetField('area')}): {feature.GetField('pattern')}, "
            f"fold axis {feature.GetField('axis_tr'):03.0f}/{feature.GetField('axis_pl'):02.0f}, "
            f"recommended section azimuth {feature.GetField('best_az'):.0f}°; suggested line "
            f"from ({x0:.0f}, {y0:.0f}) to ({x1:.0f}, {y1:.0f}), {line.Length():.0f} m"
        )


def main(out_dir):
    world = make_demo.make(out_dir)
    out = world / "sections.gpkg"
    if out.exists():
        out.unlink()
    for title, step in (
        ("Topographic profile", run_profile),
        ("Attitudes carried onto the sections", run_attitudes),
        ("Dip domains and representatives", run_domains),
        ("Geology along the sections", run_geology),
        ("Boreholes on the sections", run_boreholes),
        ("Structural trend", run_trend),
        ("Form lines below the ground", run_formlines),
    ):
        report = step(world, out)
        print(
            f"{title}: "
            + "; ".join(
                line for line in report["log"]["info"] if line.startswith(("Summary:", "Skipped:"))
            )
        )
    fences = run_fences(world, out)
    written = sum(
        int(line.split("written=")[1].split()[0])
        for report in fences
        for line in report["log"]["info"]
        if line.startswith("Summary:")
    )
    print(
        f"Sections in 3-D: {written} features in {len(fences)} fence layers "
        f"({', '.join(fence for _, fence in FENCES)})"
    )
    print_summary(out)
    print(f"\nResults in {out} (section view layers at vertical exaggeration 2).")
    print("Sections are interpretations: have them checked by a qualified geologist.")


if __name__ == "__main__":
    main(Path(sys.argv[1] if len(sys.argv) > 1 else HERE.parent / "demo"))
