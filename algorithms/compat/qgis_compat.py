"""The few QGIS names that differ between releases, resolved once.

QGIS moved many enums into the scoped ``Qgis`` namespace (3.30 and later)
and field types from ``QVariant`` to ``QMetaType`` (3.38); QGIS 4 drops the
old spellings. Everything else imports these names from here. An old
spelling is looked up only on a QGIS that lacks the new one: on 3.30 and
later the old names are aliases that QGIS patches in for old scripts
(``is_monkey_patched``), which QGIS 4 need not have.
"""

import qgis.core
from qgis.core import Qgis, QgsFeatureSink, QgsLayoutExporter, QgsUnitTypes, QgsWkbTypes

# Menu actions of the plugin's desktop glue. Qt6 has QAction in QtGui, and
# so has QGIS 3.44's qgis.PyQt.QtGui for Qt5; 3.22's has it in QtWidgets only.
try:
    from qgis.PyQt.QtGui import QAction
except ImportError:
    from qgis.PyQt.QtWidgets import QAction  # noqa: F401 (imported from here)


def _scoped(scope, member, legacy, qgis_namespace=Qgis):
    """``Qgis.<scope>.<member>`` where this QGIS has it, else ``legacy``, the
    dotted name of the old spelling in ``qgis.core`` (``"QgsWkbTypes.PointZ"``)."""
    value = getattr(getattr(qgis_namespace, scope, None), member, None)
    if value is not None:
        return value
    value = qgis.core
    for name in legacy.split("."):
        value = getattr(value, name)
    return value


def field_types(qgis_version=Qgis.QGIS_VERSION_INT):
    """(double, 64-bit integer, string) field types: QMetaType from 3.38 on
    (QGIS 4 takes nothing else), QVariant before (3.22 takes nothing else)."""
    if qgis_version >= 33800:
        from qgis.PyQt.QtCore import QMetaType

        return QMetaType.Type.Double, QMetaType.Type.LongLong, QMetaType.Type.QString
    from qgis.PyQt.QtCore import QVariant

    return QVariant.Double, QVariant.LongLong, QVariant.String


POINT_Z = _scoped("WkbType", "PointZ", "QgsWkbTypes.PointZ")
LINE_STRING = _scoped("WkbType", "LineString", "QgsWkbTypes.LineString")
LINE_STRING_Z = _scoped("WkbType", "LineStringZ", "QgsWkbTypes.LineStringZ")
NO_GEOMETRY = _scoped("WkbType", "NoGeometry", "QgsWkbTypes.NoGeometry")
MULTI_LINE_STRING = _scoped("WkbType", "MultiLineString", "QgsWkbTypes.MultiLineString")
LINE_STRING_ZM = _scoped("WkbType", "LineStringZM", "QgsWkbTypes.LineStringZM")
MULTI_LINE_STRING_ZM = _scoped("WkbType", "MultiLineStringZM", "QgsWkbTypes.MultiLineStringZM")

SOURCE_LINES = _scoped("ProcessingSourceType", "VectorLine", "QgsProcessing.TypeVectorLine")
SOURCE_POINTS = _scoped("ProcessingSourceType", "VectorPoint", "QgsProcessing.TypeVectorPoint")
SOURCE_POLYGONS = _scoped(
    "ProcessingSourceType", "VectorPolygon", "QgsProcessing.TypeVectorPolygon"
)
SOURCE_ANY_VECTOR = _scoped("ProcessingSourceType", "Vector", "QgsProcessing.TypeVector")
SOURCE_ANY_GEOMETRY = _scoped(
    "ProcessingSourceType", "VectorAnyGeometry", "QgsProcessing.TypeVectorAnyGeometry"
)

NUMBER_DOUBLE = _scoped(
    "ProcessingNumberParameterType", "Double", "QgsProcessingParameterNumber.Double"
)

TEXT_AS_TEXT = _scoped("TextRenderFormat", "AlwaysText", "QgsRenderContext.TextFormatAlwaysText")
LABEL_OVER_POINT = _scoped("LabelPlacement", "OverPoint", "QgsPalLayerSettings.OverPoint")
LABEL_HORIZONTAL = _scoped("LabelPlacement", "Horizontal", "QgsPalLayerSettings.Horizontal")
LABEL_AROUND_POINT = _scoped("LabelPlacement", "AroundPoint", "QgsPalLayerSettings.AroundPoint")
FAST_INSERT = QgsFeatureSink.Flag.FastInsert
SKIP_GEOMETRY_CHECKS = _scoped(
    "ProcessingFeatureSourceFlag",
    "SkipGeometryValidityChecks",
    "QgsProcessingFeatureSource.Flag.FlagSkipGeometryValidityChecks",
)
NO_GEOMETRY_REQUEST = _scoped(
    "FeatureRequestFlag", "NoGeometry", "QgsFeatureRequest.Flag.NoGeometry"
)
NO_THREADING = _scoped(
    "ProcessingAlgorithmFlag", "NoThreading", "QgsProcessingAlgorithm.Flag.FlagNoThreading"
)
ADVANCED = _scoped(
    "ProcessingParameterFlag", "Advanced", "QgsProcessingParameterDefinition.Flag.FlagAdvanced"
)
EXPORT_SUCCESS = QgsLayoutExporter.ExportResult.Success
LEGEND_TITLE = _scoped("LegendComponent", "Title", "QgsLegendStyle.Style.Title")
LEGEND_GROUP = _scoped("LegendComponent", "Subgroup", "QgsLegendStyle.Style.Subgroup")
LEGEND_ITEM = _scoped("LegendComponent", "SymbolLabel", "QgsLegendStyle.Style.SymbolLabel")
FILL_COLOUR_PROPERTY = _scoped(
    "Property",
    "FillColor",
    "QgsSymbolLayer.PropertyFillColor",
    qgis_namespace=qgis.core.QgsSymbolLayer,
)
OBSTACLE_WHOLE_POLYGON = _scoped(
    "LabelObstacleType", "PolygonWhole", "QgsLabelObstacleSettings.ObstacleType.PolygonWhole"
)
CRITICAL = _scoped("MessageLevel", "Critical", "Qgis.Critical")
INFO = _scoped("MessageLevel", "Info", "Qgis.Info")

UNIT_METERS = _scoped("DistanceUnit", "Meters", "QgsUnitTypes.DistanceMeters")
WKT2_2019 = _scoped(
    "CrsWktVariant", "Wkt2_2019", "QgsCoordinateReferenceSystem.WktVariant.WKT2_2019"
)


def enum_number(value):
    """The number of an enum member, plain int or scoped enum alike."""
    return int(getattr(value, "value", value))


DOUBLE, LONG, STRING = field_types()


def is_curved(wkb_type):
    return QgsWkbTypes.isCurvedType(wkb_type)


def unit_name(unit):
    return QgsUnitTypes.toString(unit)


def set_label_text(item, text_format):
    """Font and colour of a layout label: one text format from 3.38 on
    (setFont/setFontColor are deprecated there), the old calls before."""
    if hasattr(item, "setTextFormat"):
        item.setTextFormat(text_format)
    else:
        item.setFont(text_format.font())
        item.setFontColor(text_format.color())


def set_legend_text(legend, style, text_format):
    """Text of one legend style: a text format from 3.30 on, a font before."""
    current = legend.rstyle(style)
    if hasattr(current, "setTextFormat"):
        current.setTextFormat(text_format)
    else:
        legend.setStyleFont(style, text_format.font())


def advanced(parameter):
    """The parameter, marked as rarely changed (under Advanced parameters)."""
    parameter.setFlags(parameter.flags() | ADVANCED)
    return parameter


_GEOMETRY_KINDS = {
    _scoped("GeometryType", "Point", "QgsWkbTypes.PointGeometry"): "point",
    _scoped("GeometryType", "Line", "QgsWkbTypes.LineGeometry"): "line",
    _scoped("GeometryType", "Polygon", "QgsWkbTypes.PolygonGeometry"): "polygon",
}


def geometry_kind(layer):
    """ "point", "line", "polygon" or "none" (a table) for a vector layer or
    a feature source."""
    return _GEOMETRY_KINDS.get(QgsWkbTypes.geometryType(layer.wkbType()), "none")


def save_default_style(layer, name, description):
    """Saves the layer's style into its data source as the default style:
    saveStyleToDatabaseV2 from 3.40 on (the old call is deprecated there)."""
    if hasattr(layer, "saveStyleToDatabaseV2"):
        return layer.saveStyleToDatabaseV2(name, description, True, "")
    return layer.saveStyleToDatabase(name, description, True, "")
