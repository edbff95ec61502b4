"""sectionwright:sectionsheet — a print-ready page for every section."""

import os
import shutil
import tempfile
from dataclasses import dataclass
from pathlib import Path

from qgis.core import (
    QgsLayoutExporter,
    QgsLayoutItemPage,
    QgsLayoutSize,
    QgsPrintLayout,
    QgsProcessingException,
    QgsProcessingParameterBoolean,
    QgsProcessingParameterEnum,
    QgsProcessingParameterFileDestination,
    QgsProcessingParameterMultipleLayers,
    QgsProcessingParameterString,
    QgsProcessingParameterVectorLayer,
    QgsProject,
    QgsRectangle,
)

from .compat.null import plain
from .compat.qgis_compat import (
    EXPORT_SUCCESS,
    NO_THREADING,
    SOURCE_ANY_VECTOR,
    SOURCE_LINES,
    TEXT_AS_TEXT,
)
from .core.sheet_scale import end_names, padded
from .framework.base import INPUT, LINE_ID_FIELD, SKIPPED, SectionwrightAlgorithm
from .framework.ledger import RunLedger
from .framework.run_guard import ParameterProblem, stop_if_cancelled
from .inputs.section_lines import read_section_parts, working_crs
from .outputs import fields as F
from .outputs import styles
from .outputs.skipped import skip_sections
from .sheet.layers import (
    collar_points,
    copy_section,
    crossings_in_section,
    line_on_map,
    section_filter,
)
from .sheet.page import SheetSection, add_page

PROFILE = "PROFILE"
INTERVALS = "INTERVALS"
TICKS = "TICKS"
CROSSINGS = "CROSSINGS"
BOREHOLES = "BOREHOLES"
MAP_LAYERS = "MAP_LAYERS"
TITLE = "TITLE"
LABEL_DIPS = "LABEL_DIPS"
PAGE_SIZE = "PAGE_SIZE"
ADD_LAYOUT = "ADD_LAYOUT"
OUTPUT = "OUTPUT"

PAGE_SIZES = [
    ("A4 landscape", (297.0, 210.0)),
    ("A3 landscape", (420.0, 297.0)),
    ("A2 landscape", (594.0, 420.0)),
]
NO_PROFILE = "no profile for this section in PROFILE"


@dataclass
class SheetSettings:
    """Every parameter of a run, read and checked once, before any work."""

    lines: object
    id_field: str
    profile: object
    inputs: dict  # INTERVALS, TICKS, CROSSINGS, BOREHOLES: layer or None
    map_layers: list
    title: str
    label_dips: bool
    page_size: tuple  # mm
    add_layout: bool
    output: str
    suffix: str

    @classmethod
    def read(cls, algorithm, parameters, context):
        lines = algorithm.source(parameters, INPUT, context)
        profile = algorithm.parameterAsVectorLayer(parameters, PROFILE, context)
        if profile is None or profile.fields().lookupField(F.SECTION) < 0:
            raise ParameterProblem(
                PROFILE,
                "give the section-view profile made by Topographic profile (it needs "
                f"a '{F.SECTION}' field).",
            )
        output = algorithm.parameterAsFileOutput(parameters, OUTPUT, context)
        return cls(
            lines=lines,
            id_field=algorithm.parameterAsString(parameters, LINE_ID_FIELD, context),
            profile=profile,
            inputs={
                name: algorithm.parameterAsVectorLayer(parameters, name, context)
                for name in (INTERVALS, TICKS, CROSSINGS, BOREHOLES)
            },
            map_layers=algorithm.parameterAsLayerList(parameters, MAP_LAYERS, context),
            title=algorithm.parameterAsString(parameters, TITLE, context),
            label_dips=algorithm.parameterAsBoolean(parameters, LABEL_DIPS, context),
            page_size=PAGE_SIZES[algorithm.parameterAsEnum(parameters, PAGE_SIZE, context)][1],
            add_layout=algorithm.parameterAsBoolean(parameters, ADD_LAYOUT, context),
            output=output,
            suffix=_checked_suffix(output),
        )


def _checked_suffix(output):
    suffix = Path(output).suffix.lower()
    if suffix not in (".pdf", ".png", ".svg"):
        raise ParameterProblem(OUTPUT, "the file must end in .pdf, .png or .svg.")
    folder = Path(output).parent
    if not folder.is_dir() or not os.access(folder, os.W_OK):
        raise ParameterProblem(OUTPUT, f"cannot write into {folder}.")
    return suffix


class SectionSheetAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "sectionsheet"
    DISPLAY_NAME = "Section sheet"
    GROUP_ID = "sectiondrawing"
    OUTPUT_SCHEMAS = {SKIPPED: F.SKIPPED_SECTIONS}

    def flags(self):
        # Print layouts are built and rendered on the main thread.
        return super().flags() | NO_THREADING

    def initAlgorithm(self, config=None):
        tr = self.tr
        self.add_section_line_parameters()
        self.addParameter(
            QgsProcessingParameterVectorLayer(
                PROFILE, tr("Profile (section view, from Topographic profile)"), [SOURCE_LINES]
            )
        )
        for name, label, kinds in (
            (INTERVALS, "Geology strip (section view)", [SOURCE_LINES]),
            (TICKS, "Dip ticks (section view)", [SOURCE_LINES]),
            (CROSSINGS, "Geology crossings (with chainage and elev)", [SOURCE_ANY_VECTOR]),
            (BOREHOLES, "Boreholes (section view)", [SOURCE_LINES]),
        ):
            self.addParameter(
                QgsProcessingParameterVectorLayer(name, tr(label), kinds, optional=True)
            )
        self.addParameter(
            QgsProcessingParameterMultipleLayers(
                MAP_LAYERS, tr("Layers of the location map"), optional=True
            )
        )
        self.addParameter(
            QgsProcessingParameterString(
                TITLE, tr("Title"), defaultValue="Geological cross-section"
            )
        )
        self.addParameter(
            QgsProcessingParameterBoolean(
                LABEL_DIPS, tr("Write apparent dips beside the ticks"), defaultValue=True
            )
        )
        self.addParameter(
            QgsProcessingParameterEnum(
                PAGE_SIZE,
                tr("Page size"),
                options=[tr(name) for name, _ in PAGE_SIZES],
                defaultValue=1,
            )
        )
        self.addParameter(
            QgsProcessingParameterBoolean(
                ADD_LAYOUT,
                tr("Also add the layout to the current project, to edit it"),
                defaultValue=False,
            )
        )
        self.addParameter(
            QgsProcessingParameterFileDestination(
                OUTPUT, tr("Section sheets"), "PDF (*.pdf);;PNG (*.png);;SVG (*.svg)"
            )
        )
        self.add_skipped_output()

    def processAlgorithm(self, parameters, context, feedback):
        settings = SheetSettings.read(self, parameters, context)
        lines = settings.lines
        skipped, skipped_id = self.parameterAsSink(
            parameters,
            SKIPPED,
            context,
            F.SKIPPED_SECTIONS.qgs_fields(),
            lines.wkbType(),
            lines.sourceCrs(),
        )
        work_crs = working_crs(lines, context, feedback)
        parts = read_section_parts(lines, settings.id_field, work_crs, context, feedback)
        builder = SheetBuilder(
            settings.profile,
            settings.inputs,
            settings.map_layers,
            lines.sourceCrs(),
            settings.title,
            settings.label_dips,
            feedback,
        )
        project = context.project() if settings.add_layout and context.project() else QgsProject()
        layout = QgsPrintLayout(project)
        layout.initializeDefaults()
        layout.setName(settings.title)
        ledger = RunLedger(feedback)
        sections, pages = self._pages(layout, builder, parts, settings, ledger, skipped, feedback)
        if not pages:
            raise QgsProcessingException("No section could be drawn: see the log.")
        stop_if_cancelled(feedback)
        files = self._export(layout, pages, settings.output, settings.suffix)
        feedback.pushInfo(f"Written: {', '.join(files)}")
        if settings.add_layout and project is context.project():
            self._add_to_project(project, layout, sections, feedback)
        ledger.close()
        results = {OUTPUT: settings.output}
        if skipped is not None:
            results[SKIPPED] = skipped_id
        return results

    def _pages(self, layout, builder, parts, settings, ledger, skipped, feedback):
        """A page per section that has a profile; the others to SKIPPED.
        Returns the sections drawn (kept alive with the layout) and their
        labels."""
        sections, pages = [], []
        for part in parts:
            stop_if_cancelled(feedback)
            ledger.read += 1
            section = builder.section(part)
            if section is None:
                part.reason = part.reason or NO_PROFILE
                ledger.skip(part.reason)
                skip_sections(skipped, [part])
                feedback.pushInfo(f"Section {part.label}: no page ({part.reason}).")
                continue
            sections.append(section)
            page_number = self._page(layout, len(pages), settings.page_size)
            scale = add_page(layout, page_number, settings.page_size, section)
            pages.append(part.label)
            box = section.extent
            feedback.pushInfo(
                f"Section {part.label}: page {len(pages)}, scale 1:{scale:,.0f}, view chainage "
                f"{box.xMinimum():.1f}…{box.xMaximum():.1f}, exaggerated elevation "
                f"{box.yMinimum():.1f}…{box.yMaximum():.1f}."
            )
            ledger.written += 1
            feedback.setProgress(80.0 * len(pages) / max(len(parts), 1))
        return sections, pages

    @staticmethod
    def _add_to_project(project, layout, sections, feedback):
        """The layout, and the per-section layers it draws (in a group left
        unticked), added to the project for editing."""
        manager = project.layoutManager()
        layout.setName(
            manager.generateUniqueTitle() if manager.layoutByName(layout.name()) else layout.name()
        )
        group = project.layerTreeRoot().addGroup(f"Sheet layers: {layout.name()}")
        group.setItemVisibilityChecked(False)
        for section in sections:
            for layer in section.section_layers + section.location_layers[:1]:
                project.addMapLayer(layer, False)
                group.addLayer(layer)
        manager.addLayout(layout)
        feedback.pushInfo(f"Layout '{layout.name()}' added to the project.")

    @staticmethod
    def _page(layout, index, page_size):
        collection = layout.pageCollection()
        if index >= collection.pageCount():
            page = QgsLayoutItemPage(layout)
            collection.addPage(page)
        collection.page(index).setPageSize(QgsLayoutSize(*page_size))
        return index

    @staticmethod
    def _export(layout, pages, output, suffix):
        exporter = QgsLayoutExporter(layout)
        if suffix == ".pdf":
            settings = QgsLayoutExporter.PdfExportSettings()
            settings.rasterizeWholeImage = False
            result = exporter.exportToPdf(output, settings)
            _check(result, exporter, output)
            return [output]
        stem = Path(output).with_suffix("")
        scratch = Path(tempfile.mkdtemp(prefix="sectionsheet"))
        try:
            # Every page at once; QGIS names them page, page_2, page_3 …
            base = scratch / f"page{suffix}"
            if suffix == ".png":
                settings = QgsLayoutExporter.ImageExportSettings()
                settings.dpi = 150
                settings.generateWorldFile = False
                settings.exportMetadata = False
                result = exporter.exportToImage(str(base), settings)
            else:
                settings = QgsLayoutExporter.SvgExportSettings()
                # Text stays text, so the drawing can be edited further.
                settings.textRenderFormat = TEXT_AS_TEXT
                result = exporter.exportToSvg(str(base), settings)
            _check(result, exporter, output)
            files = []
            for index, label in enumerate(pages):
                produced = base if index == 0 else scratch / f"page_{index + 1}{suffix}"
                target = f"{stem}_{_safe(label)}{suffix}"
                shutil.move(str(produced), target)
                files.append(target)
        finally:
            shutil.rmtree(scratch, ignore_errors=True)
        return files


class SheetBuilder:
    """Turns section lines and the section-view layers into sheet pages;
    used by the algorithm and by scripts that build a project."""

    def __init__(self, profile, inputs, map_layers, lines_crs, title, label_dips, feedback):
        self.profile = profile
        self.inputs = inputs
        self.map_layers = list(map_layers)
        self.lines_crs = lines_crs
        self.title = title
        self.label_dips = label_dips
        self.feedback = feedback
        self.strip_renderer_units = _units(inputs.get(INTERVALS))

    def section(self, part):
        """The SheetSection of a section line part; None without a profile."""
        if part.coords is None:
            return None
        ground = next(self.profile.getFeatures(section_filter(part.label)), None)
        if ground is None:
            return None
        ve_field = self.profile.fields().lookupField(F.EXAGGERATION)
        ve = plain(ground[F.EXAGGERATION]) if ve_field >= 0 else None
        exaggeration = 1.0 if ve is None else float(ve)
        layers = self._layers(part.label, exaggeration)
        self._report_empty(part.label, layers)
        present = [layer for layer in layers.values() if layer is not None]
        start, end = end_names(part.coords)
        line = line_on_map(
            part.geometry,
            self.lines_crs,
            f"Section line {part.label}",
            styles.section_line_renderer(),
        )
        return SheetSection(
            label=part.label,
            title=self.title,
            exaggeration=exaggeration,
            extent=_extent(present, ground),
            start_name=start,
            end_name=end,
            section_layers=present,
            legend_layers=[
                layer for layer in present if layer.featureCount() and layer.name() != "Collars"
            ],
            location_layers=[line] + self.map_layers,
            location_extent=_around(part.geometry.boundingBox()),
            location_crs=self.lines_crs,
            label_dips=self.label_dips,
        )

    def _layers(self, label, exaggeration):
        """The section's own styled layers, by role (None: no such input)."""
        inputs = self.inputs
        holes = copy_section(
            inputs.get(BOREHOLES), label, "Boreholes", "LineString", styles.hole_renderer()
        )
        layers = {
            "collars": collar_points(holes, "Collars", styles.collar_renderer()),
            "ticks": copy_section(
                inputs.get(TICKS), label, "Dip ticks", "LineString", styles.tick_renderer()
            ),
            "crossings": crossings_in_section(
                inputs.get(CROSSINGS),
                label,
                exaggeration,
                "Contacts and boundaries",
                styles.crossing_renderer(),
            ),
            "holes": holes,
            "ground": copy_section(
                self.profile,
                label,
                "Ground surface",
                "MultiLineString",
                styles.profile_renderer(),
            ),
            "strip": copy_section(
                inputs.get(INTERVALS),
                label,
                "Geology strip",
                "LineString",
                styles.unit_strip_renderer(self.strip_renderer_units, F.UNIT),
            ),
        }
        return layers

    def _report_empty(self, label, layers):
        """A log line for each input given that shows nothing on this section."""
        inputs = self.inputs
        for name, given in (
            ("ticks", TICKS),
            ("crossings", CROSSINGS),
            ("holes", BOREHOLES),
            ("strip", INTERVALS),
        ):
            layer = layers[name]
            if inputs.get(given) is not None and (layer is None or not layer.featureCount()):
                self.feedback.pushInfo(f"Section {label}: nothing in {given} for this section.")


def _units(layer):
    if layer is None or layer.fields().lookupField(F.UNIT) < 0:
        return []
    values = layer.uniqueValues(layer.fields().lookupField(F.UNIT))
    return sorted({str(v) for v in map(plain, values) if v is not None and str(v) != ""})


def _extent(layers, ground):
    box = QgsRectangle(ground.geometry().boundingBox())
    for layer in layers:
        if layer.featureCount():
            box.combineExtentWith(layer.extent())
    x0, x1 = padded(box.xMinimum(), box.xMaximum(), 0.03)
    y0, y1 = padded(box.yMinimum(), box.yMaximum(), 0.12)
    return QgsRectangle(x0, y0, x1, y1)


def _around(box):
    grow = 0.35 * max(box.width(), box.height())
    return QgsRectangle(
        box.xMinimum() - grow, box.yMinimum() - grow, box.xMaximum() + grow, box.yMaximum() + grow
    )


def _check(result, exporter, target):
    if result != EXPORT_SUCCESS:
        raise ParameterProblem(
            OUTPUT,
            f"the sheet could not be written to {target} "
            f"({exporter.errorFile() or 'export error'}).",
        )


def _safe(label):
    return "".join(ch if ch.isalnum() or ch in "-_" else "_" for ch in label)
