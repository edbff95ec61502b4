"""sectionwright:dipdomains — dip domains along sections and the attitude
worth plotting in each."""

from collections import Counter

import numpy as np
from qgis.core import (
    QgsFeatureRequest,
    QgsProcessingException,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterNumber,
)

from .compat.null import plain
from .compat.qgis_compat import (
    NO_GEOMETRY,
    NUMBER_DOUBLE,
    SKIP_GEOMETRY_CHECKS,
    SOURCE_POINTS,
    advanced,
)
from .core.attitudes import as_numbers
from .core.domains import domain_table, representatives, segment, signed_apparent_dip
from .framework.base import SKIPPED, SectionwrightAlgorithm, sink_results
from .framework.ledger import RunLedger
from .framework.run_guard import stop_if_cancelled
from .outputs import fields as F
from .outputs.carried_fields import CarriedFields
from .outputs.feature_writer import write_rows
from .outputs.skipped import skip_refused

ATTITUDES = "ATTITUDES"
ANGLE_TOLERANCE = "ANGLE_TOLERANCE"
MIN_COUNT = "MIN_COUNT"
OUTPUT = "OUTPUT"
OUTPUT_DOMAINS = "OUTPUT_DOMAINS"

ATTITUDES_LABEL = "Attitudes on sections"
REQUIRED = (F.SECTION, F.CHAINAGE, F.APPARENT_DIP, F.DIPS_TO)
OPTIONAL = (F.TRAVEL, F.APPARENT_DIP_SD, F.FLAGS, F.SOURCE_FID)


class DipDomainsAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "dipdomains"
    DISPLAY_NAME = "Dip domains and representative attitudes"
    OUTPUT_SCHEMAS = {
        OUTPUT: F.DOMAIN_POINTS,
        OUTPUT_DOMAINS: F.DIP_DOMAINS,
        SKIPPED: F.SKIPPED_ROWS,
    }

    def initAlgorithm(self, config=None):
        tr = self.tr
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                ATTITUDES,
                tr(f"{ATTITUDES_LABEL} (map output of Project attitudes onto sections)"),
                [SOURCE_POINTS],
            )
        )
        self.addParameter(
            QgsProcessingParameterNumber(
                ANGLE_TOLERANCE,
                tr("Angle tolerance: change of apparent dip that starts a domain (degrees)"),
                NUMBER_DOUBLE,
                defaultValue=10.0,
                minValue=0.1,
                maxValue=90.0,
            )
        )
        self.addParameter(
            advanced(
                QgsProcessingParameterNumber(
                    MIN_COUNT,
                    tr("Fewest attitudes in a domain (where the dip direction allows)"),
                    defaultValue=1,
                    minValue=1,
                )
            )
        )
        self.addParameter(
            QgsProcessingParameterFeatureSink(
                OUTPUT, tr("Attitudes with domains and representatives (map)"), SOURCE_POINTS
            )
        )
        self.addParameter(QgsProcessingParameterFeatureSink(OUTPUT_DOMAINS, tr("Dip domains")))
        self.add_skipped_output()

    def processAlgorithm(self, parameters, context, feedback):
        points = self.source(parameters, ATTITUDES, context)
        tolerance = self.parameterAsDouble(parameters, ANGLE_TOLERANCE, context)
        min_count = self.parameterAsInt(parameters, MIN_COUNT, context)
        rows = self._read(points, feedback)
        feedback.setProgress(40)
        stop_if_cancelled(feedback)

        labels = np.array(
            [str(v).strip() if v is not None else "" for v in rows[F.SECTION]], dtype=object
        )
        chainage, _ = as_numbers(rows[F.CHAINAGE], F.CHAINAGE)
        app_dip, _ = as_numbers(rows[F.APPARENT_DIP], F.APPARENT_DIP)
        dips_to = np.array([str(v or "") for v in rows[F.DIPS_TO]], dtype=object)
        reasons = np.select(
            [labels == "", np.isnan(chainage), np.isnan(app_dip)],
            ["no section", "missing chainage", "missing app_dip"],
            "",
        ).astype(object)
        good = reasons == ""
        sections, code = np.unique(np.where(good, labels, ""), return_inverse=True)
        signed = signed_apparent_dip(app_dip, dips_to)
        source_ids = self._source_ids(rows)
        domain = segment(
            np.where(good, code, -1),
            np.where(good, chainage, np.nan),
            signed,
            tolerance,
            min_count,
            source_ids,
        )
        feedback.setProgress(60)
        stop_if_cancelled(feedback)
        group = np.full(len(domain), -1)
        _, group[good] = np.unique(
            code[good] * (domain.max(initial=0) + 1) + domain[good], return_inverse=True
        )
        travel, _ = as_numbers(rows[F.TRAVEL], F.TRAVEL)
        dip_sd, _ = as_numbers(rows[F.APPARENT_DIP_SD], F.APPARENT_DIP_SD)
        flags = np.array([str(v or "") for v in rows[F.FLAGS]], dtype=object)
        represent, why = representatives(group, travel, dip_sd, flags, source_ids)
        table = domain_table(group, chainage, signed, represent)
        return self._write(
            parameters,
            context,
            feedback,
            points,
            rows,
            dict(
                reasons=reasons,
                labels=labels,
                domain=domain,
                group=group,
                represent=represent,
                why=why,
                table=table,
                source_ids=source_ids,
                sections=sections,
            ),
        )

    @staticmethod
    def _read(points, feedback):
        """{field: raw values} of the fields dipdomains reads (None where the
        layer lacks an optional one), the attributes, geometries and ids."""
        names = {name: points.fields().lookupField(name) for name in REQUIRED + OPTIONAL}
        missing = [name for name in REQUIRED if names[name] < 0]
        if missing:
            raise QgsProcessingException(
                f"{ATTITUDES_LABEL}: the layer has no field {missing[0]!r}. Give it the map "
                "output of Project attitudes onto sections."
            )
        rows = {name: [] for name in names}
        rows.update(attributes=[], geometries=[], fids=[])
        total = max(points.featureCount(), 1)
        for number, feature in enumerate(
            points.getFeatures(QgsFeatureRequest(), SKIP_GEOMETRY_CHECKS)
        ):
            stop_if_cancelled(feedback)
            attributes = feature.attributes()
            rows["attributes"].append(attributes)
            rows["geometries"].append(feature.geometry())
            rows["fids"].append(feature.id())
            for name, index in names.items():
                rows[name].append(plain(attributes[index]) if index >= 0 else None)
            if number % 1000 == 0:
                feedback.setProgress(40 * number / total)
        return rows

    @staticmethod
    def _source_ids(rows):
        """The attitude's id in the layer it was carried from (``src_fid``)
        where known, else the feature id here."""
        given, _ = as_numbers(rows[F.SOURCE_FID], F.SOURCE_FID)
        return np.where(np.isnan(given), rows["fids"], given).astype(np.int64)

    def _write(self, parameters, context, feedback, points, rows, result):
        carried = CarriedFields(points.fields(), F.DOMAIN_POINTS)
        carried.log_replaced(feedback, f"the {ATTITUDES_LABEL.lower()} layer")
        skipped_fields = CarriedFields(points.fields(), F.SKIPPED_ROWS)
        crs = points.sourceCrs()
        sinks = self.open_sinks(
            parameters,
            context,
            (
                (OUTPUT, carried.qgs_fields(), points.wkbType(), crs),
                (OUTPUT_DOMAINS, F.DIP_DOMAINS.qgs_fields(), NO_GEOMETRY, crs),
                (SKIPPED, skipped_fields.qgs_fields(), points.wkbType(), crs),
            ),
            required=(OUTPUT, OUTPUT_DOMAINS),
        )
        ledger = RunLedger(feedback)
        good = skip_refused(
            ledger,
            sinks[SKIPPED][0],
            skipped_fields,
            result["reasons"],
            (rows["geometries"], rows["attributes"], result["source_ids"]),
        )
        table = result["table"]
        columns = {
            F.DOMAIN: result["domain"][good],
            F.DOMAIN_DIP: table["mean_dip"][result["group"][good]],
            F.REPRESENT: result["represent"][good].astype(int),
            F.WHY: result["why"][good],
        }
        write_rows(
            sinks[OUTPUT][0],
            carried.qgs_fields(),
            [rows["geometries"][i] for i in good],
            carried.columns([rows["attributes"][i] for i in good], columns),
        )
        feedback.setProgress(90)
        stop_if_cancelled(feedback)
        rep = table["rep"]
        write_rows(
            sinks[OUTPUT_DOMAINS][0],
            F.DIP_DOMAINS.qgs_fields(),
            None,
            {
                F.SECTION: result["labels"][rep],
                F.DOMAIN: result["domain"][rep],
                F.FROM_CHAINAGE: table["from_ch"],
                F.TO_CHAINAGE: table["to_ch"],
                F.COUNT: table["count"],
                F.MEAN_DIP: table["mean_dip"],
                F.DIP_SPREAD: table["dip_sd"],
                F.DIPS_TO: table["dips_to"],
                F.REPRESENTATIVE_FID: result["source_ids"][rep],
            },
        )
        per_section = Counter(result["labels"][good].tolist())
        domain_count = Counter(result["labels"][rep].tolist())
        for label in result["sections"]:
            if label:
                feedback.pushInfo(
                    f"Section {label}: {per_section[label]} attitude(s) in "
                    f"{domain_count[label]} domain(s)."
                )
        feedback.setProgress(100)
        ledger.close()
        return sink_results(sinks)
