"""Every output's fields, declared once: name (the contract in DESIGN.md, at
most 10 characters, so a Shapefile export keeps it), kind and meaning. The
names are constants for code that fills or reads the fields; the schemas
give each output its ``QgsFields`` and rows (``schema.py``)."""

from .schema import INTEGER, REAL, TEXT, Field, Schema

SECTION = "section"
SOURCE_FID = "src_fid"
REASON = "reason"
CHAINAGE = "chainage"
ELEVATION = "elev"
X = "x"
Y = "y"
LENGTH = "length"
MIN_ELEVATION = "min_elev"
MAX_ELEVATION = "max_elev"
EXAGGERATION = "ve"
OFFSET = "offset"
TRAVEL = "travel"
GROUND_ELEVATION = "gnd_elev"
DIP_DIRECTION = "dip_dir"
DIP = "dip"
STRIKE = "strike"
LINE_AZIMUTH = "line_az"
LINE_ANGLE = "line_angle"
APPARENT_DIP = "app_dip"
DIPS_TO = "dips_to"
PLOT_DIP = "plot_dip"
APPARENT_DIP_SD = "app_dip_sd"
FLAGS = "flags"
KIND = "kind"
UNIT_BEFORE = "unit_prev"
UNIT_AFTER = "unit_next"
UNIT = "unit"
CHAINAGE_FROM = "ch_from"
CHAINAGE_TO = "ch_to"
ESTIMATED_DIP_DIRECTION = "est_dipdir"
ESTIMATED_DIP = "est_dip"
ESTIMATED_APPARENT_DIP = "est_appdip"
FIT_RMS = "fit_rms"
HOLE = "hole"
DEPTH = "depth"
OFFSET_MIN = "off_min"
OFFSET_MAX = "off_max"
FROM = "from_m"
TO = "to_m"
CODE = "code"
TABLE = "table"

_SECTION = Field(SECTION, TEXT, "section label (the label field, else the feature id; #n per part)")
_CHAINAGE = Field(CHAINAGE, REAL, "horizontal distance along the line from its first vertex")
_EXAGGERATION = Field(EXAGGERATION, REAL, "vertical exaggeration of the section view")
_FLAGS = Field(FLAGS, TEXT, "comma-separated remarks")
_SOURCE_FID = Field(SOURCE_FID, INTEGER, "feature id of the source feature")
_REASON = Field(REASON, TEXT, "why the feature was not used")
_HOLE = Field(HOLE, TEXT, "hole id")
_DIPS_TO = Field(DIPS_TO, TEXT, "end of the line the apparent dip goes down to: start or end")
# A hole drawn on a section: how far its trace strays from it, and the view's VE.
_BESIDE_SECTION = Schema(
    Field(OFFSET_MIN, REAL, "smallest signed distance of the trace from the section"),
    Field(OFFSET_MAX, REAL, "largest signed distance of the trace from the section"),
    _EXAGGERATION,
)

SKIPPED_ROWS = Schema(_SOURCE_FID, _REASON)  # after the source's own fields
SKIPPED_SECTIONS = Schema(_SECTION) + SKIPPED_ROWS

PROFILE_POINTS = Schema(
    _SECTION,
    _CHAINAGE,
    Field(ELEVATION, REAL, "ground elevation from the DEM (NULL where it has no data)"),
    Field(X, REAL, "map x in the lines' CRS"),
    Field(Y, REAL, "map y in the lines' CRS"),
)
PROFILE_LINES = Schema(
    _SECTION,
    Field(LENGTH, REAL, "length of the section line (its last chainage)"),
    Field(MIN_ELEVATION, REAL, "lowest ground elevation"),
    Field(MAX_ELEVATION, REAL, "highest ground elevation"),
)
PROFILE_SECTIONS = PROFILE_LINES + Schema(_EXAGGERATION)

ORIENTATION = Schema(
    Field(DIP_DIRECTION, REAL, "dip direction, grid azimuth"),
    Field(DIP, REAL, "true dip"),
    Field(STRIKE, REAL, "strike by the right-hand rule, grid azimuth"),
)
CARRIED_ATTITUDES = (
    Schema(
        _SECTION,
        _SOURCE_FID,
        _CHAINAGE,
        Field(OFFSET, REAL, "signed distance from the line, + to its right"),
        Field(TRAVEL, REAL, "horizontal distance carried"),
        Field(ELEVATION, REAL, "elevation in the section"),
        Field(GROUND_ELEVATION, REAL, "DEM elevation at the projected position"),
    )
    + ORIENTATION
    + Schema(
        Field(LINE_AZIMUTH, REAL, "azimuth of the section line, toward its end"),
        Field(LINE_ANGLE, REAL, "acute angle between strike and line"),
        Field(APPARENT_DIP, REAL, "apparent dip in the section, true scale"),
        _DIPS_TO,
        Field(PLOT_DIP, REAL, "apparent dip drawn at the run's exaggeration"),
        Field(APPARENT_DIP_SD, REAL, "one standard deviation of the apparent dip"),
        _FLAGS,
    )
)
# Dip ticks are in the section view, which carries its exaggeration.
CARRIED_TICKS = CARRIED_ATTITUDES + Schema(_EXAGGERATION)

CROSSINGS = Schema(
    _SECTION,
    _CHAINAGE,
    Field(ELEVATION, REAL, "ground elevation at the crossing"),
    Field(KIND, TEXT, "unit boundary, or the contact's type"),
    Field(UNIT_BEFORE, TEXT, "unit before the crossing, looking along the line"),
    Field(UNIT_AFTER, TEXT, "unit after the crossing"),
    Field(ESTIMATED_DIP_DIRECTION, REAL, "dip direction of the plane fitted to the trace"),
    Field(ESTIMATED_DIP, REAL, "dip of the plane fitted to the trace"),
    Field(ESTIMATED_APPARENT_DIP, REAL, "apparent dip of that plane in the section"),
    Field(FIT_RMS, REAL, "root-mean-square misfit of the plane"),
    _FLAGS,
)
UNIT_INTERVALS = Schema(
    _SECTION,
    Field(UNIT, TEXT, "unit under the ground line (empty: unmapped)"),
    Field(CHAINAGE_FROM, REAL, "chainage where the unit starts"),
    Field(CHAINAGE_TO, REAL, "chainage where the unit ends"),
    _EXAGGERATION,
    _FLAGS,
)

BOREHOLE_TRACES = Schema(_SECTION, _HOLE, Field(DEPTH, REAL, "total depth along the hole"))
BOREHOLES = BOREHOLE_TRACES + _BESIDE_SECTION
BOREHOLE_INTERVALS = (
    Schema(
        _SECTION,
        _HOLE,
        Field(FROM, REAL, "depth along the hole where the interval starts"),
        Field(TO, REAL, "depth along the hole where the interval ends"),
        Field(CODE, TEXT, "interval code (lithology, unit …)"),
    )
    + _BESIDE_SECTION
)
SKIPPED_BOREHOLE_ROWS = Schema(
    Field(TABLE, TEXT, "the table of the row: collars, surveys or intervals"),
    _HOLE,
    _SOURCE_FID,
    Field(DEPTH, REAL, "depth of the row along the hole"),
    _REASON,
)

# dipdomains: the carried attitudes with their domain, and the domain table.
DOMAIN = "domain"
DOMAIN_DIP = "dom_dip"
REPRESENT = "represent"
WHY = "why"
FROM_CHAINAGE = "from_ch"
TO_CHAINAGE = "to_ch"
COUNT = "count"
MEAN_DIP = "mean_dip"
DIP_SPREAD = "dip_sd"
REPRESENTATIVE_FID = "rep_fid"

_DOMAIN = Field(DOMAIN, INTEGER, "dip domain, 1, 2 … along the section's chainage")
DOMAIN_POINTS = Schema(
    _DOMAIN,
    Field(DOMAIN_DIP, REAL, "the domain's mean signed apparent dip (+ toward the end)"),
    Field(REPRESENT, INTEGER, "1 for the attitude chosen to stand for its domain, else 0"),
    Field(WHY, TEXT, "what made it the choice, or why not"),
)
DIP_DOMAINS = Schema(
    _SECTION,
    _DOMAIN,
    Field(FROM_CHAINAGE, REAL, "chainage of the domain's first attitude"),
    Field(TO_CHAINAGE, REAL, "chainage of the domain's last attitude"),
    Field(COUNT, INTEGER, "attitudes in the domain"),
    Field(MEAN_DIP, REAL, "mean signed apparent dip (+ toward the end)"),
    Field(DIP_SPREAD, REAL, "standard deviation of the signed apparent dips"),
    _DIPS_TO,
    Field(REPRESENTATIVE_FID, INTEGER, "src_fid of the domain's representative attitude"),
)

# structuraltrend: one row per area, and the existing lines checked.
AREA = "area"
COUNT_N = "n"
MEAN_DIP_DIRECTION = "mean_dd"
AXIS_TREND = "axis_tr"
AXIS_PLUNGE = "axis_pl"
EIGENVALUE_1 = "e1"
EIGENVALUE_2 = "e2"
EIGENVALUE_3 = "e3"
SHAPE = "shape"
BEST_AZIMUTH = "best_az"
PATTERN = "pattern"
MISFIT = "misfit"
NEAR_COUNT = "n_near"
OBLIQUE_COUNT = "n_oblique"
ADVICE = "advice"

_AREA = Field(AREA, TEXT, "area name (the area field, else the feature id; all: the whole layer)")
_BEST_AZIMUTH = Field(BEST_AZIMUTH, REAL, "recommended section azimuth")
STRUCTURAL_TREND = Schema(
    _AREA,
    Field(COUNT_N, INTEGER, "attitudes used"),
    Field(MEAN_DIP_DIRECTION, REAL, "dip direction of the mean plane, grid azimuth"),
    Field(MEAN_DIP, REAL, "dip of the mean plane"),
    Field(AXIS_TREND, REAL, "trend of the best-fit cylindrical fold axis"),
    Field(AXIS_PLUNGE, REAL, "plunge of the fold axis"),
    Field(EIGENVALUE_1, REAL, "largest normalised eigenvalue of the orientation tensor"),
    Field(EIGENVALUE_2, REAL, "middle normalised eigenvalue"),
    Field(EIGENVALUE_3, REAL, "smallest normalised eigenvalue"),
    Field(SHAPE, REAL, "Woodcock's shape K = ln(e1/e2) / ln(e2/e3)"),
    _BEST_AZIMUTH,
    Field(PATTERN, TEXT, "girdle, cluster or scattered"),
)
LINES_CHECKED = Schema(
    _SECTION,
    _AREA,
    Field(LINE_AZIMUTH, REAL, "azimuth from the line's first vertex to its last"),
    _BEST_AZIMUTH,
    Field(MISFIT, REAL, "acute angle between line_az and best_az"),
    Field(NEAR_COUNT, INTEGER, "attitudes the line would carry"),
    Field(OBLIQUE_COUNT, INTEGER, "of those, the ones whose strike is close to the line"),
    Field(ADVICE, TEXT, "one line of advice"),
)
SKIPPED_TREND_ROWS = (
    Schema(Field(TABLE, TEXT, "the layer of the row: attitudes, areas or sections")) + SKIPPED_ROWS
)

UNIT_ABOVE = "unit_above"
UNIT_BELOW = "unit_below"
DIP_LEFT = "dip_left"
DIP_RIGHT = "dip_right"
AXIS_DIP = "axis_dip"
THICKNESS = "thick_m"
THICKNESS_SD = "thick_sd"
CHANGE = "change"

# formlines: form lines and axial surfaces in the section view, the
# thickness table, and the attitudes and crossings not used.
FORM_LINES = Schema(
    _SECTION,
    Field(KIND, TEXT, "contact (through a mapped contact) or form line"),
    Field(UNIT_ABOVE, TEXT, "unit above a contact's form line"),
    Field(UNIT_BELOW, TEXT, "unit below a contact's form line"),
    _EXAGGERATION,
)
AXIAL_SURFACES = Schema(
    _SECTION,
    Field(DIP_LEFT, REAL, "signed apparent dip of the beds on the start side, + toward the end"),
    Field(DIP_RIGHT, REAL, "signed apparent dip of the beds on the end side"),
    Field(AXIS_DIP, REAL, "signed dip of the axial surface (or arc radius) itself"),
    _EXAGGERATION,
)
UNIT_THICKNESS = Schema(
    _SECTION,
    Field(UNIT, TEXT, "unit met between two contacts"),
    Field(FROM_CHAINAGE, REAL, "chainage of the first contact"),
    Field(TO_CHAINAGE, REAL, "chainage of the second contact"),
    Field(THICKNESS, REAL, "true stratigraphic thickness, metres"),
    Field(THICKNESS_SD, REAL, "one standard deviation of the thickness, from the dips' σ"),
    Field(CHANGE, REAL, "% difference from the mean of the unit's other occurrences"),
    _FLAGS,
)
SKIPPED_FORM_LINE_ROWS = (
    Schema(Field(TABLE, TEXT, "the layer of the feature: attitudes or crossings"))
    + SKIPPED_SECTIONS
)

# The section sheet's own map layers: the end letters A, A′ of a line.
END_LETTER = "end"
SHEET_ENDS = Schema(Field(END_LETTER, TEXT, "end letter of a section line: A, or A′ at its end"))
