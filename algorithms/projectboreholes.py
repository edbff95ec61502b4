"""sectionwright:projectboreholes — drill holes desurveyed and drawn on sections."""

from dataclasses import dataclass

import numpy as np
import shapely
from qgis.core import (
    QgsCoordinateReferenceSystem,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterField,
)

from .compat.qgis_compat import (
    LINE_STRING,
    LINE_STRING_Z,
    NO_GEOMETRY,
    SOURCE_ANY_VECTOR,
    SOURCE_LINES,
    SOURCE_POINTS,
)
from .core.attitudes import as_numbers
from .core.borehole_tables import drawn_samples, kept_intervals, survey_stations
from .core.boreholes import (
    check_collars,
    group_ranges,
    interval_runs,
)
from .core.crs import transformer
from .core.north import GRID, meridian_convergence, to_grid
from .core.projection import SectionNetwork, nearest_points
from .framework.base import (
    DECLINATION,
    INPUT,
    MAX_DISTANCE,
    NORTH_REFERENCE,
    SKIPPED,
    VERTICAL_EXAGGERATION,
    SectionwrightAlgorithm,
    sink_results,
)
from .framework.ledger import RunLedger
from .framework.run_guard import ParameterProblem, stop_if_cancelled
from .inputs.dem import DemSampler, bounded_gdal_cache
from .inputs.map_crs import require_map_crs
from .inputs.section_lines import crs_wkt, read_section_parts, working_crs
from .inputs.tables import labels, lookup, read_columns
from .outputs import fields as F
from .outputs.feature_writer import write_rows
from .outputs.section_space import section_crs
from .outputs.skipped import write_skipped

COLLARS = "COLLARS"
HOLE_ID_FIELD = "HOLE_ID_FIELD"
AZIMUTH_FIELD = "AZIMUTH_FIELD"
INCLINATION_FIELD = "INCLINATION_FIELD"
DEPTH_FIELD = "DEPTH_FIELD"
SURVEYS = "SURVEYS"
SURVEY_HOLE_FIELD = "SURVEY_HOLE_FIELD"
SURVEY_DEPTH_FIELD = "SURVEY_DEPTH_FIELD"
SURVEY_AZIMUTH_FIELD = "SURVEY_AZIMUTH_FIELD"
SURVEY_INCLINATION_FIELD = "SURVEY_INCLINATION_FIELD"
INTERVALS = "INTERVALS"
INTERVAL_HOLE_FIELD = "INTERVAL_HOLE_FIELD"
INTERVAL_FROM_FIELD = "INTERVAL_FROM_FIELD"
INTERVAL_TO_FIELD = "INTERVAL_TO_FIELD"
INTERVAL_CODE_FIELD = "INTERVAL_CODE_FIELD"
OUTPUT = "OUTPUT"
OUTPUT_INTERVALS = "OUTPUT_INTERVALS"
OUTPUT_TRACES = "OUTPUT_TRACES"

DRAW_STEP = 5.0  # metres of hole between drawn points (plus stations and interval ends)
COLLAR_FIELDS = {
    HOLE_ID_FIELD: "hole",
    AZIMUTH_FIELD: "azimuth",
    INCLINATION_FIELD: "inclination",
    DEPTH_FIELD: "depth",
}
SURVEY_FIELDS = {
    SURVEY_HOLE_FIELD: "hole",
    SURVEY_DEPTH_FIELD: "depth",
    SURVEY_AZIMUTH_FIELD: "azimuth",
    SURVEY_INCLINATION_FIELD: "inclination",
}
INTERVAL_FIELDS = {
    INTERVAL_HOLE_FIELD: "hole",
    INTERVAL_FROM_FIELD: "from",
    INTERVAL_TO_FIELD: "to",
    INTERVAL_CODE_FIELD: "code",
}


@dataclass
class Table:
    """An optional table parameter: its source (None: not given) and the
    field chosen for each column key."""

    name: str
    source: object
    fields: dict


@dataclass
class BoreholeSettings:
    """Every parameter of a run, read and checked once, before any work."""

    lines: object
    id_field: str
    collars: Table
    surveys: Table
    intervals: Table
    north: int
    declination: float
    dem: object  # None: not given
    max_distance: float
    exaggeration: float

    @classmethod
    def read(cls, algorithm, parameters, context):
        def table(name, mapping, source=None):
            fields = {
                key: algorithm.parameterAsString(parameters, field, context)
                for field, key in mapping.items()
            }
            if source is None:
                source = algorithm.parameterAsSource(parameters, name, context)
            return Table(name, source, fields)

        lines = algorithm.source(parameters, INPUT, context)
        collars = table(COLLARS, COLLAR_FIELDS, algorithm.source(parameters, COLLARS, context))
        require_map_crs(
            collars.source.sourceCrs(), COLLARS, "the collars", "the collar points on the map"
        )
        for name in (HOLE_ID_FIELD, DEPTH_FIELD):
            if not collars.fields[COLLAR_FIELDS[name]]:
                raise ParameterProblem(name, "choose the field of the collar layer.")
        settings = cls(
            lines=lines,
            id_field=algorithm.label_field(parameters, context, lines),
            collars=collars,
            surveys=table(SURVEYS, SURVEY_FIELDS),
            intervals=table(INTERVALS, INTERVAL_FIELDS),
            north=algorithm.parameterAsEnum(parameters, NORTH_REFERENCE, context),
            declination=algorithm.parameterAsDouble(parameters, DECLINATION, context),
            dem=algorithm.dem(parameters, context, required=False),
            max_distance=algorithm.parameterAsDouble(parameters, MAX_DISTANCE, context),
            exaggeration=algorithm.parameterAsDouble(parameters, VERTICAL_EXAGGERATION, context),
        )
        for given, mapping in (
            (settings.surveys, SURVEY_FIELDS),
            (settings.intervals, INTERVAL_FIELDS),
        ):
            missing = [p for p, key in mapping.items() if not given.fields[key] and key != "code"]
            if given.source is not None and missing:
                raise ParameterProblem(
                    missing[0], f"choose the field of the {given.name.lower()} table."
                )
        return settings


class ProjectBoreholesAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "projectboreholes"
    DISPLAY_NAME = "Project boreholes onto sections"
    OUTPUT_SCHEMAS = {
        OUTPUT: F.BOREHOLES,
        OUTPUT_INTERVALS: F.BOREHOLE_INTERVALS,
        OUTPUT_TRACES: F.BOREHOLE_TRACES,
        SKIPPED: F.SKIPPED_BOREHOLE_ROWS,
    }

    def initAlgorithm(self, config=None):
        tr = self.tr
        self.add_section_line_parameters()
        self.addParameter(
            QgsProcessingParameterFeatureSource(COLLARS, tr("Collars (points)"), [SOURCE_POINTS])
        )
        for name, label, optional in (
            (HOLE_ID_FIELD, "Hole id field", False),
            (AZIMUTH_FIELD, "Collar azimuth field (degrees)", True),
            (
                INCLINATION_FIELD,
                "Collar inclination field (below horizontal; 90 = down, "
                "−60 read as the mining convention; empty: vertical)",
                True,
            ),
            (DEPTH_FIELD, "Total depth field (metres along the hole)", False),
        ):
            self.addParameter(
                QgsProcessingParameterField(
                    name, tr(label), parentLayerParameterName=COLLARS, optional=optional
                )
            )
        self._add_table(
            SURVEYS,
            "Downhole surveys (table)",
            (
                (SURVEY_HOLE_FIELD, "Survey hole id field"),
                (SURVEY_DEPTH_FIELD, "Survey depth field (metres along the hole)"),
                (SURVEY_AZIMUTH_FIELD, "Survey azimuth field (degrees)"),
                (SURVEY_INCLINATION_FIELD, "Survey inclination field (degrees below horizontal)"),
            ),
        )
        self._add_table(
            INTERVALS,
            "Intervals: lithology, unit … (table)",
            (
                (INTERVAL_HOLE_FIELD, "Interval hole id field"),
                (INTERVAL_FROM_FIELD, "From field (metres along the hole)"),
                (INTERVAL_TO_FIELD, "To field (metres along the hole)"),
                (INTERVAL_CODE_FIELD, "Code field"),
            ),
        )
        self.add_north_parameters()
        self.add_dem_parameter("DEM (elevation of collars without Z)", optional=True)
        self.add_max_distance_parameter(
            "Maximum distance of a collar from the section (lines' CRS units)"
        )
        self.add_exaggeration_parameter()
        for name, label, kind, optional in (
            (OUTPUT, "Boreholes (section view)", SOURCE_LINES, False),
            (OUTPUT_INTERVALS, "Borehole intervals (section view)", SOURCE_LINES, True),
            (OUTPUT_TRACES, "Desurveyed traces (map, 3-D)", SOURCE_LINES, True),
        ):
            self.addParameter(
                QgsProcessingParameterFeatureSink(
                    name, tr(label), kind, optional=optional, createByDefault=True
                )
            )
        self.add_skipped_output()

    def _add_table(self, name, label, fields):
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                name, self.tr(label), [SOURCE_ANY_VECTOR], optional=True
            )
        )
        for field_name, field_label in fields:
            self.addParameter(
                QgsProcessingParameterField(
                    field_name, self.tr(field_label), parentLayerParameterName=name, optional=True
                )
            )

    def processAlgorithm(self, parameters, context, feedback):
        settings = BoreholeSettings.read(self, parameters, context)
        work_crs = working_crs(settings.lines, context, feedback)
        parts = [
            p
            for p in read_section_parts(
                settings.lines, settings.id_field, work_crs, context, feedback
            )
            if p.coords is not None
        ]
        if not parts:
            raise ParameterProblem(INPUT, "none of the section lines can be used (see the log).")
        network = SectionNetwork([p.coords for p in parts], 2 * max(settings.max_distance, 1e-9))
        skipped = []  # (table, hole, fid, depth, reason)
        feedback.setProgress(5)
        holes = _read_collars(settings, work_crs, network, skipped)
        feedback.setProgress(15)
        stop_if_cancelled(feedback)
        surveys = _read_table(settings.surveys, holes)
        feedback.setProgress(25)
        stop_if_cancelled(feedback)
        intervals = _read_table(settings.intervals, holes)
        feedback.setProgress(35)
        stop_if_cancelled(feedback)
        stations = survey_stations(holes, surveys, skipped)
        valid_intervals = kept_intervals(holes, intervals, skipped)
        feedback.setProgress(45)
        stop_if_cancelled(feedback)

        drawn = np.flatnonzero(holes["reason"] == "")
        samples = drawn_samples(holes, stations, valid_intervals, drawn, DRAW_STEP)
        feedback.setProgress(60)
        stop_if_cancelled(feedback)
        sinks = self._sinks(parameters, context, settings.lines)
        to_map = transformer(crs_wkt(work_crs), crs_wkt(settings.lines.sourceCrs()))
        labels_of = np.array([p.label for p in parts], dtype=object)
        ranges = _write_holes(
            sinks, network, holes, samples, labels_of, to_map, valid_intervals, settings, feedback
        )
        _warn_wandering(holes, labels_of, *ranges, settings.max_distance, feedback)
        feedback.setProgress(90)
        stop_if_cancelled(feedback)
        self._account(sinks, skipped, holes, surveys, intervals, valid_intervals, feedback)
        feedback.setProgress(100)
        return sink_results(sinks)

    def _sinks(self, parameters, context, lines):
        specs = (
            (OUTPUT, F.BOREHOLES.qgs_fields(), LINE_STRING, section_crs()),
            (OUTPUT_INTERVALS, F.BOREHOLE_INTERVALS.qgs_fields(), LINE_STRING, section_crs()),
            (OUTPUT_TRACES, F.BOREHOLE_TRACES.qgs_fields(), LINE_STRING_Z, lines.sourceCrs()),
            (
                SKIPPED,
                F.SKIPPED_BOREHOLE_ROWS.qgs_fields(),
                NO_GEOMETRY,
                QgsCoordinateReferenceSystem(),
            ),
        )
        return self.open_sinks(parameters, context, specs, required=(OUTPUT,))

    @staticmethod
    def _account(sinks, skipped, holes, surveys, intervals, valid_intervals, feedback):
        """SKIPPED rows of all three tables, and the closing log lines."""
        ledger = RunLedger(feedback)
        for *_, reason in skipped:
            ledger.skip(reason)
        table, hole, fid, depth, reason = [list(c) for c in zip(*skipped)] or [[]] * 5
        write_skipped(
            sinks[SKIPPED][0],
            F.SKIPPED_BOREHOLE_ROWS.qgs_fields(),
            None,
            {F.TABLE: table, F.HOLE: hole, F.SOURCE_FID: fid, F.DEPTH: depth, F.REASON: reason},
        )
        ledger.read = len(holes["id"]) + len(surveys["hole"]) + len(intervals["hole"])
        ledger.written = ledger.read - len(skipped)
        feedback.pushInfo(
            f"Holes drawn: {int((holes['reason'] == '').sum())} of {len(holes['id'])}; "
            f"surveys used: {int(surveys['used'].sum())} of {len(surveys['hole'])}; "
            f"intervals drawn: {len(valid_intervals['hole'])} of {len(intervals['hole'])}."
        )
        ledger.close()


# Reading ------------------------------------------------------------


def _parameters_of(mapping):
    """{column: the parameter choosing its field} of a {parameter: column} mapping."""
    return {key: name for name, key in mapping.items()}


def _read_collars(settings, work_crs, network, skipped):
    collars, names = settings.collars.source, settings.collars.fields
    values, fids, geometries = read_columns(
        collars, names, "collar", True, _parameters_of(COLLAR_FIELDS)
    )
    ids = labels(values["hole"])
    depth, depth_why = as_numbers(values["depth"], "depth")
    inclination, incl_why = (
        as_numbers(values["inclination"], "inclination")
        if names["inclination"]
        else (np.full(len(ids), 90.0), np.full(len(ids), "", dtype=object))
    )
    azimuth, az_why = as_numbers(values["azimuth"], "azimuth")
    vertical = np.abs(inclination) == 90.0
    azimuth = np.where(vertical & np.isnan(azimuth), 0.0, azimuth)
    az_why = np.where(vertical, "", az_why)
    work_wkt = crs_wkt(work_crs)
    xyz = np.array([_point(g) for g in geometries], dtype=float).reshape(-1, 3)
    xy = np.column_stack(transformer(crs_wkt(collars.sourceCrs()), work_wkt)(xyz[:, 0], xyz[:, 1]))
    z = _collar_elevations(settings.dem, xyz[:, 2], xy, work_crs)
    reasons = check_collars(
        ids, ~np.isnan(xy[:, 0]), depth, inclination, z, (depth_why, incl_why, az_why)
    )
    landing = nearest_points(
        network, np.where(reasons[:, None] == "", xy, np.nan), settings.max_distance
    )
    reasons = np.where(
        (reasons == "") & (landing.line < 0),
        np.where(landing.past_end, "beyond the end of the line", "beyond max distance"),
        reasons,
    )
    convergence = (
        meridian_convergence(work_wkt, xy[:, 0], xy[:, 1])
        if settings.north != GRID
        else np.zeros(len(ids))
    )
    for i in np.flatnonzero(reasons != ""):
        skipped.append(("collars", ids[i], fids[i], None, str(reasons[i])))
    return {
        "id": ids,
        # A duplicate id refers to the first collar of that id.
        "index": {hole: i for i, hole in reversed(list(enumerate(ids))) if hole is not None},
        "xy": xy,
        "z": z,
        "depth": depth,
        "inclination": inclination,
        "azimuth": to_grid(azimuth, settings.north, convergence, settings.declination),
        "north": settings.north,
        "convergence": convergence,
        "declination": settings.declination,
        "line": landing.line,
        "reason": reasons,
    }


def _collar_elevations(dem, z, xy, work_crs):
    missing = np.isnan(z) & ~np.isnan(xy[:, 0])
    if dem is not None and missing.any():
        with bounded_gdal_cache():
            z = z.copy()
            z[missing] = DemSampler(dem, 1, 1.0, work_crs).elevations(xy[missing])
    return z


def _read_table(table, holes):
    if table.source is None:
        empty = {key: [] for key in table.fields}
        return dict(empty, fid=[], collar=np.empty(0, dtype=int), used=np.empty(0, bool))
    mapping = SURVEY_FIELDS if table.name == SURVEYS else INTERVAL_FIELDS
    values, fids, _ = read_columns(
        table.source, table.fields, table.name.lower(), False, _parameters_of(mapping)
    )
    values["hole"] = labels(values["hole"])
    values["fid"] = fids
    values["collar"] = lookup(values["hole"], holes["index"])
    values["used"] = np.zeros(len(fids), dtype=bool)
    return values


def _write_holes(sinks, network, holes, samples, labels_of, to_map, intervals, settings, feedback):
    """The holes (and their traces and intervals) drawn; returns each drawn
    hole's collar index and offset range."""
    hole = samples["hole"]
    if len(hole) == 0:
        return np.empty(0, dtype=int), np.empty(0), np.empty(0)
    exaggeration = settings.exaggeration
    chainage, offset = network.locate(holes["line"][hole], samples["xyz"][:, :2], extend=True)
    stop_if_cancelled(feedback)
    view = np.column_stack((chainage, samples["xyz"][:, 2] * exaggeration))
    group = np.cumsum(np.r_[True, hole[1:] != hole[:-1]]) - 1
    drawn = hole[np.flatnonzero(np.r_[True, hole[1:] != hole[:-1]])]
    low, high = group_ranges(offset, hole)
    sections = labels_of[holes["line"][drawn]]
    columns = {
        F.SECTION: sections,
        F.HOLE: [holes["id"][h] for h in drawn],
        F.DEPTH: holes["depth"][drawn],
        F.OFFSET_MIN: low,
        F.OFFSET_MAX: high,
        F.EXAGGERATION: np.full(len(drawn), exaggeration),
    }
    write_rows(
        sinks[OUTPUT][0],
        F.BOREHOLES.qgs_fields(),
        shapely.linestrings(view, indices=group),
        columns,
        feedback,
    )
    if sinks[OUTPUT_TRACES][0] is not None:
        map_x, map_y = to_map(samples["xyz"][:, 0], samples["xyz"][:, 1])
        trace = np.column_stack((map_x, map_y, samples["xyz"][:, 2]))
        write_rows(
            sinks[OUTPUT_TRACES][0],
            F.BOREHOLE_TRACES.qgs_fields(),
            shapely.linestrings(trace, indices=group),
            columns,
            feedback,
        )
    if sinks[OUTPUT_INTERVALS][0] is not None and len(intervals["hole"]):
        _write_intervals(
            sinks[OUTPUT_INTERVALS][0],
            holes,
            samples,
            intervals,
            view,
            offset,
            labels_of,
            exaggeration,
            feedback,
        )
    return drawn, low, high


def _warn_wandering(holes, labels_of, drawn, low, high, max_distance, feedback):
    """A log line for every hole whose trace strays beyond the maximum
    distance from its section (``low``, ``high``: its offset range)."""
    for h, far in zip(drawn, np.maximum(-low, high)):
        if far > max_distance:
            feedback.pushInfo(
                f"Hole {holes['id'][h]} wanders up to {far:.1f} from "
                f"section {labels_of[holes['line'][h]]}, beyond the maximum distance."
            )


def _write_intervals(
    sink, holes, samples, intervals, view, offset, labels_of, exaggeration, feedback
):
    kept, rows, piece = interval_runs(
        samples["hole"], samples["md"], intervals["hole"], intervals["from"], intervals["to"]
    )
    low, high = group_ranges(offset[rows], piece)
    collar = intervals["hole"][kept]
    columns = {
        F.SECTION: labels_of[holes["line"][collar]],
        F.HOLE: [holes["id"][c] for c in collar],
        F.FROM: intervals["from"][kept],
        F.TO: intervals["to"][kept],
        F.CODE: [intervals["code"][k] for k in kept],
        F.OFFSET_MIN: low,
        F.OFFSET_MAX: high,
        F.EXAGGERATION: np.full(len(kept), exaggeration),
    }
    lines = shapely.linestrings(view[rows], indices=piece)
    write_rows(sink, F.BOREHOLE_INTERVALS.qgs_fields(), lines, columns, feedback)


def _point(geometry):
    if geometry is None or geometry.isNull() or geometry.isEmpty():
        return (np.nan, np.nan, np.nan)
    point = next(geometry.constParts())
    return (point.x(), point.y(), point.z() if point.is3D() else np.nan)
