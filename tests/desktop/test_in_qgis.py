"""What a geologist sees in QGIS, with pytest-qgis's interface and canvas:
the demo project opens without an error, every dialog opens, every output
loaded by runAndLoadResults carries the plugin's style, a GeoPackage from
qgis_process carries it inside, and the section viewer draws the ground
where the profile says."""

import sys
from pathlib import Path

import numpy as np
import pytest
from qgis.core import (
    QgsApplication,
    QgsMapRendererSequentialJob,
    QgsProject,
    QgsVectorLayer,
)

sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "scripts"))
import run_demo  # noqa: E402
import run_parameters as P  # noqa: E402

from sectionwright.algorithms import all_algorithms  # noqa: E402

ALGORITHMS = [algorithm.name() for algorithm in all_algorithms()]


@pytest.fixture
def errors():
    """Critical messages logged while the test runs."""
    caught = []

    def note(message, tag, level):
        if int(getattr(level, "value", level)) >= 2:
            caught.append(f"{tag}: {message}")

    log = QgsApplication.messageLog()
    log.messageReceived.connect(note)
    yield caught
    log.messageReceived.disconnect(note)


def test_the_demo_project_opens_on_the_sections_without_an_error(
    qgis_iface, provider, demo_project, errors
):
    project = QgsProject.instance()
    assert project.read(str(demo_project / "tarrowgill.qgz"))
    QgsApplication.processEvents()
    # Also none from the sheets' print layouts, whose section-view maps and
    # scale bars measure in the section view while the project loads.
    assert errors == []
    extent = project.viewSettings().defaultViewExtent()
    sections = project.mapLayersByName("Section lines")[0].extent()
    assert extent.contains(sections) and extent.width() < 3 * sections.width()
    assert project.crs().authid() == "EPSG:32633"
    names = {layer.name() for layer in project.mapLayers().values()}
    assert {"Attitudes (field notebook)", "Collars", "Downhole surveys", "Logged intervals"} <= (
        names
    )
    from sectionwright.algorithms.outputs.output_styles import SECTION_VIEW_GROUP
    from sectionwright.algorithms.outputs.section_space import is_section_view

    root = project.layerTreeRoot()
    for node in root.findLayers():
        if is_section_view(node.layer().crs()):
            assert not node.isVisible(), node.layer().name()
    assert not root.findGroup(SECTION_VIEW_GROUP).itemVisibilityChecked()
    project.clear()


@pytest.fixture
def canvas_as_in_qgis(qgis_iface):
    """The stand-in interface puts every added layer in the canvas at once;
    QGIS's layer-tree bridge shows the visible ones, after the event loop
    turns (so a post-processor can still move a layer out of sight)."""
    from qgis.PyQt.QtCore import QTimer

    project = QgsProject.instance()
    project.layersAdded.disconnect(qgis_iface.addLayers)

    def deferred(*_):
        QTimer.singleShot(0, qgis_iface._set_canvas_layers_from_layer_tree)

    project.layersAdded.connect(deferred)
    yield qgis_iface
    project.layersAdded.disconnect(deferred)
    project.layersAdded.connect(qgis_iface.addLayers)


@pytest.mark.parametrize("name", ALGORITHMS)
def test_every_dialog_opens(qgis_iface, provider, name):
    import processing

    # The interface stand-in has no browser model; the dialog asks for one.
    qgis_iface.browserModel = lambda: None
    dialog = processing.createAlgorithmDialog(f"sectionwright:{name}")
    assert dialog is not None
    dialog.show()
    QgsApplication.processEvents()
    dialog.close()


def _runs(world):
    """Each algorithm as a geologist runs it from its dialog on the demo
    world (run_parameters.py), every output temporary."""
    out = "TEMPORARY_OUTPUT"
    view = {"VERTICAL_EXAGGERATION": 2}
    notebook = {k: v for k, v in P.demo_attitudes(world).items() if k != "MAX_DISTANCE"}
    return {
        "profile": dict(
            P.demo_profile(world),
            **view,
            STEP=50,
            OUTPUT_LINE=out,
            OUTPUT=out,
            OUTPUT_SECTION=out,
            SKIPPED=out,
        ),
        "projectattitudes": dict(
            P.demo_projectattitudes(world),
            **view,
            OUTPUT=out,
            OUTPUT_TICKS=out,
            OUTPUT_CONNECTORS=out,
            SKIPPED=out,
        ),
        "normalizeattitudes": dict(
            notebook, INPUT=notebook.pop("ATTITUDES"), OUTPUT=out, SKIPPED=out
        ),
        "geologycrossings": dict(
            P.demo_geologycrossings(world), **view, OUTPUT=out, OUTPUT_INTERVALS=out, SKIPPED=out
        ),
        "projectboreholes": dict(
            P.demo_projectboreholes(world),
            **view,
            OUTPUT=out,
            OUTPUT_INTERVALS=out,
            OUTPUT_TRACES=out,
            SKIPPED=out,
        ),
    }


def _renderer_xml(layer):
    from qgis.core import QgsReadWriteContext
    from qgis.PyQt.QtXml import QDomDocument

    document = QDomDocument()
    return (
        document.toString()
        if layer.renderer() is None
        else layer.renderer().save(document, QgsReadWriteContext()).text() + layer.renderer().dump()
    )


@pytest.mark.parametrize("name", sorted(_runs("world")))
def test_run_and_load_results_styles_every_output(
    canvas_as_in_qgis, provider, demo_dir, name, errors
):
    import processing

    from sectionwright.algorithms.compat.qgis_compat import geometry_kind
    from sectionwright.algorithms.outputs.output_styles import SECTION_VIEW_GROUP, style_for
    from sectionwright.algorithms.outputs.section_space import is_section_view

    project = QgsProject.instance()
    project.clear()
    results = processing.runAndLoadResults(f"sectionwright:{name}", _runs(demo_dir)[name])
    QgsApplication.processEvents()
    loaded = {
        output: project.mapLayer(value)
        for output, value in results.items()
        if isinstance(value, str) and project.mapLayer(value) is not None
    }
    assert loaded, results
    for output, layer in loaded.items():
        if geometry_kind(layer) == "none":
            continue  # a table: nothing to draw
        assert style_for(name, output) is not None, output
        as_loaded = layer.renderer().dump()
        style_for(name, output)(layer)  # the table's style, made afresh
        assert as_loaded == layer.renderer().dump(), output
        node = project.layerTreeRoot().findLayer(layer.id())
        if is_section_view(layer.crs()):
            assert node.parent().name() == SECTION_VIEW_GROUP and not node.isVisible()
    assert errors == []
    project.clear()


def test_a_geopackage_from_qgis_process_opens_styled(provider, demo_dir, tmp_path):
    from sectionwright.algorithms.outputs.output_styles import style_for

    out = tmp_path / "profile.gpkg"
    run_demo.run_profile(demo_dir, out)
    for table, output in (("profile_section", "OUTPUT_SECTION"), ("profile_line", "OUTPUT_LINE")):
        layer = QgsVectorLayer(f"{out}|layername={table}", table, "ogr")
        expected = QgsVectorLayer(f"{out}|layername={table}", table, "ogr")
        style_for("profile", output)(expected)
        assert layer.renderer().dump() == expected.renderer().dump(), table


def test_the_viewer_draws_the_ground_where_the_profile_says(qgis_iface, provider, demo_project):
    from qgis.PyQt.QtGui import QColor

    from sectionwright.plugin.section_viewer import SectionViewerPanel

    project = QgsProject.instance()
    assert project.read(str(demo_project / "tarrowgill.qgz"))
    panel = SectionViewerPanel(qgis_iface)
    assert panel.section_labels() == ["A", "B", "C", "D"]
    panel.show_section("B")
    assert "exaggeration 2" in panel.caption.text()
    settings = panel.canvas.mapSettings()
    settings.setOutputSize(settings.outputSize().__class__(1200, 500))
    settings.setExtent(panel.canvas.extent())
    settings.setBackgroundColor(QColor("#ffffff"))
    job = QgsMapRendererSequentialJob(settings)
    job.start()
    job.waitForFinished()
    image = job.renderedImage()
    to_pixel = job.mapSettings().mapToPixel()

    profile = next(ly for ly in panel.shown if ly.fields().lookupField("min_elev") >= 0)
    ground = next(profile.getFeatures()).geometry()
    vertices = [(v.x(), v.y()) for v in ground.vertices()]
    picked = vertices[:: max(1, len(vertices) // 25)]
    dark = 0
    for x, y in picked:
        pixel = to_pixel.transform(x, y)
        column, row = int(round(pixel.x())), int(round(pixel.y()))
        window = [
            QColor(image.pixel(c, r)).lightness()
            for c in range(column - 1, column + 2)
            for r in range(row - 2, row + 3)
            if 0 <= c < image.width() and 0 <= r < image.height()
        ]
        dark += bool(window) and min(window) < 90
    # The ground line (ink, over the geology strip) at the profile's own
    # chainage and exaggerated elevation.
    assert dark >= 0.9 * len(picked), (dark, len(picked))
    # And not everywhere: high above the ground the section view is blank.
    top = to_pixel.transform(
        vertices[0][0],
        max(y for _, y in vertices)
        + 0.5 * (panel.canvas.extent().yMaximum() - max(y for _, y in vertices)),
    )
    assert QColor(image.pixel(int(top.x()) + 5, int(top.y()))).lightness() > 200
    assert np.isfinite(settings.scale())
    project.clear()


def test_the_viewer_shows_temporary_outputs(qgis_iface, provider, demo_dir, errors):
    import processing

    from sectionwright.plugin.section_viewer import SectionViewerPanel

    project = QgsProject.instance()
    project.clear()
    processing.runAndLoadResults("sectionwright:profile", _runs(demo_dir)["profile"])
    QgsApplication.processEvents()
    before = len(errors)  # the stand-in canvas draws every layer it is given
    panel = SectionViewerPanel(qgis_iface)
    assert panel.section_labels() == ["A", "B", "C", "D"]
    panel.show_section("C")
    assert [layer.featureCount() for layer in panel.shown] == [1]
    QgsApplication.processEvents()
    assert errors[before:] == []
    panel.close()
    project.clear()


@pytest.mark.parametrize(
    "strike, side", [(0, "east"), (90, "south"), (180, "west"), (270, "north")]
)
def test_the_strike_and_dip_symbol_points_its_dip_tick_down_dip(qgis_app, strike, side):
    """Right-hand rule (common practice): the bed dips to the right of the
    strike, toward strike + 90°; the short stroke marks that side."""
    from qgis.core import QgsFeature, QgsGeometry, QgsMapSettings, QgsPointXY, QgsRectangle
    from qgis.PyQt.QtCore import QSize
    from qgis.PyQt.QtGui import QColor

    from sectionwright.algorithms.outputs import styles

    layer = QgsVectorLayer(
        "Point?crs=EPSG:32633&field=strike:double&field=dip:double", "a", "memory"
    )
    feature = QgsFeature(layer.fields())
    feature.setGeometry(QgsGeometry.fromPointXY(QgsPointXY(0, 0)))
    feature.setAttributes([float(strike), 30.0])
    layer.dataProvider().addFeatures([feature])
    layer.setRenderer(styles.strike_dip_renderer("strike", "dip"))
    settings = QgsMapSettings()
    settings.setLayers([layer])
    settings.setDestinationCrs(layer.crs())
    settings.setExtent(QgsRectangle(-10, -10, 10, 10))
    settings.setOutputSize(QSize(200, 200))
    settings.setOutputDpi(254)  # 10 pixels per millimetre
    settings.setBackgroundColor(QColor("#ffffff"))
    job = QgsMapRendererSequentialJob(settings)
    job.start()
    job.waitForFinished()
    image = job.renderedImage()

    def ink(dx, dy):  # pixels from the centre, y down
        return QColor(image.pixel(100 + dx, 100 + dy)).lightness() < 128

    # The dip stroke is 1.5 mm long from the centre: look 1 mm out each way.
    around = {"north": ink(0, -10), "south": ink(0, 10), "east": ink(10, 0), "west": ink(-10, 0)}
    across = {"north": "south", "south": "north", "east": "west", "west": "east"}
    assert around[side] and not around[across[side]], around
