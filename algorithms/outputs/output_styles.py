"""Every output styled when it loads, by one table: (algorithm id, output
name) → a function that styles the layer. The same table serves the three
ways an output reaches a geologist's eyes:

- the algorithm's dialog and ``processing.runAndLoadResults`` (a layer
  post-processor, attached in ``SectionwrightAlgorithm.postProcessAlgorithm``);
- a GeoPackage written by ``qgis_process`` and opened later (the style is
  saved into the GeoPackage as the layer's default style).

Section-view layers are put into their own group, left unticked: the main
map canvas does not draw them (its CRS is the map's), the section viewer
panel does. A new output joins with one line in ``OUTPUT_STYLES``.
"""

from qgis.core import (
    QgsProcessingLayerPostProcessorInterface,
    QgsProviderRegistry,
    QgsSingleSymbolRenderer,
)

from ..compat.qgis_compat import geometry_kind
from ..compat.qgis_compat import save_default_style as save_style_inside
from . import fields as F
from . import styles
from .section_space import is_section_view

SECTION_VIEW_GROUP = "Section views (shown in the section viewer)"
ANY_ALGORITHM = "*"


def _renderer(make):
    def style(layer):
        layer.setRenderer(make())

    return style


def _by_values(make, field):
    """A categorised renderer over the values the layer holds in ``field``."""

    def style(layer):
        index = layer.fields().lookupField(field)
        values = layer.uniqueValues(index) if index >= 0 else []
        layer.setRenderer(make(sorted({str(v) for v in values if _text(v)}), field))

    return style


def _text(value):
    return value is not None and str(value) not in ("", "NULL")


def _attitudes(layer):
    if layer.fields().lookupField(F.STRIKE) < 0 or geometry_kind(layer) != "point":
        return
    layer.setRenderer(styles.strike_dip_renderer(F.STRIKE, F.DIP))
    layer.setLabeling(styles.dip_labels(F.DIP))
    layer.setLabelsEnabled(True)


def _skipped(layer):
    kind = geometry_kind(layer)
    if kind != "none":
        layer.setRenderer(styles.skipped_renderer(kind))


def _fence(layer):
    """A section-view layer stood up on the map: ink lines, small dots or
    outlined faces, as its geometry is."""
    kind = geometry_kind(layer)
    if kind == "line":
        layer.setRenderer(styles.profile_line_renderer())
    elif kind == "point":
        layer.setRenderer(styles.profile_point_renderer())
    elif kind == "polygon":
        layer.setRenderer(QgsSingleSymbolRenderer(styles.fence_face_symbol()))


def _crossings(layer):
    layer.setRenderer(styles.crossing_renderer())


OUTPUT_STYLES = {
    ("profile", "OUTPUT"): _renderer(styles.profile_point_renderer),
    ("profile", "OUTPUT_LINE"): _renderer(styles.profile_line_renderer),
    ("profile", "OUTPUT_SECTION"): _renderer(styles.profile_renderer),
    ("projectattitudes", "OUTPUT"): _attitudes,
    ("projectattitudes", "OUTPUT_TICKS"): _renderer(styles.tick_renderer),
    ("projectattitudes", "OUTPUT_CONNECTORS"): _renderer(styles.connector_renderer),
    ("normalizeattitudes", "OUTPUT"): _attitudes,
    ("geologycrossings", "OUTPUT"): _crossings,
    ("geologycrossings", "OUTPUT_INTERVALS"): _by_values(styles.unit_strip_renderer, F.UNIT),
    ("projectboreholes", "OUTPUT"): _renderer(styles.hole_renderer),
    ("projectboreholes", "OUTPUT_INTERVALS"): _by_values(styles.code_interval_renderer, F.CODE),
    ("projectboreholes", "OUTPUT_TRACES"): _renderer(styles.trace_renderer),
    ("structuraltrend", "OUTPUT"): _renderer(styles.suggested_line_renderer),
    ("structuraltrend", "OUTPUT_LINES"): _renderer(lambda: styles.misfit_renderer(F.MISFIT)),
    ("dipdomains", "OUTPUT"): _attitudes,
    ("formlines", "OUTPUT"): _renderer(lambda: styles.form_line_renderer(F.KIND)),
    ("formlines", "OUTPUT_AXES"): _renderer(styles.axis_renderer),
    ("sectionsin3d", "OUTPUT"): _fence,
    (ANY_ALGORITHM, "SKIPPED"): _skipped,
}


def style_for(algorithm_id, output_name):
    return OUTPUT_STYLES.get((algorithm_id, output_name)) or OUTPUT_STYLES.get(
        (ANY_ALGORITHM, output_name)
    )


def apply_style(layer, algorithm_id, output_name):
    """Styles ``layer`` as the output ``output_name`` of ``algorithm_id``;
    False when the table has no style for it."""
    style = style_for(algorithm_id, output_name)
    if style is None or layer is None or not layer.isValid():
        return False
    style(layer)
    layer.triggerRepaint()
    return True


def into_section_view_group(layer, project):
    """Moves a section-view layer's node into the (unticked) section-view
    group of ``project``'s layer tree."""
    root = project.layerTreeRoot()
    node = root.findLayer(layer.id())
    if node is None or not is_section_view(layer.crs()):
        return
    group = root.findGroup(SECTION_VIEW_GROUP)
    if group is None:
        group = root.insertGroup(0, SECTION_VIEW_GROUP)
        group.setItemVisibilityChecked(False)
    if node.parent() is group:
        return
    group.insertChildNode(0, node.clone())
    node.parent().removeChildNode(node)


class StyleOnLoad(QgsProcessingLayerPostProcessorInterface):
    """Styles an output as Processing loads it into the project."""

    # Processing holds post-processors by pointer, and the algorithm copy
    # that made them is gone before the layers load: one per output, kept.
    _kept = {}

    def __init__(self, algorithm_id, output_name):
        super().__init__()
        self.algorithm_id = algorithm_id
        self.output_name = output_name

    @classmethod
    def kept(cls, algorithm_id, output_name):
        key = (algorithm_id, output_name)
        if key not in cls._kept:
            cls._kept[key] = cls(algorithm_id, output_name)
        return cls._kept[key]

    def postProcessLayer(self, layer, context, feedback):  # noqa: N802 (QGIS API)
        apply_style(layer, self.algorithm_id, self.output_name)
        project = context.project()
        if project is not None:
            into_section_view_group(layer, project)


def geopackage_of(destination):
    """The GeoPackage file a sink destination writes, or None."""
    parts = QgsProviderRegistry.instance().decodeUri("ogr", destination)
    path = str(parts.get("path") or "")
    return path if path.lower().endswith(".gpkg") else None


def save_default_style(destination, algorithm_id, output_name):
    """Writes the output's style into its GeoPackage as the layer's default
    style, so that QGIS draws it so whenever the file is opened."""
    from qgis.core import QgsVectorLayer

    layer = QgsVectorLayer(destination, output_name, "ogr")
    if not apply_style(layer, algorithm_id, output_name):
        return False
    save_style_inside(layer, layer.name(), f"Sectionwright {algorithm_id} {output_name}")
    return True
