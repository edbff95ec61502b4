"""The demo's QGIS project and its section sheets, after run_demo.py.

    python scripts/make_demo_project.py [DEMO_DIR]     (default: demo/)

Writes ``tarrowgill.qgz`` — the demo map styled with Sectionwright's unit
colours, the section-view layers, and one print layout per section, ready
to edit — and ``sections.pdf`` with one page per section.
"""

import gc
import os
import sys
from pathlib import Path

from osgeo import ogr

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
from plugin_package import start_qgis  # noqa: E402


def section_view_crossings(gpkg):
    """The geology crossings placed in the section view, as a layer of the
    GeoPackage (so that the project's layouts keep them)."""
    data = ogr.Open(str(gpkg), 1)
    source = data.GetLayerByName("geology_crossings")
    ve = {f.GetField("section"): f.GetField("ve") for f in data.GetLayerByName("profile_section")}
    if data.GetLayerByName("crossings_view") is not None:
        data.DeleteLayer("crossings_view")
    target = data.CreateLayer("crossings_view", None, ogr.wkbPoint)
    for name in ("section", "kind", "unit_prev", "unit_next"):
        target.CreateField(ogr.FieldDefn(name, ogr.OFTString))
    for name in ("chainage", "elev"):
        target.CreateField(ogr.FieldDefn(name, ogr.OFTReal))
    for feature in source:
        if feature.GetField("elev") is None:
            continue
        out = ogr.Feature(target.GetLayerDefn())
        for name in ("section", "kind", "unit_prev", "unit_next", "chainage", "elev"):
            out.SetField(name, feature.GetField(name))
        point = ogr.Geometry(ogr.wkbPoint)
        point.AddPoint_2D(
            feature.GetField("chainage"), feature.GetField("elev") * ve[feature.GetField("section")]
        )
        out.SetGeometry(point)
        target.CreateFeature(out)
    data = None


def main(demo):
    app, provider = start_qgis()  # keep both alive
    import processing
    from qgis.core import (
        QgsCoordinateReferenceSystem,
        QgsPrintLayout,
        QgsProcessingContext,
        QgsProcessingFeatureSource,
        QgsProcessingFeedback,
        QgsProject,
        QgsRasterLayer,
        QgsVectorLayer,
    )

    from sectionwright.algorithms.inputs.section_lines import read_section_parts, working_crs
    from sectionwright.algorithms.outputs import styles
    from sectionwright.algorithms.outputs.section_space import section_crs
    from sectionwright.algorithms.sectionsheet import PAGE_SIZES, SheetBuilder
    from sectionwright.algorithms.sheet.page import add_page

    world, results = demo / "tarrowgill.gpkg", demo / "sections.gpkg"
    section_view_crossings(results)
    project = QgsProject()
    project.setFileName(str(demo / "tarrowgill.qgz"))
    project.setCrs(QgsCoordinateReferenceSystem("EPSG:32633"))

    def add(path, layer_name, name, group, provider_name="ogr", renderer=None):
        layer = (
            QgsVectorLayer(f"{path}|layername={layer_name}", name, provider_name)
            if provider_name == "ogr"
            else QgsRasterLayer(str(path), name)
        )
        if renderer is not None:
            layer.setRenderer(renderer)
        project.addMapLayer(layer, False)
        group.addLayer(layer)
        return layer

    root = project.layerTreeRoot()
    map_group = root.addGroup("Tarrowgill map")
    view_group = root.addGroup("Section views (x = chainage, y = elevation × 2)")
    sections = add(
        world, "sections", "Section lines", map_group, renderer=styles.section_line_renderer()
    )
    contacts = add(
        world,
        "contacts",
        "Contacts and faults",
        map_group,
        renderer=styles.contact_renderer("type"),
    )
    units = add(world, "units", "Units", map_group)
    units.setRenderer(
        styles.unit_fill_renderer(
            [str(v) for v in units.uniqueValues(units.fields().lookupField("unit"))], "unit"
        )
    )
    add(demo / "dem.tif", None, "DEM", map_group, provider_name="gdal")
    trend_group = root.addGroup("Structural trend and dip domains")
    add(
        results,
        "trend",
        "Suggested section line (structural trend)",
        trend_group,
        renderer=styles.section_line_renderer(),
    )
    add(results, "trend_lines", "Section lines checked against the trend", trend_group)
    add(results, "attitude_domains", "Attitudes with dip domains", trend_group)
    add(results, "domains", "Dip domains", trend_group)
    engineering = section_crs()
    view = {}
    for layer_name, name, renderer in (
        ("profile_section", "Ground surface", styles.profile_renderer()),
        ("geology_strip", "Geology strip", None),
        ("attitude_ticks", "Dip ticks", styles.tick_renderer()),
        ("crossings_view", "Contacts and boundaries", styles.crossing_renderer()),
        ("boreholes", "Boreholes", styles.hole_renderer()),
        ("form_lines", "Form lines (kink construction)", styles.form_line_renderer("kind")),
        ("axial_surfaces", "Axial surfaces", styles.axis_renderer()),
    ):
        view[layer_name] = add(results, layer_name, name, view_group, renderer=renderer)
        view[layer_name].setCrs(engineering)
    strip = view["geology_strip"]
    strip.setRenderer(
        styles.unit_strip_renderer(
            [str(v) for v in strip.uniqueValues(strip.fields().lookupField("unit"))], "unit"
        )
    )
    inputs = {
        "INTERVALS": strip,
        "TICKS": view["attitude_ticks"],
        "CROSSINGS": view["crossings_view"],
        "BOREHOLES": view["boreholes"],
    }

    pdf = demo / "sections.pdf"
    processing.run(
        "sectionwright:sectionsheet",
        {
            "INPUT": sections,
            "LINE_ID_FIELD": "name",
            "PROFILE": view["profile_section"],
            "MAP_LAYERS": [contacts, units],
            "TITLE": "Tarrowgill — demo sections",
            "OUTPUT": str(pdf),
            **inputs,
        },
    )

    feedback = QgsProcessingFeedback()
    context = QgsProcessingContext()
    context.setProject(project)
    source = QgsProcessingFeatureSource(sections, context)
    parts = read_section_parts(
        source, "name", working_crs(source, context, feedback), context, feedback
    )
    builder = SheetBuilder(
        view["profile_section"],
        inputs,
        [contacts, units],
        sections.crs(),
        "Tarrowgill — demo sections",
        True,
        feedback,
    )
    sheet_group = root.addGroup("Sheet layers (one set per section)")
    sheet_group.setItemVisibilityChecked(False)
    page_size = PAGE_SIZES[1][1]
    for part in parts:
        section = builder.section(part)
        # The location map's line as a filtered view of the section lines, so
        # that the saved project keeps it.
        line = sections.clone()
        line.setSubsetString(f"\"name\" = '{part.label}'")
        line.setName(f"Section line {part.label}")
        section.location_layers[0] = line
        group = sheet_group.addGroup(f"Section {part.label}")
        for layer in section.section_layers + [line]:
            project.addMapLayer(layer, False)
            group.addLayer(layer)
        layout = QgsPrintLayout(project)
        layout.initializeDefaults()
        layout.setName(f"Section {part.label}")
        layout.pageCollection().page(0).setPageSize("A3", 1)  # landscape
        add_page(layout, 0, page_size, section)
        project.layoutManager().addLayout(layout)
    project.write()
    print(f"Project with {len(parts)} layouts: {project.fileName()}")
    print(f"Section sheets: {pdf}", flush=True)
    # Close every data source (GeoPackages checkpoint their journals), then
    # leave without QGIS's own teardown, which crashes in some releases
    # (3.40) when layouts and layers are destroyed at interpreter exit.
    project.clear()
    del view, inputs, builder, sections, contacts, units, strip, source, context
    gc.collect()
    os._exit(0)


if __name__ == "__main__":
    main(Path(sys.argv[1] if len(sys.argv) > 1 else HERE.parent / "demo").resolve())
