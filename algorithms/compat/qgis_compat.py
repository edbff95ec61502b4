"""The few QGIS names that differ between releases, resolved once.

QGIS moved many enums into the scoped ``Qgis`` namespace (3.30 and later)
and field types from ``QVariant`` to ``QMetaType`` (3.38); QGIS 4 drops the
old spellings. Everything else imports these names from here.
"""

from qgis.core import (
    Qgis,
    QgsFeatureRequest,
    QgsFeatureSink,
    QgsLayoutExporter,
    QgsLegendStyle,
    QgsPalLayerSettings,
    QgsProcessing,
    QgsProcessingAlgorithm,
    QgsProcessingFeatureSource,
    QgsProcessingParameterNumber,
    QgsRenderContext,
    QgsUnitTypes,
    QgsWkbTypes,
)
from qgis.PyQt.QtCore import QVariant


def _scoped(scope, member, legacy):
    """``Qgis.<scope>.<member>`` where it exists, else the legacy value."""
    return getattr(getattr(Qgis, scope, None), member, legacy)


POINT_Z = _scoped("WkbType", "PointZ", QgsWkbTypes.PointZ)
LINE_STRING = _scoped("WkbType", "LineString", QgsWkbTypes.LineString)
LINE_STRING_Z = _scoped("WkbType", "LineStringZ", QgsWkbTypes.LineStringZ)
NO_GEOMETRY = _scoped("WkbType", "NoGeometry", QgsWkbTypes.NoGeometry)
MULTI_LINE_STRING = _scoped("WkbType", "MultiLineString", QgsWkbTypes.MultiLineString)

SOURCE_LINES = _scoped("ProcessingSourceType", "VectorLine", QgsProcessing.TypeVectorLine)
SOURCE_POINTS = _scoped("ProcessingSourceType", "VectorPoint", QgsProcessing.TypeVectorPoint)
SOURCE_POLYGONS = _scoped("ProcessingSourceType", "VectorPolygon", QgsProcessing.TypeVectorPolygon)
SOURCE_ANY_VECTOR = _scoped("ProcessingSourceType", "Vector", QgsProcessing.TypeVector)

NUMBER_DOUBLE = _scoped(
    "ProcessingNumberParameterType", "Double", QgsProcessingParameterNumber.Double
)

TEXT_AS_TEXT = _scoped(
    "TextRenderFormat", "AlwaysText", getattr(QgsRenderContext, "TextFormatAlwaysText", 1)
)
LABEL_OVER_POINT = _scoped("LabelPlacement", "OverPoint", QgsPalLayerSettings.OverPoint)
LABEL_HORIZONTAL = _scoped("LabelPlacement", "Horizontal", QgsPalLayerSettings.Horizontal)
FAST_INSERT = QgsFeatureSink.Flag.FastInsert
SKIP_GEOMETRY_CHECKS = _scoped(
    "ProcessingFeatureSourceFlag",
    "SkipGeometryValidityChecks",
    QgsProcessingFeatureSource.Flag.FlagSkipGeometryValidityChecks,
)
NO_GEOMETRY_REQUEST = _scoped("FeatureRequestFlag", "NoGeometry", QgsFeatureRequest.Flag.NoGeometry)
NO_THREADING = _scoped(
    "ProcessingAlgorithmFlag", "NoThreading", QgsProcessingAlgorithm.Flag.FlagNoThreading
)
EXPORT_SUCCESS = QgsLayoutExporter.ExportResult.Success
LEGEND_TITLE = _scoped("LegendComponent", "Title", QgsLegendStyle.Style.Title)
LEGEND_GROUP = _scoped("LegendComponent", "Subgroup", QgsLegendStyle.Style.Subgroup)
LEGEND_ITEM = _scoped("LegendComponent", "SymbolLabel", QgsLegendStyle.Style.SymbolLabel)
CRITICAL = _scoped("MessageLevel", "Critical", Qgis.Critical)

UNIT_METERS = _scoped("DistanceUnit", "Meters", QgsUnitTypes.DistanceMeters)

POINT_GEOMETRY = _scoped("GeometryType", "Point", QgsWkbTypes.PointGeometry)
LINE_GEOMETRY = _scoped("GeometryType", "Line", QgsWkbTypes.LineGeometry)
POLYGON_GEOMETRY = _scoped("GeometryType", "Polygon", QgsWkbTypes.PolygonGeometry)
NULL_GEOMETRY = _scoped("GeometryType", "Null", QgsWkbTypes.NullGeometry)


def geometry_type(wkb_type):
    return QgsWkbTypes.geometryType(wkb_type)


def enum_number(value):
    """The number of an enum member, plain int or scoped enum alike."""
    return int(getattr(value, "value", value))


if Qgis.QGIS_VERSION_INT >= 33800:
    from qgis.PyQt.QtCore import QMetaType

    DOUBLE = QMetaType.Type.Double
    LONG = QMetaType.Type.LongLong
    STRING = QMetaType.Type.QString
else:
    DOUBLE = QVariant.Double
    LONG = QVariant.LongLong
    STRING = QVariant.String


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
