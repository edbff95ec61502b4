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
_OFFSETS = Schema(
    Field(OFFSET_MIN, REAL, "smallest signed distance of the trace from the section"),
    Field(OFFSET_MAX, REAL, "largest signed distance of the trace from the section"),
)

SKIPPED_SECTIONS = Schema(_SECTION, _SOURCE_FID, _REASON)
SKIPPED_ROWS = Schema(_SOURCE_FID, _REASON)  # after the source's own fields

PROFILE_POINTS = Schema(
    _SECTION,
    _CHAINAGE,
    Field(ELEVATION, REAL, "ground elevation from the DEM (NULL where it has no data)"),
    Field(X, REAL, "map x in the lines' CRS"),
    Field(Y, REAL, "map y in the lines' CRS"),
)
PROFILE_SECTIONS = Schema(
    _SECTION,
    Field(LENGTH, REAL, "length of the section line (its last chainage)"),
    Field(MIN_ELEVATION, REAL, "lowest ground elevation"),
    Field(MAX_ELEVATION, REAL, "highest ground elevation"),
    _EXAGGERATION,
)

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
        Field(DIPS_TO, TEXT, "end of the line the apparent dip goes down to: start or end"),
        Field(PLOT_DIP, REAL, "apparent dip drawn at the run's exaggeration"),
        Field(APPARENT_DIP_SD, REAL, "one standard deviation of the apparent dip"),
        _FLAGS,
    )
)

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

_HOLE_DEPTH = Field(DEPTH, REAL, "total depth along the hole")
BOREHOLES = Schema(_SECTION, _HOLE, _HOLE_DEPTH) + _OFFSETS + Schema(_EXAGGERATION)
BOREHOLE_INTERVALS = (
    Schema(
        _SECTION,
        _HOLE,
        Field(FROM, REAL, "depth along the hole where the interval starts"),
        Field(TO, REAL, "depth along the hole where the interval ends"),
        Field(CODE, TEXT, "interval code (lithology, unit …)"),
    )
    + _OFFSETS
    + Schema(_EXAGGERATION)
)
BOREHOLE_TRACES = Schema(_SECTION, _HOLE, _HOLE_DEPTH)
SKIPPED_BOREHOLE_ROWS = Schema(
    Field(TABLE, TEXT, "the table of the row: collars, surveys or intervals"),
    _HOLE,
    _SOURCE_FID,
    Field(DEPTH, REAL, "depth of the row along the hole"),
    _REASON,
)

# Fields the section sheet reads from other algorithms' outputs, and the
# one it writes in its own map layers (the end letters A, A′ of a line).
REPRESENTATIVE = "represent"
DOMAIN = "domain"
DOMAIN_FROM = "from_ch"
DOMAIN_TO = "to_ch"
DOMAIN_MEAN_DIP = "mean_dip"
END_LETTER = "end"
SHEET_ENDS = Schema(Field(END_LETTER, TEXT, "end letter of a section line: A, or A′ at its end"))
