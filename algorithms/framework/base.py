"""What every Sectionwright algorithm shares: naming, help, the parameters
several algorithms declare (section lines, units, DEM, north reference,
exaggeration), opening sinks and the SKIPPED output."""

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
)
from qgis.PyQt.QtCore import QCoreApplication

from ..compat.qgis_compat import NUMBER_DOUBLE, SOURCE_LINES, SOURCE_POLYGONS
from ..core.north import GRID
from .help import help_text

INPUT = "INPUT"
LINE_ID_FIELD = "LINE_ID_FIELD"
SKIPPED = "SKIPPED"
VERTICAL_EXAGGERATION = "VERTICAL_EXAGGERATION"
UNITS = "UNITS"
UNIT_FIELD = "UNIT_FIELD"
DEM = "DEM"
Z_FACTOR = "Z_FACTOR"
MAX_DISTANCE = "MAX_DISTANCE"
NORTH_REFERENCE = "NORTH_REFERENCE"
DECLINATION = "DECLINATION"

NORTH_REFERENCES = ["Grid north (as stored)", "True north", "Magnetic north"]


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

    def add_section_line_parameters(self, label="Section lines", optional=False):
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                INPUT, self.tr(label), [SOURCE_LINES], optional=optional
            )
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

    def add_dem_parameter(self, label="DEM", optional=False):
        self.addParameter(QgsProcessingParameterRasterLayer(DEM, self.tr(label), optional=optional))

    def add_z_factor_parameter(self):
        self.addParameter(
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
            raise QgsProcessingException(
                self.tr("DEM: the layer given is not a raster that can be read.")
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
        self.addParameter(
            QgsProcessingParameterEnum(
                NORTH_REFERENCE,
                tr("Azimuths are measured from"),
                options=[tr(n) for n in NORTH_REFERENCES],
                defaultValue=GRID,
            )
        )
        self.addParameter(
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
                raise QgsProcessingException(self.invalidSinkError(parameters, name))
        return sinks


def sink_results(sinks):
    """The results of a run: the id of every sink that was made."""
    return {name: sink_id for name, (sink, sink_id) in sinks.items() if sink is not None}
