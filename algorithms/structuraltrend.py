"""sectionwright:structuraltrend — the structure's trend from bedding
attitudes, the section azimuth it recommends, and how existing lines do."""

import numpy as np
import shapely
from qgis.core import (
    QgsCoordinateTransform,
    QgsCsException,
    QgsFeatureRequest,
    QgsProcessingException,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterField,
    QgsProcessingParameterNumber,
)

from .compat.qgis_compat import (
    LINE_STRING,
    NO_GEOMETRY,
    NUMBER_DOUBLE,
    SKIP_GEOMETRY_CHECKS,
    SOURCE_LINES,
    SOURCE_POINTS,
    SOURCE_POLYGONS,
    advanced,
)
from .core.carry import CarryOptions, carry_attitudes
from .core.crs import transformer
from .core.fabric import MIN_COUNT, fabric
from .core.projection import SectionNetwork
from .core.section_choice import (
    advice,
    longest_overlap,
    misfit,
    overall_azimuth,
    suggested_lines,
)
from .core.units import polygon_index_at
from .core.wkb import from_wkb
from .framework.base import (
    INPUT,
    LINE_ID_FIELD,
    MAX_DISTANCE,
    SKIPPED,
    SectionwrightAlgorithm,
    sink_results,
)
from .framework.ledger import RunLedger
from .framework.run_guard import stop_if_cancelled
from .inputs.attitudes import AttitudeSettings, add_attitude_parameters
from .inputs.section_lines import crs_wkt, read_section_parts, section_label, working_crs
from .outputs import fields as F
from .outputs.feature_writer import write_rows
from .outputs.skipped import write_skipped

ATTITUDES = "ATTITUDES"
AREAS = "AREAS"
AREA_FIELD = "AREA_FIELD"
OBLIQUE_ANGLE = "OBLIQUE_ANGLE"
OUTPUT = "OUTPUT"
OUTPUT_LINES = "OUTPUT_LINES"

WHOLE_LAYER = "all"
OUTSIDE = "outside every area"
TOO_FEW = f"area with fewer than {MIN_COUNT} attitudes"
NO_AREA_GEOMETRY = "area without usable geometry"


class StructuralTrendAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "structuraltrend"
    DISPLAY_NAME = "Structural trend and section orientation"
    OUTPUT_SCHEMAS = {
        OUTPUT: F.STRUCTURAL_TREND,
        OUTPUT_LINES: F.LINES_CHECKED,
        SKIPPED: F.SKIPPED_TREND_ROWS,
    }

    def initAlgorithm(self, config=None):
        tr = self.tr
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                ATTITUDES, tr("Attitudes (bedding points)"), [SOURCE_POINTS]
            )
        )
        add_attitude_parameters(self, ATTITUDES)
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                AREAS,
                tr("Areas (polygons; empty: the whole layer)"),
                [SOURCE_POLYGONS],
                optional=True,
            )
        )
        self.addParameter(
            QgsProcessingParameterField(
                AREA_FIELD,
                tr("Area name field (empty: feature id)"),
                parentLayerParameterName=AREAS,
                optional=True,
            )
        )
        self.add_section_line_parameters("Existing section lines to check", optional=True)
        self.add_max_distance_parameter("Maximum distance of a carried attitude from a line")
        self.addParameter(
            advanced(
                QgsProcessingParameterNumber(
                    OBLIQUE_ANGLE,
                    tr("Count attitudes whose strike is closer to the line than (degrees)"),
                    NUMBER_DOUBLE,
                    defaultValue=20.0,
                    minValue=0.0,
                    maxValue=90.0,
                )
            )
        )
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                OUTPUT, tr("Structural trend and suggested section lines (map)"), SOURCE_LINES
            )
        )
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                OUTPUT_LINES, tr("Existing lines checked (map)"), SOURCE_LINES, optional=True
            )
        )
        self.add_skipped_output()

    def processAlgorithm(self, parameters, context, feedback):
        points = self.source(parameters, ATTITUDES, context)
        if not points.sourceCrs().isValid():
            raise QgsProcessingException(
                "Attitudes: the attitude layer has no coordinate reference system; set one."
            )
        lines = self.parameterAsSource(parameters, INPUT, context)
        areas_source = self.optional_source(parameters, AREAS, context)
        settings = AttitudeSettings(self, parameters, context)
        if lines is not None:
            work_crs, out_crs = working_crs(lines, context, feedback), lines.sourceCrs()
        else:
            work_crs = working_crs(points, context, feedback, ("Attitudes", "the attitudes"))
            out_crs = points.sourceCrs()
        work_wkt = crs_wkt(work_crs)
        ledger = RunLedger(feedback)
        skipped_rows = []

        rows = settings.read(points, feedback, progress_share=30.0)
        xy = np.column_stack(
            transformer(crs_wkt(points.sourceCrs()), work_wkt)(rows.xyz[:, 0], rows.xyz[:, 1])
        )
        reasons = rows.geometry_reasons
        reasons = np.where(reasons == "", rows.reasons, reasons)
        dip_direction = settings.to_grid(rows.dip_direction, xy, work_wkt, rows.declination)
        areas = self._areas(areas_source, parameters, work_crs, context, feedback, skipped_rows)
        if areas is None:
            group = np.zeros(len(rows), dtype=int)
            labels = [WHOLE_LAYER]
            readable = np.flatnonzero(reasons == "")
            regions = [_extent(xy[readable])]
        else:
            labels, regions = areas
            group = polygon_index_at(regions, np.where(np.isfinite(xy), xy, 0.0))
            reasons = np.where((reasons == "") & (group < 0), OUTSIDE, reasons)
        usable = reasons == ""
        result = fabric(np.where(usable, dip_direction, np.nan), rows.dip, group, len(labels))
        too_few = result["n"] < MIN_COUNT
        reasons = np.where(usable & too_few[np.maximum(group, 0)], TOO_FEW, reasons)
        for i in np.flatnonzero(reasons != ""):
            skipped_rows.append(("attitudes", rows.fids[i], reasons[i]))
        ledger.read += len(rows)
        ledger.written += int(np.sum(reasons == ""))
        feedback.setProgress(50)
        stop_if_cancelled(feedback)

        to_out = transformer(work_wkt, crs_wkt(out_crs))
        sinks = self._sinks(parameters, context, out_crs)
        suggested = suggested_lines(np.asarray(regions, dtype=object), result["best_az"])
        self._write_areas(sinks[OUTPUT][0], labels, result, suggested, to_out, feedback)
        area_count = len(labels) if areas is not None else 0
        ledger.read += area_count + sum(1 for r in skipped_rows if r[0] == "areas")
        ledger.written += int(np.sum(~too_few)) if areas is not None else 0
        for k in np.flatnonzero(too_few) if areas is not None else []:
            skipped_rows.append(("areas", None, f"{TOO_FEW}: {labels[k]}"))
        feedback.setProgress(70)
        stop_if_cancelled(feedback)

        if lines is not None:
            self._check_lines(
                parameters,
                context,
                feedback,
                lines,
                work_crs,
                (xy, dip_direction, rows.dip, reasons),
                (labels, regions if areas is not None else None, result),
                (sinks, to_out, ledger, skipped_rows),
            )
        self._write_skipped(sinks[SKIPPED][0], skipped_rows, ledger)
        ledger.close()
        feedback.setProgress(100)
        return sink_results(sinks)

    def _areas(self, source, parameters, work_crs, context, feedback, skipped_rows):
        """(labels, polygons in the working CRS) of the usable areas, or None
        without AREAS; unusable ones are added to ``skipped_rows``."""
        if source is None:
            return None
        if source.featureCount() == 0:
            feedback.pushInfo("Areas: the layer is empty; one result for the whole layer.")
            return None
        field = self.parameterAsString(parameters, AREA_FIELD, context)
        if field and source.fields().lookupField(field) < 0:
            raise QgsProcessingException(
                f"Area name field: the areas layer has no field {field!r}."
            )
        to_working = QgsCoordinateTransform(
            source.sourceCrs(), work_crs, context.transformContext()
        )
        labels, wkbs = [], []
        for feature in source.getFeatures(QgsFeatureRequest(), SKIP_GEOMETRY_CHECKS):
            stop_if_cancelled(feedback)
            geometry = feature.geometry()
            try:
                if geometry is None or geometry.isNull() or geometry.isEmpty():
                    raise QgsCsException("empty")
                geometry.transform(to_working)
            except QgsCsException:
                skipped_rows.append(("areas", feature.id(), NO_AREA_GEOMETRY))
                continue
            labels.append(section_label(feature, field))
            wkbs.append(bytes(geometry.asWkb()))
        if not labels:
            raise QgsProcessingException("Areas: none of the area polygons can be used.")
        polygons = shapely.force_2d(from_wkb(np.array(wkbs, dtype=object)))
        invalid = ~shapely.is_valid(polygons)
        polygons[invalid] = shapely.make_valid(polygons[invalid])
        return labels, polygons

    def _sinks(self, parameters, context, out_crs):
        return self.open_sinks(
            parameters,
            context,
            (
                (OUTPUT, F.STRUCTURAL_TREND.qgs_fields(), LINE_STRING, out_crs),
                (OUTPUT_LINES, F.LINES_CHECKED.qgs_fields(), LINE_STRING, out_crs),
                (SKIPPED, F.SKIPPED_TREND_ROWS.qgs_fields(), NO_GEOMETRY, out_crs),
            ),
            required=(OUTPUT,),
        )

    @staticmethod
    def _write_areas(sink, labels, result, suggested, to_out, feedback):
        for k in np.flatnonzero(result["n"] < MIN_COUNT):
            feedback.pushInfo(
                f"Area {labels[k]}: {result['n'][k]} usable attitude(s), fewer than the "
                f"{MIN_COUNT} a fabric needs; no result."
            )
        kept = np.flatnonzero(result["n"] >= MIN_COUNT)
        columns = {name: result[name][kept] for name in F.STRUCTURAL_TREND.names[1:]}
        columns[F.AREA] = [labels[k] for k in kept]
        geometries = np.full(len(kept), None, dtype=object)
        for i, k in enumerate(kept):
            line = suggested[k]
            if line is not None:
                coords = shapely.get_coordinates(line)
                geometries[i] = shapely.linestrings(np.column_stack(to_out(*coords.T)))
            feedback.pushInfo(_area_summary(labels[k], result, k, suggested[k]))
        write_rows(sink, F.STRUCTURAL_TREND.qgs_fields(), geometries, columns)

    def _check_lines(self, parameters, context, feedback, lines, work_crs, attitudes, areas, out):
        xy, dip_direction, dip, reasons = attitudes
        labels, regions, result = areas
        sinks, to_out, ledger, skipped_rows = out
        id_field = self.parameterAsString(parameters, LINE_ID_FIELD, context)
        parts = read_section_parts(lines, id_field, work_crs, context, feedback)
        ledger.read += len(parts)
        for part in parts:
            if part.coords is None:
                skipped_rows.append(("sections", part.fid, f"{part.reason}: {part.label}"))
        parts = [p for p in parts if p.coords is not None]
        if not parts:
            return
        max_distance = self.parameterAsDouble(parameters, MAX_DISTANCE, context)
        network = SectionNetwork([p.coords for p in parts], 2 * max(max_distance, 1e-9))
        usable = reasons == ""
        record = carry_attitudes(
            network,
            np.where(usable[:, None], xy, np.nan),
            np.full(len(xy), np.nan),
            np.where(usable, dip_direction, np.nan),
            np.where(usable, dip, np.nan),
            CarryOptions(
                max_distance=max_distance,
                oblique_angle=self.parameterAsDouble(parameters, OBLIQUE_ANGLE, context),
            ),
        )
        carried = record["line"] >= 0
        oblique = carried & np.array(["oblique" in f for f in record["flags"]], dtype=bool)
        n_near = np.bincount(record["line"][carried], minlength=len(parts))
        n_oblique = np.bincount(record["line"][oblique], minlength=len(parts))
        geometries = np.array([shapely.LineString(p.coords) for p in parts], dtype=object)
        if regions is None:
            area = np.zeros(len(parts), dtype=int)
        else:
            area = longest_overlap(geometries, regions)
        known = area >= 0
        best = np.where(known, result["best_az"][np.maximum(area, 0)], np.nan)
        line_az = np.array([overall_azimuth(p.coords) for p in parts])
        off = misfit(line_az, best)
        pattern = np.where(known, result["pattern"][np.maximum(area, 0)], "").astype(object)
        plunge = np.where(known, result["axis_pl"][np.maximum(area, 0)], np.nan)
        texts = advice(off, best, n_near, n_oblique, pattern, plunge)
        texts = np.where(known, texts, OUTSIDE)
        for i, part in enumerate(parts):
            feedback.pushInfo(
                f"Section {part.label}: azimuth {line_az[i]:.0f}°, misfit "
                + (f"{off[i]:.0f}°" if np.isfinite(off[i]) else "none")
                + f", {n_near[i]} attitude(s) within reach ({n_oblique[i]} oblique): {texts[i]}."
            )
        ledger.written += len(parts)
        sink = sinks[OUTPUT_LINES][0]
        if sink is not None:
            columns = {
                F.SECTION: [p.label for p in parts],
                F.AREA: [labels[a] if a >= 0 else None for a in area],
                F.LINE_AZIMUTH: line_az,
                F.BEST_AZIMUTH: best,
                F.MISFIT: off,
                F.NEAR_COUNT: n_near,
                F.OBLIQUE_COUNT: n_oblique,
                F.ADVICE: texts,
            }
            mapped = [shapely.linestrings(np.column_stack(to_out(*p.coords.T))) for p in parts]
            write_rows(sink, F.LINES_CHECKED.qgs_fields(), np.array(mapped, dtype=object), columns)

    @staticmethod
    def _write_skipped(sink, skipped_rows, ledger):
        for _, _, reason in skipped_rows:
            ledger.skip(reason)
        tables, fids, reasons = zip(*skipped_rows) if skipped_rows else ((), (), ())
        columns = {F.TABLE: tables, F.SOURCE_FID: fids, F.REASON: reasons}
        write_skipped(sink, F.SKIPPED_TREND_ROWS.qgs_fields(), None, columns)


def _extent(xy):
    """The rectangle around the attitudes (the whole layer's area)."""
    if len(xy) == 0:
        return shapely.Polygon()
    return shapely.box(*xy.min(axis=0), *xy.max(axis=0))


def _area_summary(label, result, k, line):
    pattern = result["pattern"][k]
    text = (
        f"Area {label}: {result['n'][k]} attitude(s), {pattern} (K {result['shape'][k]:.2f}), "
        f"mean plane {result['mean_dd'][k]:03.0f}/{result['mean_dip'][k]:02.0f}, "
        f"fold axis {result['axis_tr'][k]:03.0f}/{result['axis_pl'][k]:02.0f}"
    )
    if np.isfinite(result["best_az"][k]):
        text += f"; recommended section azimuth {result['best_az'][k]:.0f}°"
    if line is not None:
        text += f"; suggested line {shapely.length(line):.0f} long"
    return text + "."
