"""What every Sectionwright algorithm shares: naming, help, the section-line
parameters, the SKIPPED output, and a run that stops early leaving nothing
behind (run_guard)."""

import functools

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
    LINE_GEOMETRY,
    NULL_GEOMETRY,
    NUMBER_DOUBLE,
    POINT_GEOMETRY,
    POLYGON_GEOMETRY,
    SOURCE_LINES,
    SOURCE_POINTS,
    SOURCE_POLYGONS,
    enum_number,
    geometry_type,
)
from ..outputs import fields as F
from ..outputs.carried_fields import computed_fields
from .help import help_text
from .run_guard import OutputRecord, ParameterProblem

INPUT = "INPUT"
LINE_ID_FIELD = "LINE_ID_FIELD"
SKIPPED = "SKIPPED"
VERTICAL_EXAGGERATION = "VERTICAL_EXAGGERATION"
UNITS = "UNITS"
UNIT_FIELD = "UNIT_FIELD"

# What a source parameter filtered to one geometry accepts, in words.
GEOMETRY_NEEDED = {
    enum_number(SOURCE_POINTS): (POINT_GEOMETRY, "points"),
    enum_number(SOURCE_LINES): (LINE_GEOMETRY, "lines"),
    enum_number(SOURCE_POLYGONS): (POLYGON_GEOMETRY, "polygons"),
}
GEOMETRY_NAMES = {
    POINT_GEOMETRY: "points",
    LINE_GEOMETRY: "lines",
    POLYGON_GEOMETRY: "polygons",
    NULL_GEOMETRY: "no geometry (a plain table)",
}


class SectionwrightAlgorithm(QgsProcessingAlgorithm):
    """Base of the provider's algorithms; subclasses set ``ALGORITHM_ID``,
    ``DISPLAY_NAME`` and ``GROUP_ID``."""

    GROUPS = {"sectiondata": "Section data", "sectiondrawing": "Section drawing"}
    ALGORITHM_ID = ""
    DISPLAY_NAME = ""
    GROUP_ID = "sectiondata"

    def __init_subclass__(cls, **kwargs):
        super().__init_subclass__(**kwargs)
        if "processAlgorithm" in cls.__dict__:
            cls.processAlgorithm = _guarded(cls.__dict__["processAlgorithm"])

    def tr(self, text):
        return QCoreApplication.translate(type(self).__name__, text)

    def label(self, name):
        """A parameter's label, as the dialog shows it."""
        definition = self.parameterDefinition(name)
        return definition.description() if definition is not None else name

    def parameterAsSink(self, parameters, name, context, *args, **kwargs):
        """Processing's sink, recorded so that a run that stops early can
        take its output back; a destination that cannot be written is an
        error naming the output by its label."""
        record = self.__dict__.setdefault("output_record", OutputRecord())
        record.before_sink(self.parameterAsOutputLayer(parameters, name, context))
        try:
            sink, sink_id = super().parameterAsSink(parameters, name, context, *args, **kwargs)
        except QgsProcessingException as error:
            raise ParameterProblem(name, f"the output cannot be written there ({error}).")
        record.add(sink)
        return sink, sink_id

    def required_sink(self, parameters, name, context, *args, **kwargs):
        """parameterAsSink for an output that must be written."""
        sink, sink_id = self.parameterAsSink(parameters, name, context, *args, **kwargs)
        if sink is None:
            raise ParameterProblem(name, "choose where to write this output.")
        return sink, sink_id

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
            raise ParameterProblem(name, "the layer given cannot be read.")
        self._check_geometry(name, source)
        return source

    def optional_source(self, parameters, name, context):
        """An optional feature source parameter: None when not given."""
        if self.parameterAsSource(parameters, name, context) is None:
            return None
        return self.source(parameters, name, context)

    def _check_geometry(self, name, source):
        """The dialog filters layers by geometry; a script or qgis_process
        does not, so a layer of the wrong kind is refused here."""
        needed = [
            GEOMETRY_NEEDED[number]
            for number in map(enum_number, self.parameterDefinition(name).dataTypes())
            if number in GEOMETRY_NEEDED
        ]
        held = geometry_type(source.wkbType())
        if needed and held not in [kind for kind, _ in needed]:
            wanted = " or ".join(words for _, words in needed)
            raise ParameterProblem(
                name,
                f"this layer holds {GEOMETRY_NAMES.get(held, 'unknown geometry')}; "
                f"choose a layer of {wanted}.",
            )

    def checkParameterValues(self, parameters, context):
        """Processing's own check, its message naming the parameter by its label."""
        ok, message = super().checkParameterValues(parameters, context)
        if ok:
            return ok, message
        for definition in self.parameterDefinitions():
            value = parameters.get(definition.name())
            if not definition.checkValueIsAcceptable(value, context):
                return False, f"{definition.description()}: {_unacceptable(definition, value)}"
        return ok, message

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


def _unacceptable(definition, value):
    """Why Processing refuses a parameter's value, in words."""
    if value is None or value == "":
        return "a value is needed."
    low = getattr(definition, "minimum", None)
    high = getattr(definition, "maximum", None)
    if low is not None and high is not None:
        bounds = [f"at least {low():g}" if low() > -1e300 else ""]
        bounds.append(f"at most {high():g}" if high() < 1e300 else "")
        shown = f"{value:g}" if isinstance(value, (int, float)) else value
        return f"{shown} is not allowed; the value must be {' and '.join(b for b in bounds if b)}."
    return f"{value!r} cannot be used here."


def _guarded(process_algorithm):
    """processAlgorithm that, when the run stops early (Cancel, an error),
    takes back what it wrote, and names a parameter in trouble by its label."""

    @functools.wraps(process_algorithm)
    def processAlgorithm(self, parameters, context, feedback):
        self.output_record = OutputRecord()
        try:
            return process_algorithm(self, parameters, context, feedback)
        except BaseException as error:
            self.output_record.withdraw()
            if isinstance(error, ParameterProblem):
                raise QgsProcessingException(
                    f"{self.label(error.parameter)}: {error.message}"
                ) from None
            raise

    return processAlgorithm
