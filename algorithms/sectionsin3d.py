"""sectionwright:sectionsin3d — section views stood up on the map as a 3-D fence."""

from collections import defaultdict

import numpy as np
from qgis.core import (
    QgsCoordinateTransform,
    QgsFeature,
    QgsGeometry,
    QgsProcessingException,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsWkbTypes,
)

from .compat.null import plain
from .compat.qgis_compat import FAST_INSERT, NO_GEOMETRY, SOURCE_ANY_GEOMETRY
from .core.section_to_map import place_on_map
from .core.wkb import from_wkb, to_wkb
from .framework.base import INPUT, LINE_ID_FIELD, SKIPPED, SectionwrightAlgorithm
from .framework.ledger import RunLedger
from .framework.run_guard import stop_if_cancelled
from .inputs.section_lines import read_section_parts, working_crs
from .outputs import fields as F
from .outputs.schema import Schema
from .outputs.section_space import is_section_view
from .outputs.skipped import write_skipped

SECTION_LAYER = "SECTION_LAYER"
OUTPUT = "OUTPUT"

NOT_AMONG_LINES = "section not among the lines"
UNUSABLE_LINE = "section line unusable"
NO_GEOMETRY_REASON = "null geometry"
NO_EXAGGERATION = "missing ve"


class SectionsIn3dAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "sectionsin3d"
    DISPLAY_NAME = "Sections in 3-D"
    GROUP_ID = "sectiondrawing"
    # The output carries the section view's own fields; it computes none.
    OUTPUT_SCHEMAS = {OUTPUT: Schema(), SKIPPED: F.SKIPPED_SECTIONS}

    def initAlgorithm(self, config=None):
        tr = self.tr
        self.add_section_line_parameters()
        self.addParameter(
            QgsProcessingParameterFeatureSource(
                SECTION_LAYER,
                tr("Section-view layer"),
                [SOURCE_ANY_GEOMETRY],
            )
        )
        self.addParameter(QgsProcessingParameterFeatureSink(OUTPUT, tr("Sections in 3-D")))
        self.add_skipped_output()

    def processAlgorithm(self, parameters, context, feedback):
        lines = self.source(parameters, INPUT, context)
        view = self.source(parameters, SECTION_LAYER, context)
        self._check_section_view(view, parameters, context)
        work_crs = working_crs(lines, context, feedback)
        parts = read_section_parts(
            lines,
            self.parameterAsString(parameters, LINE_ID_FIELD, context),
            work_crs,
            context,
            feedback,
        )
        by_label = {part.label: part for part in parts}
        output_type = QgsWkbTypes.addZ(QgsWkbTypes.dropM(view.wkbType()))
        sink, sink_id = self.parameterAsSink(
            parameters, OUTPUT, context, view.fields(), output_type, lines.sourceCrs()
        )
        if sink is None:
            raise QgsProcessingException(self.invalidSinkError(parameters, OUTPUT))
        skipped, skipped_id = self.parameterAsSink(
            parameters,
            SKIPPED,
            context,
            F.SKIPPED_SECTIONS.qgs_fields(),
            NO_GEOMETRY,
            lines.sourceCrs(),
        )
        to_lines = QgsCoordinateTransform(work_crs, lines.sourceCrs(), context.transformContext())
        ledger = RunLedger(feedback)

        def skip(feature, label, reason):
            ledger.skip(reason)
            write_skipped(
                skipped,
                F.SKIPPED_SECTIONS.qgs_fields(),
                [None],
                {F.SECTION: [label], F.SOURCE_FID: [feature.id()], F.REASON: [reason]},
            )

        groups = defaultdict(list)
        total = max(view.featureCount(), 1)
        for feature in view.getFeatures():
            stop_if_cancelled(feedback)
            ledger.read += 1
            label, exaggeration = _section_and_exaggeration(feature)
            part = by_label.get(label)
            if part is None:
                skip(feature, label, NOT_AMONG_LINES)
            elif part.coords is None:
                skip(feature, label, f"{UNUSABLE_LINE}: {part.reason}")
            elif not feature.hasGeometry():
                skip(feature, label, NO_GEOMETRY_REASON)
            elif exaggeration is None:
                skip(feature, label, NO_EXAGGERATION)
            else:
                groups[(label, exaggeration)].append(feature)
            feedback.setProgress(40.0 * ledger.read / total)

        done = 0
        for (label, exaggeration), features in groups.items():
            stop_if_cancelled(feedback)
            section_view = from_wkb([bytes(f.geometry().asWkb()) for f in features])
            placed = place_on_map(by_label[label].coords, section_view, exaggeration)
            wkbs = to_wkb(placed)
            for feature, wkb in zip(features, wkbs):
                if wkb is None:
                    skip(feature, label, NO_GEOMETRY_REASON)
                    continue
                geometry = QgsGeometry()
                geometry.fromWkb(wkb)
                if not to_lines.isShortCircuited():
                    geometry.transform(to_lines)
                out = QgsFeature(feature)
                out.setGeometry(geometry)
                sink.addFeature(out, FAST_INSERT)
                ledger.written += 1
            done += len(features)
            feedback.setProgress(40.0 + 60.0 * done / total)
        feedback.setProgress(100.0)
        ledger.close()
        results = {OUTPUT: sink_id}
        if skipped is not None:
            results[SKIPPED] = skipped_id
        return results

    def _check_section_view(self, view, parameters, context):
        label = self.parameterDefinition(SECTION_LAYER).description()
        name = _layer_name(self, parameters, context)
        if not is_section_view(view.sourceCrs()):
            crs = view.sourceCrs()
            raise QgsProcessingException(
                f"{label}: '{name}' is a map layer ({crs.authid() or crs.description()}), "
                "not a section view. Give a section-view output of Sectionwright "
                "(x = chainage, y = elevation × exaggeration), such as the profile's "
                "section view, the geology strip, the dip ticks or the boreholes."
            )
        missing = [n for n in (F.SECTION, F.EXAGGERATION) if view.fields().lookupField(n) < 0]
        if missing:
            raise QgsProcessingException(
                f"{label}: '{name}' has no field {' or '.join(missing)}; every Sectionwright "
                "section-view output carries the section label in 'section' and its "
                "vertical exaggeration in 've'."
            )


def _layer_name(algorithm, parameters, context):
    layer = algorithm.parameterAsVectorLayer(parameters, SECTION_LAYER, context)
    return layer.name() if layer is not None else str(parameters.get(SECTION_LAYER))


def _section_and_exaggeration(feature):
    label = plain(feature[F.SECTION])
    label = "" if label is None else str(label)
    exaggeration = plain(feature[F.EXAGGERATION])
    try:
        exaggeration = float(exaggeration)
    except (TypeError, ValueError):
        return label, None
    if not np.isfinite(exaggeration) or exaggeration <= 0:
        return label, None
    return label, exaggeration
