"""sectionwright:profile — the topographic profile along each section line."""

import numpy as np
from qgis.core import (
    QgsCoordinateReferenceSystem,
    QgsCoordinateTransform,
    QgsProcessing,
    QgsProcessingException,
    QgsProcessingParameterBand,
    QgsProcessingParameterDistance,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterNumber,
    QgsProcessingParameterRasterLayer,
)

from .compat.qgis_compat import (
    MULTI_LINE_STRING,
    MULTI_LINE_STRING_ZM,
    NUMBER_DOUBLE,
    POINT_Z,
    SOURCE_LINES,
    SOURCE_POINTS,
)
from .core.crs import transformer
from .core.profile import draped_runs, profile_samples, section_runs
from .framework.base import (
    INPUT,
    LINE_ID_FIELD,
    SKIPPED,
    VERTICAL_EXAGGERATION,
    SectionwrightAlgorithm,
    add_skipped_section,
    skipped_fields,
)
from .framework.ledger import RunLedger
from .inputs.dem import DemSampler, bounded_gdal_cache, sample_ahead
from .inputs.section_lines import crs_wkt, read_section_parts, working_crs
from .outputs import fields as F
from .outputs.carried_fields import computed_fields
from .outputs.feature_writer import multi_line_wkb, point_z_wkbs, write_rows
from .outputs.section_space import SECTION_CRS_WKT

DEM = "DEM"
DEM_BAND = "DEM_BAND"
Z_FACTOR = "Z_FACTOR"
STEP = "STEP"
OUTPUT = "OUTPUT"
OUTPUT_LINE = "OUTPUT_LINE"
OUTPUT_SECTION = "OUTPUT_SECTION"

SAMPLE_FIELDS = (F.SECTION, F.CHAINAGE, F.ELEVATION, F.X, F.Y)
LINE_FIELDS = (F.SECTION, F.LENGTH, F.MIN_ELEVATION, F.MAX_ELEVATION)
SECTION_FIELDS = LINE_FIELDS + (F.EXAGGERATION,)


class ProfileAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "profile"
    DISPLAY_NAME = "Topographic profile"

    def initAlgorithm(self, config=None):
        self.add_section_line_parameters()
        self.addParameter(QgsProcessingParameterRasterLayer(DEM, self.tr("DEM")))
        self.addParameter(
            QgsProcessingParameterBand(
                DEM_BAND,
                self.tr("DEM band"),
                defaultValue=1,
                parentLayerParameterName=DEM,
                optional=True,
            )
        )
        self.addParameter(
            QgsProcessingParameterNumber(
                Z_FACTOR,
                self.tr("Z factor (DEM values × factor = metres)"),
                NUMBER_DOUBLE,
                defaultValue=1.0,
            )
        )
        self.addParameter(
            QgsProcessingParameterDistance(
                STEP,
                self.tr("Sampling step (0: the DEM's cell size)"),
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
        source = self.source(parameters, INPUT, context)
        id_field = self.parameterAsString(parameters, LINE_ID_FIELD, context)
        dem = self.parameterAsRasterLayer(parameters, DEM, context)
        if dem is None:
            raise QgsProcessingException(
                self.tr("DEM: the layer given is not a raster that can be read.")
            )
        band = self.parameterAsInt(parameters, DEM_BAND, context)
        z_factor = self.parameterAsDouble(parameters, Z_FACTOR, context)
        step = self.parameterAsDouble(parameters, STEP, context)
        exaggeration = self.parameterAsDouble(parameters, VERTICAL_EXAGGERATION, context)

        work_crs = working_crs(source, context, feedback)
        sampler = DemSampler(dem, band, z_factor, work_crs)
        if step <= 0:
            step = self._cell_step(sampler, source, work_crs, context)
            feedback.pushInfo(f"Sampling step: {step:.3f} (the DEM's cell size).")

        sinks = self._open_sinks(parameters, context, source)
        parts = read_section_parts(source, id_field, work_crs, context, feedback)
        to_map = transformer(crs_wkt(work_crs), crs_wkt(source.sourceCrs()))
        ledger = RunLedger(feedback)
        with bounded_gdal_cache():
            sampled = sample_ahead(self._sample_jobs(parts, step), sampler)
            for index, ((part, chainage, xy), elevation) in enumerate(sampled):
                if feedback.isCanceled():
                    break
                ledger.read += 1
                if elevation is not None and np.isnan(elevation).all():
                    part.reason = "no DEM coverage"
                if part.reason:
                    ledger.skip(part.reason)
                    add_skipped_section(sinks[SKIPPED][0], part)
                    feedback.pushInfo(f"Section {part.label} skipped: {part.reason}.")
                else:
                    map_xy = np.column_stack(to_map(*xy.T))
                    self._write_part(sinks, part.label, chainage, elevation, map_xy, exaggeration)
                    ledger.written += 1
                    feedback.pushInfo(
                        f"Section {part.label}: length {chainage[-1]:.1f}, "
                        f"{len(chainage)} samples, "
                        f"{int(np.isnan(elevation).sum())} without elevation."
                    )
                feedback.setProgress(100.0 * (index + 1) / max(len(parts), 1))
        ledger.close()
        return {name: sink_id for name, (sink, sink_id, _) in sinks.items() if sink is not None}

    def _open_sinks(self, parameters, context, source):
        """{name: (sink, id, fields)}; the sink is None for an optional output
        not asked for."""
        map_crs = source.sourceCrs()
        section_crs = QgsCoordinateReferenceSystem.fromWkt(SECTION_CRS_WKT)
        sinks = {}
        for name, fields, kind, crs in (
            (OUTPUT_LINE, computed_fields(LINE_FIELDS), MULTI_LINE_STRING_ZM, map_crs),
            (OUTPUT, computed_fields(SAMPLE_FIELDS), POINT_Z, map_crs),
            (OUTPUT_SECTION, computed_fields(SECTION_FIELDS), MULTI_LINE_STRING, section_crs),
            (SKIPPED, skipped_fields(), source.wkbType(), map_crs),
        ):
            sink, sink_id = self.parameterAsSink(parameters, name, context, fields, kind, crs)
            sinks[name] = (sink, sink_id, fields)
        for name in (OUTPUT_SECTION,):
            if sinks[name][0] is None:
                raise QgsProcessingException(self.invalidSinkError(parameters, name))
        return sinks

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

    @staticmethod
    def _write_part(sinks, label, chainage, elevation, map_xy, exaggeration):
        """The outputs of one section part: its line on the map, its samples
        (when asked for) and its line in the section view."""
        valid = elevation[~np.isnan(elevation)]
        summary = {
            F.SECTION: [label],
            F.LENGTH: [chainage[-1]],
            F.MIN_ELEVATION: [valid.min()],
            F.MAX_ELEVATION: [valid.max()],
            F.EXAGGERATION: [exaggeration],
        }
        line_sink, _, fields = sinks[OUTPUT_LINE]
        if line_sink is not None:
            line = multi_line_wkb(draped_runs(map_xy, chainage, elevation), 4)
            write_rows(line_sink, fields, [line], summary)
        points_sink, _, fields = sinks[OUTPUT]
        if points_sink is not None:
            samples = {
                F.SECTION: [label] * len(chainage),
                F.CHAINAGE: chainage,
                F.ELEVATION: elevation,
                F.X: map_xy[:, 0],
                F.Y: map_xy[:, 1],
            }
            points = point_z_wkbs(np.column_stack((map_xy, elevation)))
            write_rows(points_sink, fields, points, samples)
        view = multi_line_wkb(section_runs(chainage, elevation, exaggeration), 2)
        section_sink, _, fields = sinks[OUTPUT_SECTION]
        write_rows(section_sink, fields, [view], summary)
