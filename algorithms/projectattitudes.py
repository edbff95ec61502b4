"""sectionwright:projectattitudes — attitudes carried onto section lines."""

from collections import Counter

import numpy as np
from qgis.core import (
    QgsCoordinateReferenceSystem,
    QgsFeature,
    QgsLineString,
    QgsPoint,
    QgsProcessingParameterDistance,
    QgsProcessingParameterEnum,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterNumber,
    QgsProcessingParameterRasterLayer,
)

from .compat.qgis_compat import (
    FAST_INSERT,
    LINE_STRING,
    NUMBER_DOUBLE,
    POINT_Z,
    SOURCE_LINES,
    SOURCE_POINTS,
)
from .core.carry import CarryOptions, carry_attitudes
from .core.crs import transformer
from .core.lines import vertex_chainage
from .core.projection import SectionNetwork
from .core.ticks import tick_segments
from .framework.base import (
    INPUT,
    LINE_ID_FIELD,
    SKIPPED,
    UNIT_FIELD,
    UNITS,
    VERTICAL_EXAGGERATION,
    SectionwrightAlgorithm,
)
from .framework.ledger import RunLedger
from .framework.run_guard import ParameterProblem, stop_if_cancelled
from .inputs.attitudes import AttitudeSettings, add_attitude_parameters, geometry_reason
from .inputs.dem import DemSampler, bounded_gdal_cache
from .inputs.map_crs import require_map_crs
from .inputs.map_layers import read_unit_map
from .inputs.section_lines import crs_wkt, read_section_parts, working_crs
from .outputs import fields as F
from .outputs.carried_fields import CarriedFields
from .outputs.section_space import SECTION_CRS_WKT

ATTITUDES = "ATTITUDES"
MAX_DISTANCE = "MAX_DISTANCE"
PROJECTION = "PROJECTION"
PLUNGE_TREND = "PLUNGE_TREND"
PLUNGE = "PLUNGE"
DEM = "DEM"
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


def _null(value):
    return None if value is None or value != value else value


class ProjectAttitudesAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "projectattitudes"
    DISPLAY_NAME = "Project attitudes onto sections"

    def initAlgorithm(self, config=None):
        tr = self.tr
        self.add_section_line_parameters()
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                ATTITUDES, tr("Attitudes (bedding, foliation … points)"), [SOURCE_POINTS]
            )
        )
        add_attitude_parameters(self, ATTITUDES)
        self.addParameter(
            QgsProcessingParameterDistance(
                MAX_DISTANCE,
                tr("Maximum distance from the section"),
                defaultValue=250.0,
                parentParameterName=INPUT,
                minValue=0.0,
            )
        )
        self.addParameter(
            QgsProcessingParameterEnum(
                PROJECTION, tr("Projection"), options=[tr(p) for p in PROJECTIONS], defaultValue=0
            )
        )
        self.addParameter(
            QgsProcessingParameterNumber(
                PLUNGE_TREND,
                tr("Plunge trend (degrees)"),
                NUMBER_DOUBLE,
                defaultValue=0.0,
                minValue=0.0,
                maxValue=360.0,
            )
        )
        self.addParameter(
            QgsProcessingParameterNumber(
                PLUNGE,
                tr("Plunge (degrees)"),
                NUMBER_DOUBLE,
                defaultValue=0.0,
                minValue=0.0,
                maxValue=89.9,
            )
        )
        self.addParameter(
            QgsProcessingParameterRasterLayer(
                DEM, tr("DEM (elevation of points without Z, and of the ground)"), optional=True
            )
        )
        self.add_unit_parameters()
        for name, label, default, top in (
            (OBLIQUE_ANGLE, "Flag lines closer to strike than (degrees)", 20.0, 90.0),
            (DIP_UNCERTAINTY, "Dip uncertainty, one standard deviation (degrees)", 2.0, 45.0),
            (STRIKE_UNCERTAINTY, "Strike uncertainty, one standard deviation (degrees)", 5.0, 90.0),
        ):
            self.addParameter(
                QgsProcessingParameterNumber(
                    name, tr(label), NUMBER_DOUBLE, defaultValue=default, minValue=0.0, maxValue=top
                )
            )
        self.add_exaggeration_parameter()
        self.addParameter(
            QgsProcessingParameterNumber(
                TICK_LENGTH,
                tr("Tick length in the section view (0: automatic)"),
                NUMBER_DOUBLE,
                defaultValue=0.0,
                minValue=0.0,
            )
        )
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
        lines = self.source(parameters, INPUT, context)
        points = self.source(parameters, ATTITUDES, context)
        require_map_crs(
            points.sourceCrs(), ATTITUDES, "the attitudes", "the attitude points on the map"
        )
        settings = AttitudeSettings(self, parameters, context)
        options = self._options(parameters, context)
        work_crs = working_crs(lines, context, feedback)
        work_wkt = crs_wkt(work_crs)
        parts = self._usable_parts(lines, parameters, work_crs, context, feedback)
        network = SectionNetwork([p.coords for p in parts], 2 * max(options.max_distance, 1e-9))

        rows = settings.read(points, feedback)
        xy = np.column_stack(
            transformer(crs_wkt(points.sourceCrs()), work_wkt)(rows.xyz[:, 0], rows.xyz[:, 1])
        )
        reasons = np.array([geometry_reason(g) for g in rows.geometries], dtype=object)
        reasons = np.where(reasons == "", rows.reasons, reasons)
        dip_direction = np.where(
            reasons == "",
            settings.to_grid(rows.dip_direction, xy, work_wkt, rows.declination),
            np.nan,
        )
        trend = settings.to_grid(
            np.full(len(rows), self.parameterAsDouble(parameters, PLUNGE_TREND, context)),
            xy,
            work_wkt,
            rows.declination,
        )
        feedback.setProgress(40)
        stop_if_cancelled(feedback)

        dem = self.parameterAsRasterLayer(parameters, DEM, context)
        units = self.optional_source(parameters, UNITS, context)
        with bounded_gdal_cache():
            sampler = DemSampler(dem, 1, 1.0, work_crs) if dem is not None else None
            unit_map = (
                read_unit_map(
                    units,
                    self.parameterAsString(parameters, UNIT_FIELD, context),
                    work_crs,
                    context,
                    feedback,
                )
                if units is not None
                else None
            )
            record = carry_attitudes(
                network,
                xy,
                rows.xyz[:, 2],
                dip_direction,
                np.where(reasons == "", rows.dip, np.nan),
                options,
                trend=trend,
                elevation_at=sampler.elevations if sampler else None,
                unit_at=unit_map.unit_at if unit_map else None,
            )
        record["reason"] = np.where(reasons != "", reasons, record["reason"])
        feedback.setProgress(60)
        stop_if_cancelled(feedback)
        return self._write(
            parameters, context, feedback, points, lines, parts, rows, record, xy, work_wkt
        )

    def _options(self, parameters, context):
        value = lambda name: self.parameterAsDouble(parameters, name, context)  # noqa: E731
        return CarryOptions(
            method=self.parameterAsEnum(parameters, PROJECTION, context),
            max_distance=value(MAX_DISTANCE),
            plunge=value(PLUNGE),
            exaggeration=value(VERTICAL_EXAGGERATION),
            oblique_angle=value(OBLIQUE_ANGLE),
            dip_sd=value(DIP_UNCERTAINTY),
            strike_sd=value(STRIKE_UNCERTAINTY),
        )

    @staticmethod
    def _usable_parts(lines, parameters, work_crs, context, feedback):
        id_field = parameters.get(LINE_ID_FIELD) or ""
        parts = read_section_parts(lines, id_field, work_crs, context, feedback)
        for part in parts:
            if part.coords is None:
                feedback.pushInfo(f"Section line {part.label} ignored: {part.reason}.")
        usable = [p for p in parts if p.coords is not None]
        if not usable:
            raise ParameterProblem(INPUT, "none of the section lines can be used (see the log).")
        return usable

    def _write(
        self, parameters, context, feedback, points, lines, parts, rows, record, xy, work_wkt
    ):
        carried_fields = CarriedFields(points.fields(), F.ATTITUDE_FIELDS)
        carried_fields.log_replaced(feedback, "the attitude layer")
        # Section-space layers carry their exaggeration (DESIGN.md).
        tick_fields = CarriedFields(points.fields(), F.ATTITUDE_FIELDS + (F.EXAGGERATION,))
        skipped_fields = CarriedFields(points.fields(), (F.SOURCE_FID, F.REASON))
        section_crs = QgsCoordinateReferenceSystem.fromWkt(SECTION_CRS_WKT)
        sinks = {}
        for name, kind, crs, fields in (
            (OUTPUT, POINT_Z, lines.sourceCrs(), carried_fields.fields),
            (OUTPUT_TICKS, LINE_STRING, section_crs, tick_fields.fields),
            (OUTPUT_CONNECTORS, LINE_STRING, lines.sourceCrs(), carried_fields.fields),
            (SKIPPED, points.wkbType(), points.sourceCrs(), skipped_fields.fields),
        ):
            sinks[name] = self.parameterAsSink(parameters, name, context, fields, kind, crs)
        for name in (OUTPUT, OUTPUT_TICKS):
            if sinks[name][0] is None:
                raise ParameterProblem(name, "choose where to write this output.")
        exaggeration = self.parameterAsDouble(parameters, VERTICAL_EXAGGERATION, context)

        to_map = transformer(work_wkt, crs_wkt(lines.sourceCrs()))
        landing_map = np.column_stack(to_map(*record["landing_xy"].T))
        source_map = np.column_stack(to_map(*xy.T))
        labels = np.array([p.label for p in parts] + [""], dtype=object)[record["line"]]
        ticks = tick_segments(
            record["chainage"],
            record["elev"],
            exaggeration,
            record["plot_dip"],
            record["sense"],
            self._tick_lengths(parameters, context, parts)[record["line"]],
        )
        columns = self._columns(record, labels, rows.fids)
        ledger = RunLedger(feedback)
        per_section = Counter()
        flagged = Counter()
        for i, values in enumerate(columns):
            stop_if_cancelled(feedback)
            ledger.read += 1
            reason = record["reason"][i]
            if reason:
                ledger.skip(reason)
                self._add_skipped(sinks[SKIPPED][0], skipped_fields, rows, i, reason)
                continue
            attributes = carried_fields.row(rows.attributes[i], values)
            self._add_outputs(
                sinks,
                attributes,
                exaggeration,
                record["elev"][i],
                (landing_map[i], source_map[i], ticks[i]),
            )
            ledger.written += 1
            per_section[labels[i]] += 1
            flagged[labels[i]] += bool(record["flags"][i])
            if i % 1000 == 0:
                feedback.setProgress(60 + 40 * i / max(len(rows), 1))
        for part in parts:
            feedback.pushInfo(
                f"Section {part.label}: {per_section[part.label]} attitude(s), "
                f"{flagged[part.label]} flagged."
            )
        ledger.close()
        return {name: sink_id for name, (sink, sink_id) in sinks.items() if sink is not None}

    @staticmethod
    def _columns(record, labels, fids):
        """Rows of the computed fields (fields.ATTITUDE_FIELDS, named as the
        record's keys) as plain Python values, NaN as NULL."""
        columns = []
        for name in F.ATTITUDE_FIELDS:
            if name == F.SECTION:
                columns.append([str(v) for v in labels])
            elif name == F.SOURCE_FID:
                columns.append(list(fids))
            elif name in F.TEXT_FIELDS:
                columns.append([str(v) for v in record[name]])
            else:
                columns.append([_null(v) for v in record[name].tolist()])
        return zip(*columns)

    def _tick_lengths(self, parameters, context, parts):
        fixed = self.parameterAsDouble(parameters, TICK_LENGTH, context)
        lengths = np.array([vertex_chainage(p.coords)[-1] for p in parts] + [0.0])
        return np.full(len(lengths), fixed) if fixed > 0 else lengths * AUTOMATIC_TICK_FRACTION

    @staticmethod
    def _add_outputs(sinks, attributes, exaggeration, z, places):
        landing, source, tick = places
        feature = QgsFeature()
        feature.setAttributes(attributes)
        feature.setGeometry(QgsPoint(landing[0], landing[1], z))
        sinks[OUTPUT][0].addFeature(feature, FAST_INSERT)
        # A point already on its line travels nowhere: a line of no length is no geometry.
        if sinks[OUTPUT_CONNECTORS][0] is not None and np.any(source != landing):
            feature.setGeometry(QgsLineString([QgsPoint(*source), QgsPoint(*landing)]))
            sinks[OUTPUT_CONNECTORS][0].addFeature(feature, FAST_INSERT)
        if not np.isnan(z):
            feature.setAttributes(attributes + [exaggeration])
            feature.setGeometry(QgsLineString([QgsPoint(*tick[0]), QgsPoint(*tick[1])]))
            sinks[OUTPUT_TICKS][0].addFeature(feature, FAST_INSERT)

    @staticmethod
    def _add_skipped(sink, skipped_fields, rows, i, reason):
        if sink is None:
            return
        feature = QgsFeature()
        feature.setAttributes(skipped_fields.row(rows.attributes[i], [rows.fids[i], reason]))
        feature.setGeometry(rows.geometries[i])
        sink.addFeature(feature, FAST_INSERT)
