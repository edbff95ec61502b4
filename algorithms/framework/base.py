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

from ..compat.qgis_compat import (
    FAST_INSERT,
    FLAG_ADVANCED,
    NUMBER_DOUBLE,
    SOURCE_LINES,
    SOURCE_POLYGONS,
)
from ..inputs.section_lines import OBVIOUS_LABEL_FIELDS, obvious_label_field
from ..outputs import fields as F
from ..outputs.carried_fields import computed_fields
from ..outputs.output_styles import StyleOnLoad, geopackage_of, save_default_style, style_for
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

    def parameterAsSink(self, parameters, name, context, *args, **kwargs):  # noqa: N802
        """As QGIS's, and remembers where each output went, for its style."""
        sink, destination = super().parameterAsSink(parameters, name, context, *args, **kwargs)
        if sink is not None:
            self.__dict__.setdefault("destinations", {})[name] = destination
        return sink, destination

    def postProcessAlgorithm(self, context, feedback):  # noqa: N802 (QGIS API)
        """Styles the outputs (algorithms/outputs/output_styles.py): on load
        into the project, and inside every GeoPackage written."""
        for layer_id in context.layersToLoadOnCompletion():
            # The details by reference: layersToLoadOnCompletion() is a copy.
            details = context.layerToLoadOnCompletionDetails(layer_id)
            if style_for(self.name(), details.outputName) is not None:
                details.setPostProcessor(StyleOnLoad.kept(self.name(), details.outputName))
        for name, destination in self.__dict__.get("destinations", {}).items():
            if geopackage_of(destination) and style_for(self.name(), name) is not None:
                save_default_style(destination, self.name(), name)
        return {}

    def add_section_line_parameters(self):
        self.addParameter(
            QgsProcessingParameterFeatureSource(INPUT, self.tr("Section lines"), [SOURCE_LINES])
        )
        self.addParameter(
            QgsProcessingParameterField(
                LINE_ID_FIELD,
                self.tr("Section label field (empty: name, label, section or id, else feature id)"),
                # Pre-selected in the dialog when the lines have it.
                defaultValue=OBVIOUS_LABEL_FIELDS[0],
                parentLayerParameterName=INPUT,
                optional=True,
            )
        )

    def label_field(self, parameters, context, source):
        """The field that labels the sections: the one chosen, else the
        lines' obvious one (``name``, ``label``, ``section``, ``id``), else
        none (labels are feature ids)."""
        chosen = parameters.get(LINE_ID_FIELD)
        if chosen:
            return self.parameterAsString(parameters, LINE_ID_FIELD, context)
        return obvious_label_field(source.fields().names()) or ""

    def label_of(self, name):
        """A parameter's label, as the dialog shows it, for messages."""
        definition = self.parameterDefinition(name)
        return definition.description() if definition is not None else name

    def add_advanced(self, parameter):
        """Adds a rarely changed parameter, folded under "Advanced"."""
        parameter.setFlags(parameter.flags() | FLAG_ADVANCED)
        self.addParameter(parameter)

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
