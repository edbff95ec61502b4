"""sectionwright:geologycrossings — map geology along each section line."""

from dataclasses import dataclass, field
from typing import List

import numpy as np
import shapely
from qgis.core import (
    QgsCoordinateReferenceSystem,
    QgsFeature,
    QgsPoint,
    QgsProcessingParameterDistance,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterField,
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
from .core.apparent_dip import apparent_dip
from .core.crs import transformer
from .core.geology import (
    Intervals,
    boundary_crossings,
    contact_crossings,
    unit_at_chainage,
    unit_intervals,
)
from .core.lines import azimuth_at, positions_at, vertex_chainage
from .core.profile import profile_samples, section_runs
from .core.trace_fit import plane_fits, trace_windows
from .framework.base import (
    INPUT,
    LINE_ID_FIELD,
    SKIPPED,
    UNIT_FIELD,
    UNITS,
    VERTICAL_EXAGGERATION,
    SectionwrightAlgorithm,
    add_skipped_section,
    skipped_fields,
)
from .framework.ledger import RunLedger
from .framework.run_guard import ParameterProblem, stop_if_cancelled
from .inputs.dem import DemSampler, bounded_gdal_cache, sample_ahead
from .inputs.map_crs import require_map_crs
from .inputs.map_layers import read_features, read_unit_map
from .inputs.section_lines import crs_wkt, read_section_parts, working_crs
from .outputs import fields as F
from .outputs.carried_fields import computed_fields
from .outputs.geometry_io import to_qgis
from .outputs.section_space import SECTION_CRS_WKT
from .outputs.styles import UnitStripStyler

DEM = "DEM"
Z_FACTOR = "Z_FACTOR"
CONTACTS = "CONTACTS"
CONTACT_TYPE_FIELD = "CONTACT_TYPE_FIELD"
TRACE_WINDOW = "TRACE_WINDOW"
OUTPUT = "OUTPUT"
OUTPUT_INTERVALS = "OUTPUT_INTERVALS"

UNIT_BOUNDARY = "unit boundary"
DEFAULT_CONTACT_KIND = "contact"


@dataclass
class Crossing:
    section: int  # index into the usable section parts
    chainage: float
    kind: str
    before: int  # unit indices (-1: none)
    after: int
    contact: int = -1  # contact index, for the trace fit
    flags: List[str] = field(default_factory=list)


def _label(units, index):
    return units[index] if index >= 0 else ""


class GeologyCrossingsAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "geologycrossings"
    DISPLAY_NAME = "Map geology along sections"

    def initAlgorithm(self, config=None):
        tr = self.tr
        self.add_section_line_parameters()
        self.addParameter(QgsProcessingParameterRasterLayer(DEM, tr("DEM")))
        self.addParameter(
            QgsProcessingParameterNumber(
                Z_FACTOR,
                tr("Z factor (DEM values × factor = metres)"),
                NUMBER_DOUBLE,
                defaultValue=1.0,
            )
        )
        self.add_unit_parameters()
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                CONTACTS, tr("Contacts and faults (lines)"), [SOURCE_LINES], optional=True
            )
        )
        self.addParameter(
            QgsProcessingParameterField(
                CONTACT_TYPE_FIELD,
                tr("Contact type field (e.g. contact, fault)"),
                parentLayerParameterName=CONTACTS,
                optional=True,
            )
        )
        self.addParameter(
            QgsProcessingParameterDistance(
                TRACE_WINDOW,
                tr("Contact attitude from its trace within (0: off)"),
                defaultValue=0.0,
                parentParameterName=INPUT,
                minValue=0.0,
            )
        )
        self.add_exaggeration_parameter()
        self.addParameter(
            QgsProcessingParameterFeatureSink(OUTPUT, tr("Geology crossings (map)"), SOURCE_POINTS)
        )
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                OUTPUT_INTERVALS, tr("Geology strip (section view)"), SOURCE_LINES
            )
        )
        self.add_skipped_output()

    def processAlgorithm(self, parameters, context, feedback):
        lines = self.source(parameters, INPUT, context)
        dem = self.parameterAsRasterLayer(parameters, DEM, context)
        if dem is None:
            raise ParameterProblem(DEM, "the layer given is not a raster that can be read.")
        exaggeration = self.parameterAsDouble(parameters, VERTICAL_EXAGGERATION, context)
        window = self.parameterAsDouble(parameters, TRACE_WINDOW, context)
        work_crs = working_crs(lines, context, feedback)
        parts = read_section_parts(
            lines,
            self.parameterAsString(parameters, LINE_ID_FIELD, context),
            work_crs,
            context,
            feedback,
        )
        units, polygons, polygon_units = self._units(parameters, context, work_crs, feedback)
        contacts, kinds = self._contacts(parameters, context, work_crs, feedback)
        sinks = self._sinks(parameters, context, lines)
        ledger = RunLedger(feedback)
        usable = []
        for part in parts:
            ledger.read += 1
            if part.coords is None:
                ledger.skip(part.reason)
                add_skipped_section(sinks[SKIPPED][0], part)
            else:
                usable.append(part)

        polygon_tree = shapely.STRtree(polygons) if len(polygons) else None
        contact_tree = shapely.STRtree(contacts) if len(contacts) else None
        with bounded_gdal_cache():
            sampler = DemSampler(
                dem, 1, self.parameterAsDouble(parameters, Z_FACTOR, context), work_crs
            )
            step = sampler.cell_size(usable[0].coords[0]) if usable else 1.0
            intervals = [
                self._intervals(p.coords, polygons, polygon_units, polygon_tree) for p in usable
            ]
            crossings = self._crossings(usable, intervals, contacts, kinds, contact_tree)
            jobs = self._sample_jobs(usable, intervals, crossings, step)
            sampled = {}
            for index, ((chainage, xy), elevation) in enumerate(sample_ahead(jobs, sampler)):
                stop_if_cancelled(feedback)
                sampled[index] = (chainage, xy, elevation)
                feedback.setProgress(60.0 * (index + 1) / max(len(usable), 1))
            stop_if_cancelled(feedback)
            estimates = (
                self._trace_attitudes(usable, crossings, contacts, window, step, sampler)
                if window > 0
                else {}
            )
        to_map = transformer(crs_wkt(work_crs), crs_wkt(lines.sourceCrs()))
        by_section = {}
        for number, crossing in enumerate(crossings):
            by_section.setdefault(crossing.section, []).append((number, crossing))
        for index, part in enumerate(usable):
            stop_if_cancelled(feedback)
            chainage, xy, elevation = sampled[index]
            self._write_crossings(
                sinks[OUTPUT][0],
                part,
                by_section.get(index, []),
                units,
                chainage,
                elevation,
                to_map,
                estimates,
            )
            self._write_intervals(
                sinks[OUTPUT_INTERVALS][0],
                part,
                intervals[index],
                units,
                chainage,
                elevation,
                exaggeration,
            )
            ledger.written += 1
            feedback.pushInfo(
                f"Section {part.label}: {len(intervals[index].unit)} interval(s), "
                f"{len(by_section.get(index, []))} crossing(s)."
            )
            feedback.setProgress(70.0 + 30.0 * (index + 1) / len(usable))
        ledger.close()
        self._style(context, sinks[OUTPUT_INTERVALS][1], units)
        return {name: sink_id for name, (sink, sink_id) in sinks.items() if sink is not None}

    def _sinks(self, parameters, context, lines):
        section_crs = QgsCoordinateReferenceSystem.fromWkt(SECTION_CRS_WKT)
        sinks = {
            OUTPUT: self.required_sink(
                parameters,
                OUTPUT,
                context,
                computed_fields(F.CROSSING_FIELDS),
                POINT_Z,
                lines.sourceCrs(),
            ),
            OUTPUT_INTERVALS: self.required_sink(
                parameters,
                OUTPUT_INTERVALS,
                context,
                computed_fields(F.INTERVAL_FIELDS),
                LINE_STRING,
                section_crs,
            ),
            SKIPPED: self.parameterAsSink(
                parameters, SKIPPED, context, skipped_fields(), lines.wkbType(), lines.sourceCrs()
            ),
        }
        return sinks

    def _units(self, parameters, context, work_crs, feedback):
        source = self.optional_source(parameters, UNITS, context)
        if source is None:
            return [], np.empty(0, dtype=object), np.empty(0, dtype=int)
        unit_map = read_unit_map(
            source,
            self.parameterAsString(parameters, UNIT_FIELD, context),
            work_crs,
            context,
            feedback,
        )
        labels = unit_map.labels
        unnamed = int(sum(label is None or label == "" for label in labels))
        if unnamed:
            feedback.pushInfo(
                f"{unnamed} unit polygon(s) have no unit value: their ground counts as unmapped."
            )
        units = sorted({label for label in labels if label})
        index = {unit: i for i, unit in enumerate(units)}
        polygon_units = np.array(
            [index.get(label, -1) if label else -1 for label in labels], dtype=int
        )
        return units, unit_map.polygons, polygon_units

    def _contacts(self, parameters, context, work_crs, feedback):
        source = self.optional_source(parameters, CONTACTS, context)
        if source is None:
            return np.empty(0, dtype=object), []
        require_map_crs(source.sourceCrs(), CONTACTS, "the contacts", "the map's contact lines")
        kind_field = self.parameterAsString(parameters, CONTACT_TYPE_FIELD, context)
        if kind_field and source.fields().lookupField(kind_field) < 0:
            raise ParameterProblem(
                CONTACT_TYPE_FIELD, f"the contacts layer has no field {kind_field!r}."
            )
        contacts, kinds, unusable = read_features(source, kind_field, work_crs, context)
        if unusable:
            feedback.pushInfo(f"{unusable} contact feature(s) without usable geometry left out.")
        return contacts, [kind or DEFAULT_CONTACT_KIND for kind in kinds]

    @staticmethod
    def _intervals(coords, polygons, polygon_units, tree):
        if tree is None:
            length = vertex_chainage(coords)[-1]
            return Intervals(np.array([0.0]), np.array([length]), np.array([-1]), np.array([False]))
        return unit_intervals(coords, polygons, polygon_units, tree)

    @staticmethod
    def _crossings(parts, intervals, contacts, kinds, contact_tree):
        crossings = []
        for index, (part, stretch) in enumerate(zip(parts, intervals)):
            for chainage, before, after in zip(*boundary_crossings(stretch)):
                crossings.append(
                    Crossing(index, float(chainage), UNIT_BOUNDARY, int(before), int(after))
                )
            if contact_tree is None:
                continue
            chainage, contact, along = contact_crossings(part.coords, contacts, contact_tree)
            before = unit_at_chainage(stretch, chainage - 1e-3)
            after = unit_at_chainage(stretch, chainage + 1e-3)
            for ch, c, a, b, n in zip(chainage, contact, along, before, after):
                crossings.append(
                    Crossing(
                        index,
                        float(ch),
                        kinds[c],
                        int(b),
                        int(n),
                        int(c),
                        ["along_line"] if a else [],
                    )
                )
        crossings.sort(key=lambda c: (c.section, c.chainage))
        return crossings

    @staticmethod
    def _sample_jobs(parts, intervals, crossings, step):
        """Per section: the profile samples plus every interval end and
        crossing, so the strip breaks exactly at boundaries."""
        by_section = {}
        for crossing in crossings:
            by_section.setdefault(crossing.section, []).append(crossing.chainage)
        for index, (part, stretch) in enumerate(zip(parts, intervals)):
            chainage, _ = profile_samples(part.coords, step)
            extra = np.concatenate((stretch.start, stretch.end, by_section.get(index, [])))
            chainage = np.unique(np.concatenate((chainage, extra)))
            xy = positions_at(part.coords, vertex_chainage(part.coords), chainage)
            yield (chainage, xy), xy

    @staticmethod
    def _trace_attitudes(parts, crossings, contacts, window, step, sampler):
        """{crossing number: (dip direction, dip, apparent dip, rms, ill)}."""
        wanted = np.array([i for i, c in enumerate(crossings) if c.contact >= 0], dtype=int)
        if len(wanted) == 0:
            return {}
        xy = np.array(
            [_position(parts[crossings[i].section].coords, crossings[i].chainage) for i in wanted]
        )
        points, which = trace_windows(
            contacts, np.array([crossings[i].contact for i in wanted]), xy, window, step
        )
        z = sampler.elevations(points)
        keep = ~np.isnan(z)
        dip_direction, dip, rms, ill = plane_fits(
            np.column_stack((points[keep], z[keep])), which[keep]
        )
        line_azimuth = np.array(
            [
                azimuth_at(parts[crossings[i].section].coords, np.array([crossings[i].chainage]))[0]
                for i in wanted
            ]
        )
        count = len(wanted)
        dip_direction, dip, rms, ill = (
            _padded(a, count, fill)
            for a, fill in ((dip_direction, np.nan), (dip, np.nan), (rms, np.nan), (ill, True))
        )
        alpha, _ = apparent_dip(dip, dip_direction, line_azimuth)
        return {
            int(i): (dip_direction[k], dip[k], alpha[k], rms[k], bool(ill[k]))
            for k, i in enumerate(wanted)
        }

    @staticmethod
    def _write_crossings(sink, part, numbered, units, chainage, elevation, to_map, estimates):
        if not numbered:
            return
        at = np.array([c.chainage for _, c in numbered])
        z = elevation[np.minimum(np.searchsorted(chainage, at), len(chainage) - 1)]
        xy = positions_at(part.coords, vertex_chainage(part.coords), at)
        map_x, map_y = to_map(xy[:, 0], xy[:, 1])
        for (number, crossing), zz, x, y in zip(
            numbered, z.tolist(), map_x.tolist(), map_y.tolist()
        ):
            estimate = estimates.get(number, (np.nan,) * 4 + (False,))
            flags = crossing.flags + (["ill_conditioned"] if estimate[4] else [])
            feature = QgsFeature()
            feature.setGeometry(QgsPoint(x, y, zz))
            feature.setAttributes(
                [
                    part.label,
                    crossing.chainage,
                    None if zz != zz else zz,
                    crossing.kind,
                    _label(units, crossing.before),
                    _label(units, crossing.after),
                ]
                + [None if v != v else float(v) for v in estimate[:4]]
                + [",".join(flags)]
            )
            sink.addFeature(feature, FAST_INSERT)

    @staticmethod
    def _write_intervals(sink, part, stretch, units, chainage, elevation, exaggeration):
        for start, end, unit, overlap in zip(
            stretch.start, stretch.end, stretch.unit, stretch.overlap
        ):
            inside = (chainage >= start - 1e-9) & (chainage <= end + 1e-9)
            for run in section_runs(chainage[inside], elevation[inside], exaggeration):
                feature = QgsFeature()
                feature.setGeometry(to_qgis(shapely.LineString(run)))
                feature.setAttributes(
                    [
                        part.label,
                        _label(units, unit),
                        float(start),
                        float(end),
                        exaggeration,
                        "overlap" if overlap else "",
                    ]
                )
                sink.addFeature(feature, FAST_INSERT)

    def _style(self, context, layer_id, units):
        if context.willLoadLayerOnCompletion(layer_id):
            self.styler = UnitStripStyler(units, F.UNIT)
            context.layerToLoadOnCompletionDetails(layer_id).setPostProcessor(self.styler)


def _position(coords, chainage):
    return positions_at(coords, vertex_chainage(coords), np.array([chainage]))[0]


def _padded(values, count, fill):
    """Per-group results for all ``count`` groups (groups with no points at
    the end of the range are missing from a bincount-based fit)."""
    out = np.full(count, fill, dtype=np.asarray(values).dtype if len(values) else float)
    out[: len(values)] = values
    return out
