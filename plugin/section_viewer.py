"""The section viewer: a dock panel with its own map canvas in the section
view's CRS, showing one section at a time from the project's section-view
layers — chosen from a list, or by clicking a section line on the map — with
its exaggeration and the compass direction of its ends, and a button that
makes its sheet."""

from qgis.core import (
    QgsCoordinateReferenceSystem,
    QgsFeature,
    QgsProject,
    QgsVectorLayer,
)
from qgis.gui import QgsDockWidget, QgsMapCanvas, QgsMapToolIdentifyFeature
from qgis.PyQt.QtCore import Qt
from qgis.PyQt.QtGui import QColor
from qgis.PyQt.QtWidgets import (
    QComboBox,
    QHBoxLayout,
    QLabel,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from ..algorithms.compat.qgis_compat import INFO, viewer_canvas_crs
from ..algorithms.core.sheet_scale import end_names
from ..algorithms.inputs import section_views as views
from ..algorithms.outputs.section_space import SECTION_CRS_WKT, add_measuring_operations

TITLE = "Sectionwright section viewer"


class SectionViewerPanel(QgsDockWidget):
    def __init__(self, iface, parent=None):
        super().__init__(TITLE, parent)
        self.setObjectName("SectionwrightSectionViewer")
        self.iface = iface
        self.layers = []  # the project's section-view layers
        self.shown = []  # this section's clones, kept alive while drawn
        self.label = None
        self.map_tool = None

        body = QWidget()
        column = QVBoxLayout(body)
        row = QHBoxLayout()
        row.addWidget(QLabel(self.tr("Section")))
        self.chooser = QComboBox()
        self.chooser.setMinimumWidth(90)
        self.chooser.currentTextChanged.connect(self._chosen)
        row.addWidget(self.chooser, 1)
        self.pick_button = QPushButton(self.tr("Pick on map"))
        self.pick_button.setCheckable(True)
        self.pick_button.setToolTip(self.tr("Click a section line on the map to show it here"))
        self.pick_button.toggled.connect(self._pick_toggled)
        row.addWidget(self.pick_button)
        self.sheet_button = QPushButton(self.tr("Make its sheet…"))
        self.sheet_button.setToolTip(self.tr("Runs Section sheet for this section"))
        self.sheet_button.clicked.connect(self.make_sheet)
        row.addWidget(self.sheet_button)
        column.addLayout(row)
        self.caption = QLabel()
        self.caption.setWordWrap(True)
        column.addWidget(self.caption)
        self.canvas = QgsMapCanvas()
        self.canvas.setCanvasColor(QColor("#ffffff"))
        # From no CRS to the section view (where the release allows it): a
        # canvas asked to change CRS transforms its extent, and no transform
        # reaches the section view.
        self.canvas.setDestinationCrs(QgsCoordinateReferenceSystem())
        self.canvas.setDestinationCrs(
            viewer_canvas_crs(QgsCoordinateReferenceSystem.fromWkt(SECTION_CRS_WKT))
        )
        self.canvas.setMinimumSize(320, 200)
        column.addWidget(self.canvas, 1)
        self.setWidget(body)

        project = QgsProject.instance()
        project.layersAdded.connect(self.refresh)
        project.layersRemoved.connect(self.refresh)
        project.readProject.connect(self.refresh)
        self.refresh()

    # Sections -------------------------------------------------------------

    def section_labels(self):
        return [self.chooser.itemText(i) for i in range(self.chooser.count())]

    def current_section(self):
        return self.label

    def refresh(self, *_):
        """Re-reads the project's section-view layers (layers came or went)."""
        self.layers = views.section_view_layers()
        labels = views.section_labels(self.layers)
        keep = self.label if self.label in labels else (labels[0] if labels else None)
        self.chooser.blockSignals(True)
        self.chooser.clear()
        self.chooser.addItems(labels)
        self.chooser.blockSignals(False)
        self.sheet_button.setEnabled(bool(labels))
        if keep is None:
            self.label = None
            self.shown = []
            self.canvas.setLayers([])
            self.caption.setText(
                self.tr(
                    "No section-view layers in the project yet: run Topographic profile "
                    "(and the other Sectionwright algorithms) first."
                )
            )
        else:
            self.show_section(keep)

    def _chosen(self, label):
        if label:
            self.show_section(label)

    def show_section(self, label):
        """Draws section ``label`` in the panel's canvas."""
        self.label = label
        if self.chooser.currentText() != label:
            self.chooser.blockSignals(True)
            self.chooser.setCurrentText(label)
            self.chooser.blockSignals(False)
        # The project may be new since the last section: the canvas measures
        # in the section view with the project's transform context.
        add_measuring_operations(QgsProject.instance())
        self.shown = views.one_section(self.layers, label)
        self.canvas.setLayers(self.shown)
        extent = views.extent_of(self.shown)
        if extent is not None:
            self.canvas.setExtent(extent)
        self.caption.setText(self._caption(label))
        self.canvas.refresh()

    def _caption(self, label):
        ve = views.exaggeration(self.layers, label)
        parts = [self.tr("Section {}").format(label)]
        parts.append(
            self.tr("vertical exaggeration {:g}× (y = elevation × {:g})").format(ve, ve)
            if ve
            else self.tr("exaggeration not recorded")
        )
        found = views.line_feature(views.section_line_layers(), label)
        if found is not None:
            coords = [(p.x(), p.y()) for p in found[2].geometry().vertices()]
            if len(coords) >= 2:
                start, end = end_names(coords)
                parts.append(self.tr("left end {}, right end {}").format(start, end))
        return " · ".join(parts)

    # Picking a line on the map -------------------------------------------

    def _pick_toggled(self, on):
        canvas = self.iface.mapCanvas()
        if not on:
            if self.map_tool is not None and canvas.mapTool() is self.map_tool:
                canvas.unsetMapTool(self.map_tool)
            return
        lines = views.section_line_layers()
        if not lines:
            self.pick_button.setChecked(False)
            self.iface.messageBar().pushMessage(
                TITLE, self.tr("No section line layer with a label field in the project."), INFO, 5
            )
            return
        self.map_tool = QgsMapToolIdentifyFeature(canvas)
        self.map_tool.setLayer(lines[0])
        self.map_tool.featureIdentified.connect(lambda feature: self.pick(lines[0], feature))
        self.map_tool.deactivated.connect(lambda: self.pick_button.setChecked(False))
        canvas.setMapTool(self.map_tool)

    def pick(self, layer, feature):
        """Shows the section of a section line feature of ``layer``."""
        field = views.obvious_label_field(layer.fields().names())
        label = str(feature[field]) if field else str(feature.id())
        if label in self.section_labels():
            self.show_section(label)
        else:
            self.iface.messageBar().pushMessage(
                TITLE,
                self.tr("Section {} has no section-view layers in the project.").format(label),
                INFO,
                5,
            )

    # The sheet -------------------------------------------------------------

    def sheet_parameters(self):
        """Section sheet parameters for the section shown: its line alone (a
        memory copy), the project's section-view layers as its inputs."""
        found = views.line_feature(views.section_line_layers(), self.label)
        parameters = {name: layer for name, layer in views.sheet_inputs(self.layers).items()}
        if found is not None:
            layer, field, feature = found
            line = QgsVectorLayer(
                f"LineString?crs={layer.crs().authid() or 'EPSG:4326'}",
                f"Section line {self.label}",
                "memory",
            )
            line.setCrs(layer.crs())
            line.dataProvider().addAttributes(layer.fields().toList())
            line.updateFields()
            copy = QgsFeature(line.fields())
            copy.setGeometry(feature.geometry())
            copy.setAttributes(feature.attributes())
            line.dataProvider().addFeatures([copy])
            self.sheet_line = line  # the dialog refers to it by pointer
            parameters.update(INPUT=line, LINE_ID_FIELD=field)
        parameters["TITLE"] = f"Section {self.label}"
        return parameters

    def make_sheet(self):
        import processing

        processing.execAlgorithmDialog("sectionwright:sectionsheet", self.sheet_parameters())

    def closeEvent(self, event):  # noqa: N802 (Qt API)
        self.pick_button.setChecked(False)
        super().closeEvent(event)


def dock_area():
    return Qt.DockWidgetArea.RightDockWidgetArea
