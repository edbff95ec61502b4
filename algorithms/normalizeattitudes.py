"""sectionwright:normalizeattitudes — one clean notation for a mixed notebook."""

import numpy as np
from qgis.core import (
    QgsFeature,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
)

from .compat.qgis_compat import FAST_INSERT, SOURCE_ANY_VECTOR
from .core.orientation import strike_from_dip_direction
from .framework.base import SKIPPED, SectionwrightAlgorithm
from .framework.ledger import RunLedger
from .framework.run_guard import stop_if_cancelled
from .inputs.attitudes import AttitudeSettings, add_attitude_parameters
from .inputs.section_lines import crs_wkt
from .outputs import fields as F
from .outputs.carried_fields import CarriedFields

INPUT = "INPUT"
OUTPUT = "OUTPUT"
NO_POSITION = "no position for the north correction"


class NormalizeAttitudesAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "normalizeattitudes"
    DISPLAY_NAME = "Normalise attitude notation"

    def initAlgorithm(self, config=None):
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                INPUT, self.tr("Attitudes (points or a table)"), [SOURCE_ANY_VECTOR]
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

        output_fields = CarriedFields(source.fields(), F.ORIENTATION_FIELDS)
        skipped_fields = CarriedFields(source.fields(), (F.SOURCE_FID, F.REASON))
        output, output_id = self.required_sink(
            parameters, OUTPUT, context, output_fields.fields, source.wkbType(), source.sourceCrs()
        )
        skipped, skipped_id = self.parameterAsSink(
            parameters,
            SKIPPED,
            context,
            skipped_fields.fields,
            source.wkbType(),
            source.sourceCrs(),
        )
        strike = strike_from_dip_direction(dip_direction)
        ledger = RunLedger(feedback)
        for i in range(len(rows)):
            stop_if_cancelled(feedback)
            ledger.read += 1
            feature = QgsFeature()
            feature.setGeometry(rows.geometries[i])
            if reasons[i]:
                ledger.skip(reasons[i])
                if skipped is not None:
                    feature.setAttributes(
                        skipped_fields.row(rows.attributes[i], [rows.fids[i], reasons[i]])
                    )
                    skipped.addFeature(feature, FAST_INSERT)
                continue
            feature.setAttributes(
                output_fields.row(
                    rows.attributes[i],
                    [float(dip_direction[i]), float(rows.dip[i]), float(strike[i])],
                )
            )
            output.addFeature(feature, FAST_INSERT)
            ledger.written += 1
            if i % 1000 == 0:
                feedback.setProgress(50 + 50 * i / max(len(rows), 1))
        ledger.close()
        results = {OUTPUT: output_id}
        if skipped is not None:
            results[SKIPPED] = skipped_id
        return results

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
