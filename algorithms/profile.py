"""sectionwright:profile — the topographic profile along each section line."""

from dataclasses import dataclass

import numpy as np
from qgis.core import (
    QgsCoordinateTransform,
    QgsProcessing,
    QgsProcessingParameterBand,
    QgsProcessingParameterDistance,
    QgsProcessingParameterFeatureSink,
)

from .compat.qgis_compat import (
    MULTI_LINE_STRING,
    MULTI_LINE_STRING_ZM,
    POINT_Z,
    SOURCE_LINES,
    SOURCE_POINTS,
)
from .core.crs import transformer
from .core.profile import draped_runs, profile_samples, section_runs
from .framework.base import (
    DEM,
    INPUT,
    SKIPPED,
    VERTICAL_EXAGGERATION,
    Z_FACTOR,
    SectionwrightAlgorithm,
    sink_results,
)
from .framework.ledger import RunLedger
from .framework.parameter_names import DEM_BAND
from .framework.run_guard import stop_if_cancelled
from .inputs.dem import BATCH_SAMPLES, DemSampler, ElevationsAhead, bounded_gdal_cache
from .inputs.section_lines import crs_wkt, read_section_parts, working_crs
from .outputs import fields as F
from .outputs.feature_writer import multi_line_wkb, write_rows
from .outputs.geometry_io import points_z
from .outputs.section_space import section_crs
from .outputs.skipped import skip_sections

STEP = "STEP"
OUTPUT = "OUTPUT"
OUTPUT_LINE = "OUTPUT_LINE"
OUTPUT_SECTION = "OUTPUT_SECTION"


@dataclass
class ProfileSettings:
    """Every parameter of a run, read once."""

    lines: object
    id_field: str
    dem: object
    band: int
    z_factor: float
    step: float  # 0: the DEM's cell size
    exaggeration: float

    @classmethod
    def read(cls, algorithm, parameters, context):
        lines = algorithm.source(parameters, INPUT, context)
        return cls(
            lines=lines,
            id_field=algorithm.label_field(parameters, context, lines),
            dem=algorithm.dem(parameters, context),
            band=algorithm.parameterAsInt(parameters, DEM_BAND, context),
            z_factor=algorithm.parameterAsDouble(parameters, Z_FACTOR, context),
            step=algorithm.parameterAsDouble(parameters, STEP, context),
            exaggeration=algorithm.parameterAsDouble(parameters, VERTICAL_EXAGGERATION, context),
        )


class ProfileAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "profile"
    DISPLAY_NAME = "Topographic profile"
    OUTPUT_SCHEMAS = {
        OUTPUT_LINE: F.PROFILE_LINES,
        OUTPUT: F.PROFILE_POINTS,
        OUTPUT_SECTION: F.PROFILE_SECTIONS,
        SKIPPED: F.SKIPPED_SECTIONS,
    }

    def initAlgorithm(self, config=None):
        self.add_section_line_parameters()
        self.add_dem_parameter()
        self.add_advanced(
            QgsProcessingParameterBand(
                DEM_BAND,
                self.tr("DEM band"),
                defaultValue=1,
                parentLayerParameterName=DEM,
                optional=True,
            )
        )
        self.add_z_factor_parameter()
        self.addParameter(
            QgsProcessingParameterDistance(
                STEP,
                self.tr("Sampling step (lines' CRS units; 0 = the DEM's cell size)"),
                defaultValue=0.0,
                parentParameterName=INPUT,
                minValue=0.0,
            )
        )
        self.add_exaggeration_parameter()
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                OUTPUT_LINE,
                self.tr("Profile line (map, 3-D)"),
                SOURCE_LINES,
                # Optional, so that scripts written before it existed run on:
                # where they do not name it, it is a temporary layer.
                defaultValue=QgsProcessing.TEMPORARY_OUTPUT,
                optional=True,
                createByDefault=True,
            )
        )
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                OUTPUT,
                self.tr("Profile points (map, one per sample)"),
                SOURCE_POINTS,
                optional=True,
                createByDefault=False,
            )
        )
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                OUTPUT_SECTION, self.tr("Profile (section view)"), SOURCE_LINES
            )
        )
        self.add_skipped_output()

    def processAlgorithm(self, parameters, context, feedback):
        settings = ProfileSettings.read(self, parameters, context)
        lines = settings.lines
        work_crs = working_crs(lines, context, feedback)
        sampler = DemSampler(settings.dem, settings.band, settings.z_factor, work_crs)
        step = settings.step
        if step <= 0:
            step = self._cell_step(sampler, lines, work_crs, context)
            feedback.pushInfo(f"Sampling step: {step:.3f} (the DEM's cell size).")
        parts = read_section_parts(lines, settings.id_field, work_crs, context, feedback)
        to_map = transformer(crs_wkt(work_crs), crs_wkt(lines.sourceCrs()))
        ledger = RunLedger(feedback)
        jobs = self._sample_jobs(parts, step)
        with bounded_gdal_cache(), ElevationsAhead(jobs, sampler) as sampled:
            # The outputs are opened (a GeoPackage takes a while to create)
            # while the first batch of the DEM is being read.
            writer = ProfileWriter(self._sinks(parameters, context, lines), settings, feedback)
            for index, ((part, chainage, xy), elevation) in enumerate(sampled):
                stop_if_cancelled(feedback)
                ledger.read += 1
                if elevation is not None and np.isnan(elevation).all():
                    part.reason = "no DEM coverage"
                if part.reason:
                    ledger.skip(part.reason)
                    writer.skip(part)
                    feedback.pushInfo(f"Section {part.label} skipped: {part.reason}.")
                else:
                    writer.add(part.label, chainage, elevation, np.column_stack(to_map(*xy.T)))
                    ledger.written += 1
                    feedback.pushInfo(
                        f"Section {part.label}: length {chainage[-1]:.1f}, "
                        f"{len(chainage)} samples, "
                        f"{int(np.isnan(elevation).sum())} without elevation."
                    )
                feedback.setProgress(100.0 * (index + 1) / max(len(parts), 1))
            writer.flush()
        ledger.close()
        return sink_results(writer.sinks)

    def _sinks(self, parameters, context, lines):
        specs = (
            (OUTPUT_LINE, F.PROFILE_LINES.qgs_fields(), MULTI_LINE_STRING_ZM, lines.sourceCrs()),
            (OUTPUT, F.PROFILE_POINTS.qgs_fields(), POINT_Z, lines.sourceCrs()),
            (OUTPUT_SECTION, F.PROFILE_SECTIONS.qgs_fields(), MULTI_LINE_STRING, section_crs()),
            (SKIPPED, F.SKIPPED_SECTIONS.qgs_fields(), lines.wkbType(), lines.sourceCrs()),
        )
        return self.open_sinks(parameters, context, specs, required=(OUTPUT_SECTION,))

    @staticmethod
    def _sample_jobs(parts, step):
        """((part, chainage, xy), xy) per part; xy None for unusable parts.
        A generator: samples are made as the reader needs them."""
        for part in parts:
            if part.coords is None:
                yield (part, None, None), None
            else:
                chainage, xy = profile_samples(part.coords, step)
                yield (part, chainage, xy), xy

    @staticmethod
    def _cell_step(sampler, source, work_crs, context):
        centre = QgsCoordinateTransform(
            source.sourceCrs(), work_crs, context.transformContext()
        ).transform(source.sourceExtent().center())
        return sampler.cell_size((centre.x(), centre.y()))


class ProfileWriter:
    """The outputs of a run's sections: each section's samples (when asked
    for) as it comes, its lines on the map and in the section view in
    groups (one ``write_rows`` call per output and group rather than two
    per section) of ``GROUP`` sections or ``GROUP_SAMPLES`` vertices,
    whichever comes first, so that what waits is bounded like a DEM batch."""

    GROUP = 500  # sections
    GROUP_SAMPLES = BATCH_SAMPLES

    def __init__(self, sinks, settings, feedback):
        self.sinks = sinks
        self.exaggeration = settings.exaggeration
        self.feedback = feedback
        self._summaries, self._lines, self._views = [], [], []
        self._waiting = 0  # samples in the lines not yet written

    def skip(self, part):
        skip_sections(self.sinks[SKIPPED][0], [part])

    def add(self, label, chainage, elevation, map_xy):
        """One section part: its line on the map, its samples (when asked
        for) and its line in the section view."""
        valid = elevation[~np.isnan(elevation)]
        self._summaries.append((label, chainage[-1], valid.min(), valid.max()))
        if self.sinks[OUTPUT_LINE][0] is not None:
            self._lines.append(multi_line_wkb(draped_runs(map_xy, chainage, elevation), 4))
        runs = section_runs(chainage, elevation, self.exaggeration)
        self._views.append(multi_line_wkb(runs, 2))
        if self.sinks[OUTPUT][0] is not None:
            self._write_points(label, chainage, elevation, map_xy)
        self._waiting += len(chainage)
        if len(self._summaries) >= self.GROUP or self._waiting >= self.GROUP_SAMPLES:
            self.flush()

    def flush(self):
        if not self._summaries:
            return
        label, length, low, high = (list(column) for column in zip(*self._summaries))
        summary = {
            F.SECTION: label,
            F.LENGTH: length,
            F.MIN_ELEVATION: low,
            F.MAX_ELEVATION: high,
            F.EXAGGERATION: [self.exaggeration] * len(label),
        }
        if self._lines:
            line_sink = self.sinks[OUTPUT_LINE][0]
            fields = F.PROFILE_LINES.qgs_fields()
            write_rows(line_sink, fields, self._lines, summary, self.feedback)
        view_sink = self.sinks[OUTPUT_SECTION][0]
        fields = F.PROFILE_SECTIONS.qgs_fields()
        write_rows(view_sink, fields, self._views, summary, self.feedback)
        self._summaries, self._lines, self._views = [], [], []
        self._waiting = 0

    def _write_points(self, label, chainage, elevation, map_xy):
        samples = {
            F.SECTION: [label] * len(chainage),
            F.CHAINAGE: chainage,
            F.ELEVATION: elevation,
            F.X: map_xy[:, 0],
            F.Y: map_xy[:, 1],
        }
        points = points_z(map_xy[:, 0], map_xy[:, 1], elevation)
        write_rows(
            self.sinks[OUTPUT][0], F.PROFILE_POINTS.qgs_fields(), points, samples, self.feedback
        )
