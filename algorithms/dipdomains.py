"""sectionwright:dipdomains — dip domains along sections and the attitude
worth plotting in each."""

from collections import Counter

import numpy as np
from qgis.core import (
    QgsFeature,
    QgsFeatureRequest,
    QgsProcessingException,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterNumber,
)
from qgis.PyQt.QtCore import QVariant

from .compat.qgis_compat import (
    FAST_INSERT,
    NO_GEOMETRY,
    NUMBER_DOUBLE,
    SKIP_GEOMETRY_CHECKS,
    SOURCE_POINTS,
    advanced,
)
from .core.attitudes import as_numbers
from .core.domains import domain_table, representatives, segment, signed_apparent_dip
from .framework.base import SKIPPED, SectionwrightAlgorithm
from .framework.ledger import RunLedger
from .outputs import fields as F
from .outputs.carried_fields import CarriedFields, computed_fields

ATTITUDES = "ATTITUDES"
ANGLE_TOLERANCE = "ANGLE_TOLERANCE"
MIN_COUNT = "MIN_COUNT"
OUTPUT = "OUTPUT"
OUTPUT_DOMAINS = "OUTPUT_DOMAINS"

ATTITUDES_LABEL = "Attitudes on sections"
REQUIRED = (F.SECTION, F.CHAINAGE, F.APPARENT_DIP, F.DIPS_TO)
OPTIONAL = (F.TRAVEL, F.APPARENT_DIP_SD, F.FLAGS, F.SOURCE_FID)


def _plain(value):
    """None for NULL (a null QVariant on 3.22, None later)."""
    return None if value is None or isinstance(value, QVariant) else value


class DipDomainsAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "dipdomains"
    DISPLAY_NAME = "Dip domains and representative attitudes"

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
        if feedback.isCanceled():
            return {}
        feedback.setProgress(60)
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
            if feedback.isCanceled():
                break
            attributes = feature.attributes()
            rows["attributes"].append(attributes)
            rows["geometries"].append(feature.geometry())
            rows["fids"].append(feature.id())
            for name, index in names.items():
                rows[name].append(_plain(attributes[index]) if index >= 0 else None)
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
        carried = CarriedFields(points.fields(), F.DOMAIN_POINT_FIELDS)
        carried.log_replaced(feedback, f"the {ATTITUDES_LABEL.lower()} layer")
        skipped_fields = CarriedFields(points.fields(), (F.REASON,))
        output, output_id = self.parameterAsSink(
            parameters, OUTPUT, context, carried.fields, points.wkbType(), points.sourceCrs()
        )
        domains, domains_id = self.parameterAsSink(
            parameters, OUTPUT_DOMAINS, context, computed_fields(F.DOMAIN_FIELDS), NO_GEOMETRY
        )
        for sink, name in ((output, OUTPUT), (domains, OUTPUT_DOMAINS)):
            if sink is None:
                raise QgsProcessingException(self.invalidSinkError(parameters, name))
        skipped, skipped_id = self.parameterAsSink(
            parameters,
            SKIPPED,
            context,
            skipped_fields.fields,
            points.wkbType(),
            points.sourceCrs(),
        )
        table = result["table"]
        dom_dip = np.where(result["group"] >= 0, table["mean_dip"][result["group"]], np.nan)
        ledger = RunLedger(feedback)
        per_section = Counter()
        total = max(len(rows["fids"]), 1)
        for i, attributes in enumerate(rows["attributes"]):
            if feedback.isCanceled():
                break
            ledger.read += 1
            feature = QgsFeature()
            feature.setGeometry(rows["geometries"][i])
            reason = result["reasons"][i]
            if reason:
                ledger.skip(reason)
                if skipped is not None:
                    feature.setAttributes(skipped_fields.row(attributes, [reason]))
                    skipped.addFeature(feature, FAST_INSERT)
                continue
            values = [
                int(result["domain"][i]),
                float(dom_dip[i]),
                int(result["represent"][i]),
                str(result["why"][i]),
            ]
            feature.setAttributes(carried.row(attributes, values))
            output.addFeature(feature, FAST_INSERT)
            ledger.written += 1
            per_section[result["labels"][i]] += 1
            if i % 1000 == 0:
                feedback.setProgress(60 + 30 * i / total)
        self._write_domains(domains, result)
        domain_count = Counter(result["labels"][table["rep"]].tolist())
        for label in result["sections"]:
            if label:
                feedback.pushInfo(
                    f"Section {label}: {per_section[label]} attitude(s) in "
                    f"{domain_count[label]} domain(s)."
                )
        ledger.close()
        feedback.setProgress(100)
        results = {OUTPUT: output_id, OUTPUT_DOMAINS: domains_id}
        if skipped is not None:
            results[SKIPPED] = skipped_id
        return results

    @staticmethod
    def _write_domains(sink, result):
        table = result["table"]
        for k, rep in enumerate(table["rep"]):
            feature = QgsFeature()
            feature.setAttributes(
                [
                    str(result["labels"][rep]),
                    int(result["domain"][rep]),
                    float(table["from_ch"][k]),
                    float(table["to_ch"][k]),
                    int(table["count"][k]),
                    float(table["mean_dip"][k]),
                    float(table["dip_sd"][k]),
                    str(table["dips_to"][k]),
                    int(result["source_ids"][rep]),
                ]
            )
            sink.addFeature(feature, FAST_INSERT)
