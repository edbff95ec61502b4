"""sectionwright:normalizeattitudes — one clean notation for a mixed notebook."""

import numpy as np
from qgis.core import (
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
)

from .compat.qgis_compat import SOURCE_ANY_VECTOR, SOURCE_POINTS
from .core.orientation import strike_from_dip_direction
from .framework.base import SKIPPED, SectionwrightAlgorithm, sink_results
from .framework.ledger import RunLedger
from .framework.run_guard import stop_if_cancelled
from .inputs.attitudes import AttitudeSettings, add_attitude_parameters
from .inputs.section_lines import crs_wkt
from .outputs import fields as F
from .outputs.carried_fields import CarriedFields
from .outputs.feature_writer import write_rows
from .outputs.skipped import skip_refused

INPUT = "INPUT"
OUTPUT = "OUTPUT"
NO_POSITION = "no position for the north correction"


class NormalizeAttitudesAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "normalizeattitudes"
    DISPLAY_NAME = "Normalise attitude notation"
    OUTPUT_SCHEMAS = {OUTPUT: F.ORIENTATION, SKIPPED: F.SKIPPED_ROWS}

    def initAlgorithm(self, config=None):
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                INPUT, self.tr("Attitudes (points or a table)"), [SOURCE_POINTS, SOURCE_ANY_VECTOR]
            )
        )
        add_attitude_parameters(self, INPUT)
        self.addParameter(
            QgsProcessingParameterFeatureSink(OUTPUT, self.tr("Normalised attitudes"))
        )
        self.add_skipped_output()

    def processAlgorithm(self, parameters, context, feedback):
        source = self.source(parameters, INPUT, context)
        settings = AttitudeSettings(self, parameters, context)
        rows = settings.read(source, feedback, progress_share=50.0)
        dip_direction, reasons = self._grid(settings, source, rows, feedback)
        feedback.setProgress(50)
        stop_if_cancelled(feedback)
        output_fields = CarriedFields(source.fields(), F.ORIENTATION)
        skipped_fields = CarriedFields(source.fields(), F.SKIPPED_ROWS)
        crs = source.sourceCrs()
        sinks = self.open_sinks(
            parameters,
            context,
            (
                (OUTPUT, output_fields.qgs_fields(), source.wkbType(), crs),
                (SKIPPED, skipped_fields.qgs_fields(), source.wkbType(), crs),
            ),
            required=(OUTPUT,),
        )
        ledger = RunLedger(feedback)
        good = skip_refused(
            ledger,
            sinks[SKIPPED][0],
            skipped_fields,
            reasons,
            (rows.geometries, rows.attributes, rows.fids),
        )
        feedback.setProgress(75)
        stop_if_cancelled(feedback)
        columns = {
            F.DIP_DIRECTION: dip_direction[good],
            F.DIP: rows.dip[good],
            F.STRIKE: strike_from_dip_direction(dip_direction)[good],
        }
        write_rows(
            sinks[OUTPUT][0],
            output_fields.qgs_fields(),
            [rows.geometries[i] for i in good],
            output_fields.columns([rows.attributes[i] for i in good], columns),
        )
        feedback.setProgress(100)
        ledger.close()
        return sink_results(sinks)

    @staticmethod
    def _grid(settings, source, rows, feedback):
        """Grid azimuths of the layer's CRS; a table, or a layer in a
        geographic CRS, keeps true north (its grid north)."""
        reasons = rows.reasons.copy()
        if not settings.corrects_north:
            return rows.dip_direction % 360.0, reasons
        crs = source.sourceCrs()
        if not crs.isValid() or crs.isGeographic():
            feedback.pushInfo(
                "Azimuths are given relative to true north "
                "(the layer has no projected CRS whose grid they could follow)."
            )
            return settings.to_grid(rows.dip_direction, None, None, rows.declination), reasons
        no_position = np.isnan(rows.xyz[:, 0]) & (reasons == "")
        reasons[no_position] = NO_POSITION
        corrected = settings.to_grid(
            rows.dip_direction, rows.xyz[:, :2], crs_wkt(crs), rows.declination
        )
        return corrected, reasons
