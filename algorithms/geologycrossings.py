"""sectionwright:geologycrossings — map geology along each section line."""

from dataclasses import dataclass, field
from typing import List

import numpy as np
import shapely
from qgis.core import (
    QgsProcessingParameterDistance,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterField,
)

from .compat.qgis_compat import LINE_STRING, POINT_Z, SOURCE_LINES, SOURCE_POINTS
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
    SKIPPED,
    UNIT_FIELD,
    UNITS,
    VERTICAL_EXAGGERATION,
    Z_FACTOR,
    SectionwrightAlgorithm,
    sink_results,
)
from .framework.ledger import RunLedger
from .framework.run_guard import ParameterProblem, stop_if_cancelled
from .inputs.dem import DemSampler, ElevationsAhead, bounded_gdal_cache
from .inputs.map_crs import require_map_crs
from .inputs.map_layers import read_features, read_unit_map
from .inputs.section_lines import crs_wkt, read_section_parts, working_crs
from .outputs import fields as F
from .outputs.feature_writer import write_rows
from .outputs.geometry_io import points_z
from .outputs.section_space import section_crs
from .outputs.skipped import skip_sections

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


@dataclass
class GeologySettings:
    """Every parameter of a run, read once."""

    lines: object
    id_field: str
    dem: object
    z_factor: float
    units: object  # None: not given
    unit_field: str
    contacts: object  # None: not given
    contact_type_field: str
    window: float  # 0: no trace attitudes
    exaggeration: float

    @classmethod
    def read(cls, algorithm, parameters, context):
        text = lambda name: algorithm.parameterAsString(parameters, name, context)  # noqa: E731
        number = lambda name: algorithm.parameterAsDouble(parameters, name, context)  # noqa: E731
        lines = algorithm.source(parameters, INPUT, context)
        return cls(
            lines=lines,
            id_field=algorithm.label_field(parameters, context, lines),
            dem=algorithm.dem(parameters, context),
            z_factor=number(Z_FACTOR),
            units=algorithm.optional_source(parameters, UNITS, context),
            unit_field=text(UNIT_FIELD),
            contacts=algorithm.optional_source(parameters, CONTACTS, context),
            contact_type_field=text(CONTACT_TYPE_FIELD),
            window=number(TRACE_WINDOW),
            exaggeration=number(VERTICAL_EXAGGERATION),
        )


class GeologyCrossingsAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "geologycrossings"
    DISPLAY_NAME = "Map geology along sections"
    OUTPUT_SCHEMAS = {
        OUTPUT: F.CROSSINGS,
        OUTPUT_INTERVALS: F.UNIT_INTERVALS,
        SKIPPED: F.SKIPPED_SECTIONS,
    }

    def initAlgorithm(self, config=None):
        tr = self.tr
        self.add_section_line_parameters()
        self.add_dem_parameter()
        self.add_z_factor_parameter()
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
        self.add_advanced(
            QgsProcessingParameterDistance(
                TRACE_WINDOW,
                tr("Contact attitude from its trace within (lines' CRS units; 0 = off)"),
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
        settings = GeologySettings.read(self, parameters, context)
        lines = settings.lines
        work_crs = working_crs(lines, context, feedback)
        parts = read_section_parts(lines, settings.id_field, work_crs, context, feedback)
        units, polygons, polygon_units = self._units(settings, work_crs, context, feedback)
        contacts, kinds = self._contacts(settings, work_crs, context, feedback)
        sinks = self._sinks(parameters, context, lines)
        ledger = RunLedger(feedback)
        ledger.read = len(parts)
        unusable = [p for p in parts if p.coords is None]
        for part in unusable:
            ledger.skip(part.reason)
        skip_sections(sinks[SKIPPED][0], unusable)
        usable = [p for p in parts if p.coords is not None]

        polygon_tree = shapely.STRtree(polygons) if len(polygons) else None
        contact_tree = shapely.STRtree(contacts) if len(contacts) else None
        with bounded_gdal_cache():
            sampler = DemSampler(settings.dem, 1, settings.z_factor, work_crs)
            step = sampler.cell_size(usable[0].coords[0]) if usable else 1.0
            intervals = []
            for part in usable:
                stop_if_cancelled(feedback)
                intervals.append(
                    self._intervals(part.coords, polygons, polygon_units, polygon_tree)
                )
                feedback.setProgress(10.0 * len(intervals) / len(usable))
            crossings = self._crossings(usable, intervals, contacts, kinds, contact_tree, feedback)
            sampled = self._sample(usable, intervals, crossings, step, sampler, feedback)
            stop_if_cancelled(feedback)
            estimates = (
                self._trace_attitudes(usable, crossings, contacts, settings.window, step, sampler)
                if settings.window > 0
                else {}
            )
        to_map = transformer(crs_wkt(work_crs), crs_wkt(lines.sourceCrs()))
        geology = (intervals, crossings, units, estimates)
        ledger.written = _write_sections(
            sinks, usable, sampled, geology, to_map, settings.exaggeration, feedback
        )
        ledger.close()
        return sink_results(sinks)

    def _sinks(self, parameters, context, lines):
        specs = (
            (OUTPUT, F.CROSSINGS.qgs_fields(), POINT_Z, lines.sourceCrs()),
            (OUTPUT_INTERVALS, F.UNIT_INTERVALS.qgs_fields(), LINE_STRING, section_crs()),
            (SKIPPED, F.SKIPPED_SECTIONS.qgs_fields(), lines.wkbType(), lines.sourceCrs()),
        )
        return self.open_sinks(parameters, context, specs, required=(OUTPUT, OUTPUT_INTERVALS))

    def _sample(self, parts, intervals, crossings, step, sampler, feedback):
        """[(chainage, xy, elevation)] per part, in order."""
        jobs = self._sample_jobs(parts, intervals, crossings, step)
        sampled = []
        with ElevationsAhead(jobs, sampler) as elevations:
            for (chainage, xy), elevation in elevations:
                stop_if_cancelled(feedback)
                sampled.append((chainage, xy, elevation))
                feedback.setProgress(20.0 + 40.0 * len(sampled) / max(len(parts), 1))
        return sampled

    @staticmethod
    def _units(settings, work_crs, context, feedback):
        if settings.units is None:
            return [], np.empty(0, dtype=object), np.empty(0, dtype=int)
        unit_map = read_unit_map(settings.units, settings.unit_field, work_crs, context, feedback)
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

    @staticmethod
    def _contacts(settings, work_crs, context, feedback):
        if settings.contacts is None:
            return np.empty(0, dtype=object), []
        require_map_crs(
            settings.contacts.sourceCrs(), CONTACTS, "the contacts", "the map's contact lines"
        )
        kind_field = settings.contact_type_field
        if kind_field and settings.contacts.fields().lookupField(kind_field) < 0:
            raise ParameterProblem(
                CONTACT_TYPE_FIELD, f"the contacts layer has no field {kind_field!r}."
            )
        contacts, kinds, unusable = read_features(
            settings.contacts, settings.contact_type_field, work_crs, context
        )
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
    def _crossings(parts, intervals, contacts, kinds, contact_tree, feedback):
        crossings = []
        for index, (part, stretch) in enumerate(zip(parts, intervals)):
            stop_if_cancelled(feedback)
            feedback.setProgress(10.0 + 10.0 * index / len(parts))
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


def _position(coords, chainage):
    return positions_at(coords, vertex_chainage(coords), np.array([chainage]))[0]


def _padded(values, count, fill):
    """Per-group results for all ``count`` groups (groups with no points at
    the end of the range are missing from a bincount-based fit)."""
    out = np.full(count, fill, dtype=np.asarray(values).dtype if len(values) else float)
    out[: len(values)] = values
    return out


def _write_sections(sinks, parts, sampled, geology, to_map, exaggeration, feedback):
    """The crossings and the geology strip of every sampled part;
    ``geology`` is (intervals, crossings, units, estimates). Returns how
    many parts were written."""
    intervals, crossings, units, estimates = geology
    by_section = {}
    for number, crossing in enumerate(crossings):
        by_section.setdefault(crossing.section, []).append((number, crossing))
    for index, part in enumerate(parts):
        stop_if_cancelled(feedback)
        chainage, _, elevation = sampled[index]
        numbered = by_section.get(index, [])
        _write_crossings(
            sinks[OUTPUT][0], part, numbered, units, chainage, elevation, to_map, estimates
        )
        _write_intervals(
            sinks[OUTPUT_INTERVALS][0],
            part,
            intervals[index],
            units,
            chainage,
            elevation,
            exaggeration,
        )
        feedback.pushInfo(
            f"Section {part.label}: {len(intervals[index].unit)} interval(s), "
            f"{len(numbered)} crossing(s)."
        )
        feedback.setProgress(70.0 + 30.0 * (index + 1) / len(parts))
    return len(sampled)


def _write_crossings(sink, part, numbered, units, chainage, elevation, to_map, estimates):
    if not numbered:
        return
    at = np.array([c.chainage for _, c in numbered])
    z = elevation[np.minimum(np.searchsorted(chainage, at), len(chainage) - 1)]
    xy = positions_at(part.coords, vertex_chainage(part.coords), at)
    map_x, map_y = to_map(xy[:, 0], xy[:, 1])
    no_estimate = (np.nan,) * 4 + (False,)
    estimate = np.array([estimates.get(n, no_estimate)[:4] for n, _ in numbered], dtype=float)
    ill = [estimates.get(n, no_estimate)[4] for n, _ in numbered]
    crossings = [c for _, c in numbered]
    columns = {
        F.SECTION: [part.label] * len(crossings),
        F.CHAINAGE: at,
        F.ELEVATION: z,
        F.KIND: [c.kind for c in crossings],
        F.UNIT_BEFORE: [_label(units, c.before) for c in crossings],
        F.UNIT_AFTER: [_label(units, c.after) for c in crossings],
        F.ESTIMATED_DIP_DIRECTION: estimate[:, 0],
        F.ESTIMATED_DIP: estimate[:, 1],
        F.ESTIMATED_APPARENT_DIP: estimate[:, 2],
        F.FIT_RMS: estimate[:, 3],
        F.FLAGS: [
            ",".join(c.flags + (["ill_conditioned"] if bad else []))
            for c, bad in zip(crossings, ill)
        ],
    }
    write_rows(sink, F.CROSSINGS.qgs_fields(), points_z(map_x, map_y, z), columns)


def _write_intervals(sink, part, stretch, units, chainage, elevation, exaggeration):
    """The ground line cut by unit: one line per unit stretch and unbroken
    run of elevations."""
    geometries, stretch_of = [], []
    for number, (start, end) in enumerate(zip(stretch.start, stretch.end)):
        inside = (chainage >= start - 1e-9) & (chainage <= end + 1e-9)
        for run in section_runs(chainage[inside], elevation[inside], exaggeration):
            geometries.append(shapely.LineString(run))
            stretch_of.append(number)
    which = np.array(stretch_of, dtype=int)
    columns = {
        F.SECTION: [part.label] * len(which),
        F.UNIT: [_label(units, u) for u in stretch.unit[which]],
        F.CHAINAGE_FROM: stretch.start[which],
        F.CHAINAGE_TO: stretch.end[which],
        F.EXAGGERATION: np.full(len(which), exaggeration),
        F.FLAGS: ["overlap" if o else "" for o in stretch.overlap[which]],
    }
    write_rows(sink, F.UNIT_INTERVALS.qgs_fields(), np.array(geometries, dtype=object), columns)
