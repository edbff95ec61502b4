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
        layer.setDataSource(f"{gpkg}|layername={table}", layer.name(), "ogr")
        layer.setRenderer(renderer)
        if labeling is not None:
            layer.setLabeling(labeling)
            layer.setLabelsEnabled(True)


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
        QgsVectorLayer,
    )

    from sectionwright.algorithms.outputs import sheet_styles, styles
    from sectionwright.algorithms.outputs.section_space import section_crs

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

    def values(layer, field):
        return [str(v) for v in layer.uniqueValues(layer.fields().lookupField(field))]

    root = project.layerTreeRoot()
    map_group = root.addGroup("Tarrowgill map")
    fence_group = root.addGroup("Sections in 3-D (fence, for the 3-D map view)")
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
    units.setRenderer(styles.unit_fill_renderer(values(units, "unit"), "unit"))
    dem = add(demo / "dem.tif", None, "DEM", map_group, provider_name="gdal")
    add(results, "profile_line", "Profile lines (3-D, M = chainage)", map_group)
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
    add(
        results,
        "trend",
        "Suggested section line (structural trend)",
        trend_group,
        renderer=styles.section_line_renderer(),
    )
    add(results, "trend_lines", "Section lines checked against the trend", trend_group)
    add(results, "attitude_domains", "Attitudes with dip domains", trend_group)
    domains = add(results, "domains", "Dip domains", trend_group)
    engineering = section_crs()
    view = {}
    for layer_name, name, renderer in (
        ("profile_section", "Ground surface", styles.profile_renderer()),
        ("geology_strip", "Geology strip", None),
        ("attitude_ticks", "Dip ticks", styles.tick_renderer()),
        ("crossings_view", "Contacts and boundaries", styles.crossing_renderer()),
        ("boreholes", "Boreholes", styles.hole_renderer()),
        ("borehole_intervals", "Logged intervals", None),
        ("form_lines", "Form lines (kink construction)", styles.form_line_renderer("kind")),
        ("axial_surfaces", "Axial surfaces", styles.axis_renderer()),
    ):
        view[layer_name] = add(results, layer_name, name, view_group, renderer=renderer)
        view[layer_name].setCrs(engineering)
    strip = view["geology_strip"]
    strip.setRenderer(styles.unit_strip_renderer(values(strip, "unit"), "unit"))
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
