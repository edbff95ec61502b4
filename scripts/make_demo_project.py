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
    # The section view's own CRS, as the algorithms write it: a layer
    # without one reads back as an unnamed custom CRS that nothing transforms to.
    target = data.CreateLayer(
        "crossings_view", data.GetLayerByName("profile_section").GetSpatialRef(), ogr.wkbPoint
    )
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
        QgsReferencedRectangle,
        QgsVectorLayer,
    )

    from sectionwright.algorithms.inputs.section_lines import read_section_parts, working_crs
    from sectionwright.algorithms.outputs import styles
    from sectionwright.algorithms.outputs.output_styles import SECTION_VIEW_GROUP, apply_style
    from sectionwright.algorithms.outputs.section_space import section_crs
    from sectionwright.algorithms.sectionsheet import PAGE_SIZES, SheetBuilder
    from sectionwright.algorithms.sheet.page import add_page

    world, results = demo / "tarrowgill.gpkg", demo / "sections.gpkg"
    section_view_crossings(results)
    processing.run(
        "sectionwright:normalizeattitudes",
        {
            "INPUT": f"{world}|layername=attitudes",
            "CONVENTION": 3,
            "TEXT_FIELD": "attitude",
            "OUTPUT": f"ogr:dbname='{results}' table=\"attitudes_clean\" (geom)",
        },
    )
    project = QgsProject()
    project.setFileName(str(demo / "tarrowgill.qgz"))
    project.setCrs(QgsCoordinateReferenceSystem("EPSG:32633"))
    # Planar measures: an ellipsoid would make QGIS look for a transform from
    # the section view to geographic coordinates, and there is none.
    project.setEllipsoid("NONE")

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
    results_group = root.addGroup("Results on the map")
    data_group = root.addGroup("Field and drilling data")
    # Section-view layers are drawn by the section viewer, not by the map
    # canvas (whose CRS is the map's): their group is left unticked.
    view_group = root.addGroup(SECTION_VIEW_GROUP)
    view_group.setItemVisibilityChecked(False)
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

    # Every demo input, so that each step can be rerun from its dialog.
    attitudes = add(world, "attitudes", "Attitudes (field notebook)", data_group)
    attitudes.setRenderer(styles.profile_point_renderer())
    add(world, "collars", "Collars", data_group, renderer=styles.collar_renderer())
    add(world, "surveys", "Downhole surveys", data_group)
    add(world, "intervals", "Logged intervals", data_group)

    def add_result(layer_name, name, group, algorithm_id, output_name):
        layer = add(results, layer_name, name, group)
        apply_style(layer, algorithm_id, output_name)
        return layer

    for layer_name, name, algorithm_id, output_name in (
        ("profile_line", "Profile lines (3-D, M = chainage)", "profile", "OUTPUT_LINE"),
        ("attitudes_clean", "Attitudes (strike and dip)", "normalizeattitudes", "OUTPUT"),
        ("attitudes", "Attitudes carried to the sections", "projectattitudes", "OUTPUT"),
        ("attitude_connectors", "Carried from … to", "projectattitudes", "OUTPUT_CONNECTORS"),
        ("geology_crossings", "Geology crossings", "geologycrossings", "OUTPUT"),
        ("borehole_traces", "Borehole traces", "projectboreholes", "OUTPUT_TRACES"),
    ):
        add_result(layer_name, name, results_group, algorithm_id, output_name)

    trend_group = root.addGroup("Structural trend and dip domains")
    for layer_name, name, algorithm_id, output_name in (
        ("trend", "Suggested section line (structural trend)", "structuraltrend", "OUTPUT"),
        (
            "trend_lines",
            "Section lines checked against the trend",
            "structuraltrend",
            "OUTPUT_LINES",
        ),
        ("attitude_domains", "Attitudes with dip domains", "dipdomains", "OUTPUT"),
        ("domains", "Dip domains", "dipdomains", "OUTPUT_DOMAINS"),
    ):
        add_result(layer_name, name, trend_group, algorithm_id, output_name)
    engineering = section_crs()
    view = {}
    for layer_name, name, algorithm_id, output_name in (
        ("attitude_ticks", "Dip ticks", "projectattitudes", "OUTPUT_TICKS"),
        ("crossings_view", "Contacts and boundaries", "geologycrossings", "OUTPUT"),
        ("boreholes", "Boreholes", "projectboreholes", "OUTPUT"),
        ("borehole_intervals", "Borehole intervals", "projectboreholes", "OUTPUT_INTERVALS"),
        ("profile_section", "Ground surface", "profile", "OUTPUT_SECTION"),
        ("geology_strip", "Geology strip", "geologycrossings", "OUTPUT_INTERVALS"),
        ("form_lines", "Form lines (kink construction)", "formlines", "OUTPUT"),
        ("axial_surfaces", "Axial surfaces", "formlines", "OUTPUT_AXES"),
    ):
        view[layer_name] = add_result(layer_name, name, view_group, algorithm_id, output_name)
        view[layer_name].setCrs(engineering)
    strip = view["geology_strip"]
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
        for layer in section.section_layers:
            # Distinct names, as the dialogs' layer lists show every layer
            # (the sheet's legend keeps the plain ones).
            layer.setName(f"{layer.name()}, section {part.label}")
        project.layoutManager().addLayout(layout)
    # Opened, the project shows the map around the section lines.
    around = sections.extent()
    around.grow(0.08 * max(around.width(), around.height()))
    project.viewSettings().setDefaultViewExtent(QgsReferencedRectangle(around, sections.crs()))
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
