"""What every Sectionwright algorithm shares: naming, help, the section-line
parameters and the SKIPPED output."""

from qgis.core import (
    QgsFeature,
    QgsProcessingAlgorithm,
    QgsProcessingException,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterField,
    QgsProcessingParameterNumber,
)
from qgis.PyQt.QtCore import QCoreApplication

from ..compat.qgis_compat import FAST_INSERT, NUMBER_DOUBLE, SOURCE_LINES, SOURCE_POLYGONS
from ..outputs import fields as F
from ..outputs.carried_fields import computed_fields
from .help import help_text

INPUT = "INPUT"
LINE_ID_FIELD = "LINE_ID_FIELD"
SKIPPED = "SKIPPED"
VERTICAL_EXAGGERATION = "VERTICAL_EXAGGERATION"
UNITS = "UNITS"
UNIT_FIELD = "UNIT_FIELD"


class SectionwrightAlgorithm(QgsProcessingAlgorithm):
    """Base of the provider's algorithms; subclasses set ``ALGORITHM_ID``,
    ``DISPLAY_NAME`` and ``GROUP_ID``."""

    GROUPS = {"sectiondata": "Section data", "sectiondrawing": "Section drawing"}
    ALGORITHM_ID = ""
    DISPLAY_NAME = ""
    GROUP_ID = "sectiondata"

    def tr(self, text):
        return QCoreApplication.translate(type(self).__name__, text)

    def createInstance(self):
        return type(self)()

    def name(self):
        return self.ALGORITHM_ID

    def displayName(self):
        return self.tr(self.DISPLAY_NAME)

    def group(self):
        return self.tr(self.GROUPS[self.GROUP_ID])

    def groupId(self):
        return self.GROUP_ID

    def shortHelpString(self):
        return self.tr(help_text(self.ALGORITHM_ID))

    def add_section_line_parameters(self):
        self.addParameter(
            QgsProcessingParameterFeatureSource(INPUT, self.tr("Section lines"), [SOURCE_LINES])
        )
        self.addParameter(
            QgsProcessingParameterField(
                LINE_ID_FIELD,
                self.tr("Section label field (empty: feature id)"),
                parentLayerParameterName=INPUT,
                optional=True,
            )
        )

    def source(self, parameters, name, context):
        """A feature source parameter, or an error naming it."""
        source = self.parameterAsSource(parameters, name, context)
        if source is None:
            raise QgsProcessingException(self.invalidSourceError(parameters, name))
        return source

    def add_unit_parameters(self):
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                UNITS, self.tr("Map units (polygons)"), [SOURCE_POLYGONS], optional=True
            )
        )
        self.addParameter(
            QgsProcessingParameterField(
                UNIT_FIELD, self.tr("Unit field"), parentLayerParameterName=UNITS, optional=True
            )
        )

    def add_exaggeration_parameter(self):
        self.addParameter(
            QgsProcessingParameterNumber(
                VERTICAL_EXAGGERATION,
                self.tr("Vertical exaggeration"),
                NUMBER_DOUBLE,
                defaultValue=1.0,
                minValue=0.001,
            )
        )

    def add_skipped_output(self):
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                SKIPPED, self.tr("Skipped"), optional=True, createByDefault=False
            )
        )


def skipped_fields():
    return computed_fields((F.SECTION, F.SOURCE_FID, F.REASON))


def add_skipped_section(sink, section):
    """One SKIPPED row for a section line part (sink may be None: not asked)."""
    if sink is None:
        return
    feature = QgsFeature()
    if section.geometry is not None:
        feature.setGeometry(section.geometry)
    feature.setAttributes([section.label, section.fid, section.reason])
    sink.addFeature(feature, FAST_INSERT)
