"""sectionwright:projectattitudes — attitudes carried onto section lines."""

from collections import Counter
from dataclasses import dataclass

import numpy as np
from qgis.core import (
    QgsProcessingParameterEnum,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterNumber,
)

from .compat.qgis_compat import LINE_STRING, NUMBER_DOUBLE, POINT_Z, SOURCE_LINES, SOURCE_POINTS
from .core.carry import CarryOptions, carry_attitudes
from .core.crs import transformer
from .core.lines import vertex_chainage
from .core.projection import SectionNetwork
from .core.ticks import tick_segments
from .framework.base import (
    INPUT,
    MAX_DISTANCE,
    SKIPPED,
    UNIT_FIELD,
    UNITS,
    VERTICAL_EXAGGERATION,
    SectionwrightAlgorithm,
    sink_results,
)
from .framework.ledger import RunLedger
from .framework.run_guard import ParameterProblem, stop_if_cancelled
from .inputs.attitudes import AttitudeSettings, add_attitude_parameters
from .inputs.dem import DemSampler, bounded_gdal_cache
from .inputs.map_crs import require_map_crs
from .inputs.map_layers import read_unit_map
from .inputs.section_lines import crs_wkt, read_section_parts, working_crs
from .outputs import fields as F
from .outputs.carried_fields import CarriedFields
from .outputs.feature_writer import collector_paused, line_wkbs, write_rows
from .outputs.geometry_io import points_z
from .outputs.section_space import section_crs
from .outputs.skipped import skip_refused

ATTITUDES = "ATTITUDES"
PROJECTION = "PROJECTION"
PLUNGE_TREND = "PLUNGE_TREND"
PLUNGE = "PLUNGE"
OBLIQUE_ANGLE = "OBLIQUE_ANGLE"
DIP_UNCERTAINTY = "DIP_UNCERTAINTY"
STRIKE_UNCERTAINTY = "STRIKE_UNCERTAINTY"
TICK_LENGTH = "TICK_LENGTH"
OUTPUT = "OUTPUT"
OUTPUT_TICKS = "OUTPUT_TICKS"
OUTPUT_CONNECTORS = "OUTPUT_CONNECTORS"

PROJECTIONS = [
    "Perpendicular to the line (nearest point)",
    "Along the attitude's strike",
    "Along a plunge (trend and plunge below)",
]
AUTOMATIC_TICK_FRACTION = 1 / 40  # of the section's length, when TICK_LENGTH is 0
CARRY_CHUNK = 20_000  # attitudes carried between two looks at Cancel (~0.3 s)


@dataclass
class ProjectAttitudesSettings:
    """Every parameter of a run, read and checked once, before any work."""

    lines: object
    points: object
    id_field: str
    attitudes: AttitudeSettings
    carry: CarryOptions
    plunge_trend: float
    dem: object  # None: not given
    units: object  # None: not given
    unit_field: str
    tick_length: float  # 0: automatic

    @classmethod
    def read(cls, algorithm, parameters, context):
        number = lambda name: algorithm.parameterAsDouble(parameters, name, context)  # noqa: E731
        points = algorithm.source(parameters, ATTITUDES, context)
        require_map_crs(
            points.sourceCrs(), ATTITUDES, "the attitudes", "the attitude points on the map"
        )
        lines = algorithm.source(parameters, INPUT, context)
        return cls(
            lines=lines,
            points=points,
            id_field=algorithm.label_field(parameters, context, lines),
            attitudes=AttitudeSettings(algorithm, parameters, context),
            carry=CarryOptions(
                method=algorithm.parameterAsEnum(parameters, PROJECTION, context),
                max_distance=number(MAX_DISTANCE),
                plunge=number(PLUNGE),
                exaggeration=number(VERTICAL_EXAGGERATION),
                oblique_angle=number(OBLIQUE_ANGLE),
                dip_sd=number(DIP_UNCERTAINTY),
                strike_sd=number(STRIKE_UNCERTAINTY),
            ),
            plunge_trend=number(PLUNGE_TREND),
            dem=algorithm.dem(parameters, context, required=False),
            units=algorithm.optional_source(parameters, UNITS, context),
            unit_field=algorithm.parameterAsString(parameters, UNIT_FIELD, context),
            tick_length=number(TICK_LENGTH),
        )


class ProjectAttitudesAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "projectattitudes"
    DISPLAY_NAME = "Project attitudes onto sections"
    OUTPUT_SCHEMAS = {
        OUTPUT: F.CARRIED_ATTITUDES,
        OUTPUT_TICKS: F.CARRIED_TICKS,
        OUTPUT_CONNECTORS: F.CARRIED_ATTITUDES,
        SKIPPED: F.SKIPPED_ROWS,
    }

    def initAlgorithm(self, config=None):
        tr = self.tr
        self.add_section_line_parameters()
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                ATTITUDES, tr("Attitudes (bedding, foliation … points)"), [SOURCE_POINTS]
            )
        )
        add_attitude_parameters(self, ATTITUDES)
        self.add_max_distance_parameter("Maximum distance from the section (lines' CRS units)")
        self._add_projection_parameters()
        self.add_dem_parameter("DEM (elevation of points without Z, and of the ground)", True)
        self.add_unit_parameters()
        self._add_uncertainty_parameters()
        self.add_exaggeration_parameter()
        self.add_advanced(
            QgsProcessingParameterNumber(
                TICK_LENGTH,
                tr("Tick length (section-view metres, 0 = automatic)"),
                NUMBER_DOUBLE,
                defaultValue=0.0,
                minValue=0.0,
            )
        )
        self._add_outputs()

    def _add_projection_parameters(self):
        tr = self.tr
        self.addParameter(
            QgsProcessingParameterEnum(
                PROJECTION, tr("Projection"), options=[tr(p) for p in PROJECTIONS], defaultValue=0
            )
        )
        self.add_advanced(
            QgsProcessingParameterNumber(
                PLUNGE_TREND,
                tr("Plunge trend (degrees; only for projection along a plunge)"),
                NUMBER_DOUBLE,
                defaultValue=0.0,
                minValue=0.0,
                maxValue=360.0,
            )
        )
        self.add_advanced(
            QgsProcessingParameterNumber(
                PLUNGE,
                tr("Plunge (degrees below horizontal; only for projection along a plunge)"),
                NUMBER_DOUBLE,
                defaultValue=0.0,
                minValue=0.0,
                maxValue=89.9,
            )
        )

    def _add_uncertainty_parameters(self):
        tr = self.tr
        for name, label, default, top in (
            (OBLIQUE_ANGLE, "Flag lines closer to strike than (degrees)", 20.0, 90.0),
            (DIP_UNCERTAINTY, "Dip uncertainty, one standard deviation (degrees)", 2.0, 45.0),
            (STRIKE_UNCERTAINTY, "Strike uncertainty, one standard deviation (degrees)", 5.0, 90.0),
        ):
            self.add_advanced(
                QgsProcessingParameterNumber(
                    name, tr(label), NUMBER_DOUBLE, defaultValue=default, minValue=0.0, maxValue=top
                )
            )

    def _add_outputs(self):
        tr = self.tr
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                OUTPUT, tr("Attitudes on sections (map)"), SOURCE_POINTS
            )
        )
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                OUTPUT_TICKS, tr("Dip ticks (section view)"), SOURCE_LINES
            )
        )
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                OUTPUT_CONNECTORS,
                tr("Projection connectors (map)"),
                SOURCE_LINES,
                optional=True,
                createByDefault=False,
            )
        )
        self.add_skipped_output()

    def processAlgorithm(self, parameters, context, feedback):
        settings = ProjectAttitudesSettings.read(self, parameters, context)
        work_crs = working_crs(settings.lines, context, feedback)
        parts = _usable_parts(settings, work_crs, context, feedback)
        rows = settings.attitudes.read(settings.points, feedback)
        feedback.setProgress(30)
        stop_if_cancelled(feedback)
        # The core makes ~10 shapely objects per attitude; with every row
        # read still alive, the cycle collector's passes over them cost
        # a sixth of the core's time (and the rows hold no cycles).
        with collector_paused():
            xy, record = self._carry(settings, parts, rows, work_crs, context, feedback)
        feedback.setProgress(60)
        fields = _output_fields(settings.points, feedback)
        sinks = self._sinks(parameters, context, settings, fields)
        _write(sinks, fields, settings, parts, rows, record, xy, work_crs, feedback)
        feedback.setProgress(100)
        return sink_results(sinks)

    @staticmethod
    def _carry(settings, parts, rows, work_crs, context, feedback):
        """Working-CRS positions of the attitudes and their section record
        (``reason`` set for every row that is not carried)."""
        work_wkt = crs_wkt(work_crs)
        network = SectionNetwork(
            [p.coords for p in parts], 2 * max(settings.carry.max_distance, 1e-9)
        )
        xy = np.column_stack(
            transformer(crs_wkt(settings.points.sourceCrs()), work_wkt)(
                rows.xyz[:, 0], rows.xyz[:, 1]
            )
        )
        reasons = np.where(rows.geometry_reasons == "", rows.reasons, rows.geometry_reasons)
        to_grid = settings.attitudes.to_grid
        dip_direction = np.where(
            reasons == "", to_grid(rows.dip_direction, xy, work_wkt, rows.declination), np.nan
        )
        trend = to_grid(np.full(len(rows), settings.plunge_trend), xy, work_wkt, rows.declination)
        feedback.setProgress(40)
        with bounded_gdal_cache():
            sampler = (
                DemSampler(settings.dem, 1, 1.0, work_crs) if settings.dem is not None else None
            )
            unit_map = (
                read_unit_map(settings.units, settings.unit_field, work_crs, context, feedback)
                if settings.units is not None
                else None
            )
            record = _carried_in_chunks(
                feedback,
                network,
                (xy, rows.xyz[:, 2], dip_direction, np.where(reasons == "", rows.dip, np.nan)),
                settings.carry,
                trend=trend,
                elevation_at=sampler.elevations if sampler else None,
                unit_at=unit_map.unit_at if unit_map else None,
            )
        record["reason"] = np.where(reasons != "", reasons, record["reason"])
        return xy, record

    def _sinks(self, parameters, context, settings, fields):
        carried, ticks, skipped = fields
        points, lines_crs = settings.points, settings.lines.sourceCrs()
        specs = (
            (OUTPUT, carried.qgs_fields(), POINT_Z, lines_crs),
            (OUTPUT_TICKS, ticks.qgs_fields(), LINE_STRING, section_crs()),
            (OUTPUT_CONNECTORS, carried.qgs_fields(), LINE_STRING, lines_crs),
            (SKIPPED, skipped.qgs_fields(), points.wkbType(), points.sourceCrs()),
        )
        return self.open_sinks(parameters, context, specs, required=(OUTPUT, OUTPUT_TICKS))


def _carried_in_chunks(feedback, network, attitudes, options, trend, **lookups):
    """carry_attitudes over ``attitudes`` (xy, z, dip direction, dip), a
    chunk at a time, Cancel looked at between chunks (each carries
    independently of the others, so the record is the same)."""
    records = []
    for start in range(0, max(len(trend), 1), CARRY_CHUNK):
        stop_if_cancelled(feedback)
        chunk = slice(start, start + CARRY_CHUNK)
        records.append(
            carry_attitudes(
                network, *(a[chunk] for a in attitudes), options, trend=trend[chunk], **lookups
            )
        )
    return {key: np.concatenate([r[key] for r in records]) for key in records[0]}


def _output_fields(points, feedback):
    """The fields of the carried outputs and of SKIPPED, both after the
    attitude layer's own."""
    carried = CarriedFields(points.fields(), F.CARRIED_ATTITUDES)
    carried.log_replaced(feedback, "the attitude layer")
    ticks = CarriedFields(points.fields(), F.CARRIED_TICKS)
    return carried, ticks, CarriedFields(points.fields(), F.SKIPPED_ROWS)


def _write(sinks, fields, settings, parts, rows, record, xy, work_crs, feedback):
    _, _, skipped_fields = fields
    ledger = RunLedger(feedback)
    features = (rows.geometries, rows.attributes, rows.fids)
    carried = skip_refused(ledger, sinks[SKIPPED][0], skipped_fields, record["reason"], features)
    labels = np.array([p.label for p in parts] + [""], dtype=object)[record["line"]]
    stop_if_cancelled(feedback)
    to_map = transformer(crs_wkt(work_crs), crs_wkt(settings.lines.sourceCrs()))
    ticks = tick_segments(
        record["chainage"],
        record["elev"],
        settings.carry.exaggeration,
        record["plot_dip"],
        record["sense"],
        _tick_lengths(settings.tick_length, parts)[record["line"]],
    )
    geometry = (xy, ticks, to_map)
    _write_carried(sinks, fields, (rows, record, labels, carried), geometry, settings, feedback)
    _log_sections(feedback, parts, labels[carried], record["flags"][carried])
    ledger.close()


def _write_carried(sinks, fields, carried_rows, geometry, settings, feedback):
    """The three outputs of the carried attitudes, sharing their fields (the
    ticks with the exaggeration besides); ``geometry`` is (working-CRS source
    positions, tick segments, the transformation to the lines' CRS)."""
    carried_fields, tick_fields, _ = fields
    rows, record, labels, carried = carried_rows
    xy, ticks, to_map = geometry
    # The core's record is keyed by the output's field names.
    computed = {name: record[name][carried] for name in F.CARRIED_ATTITUDES.names if name in record}
    computed.update({F.SECTION: labels[carried], F.SOURCE_FID: np.asarray(rows.fids)[carried]})
    columns = carried_fields.columns([rows.attributes[i] for i in carried], computed)
    fields = carried_fields.qgs_fields()
    landing = np.column_stack(to_map(*record["landing_xy"][carried].T))
    elevation = record["elev"][carried]
    also = []
    if sinks[OUTPUT_CONNECTORS][0] is not None:
        source = np.column_stack(to_map(*xy[carried].T))
        # A point already on its line travels nowhere: a line of no length is no geometry.
        moved = np.flatnonzero(np.any(source != landing, axis=1))
        connectors = line_wkbs(np.stack((source[moved], landing[moved]), axis=1))
        also.append((sinks[OUTPUT_CONNECTORS][0], connectors, moved, []))
    drawn = np.flatnonzero(~np.isnan(elevation))
    tick_lines = line_wkbs(ticks[carried][drawn])
    exaggeration = settings.carry.exaggeration
    # A tick is its point's feature with a line and the exaggeration, unless
    # a source field named like the exaggeration is carried on the points
    # but replaced on the ticks.
    shared = tick_fields.qgs_fields().names() == fields.names() + [F.EXAGGERATION]
    if shared:
        also.append((sinks[OUTPUT_TICKS][0], tick_lines, drawn, [exaggeration]))
    write_rows(sinks[OUTPUT][0], fields, points_z(*landing.T, elevation), columns, feedback, also)
    if shared:
        return
    stop_if_cancelled(feedback)
    tick_columns = {name: [values[i] for i in drawn] for name, values in columns.items()}
    tick_columns[F.EXAGGERATION] = [exaggeration] * len(drawn)
    write_rows(sinks[OUTPUT_TICKS][0], tick_fields.qgs_fields(), tick_lines, tick_columns, feedback)


def _usable_parts(settings, work_crs, context, feedback):
    parts = read_section_parts(settings.lines, settings.id_field, work_crs, context, feedback)
    for part in parts:
        if part.coords is None:
            feedback.pushInfo(f"Section line {part.label} ignored: {part.reason}.")
    usable = [p for p in parts if p.coords is not None]
    if not usable:
        raise ParameterProblem(INPUT, "none of the section lines can be used (see the log).")
    return usable


def _tick_lengths(fixed, parts):
    """Tick length per section part (and a last one for 'no section')."""
    lengths = np.array([vertex_chainage(p.coords)[-1] for p in parts] + [0.0])
    return np.full(len(lengths), fixed) if fixed > 0 else lengths * AUTOMATIC_TICK_FRACTION


def _log_sections(feedback, parts, labels, flags):
    per_section = Counter(labels.tolist())
    flagged = Counter(labels[flags != ""].tolist())
    for part in parts:
        feedback.pushInfo(
            f"Section {part.label}: {per_section[part.label]} attitude(s), "
            f"{flagged[part.label]} flagged."
        )
