"""The project's section-view layers, as the section viewer and the sheet's
dialog read them: which sections they hold, each section's exaggeration,
one section's layers filtered out of them, the layers a sheet needs, and
the check that they share one exaggeration."""

import math

from qgis.core import (
    QgsExpression,
    QgsFeatureRequest,
    QgsMemoryProviderUtils,
    QgsProcessingException,
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


def exaggerations(layer):
    """The distinct exaggerations a layer is drawn at: its ``ve`` values, or
    for dip ticks (which carry the attitudes' own fields) the ratio
    tan(plot_dip) / tan(app_dip) of ticks that are neither flat nor
    vertical; empty when neither is there."""
    index = layer.fields().lookupField(F.EXAGGERATION)
    if index >= 0:
        return {float(v) for v in layer.uniqueValues(index) if _number(v) is not None}
    names = layer.fields().names()
    if F.PLOT_DIP not in names or F.APPARENT_DIP not in names:
        return set()
    found = set()
    for feature in layer.getFeatures():
        drawn, true = _number(feature[F.PLOT_DIP]), _number(feature[F.APPARENT_DIP])
        if drawn is not None and true is not None and 0.5 < true < 89.5 and drawn < 89.9:
            found.add(round(math.tan(math.radians(drawn)) / math.tan(math.radians(true)), 2))
    return found


def _number(value):
    try:
        number = float(value)
    except (TypeError, ValueError):
        return None
    return None if number != number else number


def check_same_exaggeration(labelled_layers):
    """Refuses section-view inputs drawn at different exaggerations:
    ``labelled_layers`` is [(parameter label, layer)], layers may be None."""
    found = [
        (label, layer, exaggerations(layer))
        for label, layer in labelled_layers
        if layer is not None and exaggerations(layer)
    ]
    values = set().union(*(ve for _, _, ve in found)) if found else set()
    if len(values) > 1:
        listed = "; ".join(
            f"{label} '{layer.name()}' at {', '.join(f'{v:g}' for v in sorted(ve))}"
            for label, layer, ve in found
        )
        raise QgsProcessingException(
            f"The section-view inputs are drawn at different vertical exaggerations ({listed}). "
            "Run them again with one exaggeration."
        )
    return values.pop() if values else None
