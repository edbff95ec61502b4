"""What every Sectionwright algorithm shares: naming, help, the parameters
several algorithms declare (section lines, units, DEM, north reference,
exaggeration), opening sinks and the SKIPPED output, and a run that stops
early leaving nothing behind (run_guard)."""

import functools

from qgis.core import (
    QgsProcessingAlgorithm,
    QgsProcessingException,
    QgsProcessingParameterDistance,
    QgsProcessingParameterEnum,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterField,
    QgsProcessingParameterNumber,
    QgsProcessingParameterRasterLayer,
    QgsProcessingUtils,
)
from qgis.PyQt.QtCore import QCoreApplication

from ..compat.qgis_compat import (
    NUMBER_DOUBLE,
    SOURCE_ANY_VECTOR,
    SOURCE_LINES,
    SOURCE_POINTS,
    SOURCE_POLYGONS,
    advanced,
    enum_number,
    geometry_kind,
)
from ..core.north import GRID
from ..inputs.section_lines import OBVIOUS_LABEL_FIELDS, obvious_label_field
from ..outputs.output_styles import StyleOnLoad, geopackage_of, save_default_style, style_for
from ..outputs.section_space import add_measuring_operations, is_section_view
from .help import help_text
from .parameter_names import (  # noqa: F401 (algorithms import them from here)
    DECLINATION,
    DEM,
    INPUT,
    LINE_ID_FIELD,
    MAX_DISTANCE,
    NORTH_REFERENCE,
    SKIPPED,
    UNIT_FIELD,
    UNITS,
    VERTICAL_EXAGGERATION,
    Z_FACTOR,
)
from .run_guard import OutputRecord, ParameterProblem, destination_asked

NORTH_REFERENCES = ["Grid north (as stored)", "True north", "Magnetic north"]

# What a source parameter filtered to one geometry accepts: the geometry
# kind (compat.geometry_kind) and its words. "Any vector" beside a geometry
# filter adds plain tables (a dialog offers them too).
GEOMETRY_NEEDED = {
    enum_number(SOURCE_POINTS): ("point", "a layer of points"),
    enum_number(SOURCE_LINES): ("line", "a layer of lines"),
    enum_number(SOURCE_POLYGONS): ("polygon", "a layer of polygons"),
    enum_number(SOURCE_ANY_VECTOR): ("none", "a table"),
}
GEOMETRY_HELD = {
    "point": "points",
    "line": "lines",
    "polygon": "polygons",
    "none": "no geometry (a plain table)",
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
        record.before_sink(destination_asked(parameters.get(name), context))
        try:
            sink, sink_id = super().parameterAsSink(parameters, name, context, *args, **kwargs)
        except QgsProcessingException as error:
            raise ParameterProblem(name, f"the output cannot be written there ({error}).")
        record.add(sink)
        if sink is not None:
            # Where each output went, for its style (postProcessAlgorithm).
            self.__dict__.setdefault("destinations", {})[name] = sink_id
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
        _prepare_project_for_section_views(context)
        return {}

    def label_field(self, parameters, context, source):
        """The field that labels the sections: the one chosen, else the
        lines' obvious one (``name``, ``label``, ``section``, ``id``), else
        none (labels are feature ids)."""
        if parameters.get(LINE_ID_FIELD):
            return self.parameterAsString(parameters, LINE_ID_FIELD, context)
        return obvious_label_field(source.fields().names()) or ""

    def add_advanced(self, parameter):
        """Adds a rarely changed parameter, folded under "Advanced"."""
        self.addParameter(advanced(parameter))

    def add_section_line_parameters(self, label="Section lines", optional=False):
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                INPUT, self.tr(label), [SOURCE_LINES], optional=optional
            )
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
        kinds = [kind for kind, _ in needed]
        held = geometry_kind(source)
        if kinds and kinds != ["none"] and held not in kinds:
            wanted = " or ".join(words for _, words in needed)
            raise ParameterProblem(
                name, f"this layer holds {GEOMETRY_HELD[held]}; choose {wanted}."
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

    def add_dem_parameter(self, label="DEM", optional=False):
        self.addParameter(QgsProcessingParameterRasterLayer(DEM, self.tr(label), optional=optional))

    def add_z_factor_parameter(self):
        self.add_advanced(
            QgsProcessingParameterNumber(
                Z_FACTOR,
                self.tr("Z factor (DEM values × factor = metres)"),
                NUMBER_DOUBLE,
                defaultValue=1.0,
            )
        )

    def dem(self, parameters, context, required=True):
        """The DEM layer, or None when it is optional and not given; a
        required DEM that cannot be read is an error naming it."""
        layer = self.parameterAsRasterLayer(parameters, DEM, context)
        if layer is None and required:
            raise ParameterProblem(
                DEM, self.tr("the layer given is not a raster that can be read.")
            )
        return layer

    def add_max_distance_parameter(self, label):
        self.addParameter(
            QgsProcessingParameterDistance(
                MAX_DISTANCE,
                self.tr(label),
                defaultValue=250.0,
                parentParameterName=INPUT,
                minValue=0.0,
            )
        )

    def add_north_parameters(self):
        """NORTH_REFERENCE and DECLINATION, as every algorithm reading azimuths has them."""
        tr = self.tr
        self.add_advanced(
            QgsProcessingParameterEnum(
                NORTH_REFERENCE,
                tr("Azimuths are measured from"),
                options=[tr(n) for n in NORTH_REFERENCES],
                defaultValue=GRID,
            )
        )
        self.add_advanced(
            QgsProcessingParameterNumber(
                DECLINATION,
                tr("Magnetic declination (degrees, east positive)"),
                NUMBER_DOUBLE,
                defaultValue=0.0,
                minValue=-180.0,
                maxValue=180.0,
            )
        )

    def add_skipped_output(self):
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                SKIPPED, self.tr("Skipped"), optional=True, createByDefault=False
            )
        )

    def open_sinks(self, parameters, context, specs, required):
        """{name: (sink, id)} for ``specs`` of (name, fields, geometry type,
        CRS); an output in ``required`` that cannot be made is an error."""
        sinks = {
            name: self.parameterAsSink(parameters, name, context, fields, kind, crs)
            for name, fields, kind, crs in specs
        }
        for name in required:
            if sinks[name][0] is None:
                raise ParameterProblem(name, "choose where to write this output.")
        return sinks


def sink_results(sinks):
    """The results of a run: the id of every sink that was made."""
    return {name: sink_id for name, (sink, sink_id) in sinks.items() if sink is not None}


def _prepare_project_for_section_views(context):
    """The project the outputs load into learns the section view's
    operations (section_space.add_measuring_operations) before they load:
    QGIS looks for a transform from a layer it loads to the map."""
    project = context.project()
    if project is None:
        return
    loading = [
        QgsProcessingUtils.mapLayerFromString(layer_id, context)
        for layer_id in context.layersToLoadOnCompletion()
    ]
    views = [layer for layer in loading if layer is not None and is_section_view(layer.crs())]
    if views:
        add_measuring_operations(project, views)


def _unacceptable(definition, value):
    """Why Processing refuses a parameter's value, in words."""
    if value is None or value == "":
        return "a value is needed."
    low = getattr(definition, "minimum", None)
    high = getattr(definition, "maximum", None)
    if low is not None and high is not None:
        if not _is_number(value):
            return f"{value!r} is not a number."
        bounds = [f"at least {low():g}" if low() > -1e300 else ""]
        bounds.append(f"at most {high():g}" if high() < 1e300 else "")
        shown = f"{value:g}" if isinstance(value, (int, float)) else value
        return f"{shown} is not allowed; the value must be {' and '.join(b for b in bounds if b)}."
    return f"{value!r} cannot be used here."


def _is_number(value):
    try:
        float(value)
    except (TypeError, ValueError):
        return False
    return True


def _guarded(process_algorithm):
    """processAlgorithm that, when the run stops early (Cancel, an error),
    takes back what it wrote, and names a parameter in trouble by its label."""

    @functools.wraps(process_algorithm)
    def processAlgorithm(self, parameters, context, feedback):
        self.output_record = OutputRecord()
        try:
            results = process_algorithm(self, parameters, context, feedback)
            self.output_record.release()
            return results
        except BaseException as error:
            self.output_record.withdraw()
            if isinstance(error, ParameterProblem):
                raise QgsProcessingException(
                    f"{self.label(error.parameter)}: {error.message}"
                ) from None
            raise

    return processAlgorithm
