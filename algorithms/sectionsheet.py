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
    QgsProcessingParameterNumber,
    QgsProcessingParameterString,
    QgsProcessingParameterVectorLayer,
    QgsProject,
    QgsProviderRegistry,
    QgsRectangle,
)
from qgis.PyQt.QtCore import QDate, Qt

from .compat.qgis_compat import (
    EXPORT_SUCCESS,
    NO_THREADING,
    NUMBER_DOUBLE,
    SOURCE_ANY_VECTOR,
    SOURCE_LINES,
    TEXT_AS_TEXT,
    advanced,
)
from .core.sheet_scale import format_scale
from .framework.base import INPUT, SKIPPED, SectionwrightAlgorithm
from .framework.ledger import RunLedger
from .framework.run_guard import stop_if_cancelled
from .inputs.section_lines import read_section_parts, working_crs
from .inputs.section_views import section_view_layers, sheet_inputs
from .outputs import fields as F
from .outputs import styles
from .outputs.section_space import add_measuring_operations, is_section_view
from .outputs.skipped import skip_sections
from .sheet.builder import (
    AXES,
    BOREHOLE_INTERVALS,
    BOREHOLES,
    CROSSINGS,
    DOMAINS,
    FORM_LINES,
    INTERVALS,
    PROFILE,
    TICKS,
    SheetBuilder,
)
from .sheet.exaggeration import common_exaggeration
from .sheet.layers import line_on_map
from .sheet.page import add_overview_page, add_section_page, scale_statement, view_box
from .sheet.title_block import TitleBlock

MAP_LAYERS = "MAP_LAYERS"
TITLE = "TITLE"
AUTHOR = "AUTHOR"
LABEL_DIPS = "LABEL_DIPS"
PAGE_SIZE = "PAGE_SIZE"
SCALE = "SCALE"
OVERVIEW = "OVERVIEW"
ADD_LAYOUT = "ADD_LAYOUT"
OUTPUT = "OUTPUT"

PAGE_SIZES = [
    ("A4 landscape", (297.0, 210.0)),
    ("A3 landscape", (420.0, 297.0)),
    ("A2 landscape", (594.0, 420.0)),
]
# Optional section-view inputs: parameter, label, geometry filter.
SECTION_VIEW_INPUTS = (
    (INTERVALS, "Geology strip (section view)", SOURCE_LINES),
    (TICKS, "Dip ticks (section view)", SOURCE_LINES),
    (CROSSINGS, "Geology crossings (with chainage and elev)", SOURCE_ANY_VECTOR),
    (BOREHOLES, "Boreholes (section view)", SOURCE_LINES),
    (BOREHOLE_INTERVALS, "Logged borehole intervals (section view)", SOURCE_LINES),
    (FORM_LINES, "Form lines (section view, from Subsurface form lines)", SOURCE_LINES),
    (AXES, "Axial surfaces (section view, from Subsurface form lines)", SOURCE_LINES),
    (DOMAINS, "Dip domains table (from Dip domains)", SOURCE_ANY_VECTOR),
)


@dataclass
class SheetSettings:
    """Every parameter of a run, read and checked once, before any work."""

    lines: object
    id_field: str
    inputs: dict  # PROFILE and the optional section-view inputs: layer or None
    exaggeration: float
    map_layers: list
    title: str
    title_block: dict  # the title block's entries common to every page
    label_dips: bool
    page_size: tuple  # mm
    scale: float  # 0: automatic
    overview: bool
    add_layout: bool
    output: str
    suffix: str

    @classmethod
    def read(cls, algorithm, parameters, context, feedback):
        def label(name):
            return algorithm.parameterDefinition(name).description()

        lines = algorithm.source(parameters, INPUT, context)
        profile = algorithm.parameterAsVectorLayer(parameters, PROFILE, context)
        if (
            profile is None
            or profile.fields().lookupField(F.SECTION) < 0
            or not is_section_view(profile.crs())
        ):
            raise QgsProcessingException(
                f"{label(PROFILE)}: give the section-view profile made by Topographic "
                f"profile (a layer in the section view with a '{F.SECTION}' field), not the "
                "map's section lines."
            )
        output = algorithm.parameterAsFileOutput(parameters, OUTPUT, context)
        inputs = {PROFILE: profile}
        for name, _, _ in SECTION_VIEW_INPUTS:
            inputs[name] = algorithm.parameterAsVectorLayer(parameters, name, context)
        map_layers = algorithm.parameterAsLayerList(parameters, MAP_LAYERS, context)
        title = algorithm.parameterAsString(parameters, TITLE, context)
        return cls(
            lines=lines,
            id_field=algorithm.label_field(parameters, context, lines),
            inputs=inputs,
            exaggeration=_exaggeration(inputs, label, feedback),
            map_layers=map_layers,
            title=title,
            title_block=dict(
                title=title,
                crs=_crs_text(lines.sourceCrs()),
                date=QDate.currentDate().toString(Qt.DateFormat.ISODate),
                author=algorithm.parameterAsString(parameters, AUTHOR, context).strip(),
                sources=_sources(
                    algorithm.parameterAsVectorLayer(parameters, INPUT, context),
                    inputs,
                    map_layers,
                ),
            ),
            label_dips=algorithm.parameterAsBoolean(parameters, LABEL_DIPS, context),
            page_size=PAGE_SIZES[algorithm.parameterAsEnum(parameters, PAGE_SIZE, context)][1],
            scale=algorithm.parameterAsDouble(parameters, SCALE, context),
            overview=algorithm.parameterAsBoolean(parameters, OVERVIEW, context),
            add_layout=algorithm.parameterAsBoolean(parameters, ADD_LAYOUT, context),
            output=output,
            suffix=_checked_suffix(output, label(OUTPUT)),
        )


def _layer_id(layer):
    return layer.id() if layer is not None else None


def _checked_suffix(output, label):
    suffix = Path(output).suffix.lower()
    if suffix not in (".pdf", ".png", ".svg"):
        raise QgsProcessingException(f"{label}: the file must end in .pdf, .png or .svg.")
    folder = Path(output).parent
    if not folder.is_dir() or not os.access(folder, os.W_OK):
        raise QgsProcessingException(f"{label}: cannot write into {folder}.")
    return suffix


def _exaggeration(inputs, label, feedback):
    """The one VE of the section-view inputs (1 when none says)."""
    named = {
        label(name): layer
        for name, layer in inputs.items()
        if layer is not None and is_section_view(layer.crs())
    }
    exaggeration = common_exaggeration(named)
    if exaggeration is None:
        feedback.pushInfo(
            f"No section-view input has a '{F.EXAGGERATION}' field: drawn at exaggeration 1."
        )
        return 1.0
    return exaggeration


def _report_empty(label, inputs, section, feedback):
    """A log line for each input given that shows nothing on this section."""
    shown = {layer.name(): layer for layer in section.section_layers}
    for given, name in (
        (TICKS, "Dip ticks"),
        (CROSSINGS, "Contacts and boundaries"),
        (BOREHOLES, "Boreholes"),
        (INTERVALS, "Geology strip"),
        (BOREHOLE_INTERVALS, "Logged intervals"),
        (FORM_LINES, "Form lines"),
        (AXES, "Axial surfaces"),
        (DOMAINS, "Dip domains"),
    ):
        layer = shown.get(name)
        if inputs.get(given) is not None and (layer is None or not layer.featureCount()):
            feedback.pushInfo(f"Section {label}: nothing in {given} for this section.")


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
        # The project's section-view layers as defaults, so that the dialog
        # does not offer the map's own lines first.
        found = sheet_inputs(section_view_layers())
        self.addParameter(
            QgsProcessingParameterVectorLayer(
                PROFILE,
                tr("Profile (section view, from Topographic profile)"),
                [SOURCE_LINES],
                defaultValue=_layer_id(found.get(PROFILE)),
            )
        )
        for name, label, kind in SECTION_VIEW_INPUTS:
            self.addParameter(
                QgsProcessingParameterVectorLayer(
                    name, tr(label), [kind], defaultValue=_layer_id(found.get(name)), optional=True
                )
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
            QgsProcessingParameterString(AUTHOR, tr("Author"), defaultValue="", optional=True)
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
            advanced(
                QgsProcessingParameterNumber(
                    SCALE,
                    tr("Horizontal scale 1:N (N; 0 = the largest standard scale that fits)"),
                    NUMBER_DOUBLE,
                    defaultValue=0.0,
                    minValue=0.0,
                )
            )
        )
        self.addParameter(
            QgsProcessingParameterBoolean(
                OVERVIEW,
                tr("Start with an overview page of every section line"),
                defaultValue=False,
            )
        )
        self.addParameter(
            advanced(
                QgsProcessingParameterBoolean(
                    ADD_LAYOUT,
                    tr("Also add the layout to the current project, to edit it"),
                    defaultValue=False,
                )
            )
        )
        self.addParameter(
            QgsProcessingParameterFileDestination(
                OUTPUT, tr("Section sheets"), "PDF (*.pdf);;PNG (*.png);;SVG (*.svg)"
            )
        )
        self.add_skipped_output()

    def processAlgorithm(self, parameters, context, feedback):
        settings = SheetSettings.read(self, parameters, context, feedback)
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
            settings.inputs,
            settings.map_layers,
            lines.sourceCrs(),
            view_box(settings.page_size),
            settings.scale,
            settings.label_dips,
        )
        ledger = RunLedger(feedback)
        sections = self._sections(builder, parts, settings, ledger, skipped, feedback)
        if not sections:
            raise QgsProcessingException("No section could be drawn: see the log.")
        project = context.project() if settings.add_layout and context.project() else QgsProject()
        # Before the first map item: its render context measures in the section view.
        add_measuring_operations(
            project, [*project.mapLayers().values(), *settings.inputs.values()]
        )
        layout = QgsPrintLayout(project)
        layout.initializeDefaults()
        layout.setName(settings.title)
        pages, layer_sets = self._layout(layout, builder, parts, sections, settings, feedback)
        files = self._export(layout, pages, settings.output, settings.suffix)
        feedback.pushInfo(f"Written: {', '.join(files)}")
        if settings.add_layout and project is context.project():
            self._add_to_project(project, layout, layer_sets, feedback)
        feedback.setProgress(100.0)
        ledger.close()
        results = {OUTPUT: settings.output}
        if skipped is not None:
            results[SKIPPED] = skipped_id
        return results

    @staticmethod
    def _sections(builder, parts, settings, ledger, skipped, feedback):
        """What each page shows; parts that get no page go to SKIPPED."""
        sections = []
        for part in parts:
            stop_if_cancelled(feedback)
            ledger.read += 1
            section = builder.section(part, settings.exaggeration)
            if section is None:
                part.reason = builder.reason
                ledger.skip(part.reason)
                skip_sections(skipped, [part])
                feedback.pushInfo(f"Section {part.label}: no page ({part.reason}).")
                continue
            _report_empty(part.label, settings.inputs, section, feedback)
            sections.append(section)
            ledger.written += 1
            feedback.setProgress(40.0 * len(sections) / max(len(parts), 1))
        return sections

    def _layout(self, layout, builder, parts, sections, settings, feedback):
        """The pages (overview first when asked for); returns their labels and
        the layers each page draws, as (group name, layers)."""
        block = settings.title_block
        count = len(sections) + settings.overview
        pages, layer_sets = [], []
        if settings.overview:
            layers = self._overview(layout, builder, parts, sections, settings)
            pages.append("overview")
            layer_sets.append(("Overview", layers))
        for section in sections:
            stop_if_cancelled(feedback)
            subject = (
                f"Section {section.label}–{section.label}′ · {section.start_name} "
                f"{section.start_azimuth:03.0f}° to {section.end_name} {section.end_azimuth:03.0f}°"
            )
            add_section_page(
                layout,
                _page(layout, len(pages), settings.page_size),
                settings.page_size,
                section,
                TitleBlock(
                    subject=subject,
                    scale=scale_statement(section.scale, section.exaggeration),
                    sheet=f"{len(pages) + 1} of {count}",
                    **block,
                ),
                settings.lines.sourceCrs(),
            )
            pages.append(section.label)
            layer_sets.append(
                (f"Section {section.label}", section.section_layers + section.location_layers[:2])
            )
            box = section.extent
            feedback.pushInfo(
                f"Section {section.label}: page {len(pages)}, scale {format_scale(section.scale)} "
                f"(1:{section.scale:.0f}), view chainage "
                f"{box.xMinimum():.1f}…{box.xMaximum():.1f}, exaggerated elevation "
                f"{box.yMinimum():.1f}…{box.yMaximum():.1f}."
            )
            feedback.setProgress(40.0 + 40.0 * len(pages) / count)
        return pages, layer_sets

    @staticmethod
    def _overview(layout, builder, parts, sections, settings):
        """The first page: every section line on the map; returns the layers
        made for it."""
        crs = settings.lines.sourceCrs()
        drawn = [part for part in parts if part.coords is not None]
        extent = QgsRectangle()
        line_layers = []
        for part in drawn:
            extent.combineExtentWith(part.geometry.boundingBox())
            line_layers.append(
                line_on_map(
                    part.geometry, crs, f"Section line {part.label}", styles.section_line_renderer()
                )
            )
        page_numbers = {section.label: index + 2 for index, section in enumerate(sections)}
        listing = [
            f"{s.label}–{s.label}′   {s.length / 1000:.2f} km   {format_scale(s.scale)}   "
            f"page {page_numbers[s.label]}"
            for s in sections
        ]
        made = [builder.ends(drawn)] + line_layers
        add_overview_page(
            layout,
            _page(layout, 0, settings.page_size),
            settings.page_size,
            made + list(settings.map_layers),
            extent,
            crs,
            TitleBlock(
                subject="Index of sections",
                scale="Each section's scale on its own page",
                sheet=f"1 of {len(sections) + 1}",
                **settings.title_block,
            ),
            listing,
        )
        return made

    @staticmethod
    def _add_to_project(project, layout, layer_sets, feedback):
        """The layout, and the per-section layers it draws (in a group left
        unticked, a subgroup per page), added to the project for editing;
        ``layer_sets`` are (subgroup name, layers)."""
        manager = project.layoutManager()
        layout.setName(
            manager.generateUniqueTitle() if manager.layoutByName(layout.name()) else layout.name()
        )
        group = project.layerTreeRoot().addGroup(f"Sheet layers: {layout.name()}")
        group.setItemVisibilityChecked(False)
        for name, layers in layer_sets:
            subgroup = group.addGroup(name)
            for layer in layers:
                project.addMapLayer(layer, False)
                subgroup.addLayer(layer)
        manager.addLayout(layout)
        feedback.pushInfo(f"Layout '{layout.name()}' added to the project.")

    @staticmethod
    def _export(layout, pages, output, suffix):
        exporter = QgsLayoutExporter(layout)
        if suffix == ".pdf":
            settings = QgsLayoutExporter.PdfExportSettings()
            settings.rasterizeWholeImage = False
            # Text stays text: searchable, selectable, and crisp at any zoom.
            settings.textRenderFormat = TEXT_AS_TEXT
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


def _check(result, exporter, target):
    if result != EXPORT_SUCCESS:
        raise QgsProcessingException(
            f"Section sheets: the sheet could not be written to {target} "
            f"({exporter.errorFile() or 'export error'})."
        )


def _safe(label):
    return "".join(ch if ch.isalnum() or ch in "-_" else "_" for ch in label)


def _page(layout, index, page_size):
    collection = layout.pageCollection()
    if index >= collection.pageCount():
        collection.addPage(QgsLayoutItemPage(layout))
    collection.page(index).setPageSize(QgsLayoutSize(*page_size))
    return index


def _crs_text(crs):
    return f"{crs.authid()} · {crs.description()}" if crs.authid() else crs.description()


def _sources(lines, inputs, map_layers):
    """Names of the layers the sheet was drawn from, lines first."""
    layers = [lines] + list(inputs.values()) + list(map_layers)
    return list(dict.fromkeys(_source_name(layer) for layer in layers if layer is not None))


def _source_name(layer):
    """A layer's name, or for a layer of a multi-layer file 'layer (file)'."""
    parts = QgsProviderRegistry.instance().decodeUri(layer.providerType(), layer.source())
    inner, path = parts.get("layerName"), parts.get("path")
    if inner and path:
        return f"{inner} ({Path(path).name})"
    return layer.name()
