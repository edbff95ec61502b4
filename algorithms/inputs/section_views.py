"""The project's section-view layers, as the section viewer and the sheet's
dialog read them: which sections they hold, each section's exaggeration,
one section's layers filtered out of them, and the layers a sheet needs."""

from qgis.core import (
    QgsExpression,
    QgsFeatureRequest,
    QgsMemoryProviderUtils,
    QgsProject,
    QgsRectangle,
    QgsVectorLayer,
)

from ..compat.qgis_compat import geometry_kind
from ..outputs import fields as F
from ..outputs.section_space import is_section_view
from .section_lines import obvious_label_field

# What each sheet input looks like among section-view layers: its geometry
# and the fields only it has.
SHEET_INPUTS = (
    ("PROFILE", "line", (F.MIN_ELEVATION, F.LENGTH)),
    ("INTERVALS", "line", (F.UNIT, F.CHAINAGE_FROM)),
    ("TICKS", "line", (F.APPARENT_DIP, F.PLOT_DIP)),
    ("BOREHOLE_INTERVALS", "line", (F.HOLE, F.FROM, F.CODE)),
    ("BOREHOLES", "line", (F.HOLE, F.DEPTH)),
    ("FORM_LINES", "line", (F.KIND, F.UNIT_ABOVE)),
    ("AXES", "line", (F.AXIS_DIP, F.DIP_LEFT)),
    ("CROSSINGS", "point", (F.KIND,)),
)


def section_view_layers(project=None):
    """The project's vector layers in the section view that carry a
    ``section`` field, in layer-tree order (top first)."""
    project = project or QgsProject.instance()
    layers = []
    for node in project.layerTreeRoot().findLayers():
        layer = node.layer()
        if (
            isinstance(layer, QgsVectorLayer)
            and layer.isValid()
            and is_section_view(layer.crs())
            and layer.fields().lookupField(F.SECTION) >= 0
            and not layer.subsetString()  # per-section copies of sheets
            and layer not in layers
        ):
            layers.append(layer)
    return layers


def section_labels(layers):
    labels = set()
    for layer in layers:
        values = layer.uniqueValues(layer.fields().lookupField(F.SECTION))
        labels.update(str(v) for v in values if v is not None and str(v) not in ("", "NULL"))
    return sorted(labels)


def section_expression(label):
    return f'"{F.SECTION}" = {QgsExpression.quotedValue(label)}'


def exaggeration(layers, label):
    """The section's vertical exaggeration, from the first layer that has it."""
    request = QgsFeatureRequest().setFilterExpression(section_expression(label))
    for layer in layers:
        if layer.fields().lookupField(F.EXAGGERATION) < 0:
            continue
        for feature in layer.getFeatures(request):
            value = feature[F.EXAGGERATION]
            if value is not None and str(value) != "NULL":
                return float(value)
    return None


def one_section(layers, label):
    """Layers showing only section ``label`` of ``layers``, each with its
    source's style: filtered clones, or for temporary (memory) layers a copy
    of that section's features."""
    return [_section_of(layer, label) for layer in layers]


def _section_of(layer, label):
    if layer.providerType() != "memory":
        clone = layer.clone()
        clone.setSubsetString(section_expression(label))
        return clone
    # A memory layer's clone is rebuilt from its URI, whose CRS QGIS then
    # tries to transform; a fresh layer in the section view's CRS is not.
    copy = QgsMemoryProviderUtils.createMemoryLayer(
        layer.name(), layer.fields(), layer.wkbType(), layer.crs()
    )
    # Its extent is worked out in WGS 84 as features come in.
    copy.setTransformContext(layer.transformContext())
    request = QgsFeatureRequest().setFilterExpression(section_expression(label))
    copy.dataProvider().addFeatures(list(layer.getFeatures(request)))
    copy.updateExtents()
    copy.setRenderer(layer.renderer().clone())
    if layer.labeling() is not None:
        copy.setLabeling(layer.labeling().clone())
        copy.setLabelsEnabled(layer.labelsEnabled())
    return copy


def extent_of(layers, margin=0.06):
    box = None
    for layer in layers:
        if layer.featureCount():
            if box is None:
                box = QgsRectangle(layer.extent())
            else:
                box.combineExtentWith(layer.extent())
    if box is None:
        return None
    grow_x, grow_y = margin * box.width() or 1.0, 2 * margin * box.height() or 1.0
    return QgsRectangle(
        box.xMinimum() - grow_x,
        box.yMinimum() - grow_y,
        box.xMaximum() + grow_x,
        box.yMaximum() + grow_y,
    )


def sheet_inputs(layers):
    """{sheet parameter: layer} for the section-view layers that fit one."""
    chosen = {}
    for layer in layers:
        names = set(layer.fields().names())
        for parameter, kind, needs in SHEET_INPUTS:
            if parameter not in chosen and geometry_kind(layer) == kind and set(needs) <= names:
                chosen[parameter] = layer
                break
    return chosen


def section_line_layers(project=None):
    """Map layers of lines with an obvious label field: the section lines."""
    project = project or QgsProject.instance()
    found = []
    for layer in project.mapLayers().values():
        if (
            isinstance(layer, QgsVectorLayer)
            and layer.isValid()
            and geometry_kind(layer) == "line"
            and not is_section_view(layer.crs())
            and not layer.subsetString()
            and obvious_label_field(layer.fields().names())
        ):
            found.append(layer)
    return sorted(found, key=lambda layer: layer.name())


def line_feature(lines, label):
    """(layer, label field, feature) of the section line labelled ``label``."""
    for layer in lines:
        field = obvious_label_field(layer.fields().names())
        request = QgsFeatureRequest().setFilterExpression(
            f"{QgsExpression.quotedColumnRef(field)} = {QgsExpression.quotedValue(label)}"
        )
        feature = next(layer.getFeatures(request), None)
        if feature is not None:
            return layer, field, feature
    return None
