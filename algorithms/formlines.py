"""sectionwright:formlines — subsurface form lines by the kink or arc method,
and the thickness check of every unit met on a section."""

from dataclasses import dataclass

import numpy as np
import shapely
from qgis.core import (
    QgsCoordinateReferenceSystem,
    QgsProcessingException,
    QgsProcessingParameterBoolean,
    QgsProcessingParameterEnum,
    QgsProcessingParameterFeatureSink,
    QgsProcessingParameterFeatureSource,
    QgsProcessingParameterNumber,
)

from .compat.qgis_compat import (
    LINE_STRING,
    NO_GEOMETRY,
    NUMBER_DOUBLE,
    SOURCE_LINES,
    SOURCE_POINTS,
    advanced,
)
from .core.bedding import exaggerated, ground_arrays
from .core.formlines import construct
from .core.thickness import bed_normals, thickness_changes, unit_thickness
from .core.wkb import from_wkb
from .framework.base import SKIPPED, VERTICAL_EXAGGERATION, SectionwrightAlgorithm, sink_results
from .framework.ledger import RunLedger
from .framework.run_guard import stop_if_cancelled
from .inputs.tables import labels, read_columns
from .outputs import fields as F
from .outputs.feature_writer import write_rows
from .outputs.section_space import is_section_view, section_crs
from .outputs.skipped import write_skipped

ATTITUDES = "ATTITUDES"
CROSSINGS = "CROSSINGS"
PROFILE = "PROFILE"
METHOD = "METHOD"
DEPTH = "DEPTH"
SPACING = "SPACING"
REPRESENTATIVES_ONLY = "REPRESENTATIVES_ONLY"
THICKNESS_TOLERANCE = "THICKNESS_TOLERANCE"
OUTPUT = "OUTPUT"
OUTPUT_AXES = "OUTPUT_AXES"
OUTPUT_THICKNESS = "OUTPUT_THICKNESS"

MAKERS = {ATTITUDES: "Project attitudes onto sections", CROSSINGS: "Map geology along sections"}
METHODS = ["Kink (dip domains)", "Arc (Busk, concentric)"]
ATTITUDES_LABEL = "Attitudes on sections"
CROSSINGS_LABEL = "Geology crossings"
PROFILE_LABEL = "Profile (section view)"
ATTITUDE_COLUMNS = (
    F.SECTION,
    F.CHAINAGE,
    F.ELEVATION,
    F.APPARENT_DIP,
    F.DIPS_TO,
    F.DIP,
    F.DIP_DIRECTION,
    F.LINE_AZIMUTH,
    F.APPARENT_DIP_SD,
)
NUMERIC_COLUMNS = (
    F.CHAINAGE,
    F.ELEVATION,
    F.APPARENT_DIP,
    F.DIP,
    F.DIP_DIRECTION,
    F.LINE_AZIMUTH,
    F.APPARENT_DIP_SD,
)
CROSSING_COLUMNS = (F.SECTION, F.CHAINAGE, F.ELEVATION, F.KIND, F.UNIT_BEFORE, F.UNIT_AFTER)
# A unit-boundary crossing and a contact-line crossing between the same two
# units closer than this are one contact, drawn once (the contact line's).
SAME_CONTACT = 25.0
CONTACT, FORM_LINE = "contact", "form line"
UNIT_BOUNDARY = "unit boundary"
FAULT_REASON = "fault: no form line; it marks the units it cuts as faulted"


@dataclass
class Settings:
    method: int
    depth: float  # 0: half the section's length
    spacing: float
    tolerance: float  # percent
    exaggeration: float


@dataclass
class SectionData:
    ground_x: np.ndarray
    ground_z: np.ndarray
    attitudes: np.ndarray  # row indices into the attitude columns
    contacts: np.ndarray  # row indices into the crossing columns
    faults: np.ndarray


class FormLinesAlgorithm(SectionwrightAlgorithm):
    ALGORITHM_ID = "formlines"
    DISPLAY_NAME = "Subsurface form lines"
    GROUP_ID = "sectiondrawing"
    OUTPUT_SCHEMAS = {
        OUTPUT: F.FORM_LINES,
        OUTPUT_AXES: F.AXIAL_SURFACES,
        OUTPUT_THICKNESS: F.UNIT_THICKNESS,
        SKIPPED: F.SKIPPED_FORM_LINE_ROWS,
    }

    def initAlgorithm(self, config=None):
        tr = self.tr
        for name, label, kind in (
            (ATTITUDES, ATTITUDES_LABEL + " (from Project attitudes onto sections)", SOURCE_POINTS),
            (CROSSINGS, CROSSINGS_LABEL + " (from Map geology along sections)", SOURCE_POINTS),
            (PROFILE, PROFILE_LABEL + " (from Topographic profile)", SOURCE_LINES),
        ):
            self.addParameter(QgsProcessingParameterFeatureSource(name, tr(label), [kind]))
        self.addParameter(
            QgsProcessingParameterEnum(
                METHOD, tr("Method"), options=[tr(m) for m in METHODS], defaultValue=0
            )
        )
        self.addParameter(
            QgsProcessingParameterNumber(
                DEPTH,
                tr(
                    "Depth below the section's lowest ground "
                    "(metres, 0 = half the section's length)"
                ),
                NUMBER_DOUBLE,
                defaultValue=0.0,
                minValue=0.0,
            )
        )
        self.addParameter(
            QgsProcessingParameterNumber(
                SPACING,
                tr("Extra form lines every (metres of stratigraphy, 0 = through contacts only)"),
                NUMBER_DOUBLE,
                defaultValue=0.0,
                minValue=0.0,
            )
        )
        self.addParameter(
            QgsProcessingParameterBoolean(
                REPRESENTATIVES_ONLY,
                tr("Use only the attitudes marked representative (by Dip domains)"),
                defaultValue=False,
            )
        )
        tolerance = QgsProcessingParameterNumber(
            THICKNESS_TOLERANCE,
            tr("Flag thickness changes beyond (percent)"),
            NUMBER_DOUBLE,
            defaultValue=15.0,
            minValue=0.0,
        )
        self.addParameter(advanced(tolerance))
        self.add_exaggeration_parameter()
        for name, label, kind in (
            (OUTPUT, "Form lines (section view)", SOURCE_LINES),
            (OUTPUT_AXES, "Axial surfaces (section view)", SOURCE_LINES),
        ):
            self.addParameter(QgsProcessingParameterFeatureSink(name, tr(label), kind))
        self.addParameter(
            QgsProcessingParameterFeatureSink(OUTPUT_THICKNESS, tr("Unit thickness (table)"))
        )
        self.add_skipped_output()

    def processAlgorithm(self, parameters, context, feedback):
        profile = self.source(parameters, PROFILE, context)
        if not is_section_view(profile.sourceCrs()):
            raise QgsProcessingException(
                f"{PROFILE_LABEL}: give the section-view profile of Topographic profile "
                "(its layer is in the 'Section view' CRS)."
            )
        grounds = self._grounds(profile)
        attitudes = self._read(parameters, ATTITUDES, ATTITUDE_COLUMNS, ATTITUDES_LABEL, context)
        represent = self._representatives(parameters, context, feedback)
        crossings = self._read(parameters, CROSSINGS, CROSSING_COLUMNS, CROSSINGS_LABEL, context)
        settings = Settings(
            self.parameterAsEnum(parameters, METHOD, context),
            self.parameterAsDouble(parameters, DEPTH, context),
            self.parameterAsDouble(parameters, SPACING, context),
            self.parameterAsDouble(parameters, THICKNESS_TOLERANCE, context),
            self.parameterAsDouble(parameters, VERTICAL_EXAGGERATION, context),
        )
        sinks = self._sinks(parameters, context)
        ledger = RunLedger(feedback)
        skipped = []
        sections = self._sort(grounds, attitudes, represent, crossings, skipped)
        feedback.pushInfo(
            f"{len(sections)} section(s); method: {METHODS[settings.method]}; "
            f"{len(attitudes['fid'])} attitude(s), {len(crossings['fid'])} crossing(s) read."
        )
        ledger.read = len(attitudes["fid"]) + len(crossings["fid"])
        for number, (label, data) in enumerate(sorted(sections.items())):
            stop_if_cancelled(feedback)
            if self._section(label, data, attitudes, crossings, settings, sinks, feedback):
                ledger.written += len(data.attitudes) + len(data.contacts)
            else:
                reason = "no usable dip on the section"
                skipped += [(ATTITUDES, label, attitudes["fid"][i], reason) for i in data.attitudes]
                skipped += [(CROSSINGS, label, crossings["fid"][i], reason) for i in data.contacts]
            feedback.setProgress(100.0 * (number + 1) / max(len(sections), 1))
        for label, data in sections.items():
            skipped += [(CROSSINGS, label, crossings["fid"][i], FAULT_REASON) for i in data.faults]
        for *_, reason in skipped:
            ledger.skip(reason)
        self._write_skipped(sinks[SKIPPED][0], skipped)
        ledger.close()
        feedback.setProgress(100)
        return sink_results(sinks)

    # Reading

    def _read(self, parameters, name, columns, label, context):
        source = self.source(parameters, name, context)
        missing = [c for c in columns if source.fields().lookupField(c) < 0]
        if missing:
            raise QgsProcessingException(
                f"{label}: the layer has no field {', '.join(repr(m) for m in missing)}; give "
                f"the output of {MAKERS[name]}."
            )
        values, fids, _ = read_columns(source, {c: c for c in columns}, label)
        values["fid"] = fids
        for key in (F.SECTION, F.DIPS_TO, F.KIND, F.UNIT_BEFORE, F.UNIT_AFTER):
            if key in values:
                values[key] = [v or "" for v in labels(values[key])]
        for key in NUMERIC_COLUMNS:
            if key in values:
                values[key] = _numbers(values[key])
        return values

    def _representatives(self, parameters, context, feedback):
        """0/1 per attitude when only representatives are wanted and the
        layer says which they are; None otherwise."""
        if not self.parameterAsBoolean(parameters, REPRESENTATIVES_ONLY, context):
            return None
        source = self.source(parameters, ATTITUDES, context)
        if source.fields().lookupField(F.REPRESENT) < 0:
            feedback.pushInfo(
                f"{ATTITUDES_LABEL}: no '{F.REPRESENT}' field (made by Dip domains): "
                "every attitude is used."
            )
            return None
        values, _, _ = read_columns(source, {F.REPRESENT: F.REPRESENT}, ATTITUDES_LABEL)
        return np.array([v == 1 or v == "1" for v in values[F.REPRESENT]], dtype=bool)

    def _grounds(self, profile):
        """{section: (chainage, elevation)} at true scale from the profile."""
        if any(profile.fields().lookupField(name) < 0 for name in (F.SECTION, F.EXAGGERATION)):
            raise QgsProcessingException(
                f"{PROFILE_LABEL}: the layer needs the fields 'section' and 've' of the "
                "section-view profile of Topographic profile."
            )
        values, _, geometries = read_columns(
            profile, {F.SECTION: F.SECTION, F.EXAGGERATION: F.EXAGGERATION}, PROFILE_LABEL, True
        )
        exaggerations = sorted({float(ve) for ve in values[F.EXAGGERATION] if ve})
        if len(exaggerations) > 1:
            raise QgsProcessingException(
                f"{PROFILE_LABEL}: its sections carry different exaggerations (ve "
                f"{', '.join(f'{ve:g}' for ve in exaggerations)}); give the profile of one run."
            )
        grounds = {}
        for section, ve, geometry in zip(
            labels(values[F.SECTION]), values[F.EXAGGERATION], geometries
        ):
            if section is None or geometry is None or geometry.isEmpty() or not ve:
                continue
            xy = shapely.get_coordinates(from_wkb(bytes(geometry.asWkb())))
            x, z = ground_arrays(xy[:, 0], xy[:, 1] / float(ve))
            if len(x) >= 2:
                grounds[section] = (x, z)
        return grounds

    def _sort(self, grounds, attitudes, represent, crossings, skipped):
        """Per section, the attitudes and contacts it can use; the rest
        into ``skipped`` with reasons."""
        sections = {label: SectionData(x, z, [], [], []) for label, (x, z) in grounds.items()}
        for i, section in enumerate(attitudes[F.SECTION]):
            reason = (
                "no profile for the section" if section not in sections
                else "no chainage" if np.isnan(attitudes[F.CHAINAGE][i])
                else "no apparent dip" if np.isnan(attitudes[F.APPARENT_DIP][i])
                else "not representative" if represent is not None and not represent[i]
                else ""
            )  # fmt: skip
            if reason:
                skipped.append((ATTITUDES, section, attitudes["fid"][i], reason))
            else:
                sections[section].attitudes.append(i)
        for i, section in enumerate(crossings[F.SECTION]):
            reason = self._crossing_reason(crossings, i, sections)
            if reason == "fault":
                sections[section].faults.append(i)
            elif reason:
                skipped.append((CROSSINGS, section, crossings["fid"][i], reason))
            else:
                sections[section].contacts.append(i)
        for label, data in sections.items():
            data.attitudes = np.array(data.attitudes, dtype=int)
            data.faults = np.array(data.faults, dtype=int)
            kept, reasons = _one_per_contact(crossings, np.array(data.contacts, dtype=int))
            data.contacts = kept
            skipped += [(CROSSINGS, label, crossings["fid"][i], r) for i, r in reasons]
        return sections

    @staticmethod
    def _crossing_reason(crossings, i, sections):
        if crossings[F.SECTION][i] not in sections:
            return "no profile for the section"
        if "fault" in crossings[F.KIND][i].lower():
            return "fault"
        if np.isnan(crossings[F.CHAINAGE][i]):
            return "no chainage"
        return ""

    # One section

    def _section(self, label, data, attitudes, crossings, settings, sinks, feedback):
        if len(data.attitudes) == 0:
            feedback.pushInfo(f"Section {label}: no usable dip; nothing constructed.")
            return False
        ground_x, ground_z = data.ground_x, data.ground_z
        rows = data.attitudes
        chainage = attitudes[F.CHAINAGE][rows]
        signs = np.where(np.array(attitudes[F.DIPS_TO], dtype=object)[rows] == "start", -1.0, 1.0)
        dips = attitudes[F.APPARENT_DIP][rows] * signs
        elevation = attitudes[F.ELEVATION][rows]
        elevation = np.where(
            np.isnan(elevation), np.interp(chainage, ground_x, ground_z), elevation
        )
        contacts = data.contacts
        contact_x = crossings[F.CHAINAGE][contacts]
        contact_z = crossings[F.ELEVATION][contacts]
        contact_z = np.where(
            np.isnan(contact_z), np.interp(contact_x, ground_x, ground_z), contact_z
        )
        contact_points = np.column_stack((contact_x, contact_z))
        before = np.array(crossings[F.UNIT_BEFORE], dtype=object)[contacts]
        after = np.array(crossings[F.UNIT_AFTER], dtype=object)[contacts]
        length = ground_x[-1] - ground_x[0]
        exaggeration = settings.exaggeration
        result = construct(
            settings.method,
            ground_x,
            ground_z,
            np.column_stack((chainage, elevation)),
            dips,
            contact_points,
            before,
            after,
            settings.depth if settings.depth > 0 else length / 2,
            settings.spacing,
        )
        count, axes = len(result.lines), len(result.axes)
        write_rows(
            sinks[OUTPUT][0],
            F.FORM_LINES.qgs_fields(),
            exaggerated(result.lines, exaggeration),
            {
                F.SECTION: [label] * count,
                F.KIND: np.where(result.contact >= 0, CONTACT, FORM_LINE),
                F.UNIT_ABOVE: [u or None for u in result.unit_above],
                F.UNIT_BELOW: [u or None for u in result.unit_below],
                F.EXAGGERATION: np.full(count, exaggeration),
            },
        )
        write_rows(
            sinks[OUTPUT_AXES][0],
            F.AXIAL_SURFACES.qgs_fields(),
            exaggerated(result.axes, exaggeration),
            {
                F.SECTION: [label] * axes,
                F.DIP_LEFT: result.dip_left,
                F.DIP_RIGHT: result.dip_right,
                F.AXIS_DIP: result.axis_dip,
                F.EXAGGERATION: np.full(axes, exaggeration),
            },
        )
        measured = self._thickness(
            label, attitudes, rows, chainage, contact_points, before, after,
            crossings[F.CHAINAGE][data.faults], settings.tolerance, sinks[OUTPUT_THICKNESS][0],
        )  # fmt: skip
        feedback.pushInfo(
            f"Section {label}: {len(rows)} dip(s), {len(contacts)} contact(s): "
            f"{len(result.lines)} form line(s), {len(result.axes)} axial surface(s), "
            f"{measured[0]} unit(s) measured, {measured[1]} thickness change(s)."
        )
        return True

    @staticmethod
    def _thickness(
        label, attitudes, rows, chainage, contacts, before, after, faults, tolerance, sink
    ):
        normals = bed_normals(
            attitudes[F.DIP][rows],
            attitudes[F.DIP_DIRECTION][rows],
            attitudes[F.LINE_AZIMUTH][rows],
        )
        order = np.argsort(contacts[:, 0], kind="stable")
        table = unit_thickness(
            contacts[order],
            before[order],
            after[order],
            chainage,
            normals,
            attitudes[F.APPARENT_DIP_SD][rows],
            faults,
        )
        change, changed = thickness_changes(table["unit"], table["thick_m"], tolerance)
        flags = [
            ",".join((["thickness_changes"] if flagged else []) + own)
            for flagged, own in zip(changed.tolist(), table["flags"])
        ]
        write_rows(
            sink,
            F.UNIT_THICKNESS.qgs_fields(),
            None,
            {
                F.SECTION: [label] * len(flags),
                F.UNIT: table["unit"],
                F.FROM_CHAINAGE: table["from_ch"],
                F.TO_CHAINAGE: table["to_ch"],
                F.THICKNESS: table["thick_m"],
                F.THICKNESS_SD: table["thick_sd"],
                F.CHANGE: change,
                F.FLAGS: flags,
            },
        )
        return len(table["unit"]), int(changed.sum())

    # Writing

    def _sinks(self, parameters, context):
        no_crs = QgsCoordinateReferenceSystem()
        specs = [
            (name, self.OUTPUT_SCHEMAS[name].qgs_fields(), kind, crs)
            for name, kind, crs in (
                (OUTPUT, LINE_STRING, section_crs()),
                (OUTPUT_AXES, LINE_STRING, section_crs()),
                (OUTPUT_THICKNESS, NO_GEOMETRY, no_crs),
                (SKIPPED, NO_GEOMETRY, no_crs),
            )
        ]
        return self.open_sinks(
            parameters, context, specs, required=(OUTPUT, OUTPUT_AXES, OUTPUT_THICKNESS)
        )

    @staticmethod
    def _write_skipped(sink, skipped):
        tables, sections, fids, reasons = zip(*skipped) if skipped else ((), (), (), ())
        columns = {
            F.TABLE: ["attitudes" if t == ATTITUDES else "crossings" for t in tables],
            F.SECTION: [s or None for s in sections],
            F.SOURCE_FID: list(fids),
            F.REASON: list(reasons),
        }
        write_skipped(sink, F.SKIPPED_FORM_LINE_ROWS.qgs_fields(), None, columns)


def _numbers(values):
    return np.array([np.nan if v is None else float(v) for v in values], dtype=float)


def _one_per_contact(crossings, rows):
    """The contacts of one section among its crossings, sorted by chainage,
    and (row, reason) for the others.

    A contact-line crossing between two different units is kept, and a
    unit-boundary crossing between the same units within SAME_CONTACT is the
    same contact. A contact-line crossing that sees one unit on both sides
    (the line drawn a little off the polygons' boundary) or none is the
    same contact as a unit-boundary crossing within SAME_CONTACT, if there
    is one. Of two crossings of one kind between the same units within
    SAME_CONTACT the first is kept."""
    if len(rows) == 0:
        return rows, []
    before = np.array([crossings[F.UNIT_BEFORE][i] for i in rows], dtype=object)
    after = np.array([crossings[F.UNIT_AFTER][i] for i in rows], dtype=object)
    chainage = crossings[F.CHAINAGE][rows]
    boundary = np.array([crossings[F.KIND][i] == UNIT_BOUNDARY for i in rows])
    units = (before != "") & (after != "") & (before != after)
    pair = np.array([" | ".join(sorted(p)) for p in zip(before, after)])
    near = np.abs(chainage[:, None] - chainage[None, :]) < SAME_CONTACT
    same = near & (pair[:, None] == pair[None, :]) & units[:, None] & units[None, :]
    line_twin = (same & ~boundary[None, :]).any(axis=1)
    near_boundary = (near & (boundary & units)[None, :]).any(axis=1)
    same_kind = same & (boundary[:, None] == boundary[None, :])
    repeated = units & ((boundary & line_twin) | np.tril(same_kind, k=-1).any(axis=1))
    repeated |= ~units & ~boundary & near_boundary
    reasons = np.where(
        repeated,
        "same contact as a crossing nearby",
        np.where(
            units,
            "",
            np.where(
                (before == "") | (after == ""), "crossing without a unit", "same unit either side"
            ),
        ),
    )
    kept = rows[reasons == ""]
    order = np.argsort(crossings[F.CHAINAGE][kept], kind="stable")
    return kept[order], [(i, r) for i, r in zip(rows.tolist(), reasons.tolist()) if r]
