"""The demo's QGIS project and its section sheets, after run_demo.py.

    python scripts/make_demo_project.py [DEMO_DIR]     (default: demo/)

Writes ``sections.pdf`` — an overview page and one sheet per section — and
``tarrowgill.qgz``: the demo map styled with Sectionwright's unit colours,
the section-view layers, the sections standing as a 3-D fence over the DEM
(layers with 3-D symbols, for View ▸ New 3D Map View), and the sheets'
print layout with the layers it draws, ready to edit.
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


def fence_renderer(colours=None, field=None, default="#2b2b2b", width=3.0):
    """A 3-D renderer for a fence layer: lines drawn at their own Z
    (altitude clamping absolute), one colour, or one per value of ``field``."""
    import qgis._3d as q3d
    from qgis.core import Qgis
    from qgis.PyQt.QtGui import QColor

    absolute = getattr(getattr(Qgis, "AltitudeClamping", None), "Absolute", None)
    if absolute is None:
        absolute = q3d.Qgs3DTypes.AltClampAbsolute

    def symbol(colour):
        line = q3d.QgsLine3DSymbol()
        line.setRenderAsSimpleLines(True)
        line.setWidth(width)
        line.setAltitudeClamping(absolute)
        material = q3d.QgsPhongMaterialSettings()
        material.setAmbient(QColor(colour))
        material.setDiffuse(QColor(colour))
        # setMaterial became setMaterialSettings in QGIS 3.24.
        (getattr(line, "setMaterialSettings", None) or line.setMaterial)(material)
        return line

    if not colours:
        return q3d.QgsVectorLayer3DRenderer(symbol(default))
    root = q3d.QgsRuleBased3DRenderer.Rule(None)
    for value, colour in colours.items():
        root.appendChild(
            q3d.QgsRuleBased3DRenderer.Rule(symbol(colour.name()), f"\"{field}\" = '{value}'")
        )
    return q3d.QgsRuleBased3DRenderer(root)


def keep_memory_layers(project, gpkg):
    """The sheet's helper layers (hole names, dip labels, end letters …)
    live in memory; written to a GeoPackage and pointed at it, the saved
    project keeps them."""
    from qgis.core import QgsVectorFileWriter

    if gpkg.exists():
        gpkg.unlink()
    for index, layer in enumerate(
        [layer for layer in project.mapLayers().values() if layer.providerType() == "memory"]
    ):
        table = f"sheet_{index:03d}"
        options = QgsVectorFileWriter.SaveVectorOptions()
        options.driverName = "GPKG"
        options.layerName = table
        if gpkg.exists():
            options.actionOnExistingFile = (
                QgsVectorFileWriter.ActionOnExistingFile.CreateOrOverwriteLayer
            )
        error = QgsVectorFileWriter.writeAsVectorFormatV3(
            layer, str(gpkg), project.transformContext(), options
        )[0]
        if error != QgsVectorFileWriter.WriterError.NoError:
            raise RuntimeError(f"could not keep {layer.name()} in {gpkg}")
        renderer, labeling = layer.renderer().clone(), layer.labeling()
        labeling = labeling.clone() if labeling is not None else None
        crs = layer.crs()
        layer.setDataSource(f"{gpkg}|layername={table}", layer.name(), "ogr")
        # The GeoPackage hands back its own spelling of the CRS; the section
        # view's is kept, so that its canvas draws the layer untransformed.
        layer.setCrs(crs)
        layer.setRenderer(renderer)
        if labeling is not None:
            layer.setLabeling(labeling)
            layer.setLabelsEnabled(True)


def name_sheet_layers_by_section(project):
    """The sheet's per-section copies named after their section ("Boreholes,
    section B"): the dialogs' layer lists show every layer of the project.
    The sheet's legends keep the names they were drawn with."""
    import re

    for layer in project.mapLayers().values():
        found = re.search(
            r"\"section\" = '([^']*)'",
            layer.subsetString() if hasattr(layer, "subsetString") else "",
        )
        if found and not layer.name().endswith(f"section {found.group(1)}"):
            layer.setName(f"{layer.name()}, section {found.group(1)}")


def main(demo):
    app, provider = start_qgis()  # keep both alive
    import processing
    import qgis.core
    from qgis.core import (
        QgsCoordinateReferenceSystem,
        QgsProcessingContext,
        QgsProcessingFeedback,
        QgsProject,
        QgsRasterLayer,
        QgsReferencedRectangle,
        QgsVectorLayer,
    )

    from sectionwright.algorithms.outputs import sheet_styles, styles
    from sectionwright.algorithms.outputs.output_styles import SECTION_VIEW_GROUP, apply_style
    from sectionwright.algorithms.outputs.section_space import section_crs

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
    # Planar measures on the map, as chainage is grid distance. The section
    # view measures through the operations the sheet adds to the project.
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

    def values(layer, field):
        return [str(v) for v in layer.uniqueValues(layer.fields().lookupField(field))]

    def add_result(layer_name, name, group, algorithm_id, output_name):
        layer = add(results, layer_name, name, group)
        apply_style(layer, algorithm_id, output_name)
        return layer

    root = project.layerTreeRoot()
    map_group = root.addGroup("Tarrowgill map")
    results_group = root.addGroup("Results on the map")
    data_group = root.addGroup("Field and drilling data")
    fence_group = root.addGroup("Sections in 3-D (fence, for the 3-D map view)")
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
    units.setRenderer(styles.unit_fill_renderer(values(units, "unit"), "unit"))
    dem = add(demo / "dem.tif", None, "DEM", map_group, provider_name="gdal")

    # Every demo input, so that each step can be rerun from its dialog.
    attitudes = add(world, "attitudes", "Attitudes (field notebook)", data_group)
    attitudes.setRenderer(styles.profile_point_renderer())
    add(world, "collars", "Collars", data_group, renderer=styles.collar_renderer())
    add(world, "surveys", "Downhole surveys", data_group)
    add(world, "intervals", "Logged intervals", data_group)
    for layer_name, name, algorithm_id, output_name in (
        ("profile_line", "Profile lines (3-D, M = chainage)", "profile", "OUTPUT_LINE"),
        ("attitudes_clean", "Attitudes (strike and dip)", "normalizeattitudes", "OUTPUT"),
        ("attitudes", "Attitudes carried to the sections", "projectattitudes", "OUTPUT"),
        ("attitude_connectors", "Carried from … to", "projectattitudes", "OUTPUT_CONNECTORS"),
        ("geology_crossings", "Geology crossings", "geologycrossings", "OUTPUT"),
        ("borehole_traces", "Borehole traces", "projectboreholes", "OUTPUT_TRACES"),
    ):
        add_result(layer_name, name, results_group, algorithm_id, output_name)
    colours = sheet_styles.palette(values(units, "unit"))
    for layer_name, name, renderer in (
        ("fence_ground", "Ground (3-D)", fence_renderer(width=2.0)),
        ("fence_strip", "Geology strip (3-D)", fence_renderer(colours, "unit", width=6.0)),
        ("fence_boreholes", "Boreholes (3-D)", fence_renderer(width=2.0)),
        ("fence_intervals", "Logged intervals (3-D)", fence_renderer(colours, "code", width=5.0)),
        ("fence_form_lines", "Form lines (3-D)", fence_renderer(default="#5e5e5e", width=1.5)),
        ("fence_axes", "Axial surfaces (3-D)", fence_renderer(default="#8e2b1f", width=1.5)),
    ):
        fence = add(results, layer_name, name, fence_group)
        fence.setRenderer3D(renderer)
    # QGIS 3.26+ keeps the 3-D view's terrain in the project; 3.22 in the view.
    terrain_provider = getattr(qgis.core, "QgsRasterDemTerrainProvider", None)
    if terrain_provider is not None:
        terrain = terrain_provider()
        terrain.setLayer(dem)
        project.elevationProperties().setTerrainProvider(terrain)
    trend_group = root.addGroup("Structural trend and dip domains")
    for layer_name, name, algorithm_id, output_name in (
        ("trend", "Suggested section line (structural trend)", "structuraltrend", "OUTPUT"),
        ("trend_lines", "Lines checked against the trend", "structuraltrend", "OUTPUT_LINES"),
        ("attitude_domains", "Attitudes with dip domains", "dipdomains", "OUTPUT"),
    ):
        add_result(layer_name, name, trend_group, algorithm_id, output_name)
    domains = add(results, "domains", "Dip domains", trend_group)
    engineering = section_crs()
    view = {}
    for layer_name, name, algorithm_id, output_name in (
        ("attitude_ticks", "Dip ticks", "projectattitudes", "OUTPUT_TICKS"),
        ("crossings_view", "Contacts and boundaries", "geologycrossings", "OUTPUT"),
        ("boreholes", "Boreholes", "projectboreholes", "OUTPUT"),
        ("borehole_intervals", "Logged intervals", "projectboreholes", "OUTPUT_INTERVALS"),
        ("form_lines", "Form lines (kink construction)", "formlines", "OUTPUT"),
        ("axial_surfaces", "Axial surfaces", "formlines", "OUTPUT_AXES"),
        ("profile_section", "Ground surface", "profile", "OUTPUT_SECTION"),
        ("geology_strip", "Geology strip", "geologycrossings", "OUTPUT_INTERVALS"),
    ):
        view[layer_name] = add_result(layer_name, name, view_group, algorithm_id, output_name)
        view[layer_name].setCrs(engineering)
    strip = view["geology_strip"]
    view["borehole_intervals"].setRenderer(sheet_styles.hole_interval_renderer(colours, "code"))

    context = QgsProcessingContext()
    context.setProject(project)
    pdf = demo / "sections.pdf"
    processing.run(
        "sectionwright:sectionsheet",
        {
            "INPUT": sections,
            "LINE_ID_FIELD": "name",
            "PROFILE": view["profile_section"],
            "INTERVALS": strip,
            "TICKS": view["attitude_ticks"],
            "CROSSINGS": view["crossings_view"],
            "BOREHOLES": view["boreholes"],
            "BOREHOLE_INTERVALS": view["borehole_intervals"],
            "FORM_LINES": view["form_lines"],
            "AXES": view["axial_surfaces"],
            "DOMAINS": domains,
            "MAP_LAYERS": [contacts, units],
            "TITLE": "Tarrowgill — demo sections",
            "AUTHOR": "Sectionwright demo",
            "OVERVIEW": True,
            "ADD_LAYOUT": True,
            "OUTPUT": str(pdf),
        },
        context=context,
        feedback=QgsProcessingFeedback(),
    )
    keep_memory_layers(project, demo / "sheet_layers.gpkg")
    name_sheet_layers_by_section(project)
    # Opened, the project shows the map around the section lines.
    around = sections.extent()
    around.grow(0.08 * max(around.width(), around.height()))
    project.viewSettings().setDefaultViewExtent(QgsReferencedRectangle(around, sections.crs()))
    project.write()
    layouts = project.layoutManager().layouts()
    print(
        f"Project with {len(layouts)} layout of "
        f"{layouts[0].pageCollection().pageCount()} pages: {project.fileName()}"
    )
    print(f"Section sheets: {pdf}", flush=True)
    print(
        "3-D: View ▸ New 3D Map View shows the fence layers at their true elevations; "
        "on QGIS 3.22 choose the DEM as terrain in the view's configuration.",
        flush=True,
    )
    # Close every data source (GeoPackages checkpoint their journals), then
    # leave without QGIS's own teardown, which crashes in some releases
    # (3.40) when layouts and layers are destroyed at interpreter exit.
    project.clear()
    del view, sections, contacts, units, strip, context
    gc.collect()
    os._exit(0)


if __name__ == "__main__":
    main(Path(sys.argv[1] if len(sys.argv) > 1 else HERE.parent / "demo").resolve())
