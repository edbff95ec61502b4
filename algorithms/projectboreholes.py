"""sectionwright:projectboreholes — drill holes desurveyed and drawn on sections."""

import numpy as np
import shapely
from qgis.core import (
    QgsCoordinateReferenceSystem,
    QgsFeature,
    QgsProcessingParameterDistance,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterField,
    QgsProcessingParameterRasterLayer,
)

from .compat.qgis_compat import (
    FAST_INSERT,
    LINE_STRING,
    LINE_STRING_Z,
    NO_GEOMETRY,
    SOURCE_ANY_VECTOR,
    SOURCE_LINES,
    SOURCE_POINTS,
)
from .core.attitudes import as_numbers
from .core.boreholes import assemble_stations, check_intervals, check_surveys
from .core.crs import transformer
from .core.desurvey import positions_at_depths, station_offsets
from .core.north import GRID, meridian_convergence, to_grid
from .core.projection import SectionNetwork, nearest_points
from .framework.base import (
    INPUT,
    LINE_ID_FIELD,
    SKIPPED,
    VERTICAL_EXAGGERATION,
    SectionwrightAlgorithm,
)
from .framework.ledger import RunLedger
from .framework.run_guard import ParameterProblem, stop_if_cancelled
from .inputs.attitudes import DECLINATION, NORTH_REFERENCE, add_north_parameters
from .inputs.dem import DemSampler, bounded_gdal_cache
from .inputs.map_crs import require_map_crs
from .inputs.section_lines import crs_wkt, read_section_parts, working_crs
from .inputs.tables import labels, lookup, read_columns
from .outputs import fields as F
from .outputs.carried_fields import computed_fields
from .outputs.geometry_io import add_features
from .outputs.section_space import SECTION_CRS_WKT

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
DEM = "DEM"
MAX_DISTANCE = "MAX_DISTANCE"
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


class ProjectBoreholesAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "projectboreholes"
    DISPLAY_NAME = "Project boreholes onto sections"

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
                (SURVEY_DEPTH_FIELD, "Survey depth field"),
                (SURVEY_AZIMUTH_FIELD, "Survey azimuth field"),
                (SURVEY_INCLINATION_FIELD, "Survey inclination field"),
            ),
        )
        self._add_table(
            INTERVALS,
            "Intervals: lithology, unit … (table)",
            (
                (INTERVAL_HOLE_FIELD, "Interval hole id field"),
                (INTERVAL_FROM_FIELD, "From field"),
                (INTERVAL_TO_FIELD, "To field"),
                (INTERVAL_CODE_FIELD, "Code field"),
            ),
        )
        add_north_parameters(self)
        self.addParameter(
            QgsProcessingParameterRasterLayer(
                DEM, tr("DEM (elevation of collars without Z)"), optional=True
            )
        )
        self.addParameter(
            QgsProcessingParameterDistance(
                MAX_DISTANCE,
                tr("Maximum distance of a collar from the section"),
                defaultValue=250.0,
                parentParameterName=INPUT,
                minValue=0.0,
            )
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
        lines = self.source(parameters, INPUT, context)
        collars = self.source(parameters, COLLARS, context)
        require_map_crs(collars.sourceCrs(), COLLARS, "the collars", "the collar points on the map")
        for name in (HOLE_ID_FIELD, DEPTH_FIELD):
            if not self.parameterAsString(parameters, name, context):
                raise ParameterProblem(name, "choose the field of the collar layer.")
        work_crs = working_crs(lines, context, feedback)
        work_wkt = crs_wkt(work_crs)
        parts = [
            p
            for p in read_section_parts(
                lines,
                self.parameterAsString(parameters, LINE_ID_FIELD, context),
                work_crs,
                context,
                feedback,
            )
            if p.coords is not None
        ]
        if not parts:
            raise ParameterProblem(INPUT, "none of the section lines can be used (see the log).")
        max_distance = self.parameterAsDouble(parameters, MAX_DISTANCE, context)
        network = SectionNetwork([p.coords for p in parts], 2 * max(max_distance, 1e-9))
        ledger = RunLedger(feedback)
        skipped = []  # (table, hole, fid, depth, reason)

        feedback.setProgress(5)
        holes = self._read_collars(
            parameters, context, collars, work_crs, work_wkt, network, max_distance, skipped
        )
        feedback.setProgress(15)
        stop_if_cancelled(feedback)
        surveys = self._read_table(parameters, context, SURVEYS, SURVEY_FIELDS, holes)
        feedback.setProgress(25)
        stop_if_cancelled(feedback)
        intervals = self._read_table(parameters, context, INTERVALS, INTERVAL_FIELDS, holes)
        feedback.setProgress(35)
        stop_if_cancelled(feedback)
        stations = self._stations(holes, surveys, skipped)
        valid_intervals = self._intervals(holes, intervals, skipped)
        feedback.setProgress(45)
        stop_if_cancelled(feedback)

        drawn = np.flatnonzero(holes["reason"] == "")
        samples = self._samples(holes, stations, valid_intervals, drawn)
        feedback.setProgress(60)
        stop_if_cancelled(feedback)
        sinks = self._sinks(parameters, context, lines)
        labels_of = np.array([p.label for p in parts], dtype=object)
        exaggeration = self.parameterAsDouble(parameters, VERTICAL_EXAGGERATION, context)
        to_map = transformer(work_wkt, crs_wkt(lines.sourceCrs()))
        self._write_holes(
            sinks,
            network,
            holes,
            samples,
            labels_of,
            exaggeration,
            to_map,
            valid_intervals,
            max_distance,
            feedback,
        )
        feedback.setProgress(90)
        stop_if_cancelled(feedback)
        for table, hole, fid, depth, reason in skipped:
            ledger.skip(reason)
            if sinks[SKIPPED][0] is not None:
                feature = QgsFeature()
                feature.setAttributes([table, hole, fid, depth, reason])
                sinks[SKIPPED][0].addFeature(feature, FAST_INSERT)
        ledger.read = len(holes["id"]) + len(surveys["hole"]) + len(intervals["hole"])
        ledger.written = ledger.read - len(skipped)
        feedback.pushInfo(
            f"Holes drawn: {len(drawn)} of {len(holes['id'])}; surveys used: "
            f"{int(surveys['used'].sum())} of {len(surveys['hole'])}; intervals drawn: "
            f"{len(valid_intervals['hole'])} of {len(intervals['hole'])}."
        )
        ledger.close()
        return {name: sink_id for name, (sink, sink_id) in sinks.items() if sink is not None}

    # Reading ------------------------------------------------------------

    def _fields(self, parameters, context, mapping):
        return {
            key: self.parameterAsString(parameters, name, context) for name, key in mapping.items()
        }

    def _read_collars(
        self, parameters, context, collars, work_crs, work_wkt, network, max_distance, skipped
    ):
        names = self._fields(parameters, context, COLLAR_FIELDS)
        values, fids, geometries = read_columns(
            collars, names, _parameters_of(COLLAR_FIELDS), "collar", with_geometry=True
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
        xyz = np.array([_point(g) for g in geometries], dtype=float).reshape(-1, 3)
        xy = np.column_stack(
            transformer(crs_wkt(collars.sourceCrs()), work_wkt)(xyz[:, 0], xyz[:, 1])
        )
        z = self._collar_elevations(parameters, context, xyz[:, 2], xy, work_crs)
        reasons = np.full(len(ids), "", dtype=object)
        seen = set()
        for i, hole in enumerate(ids):
            reasons[i] = (
                "null geometry"
                if np.isnan(xy[i, 0])
                else "missing hole id"
                if hole is None
                else "duplicate hole id"
                if hole in seen
                else depth_why[i]
                or incl_why[i]
                or az_why[i]
                or ("depth not positive" if depth[i] <= 0 else "")
                or ("inclination out of range" if abs(inclination[i]) > 90 else "")
                or ("no collar elevation" if np.isnan(z[i]) else "")
            )
            if hole is not None:
                seen.add(hole)
        landing = nearest_points(
            network, np.where(reasons[:, None] == "", xy, np.nan), max_distance
        )
        reasons = np.where(
            (reasons == "") & (landing.line < 0),
            np.where(landing.past_end, "beyond the end of the line", "beyond max distance"),
            reasons,
        )
        north = self.parameterAsEnum(parameters, NORTH_REFERENCE, context)
        convergence = (
            meridian_convergence(work_wkt, xy[:, 0], xy[:, 1])
            if north != GRID
            else np.zeros(len(ids))
        )
        declination = self.parameterAsDouble(parameters, DECLINATION, context)
        for i in np.flatnonzero(reasons != ""):
            skipped.append(("collars", ids[i], fids[i], None, str(reasons[i])))
        first_of = {}
        for i, hole in enumerate(ids):
            if hole is not None:
                first_of.setdefault(hole, i)  # a duplicate id refers to the first collar
        return {
            "id": ids,
            "index": first_of,
            "xy": xy,
            "z": z,
            "depth": depth,
            "inclination": inclination,
            "azimuth": to_grid(azimuth, north, convergence, declination),
            "north": north,
            "convergence": convergence,
            "declination": declination,
            "line": landing.line,
            "reason": reasons,
        }

    def _collar_elevations(self, parameters, context, z, xy, work_crs):
        dem = self.parameterAsRasterLayer(parameters, DEM, context)
        missing = np.isnan(z) & ~np.isnan(xy[:, 0])
        if dem is not None and missing.any():
            with bounded_gdal_cache():
                z = z.copy()
                z[missing] = DemSampler(dem, 1, 1.0, work_crs).elevations(xy[missing])
        return z

    def _read_table(self, parameters, context, name, mapping, holes):
        source = self.parameterAsSource(parameters, name, context)
        empty = {key: [] for key in mapping.values()}
        if source is None:
            return dict(empty, fid=[], collar=np.empty(0, dtype=int), used=np.empty(0, bool))
        names = self._fields(parameters, context, mapping)
        missing = [p for p, key in mapping.items() if not names[key] and key != "code"]
        if missing:
            raise ParameterProblem(missing[0], f"choose the field of the {name.lower()} table.")
        values, fids, _ = read_columns(source, names, _parameters_of(mapping), name.lower())
        values["hole"] = labels(values["hole"])
        values["fid"] = fids
        values["collar"] = lookup(values["hole"], holes["index"])
        values["used"] = np.zeros(len(fids), dtype=bool)
        return values

    # Checking -----------------------------------------------------------

    def _stations(self, holes, surveys, skipped):
        depth, _ = as_numbers(surveys["depth"], "depth")
        azimuth, _ = as_numbers(surveys["azimuth"], "azimuth")
        inclination, _ = as_numbers(surveys["inclination"], "inclination")
        collar = surveys["collar"]
        reasons = check_surveys(collar, depth, azimuth, inclination, holes["depth"])
        _refuse("surveys", surveys, depth, reasons, holes, skipped)
        good = reasons == ""
        surveys["used"] = good
        grid_azimuth = to_grid(
            azimuth[good], holes["north"], holes["convergence"][collar[good]], holes["declination"]
        )
        return assemble_stations(
            holes["inclination"],
            holes["azimuth"],
            collar[good],
            depth[good],
            inclination[good],
            grid_azimuth,
        )

    def _intervals(self, holes, intervals, skipped):
        top, _ = as_numbers(intervals["from"], "from")
        bottom, _ = as_numbers(intervals["to"], "to")
        collar = intervals["collar"]
        reasons = check_intervals(collar, top, bottom, holes["depth"])
        _refuse("intervals", intervals, top, reasons, holes, skipped)
        good = np.flatnonzero(reasons == "")
        codes = [intervals["code"][i] for i in good]
        return {
            "hole": collar[good],
            "from": top[good],
            "to": bottom[good],
            "code": ["" if c is None else str(c) for c in codes],
        }

    # Geometry -----------------------------------------------------------

    @staticmethod
    def _samples(holes, stations, intervals, drawn):
        """Depths drawn per hole (stations, interval ends, every DRAW_STEP,
        the bottom) and their positions: working-CRS xyz."""
        hole_parts, depth_parts = [], []
        for h in drawn:
            regular = np.arange(0.0, holes["depth"][h], DRAW_STEP)
            mine = intervals["hole"] == h
            extra = np.concatenate(
                (
                    stations.md[stations.hole == h],
                    intervals["from"][mine],
                    intervals["to"][mine],
                    [holes["depth"][h]],
                )
            )
            depths = np.unique(np.concatenate((regular, extra)))
            depths = depths[depths <= holes["depth"][h]]
            hole_parts.append(np.full(len(depths), h))
            depth_parts.append(depths)
        hole = np.concatenate(hole_parts) if hole_parts else np.empty(0, dtype=int)
        md = np.concatenate(depth_parts) if depth_parts else np.empty(0)
        offsets = station_offsets(
            stations.md, stations.inclination, stations.azimuth, stations.hole
        )
        enu = positions_at_depths(
            stations.md, stations.inclination, stations.azimuth, stations.hole, offsets, hole, md
        )
        xyz = np.column_stack((holes["xy"][hole] + enu[:, :2], holes["z"][hole] - enu[:, 2]))
        return {"hole": hole, "md": md, "xyz": xyz}

    def _write_holes(
        self,
        sinks,
        network,
        holes,
        samples,
        labels_of,
        exaggeration,
        to_map,
        intervals,
        max_distance,
        feedback,
    ):
        hole = samples["hole"]
        if len(hole) == 0:
            return
        chainage, offset = network.locate(holes["line"][hole], samples["xyz"][:, :2], extend=True)
        view = np.column_stack((chainage, samples["xyz"][:, 2] * exaggeration))
        starts = np.flatnonzero(np.r_[True, hole[1:] != hole[:-1]])
        drawn = hole[starts]
        group = np.cumsum(np.r_[True, hole[1:] != hole[:-1]]) - 1
        low = np.minimum.reduceat(offset, starts)
        high = np.maximum.reduceat(offset, starts)
        sections = labels_of[holes["line"][drawn]]
        for h, section, far in zip(drawn, sections, np.maximum(-low, high)):
            if far > max_distance:
                feedback.pushInfo(
                    f"Hole {holes['id'][h]} wanders up to {far:.1f} from "
                    f"section {section}, beyond the maximum distance."
                )
        add_features(
            sinks[OUTPUT][0],
            shapely.linestrings(view, indices=group),
            [
                [s, holes["id"][h], float(holes["depth"][h]), float(a), float(b), exaggeration]
                for s, h, a, b in zip(sections, drawn, low, high)
            ],
        )
        if sinks[OUTPUT_TRACES][0] is not None:
            map_x, map_y = to_map(samples["xyz"][:, 0], samples["xyz"][:, 1])
            trace = np.column_stack((map_x, map_y, samples["xyz"][:, 2]))
            add_features(
                sinks[OUTPUT_TRACES][0],
                shapely.linestrings(trace, indices=group),
                [[s, holes["id"][h], float(holes["depth"][h])] for s, h in zip(sections, drawn)],
            )
        if sinks[OUTPUT_INTERVALS][0] is not None and len(intervals["hole"]):
            self._write_intervals(
                sinks[OUTPUT_INTERVALS][0],
                holes,
                samples,
                intervals,
                view,
                offset,
                labels_of,
                exaggeration,
            )

    def _write_intervals(
        self, sink, holes, samples, intervals, view, offset, labels_of, exaggeration
    ):
        """Each interval as the run of drawn samples from its top to its
        bottom (both are among the samples)."""
        scale = 2.0 * (samples["md"].max() + 1.0)
        key = samples["hole"] * scale + samples["md"]
        first = np.searchsorted(key, intervals["hole"] * scale + intervals["from"], side="left")
        last = np.searchsorted(key, intervals["hole"] * scale + intervals["to"], side="right")
        count = last - first
        keep = np.flatnonzero(count >= 2)
        count, first = count[keep], first[keep]
        piece = np.repeat(np.arange(len(keep)), count)
        within = np.arange(count.sum()) - np.repeat(np.cumsum(count) - count, count)
        rows = np.repeat(first, count) + within
        starts = np.cumsum(count) - count
        low = np.minimum.reduceat(offset[rows], starts) if len(rows) else []
        high = np.maximum.reduceat(offset[rows], starts) if len(rows) else []
        collar = intervals["hole"][keep]
        add_features(
            sink,
            shapely.linestrings(view[rows], indices=piece),
            [
                [
                    labels_of[holes["line"][c]],
                    holes["id"][c],
                    float(intervals["from"][k]),
                    float(intervals["to"][k]),
                    intervals["code"][k],
                    float(a),
                    float(b),
                    exaggeration,
                ]
                for c, k, a, b in zip(collar, keep, low, high)
            ],
        )

    def _sinks(self, parameters, context, lines):
        section_crs = QgsCoordinateReferenceSystem.fromWkt(SECTION_CRS_WKT)
        specs = (
            (OUTPUT, F.HOLE_FIELDS, LINE_STRING, section_crs),
            (OUTPUT_INTERVALS, F.HOLE_INTERVAL_FIELDS, LINE_STRING, section_crs),
            (OUTPUT_TRACES, F.TRACE_FIELDS, LINE_STRING_Z, lines.sourceCrs()),
            (SKIPPED, F.HOLE_SKIPPED_FIELDS, NO_GEOMETRY, QgsCoordinateReferenceSystem()),
        )
        sinks = {
            name: self.parameterAsSink(parameters, name, context, computed_fields(names), kind, crs)
            for name, names, kind, crs in specs
        }
        if sinks[OUTPUT][0] is None:
            raise ParameterProblem(OUTPUT, "choose where to write this output.")
        return sinks


def _parameters_of(mapping):
    """{column: the parameter choosing its field} of a {parameter: column} mapping."""
    return {key: name for name, key in mapping.items()}


def _point(geometry):
    if geometry is None or geometry.isNull() or geometry.isEmpty():
        return (np.nan, np.nan, np.nan)
    point = next(geometry.constParts())
    return (point.x(), point.y(), point.z() if point.is3D() else np.nan)


def _refuse(table, rows, depth, reasons, holes, skipped):
    """Rows of a collar that is not drawn are refused too; every refused row
    joins ``skipped``. ``reasons`` is updated in place."""
    collar = rows["collar"]
    not_drawn = (reasons == "") & (collar >= 0)
    not_drawn[not_drawn] = holes["reason"][collar[not_drawn]] != ""
    reasons[not_drawn] = "collar skipped"
    for i in np.flatnonzero(reasons != ""):
        skipped.append((table, rows["hole"][i], rows["fid"][i], _depth(depth[i]), str(reasons[i])))


def _depth(value):
    return None if value != value else float(value)
