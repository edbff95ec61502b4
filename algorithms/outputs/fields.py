"""Output field names (the contract in DESIGN.md). At most 10 characters, so
a Shapefile export keeps them."""

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

# The fields of a carried attitude, in output order, and which are text.
ATTITUDE_FIELDS = (
    SECTION,
    SOURCE_FID,
    CHAINAGE,
    OFFSET,
    TRAVEL,
    ELEVATION,
    GROUND_ELEVATION,
    DIP_DIRECTION,
    DIP,
    STRIKE,
    LINE_AZIMUTH,
    LINE_ANGLE,
    APPARENT_DIP,
    DIPS_TO,
    PLOT_DIP,
    APPARENT_DIP_SD,
    FLAGS,
)
ORIENTATION_FIELDS = (DIP_DIRECTION, DIP, STRIKE)
TEXT_FIELDS = (SECTION, DIPS_TO, FLAGS, REASON)
INTEGER_FIELDS = (SOURCE_FID,)
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

CROSSING_FIELDS = (
    SECTION,
    CHAINAGE,
    ELEVATION,
    KIND,
    UNIT_BEFORE,
    UNIT_AFTER,
    ESTIMATED_DIP_DIRECTION,
    ESTIMATED_DIP,
    ESTIMATED_APPARENT_DIP,
    FIT_RMS,
    FLAGS,
)
INTERVAL_FIELDS = (SECTION, UNIT, CHAINAGE_FROM, CHAINAGE_TO, EXAGGERATION, FLAGS)
TEXT_FIELDS = TEXT_FIELDS + (KIND, UNIT_BEFORE, UNIT_AFTER, UNIT)
HOLE = "hole"
DEPTH = "depth"
OFFSET_MIN = "off_min"
OFFSET_MAX = "off_max"
FROM = "from_m"
TO = "to_m"
CODE = "code"
TABLE = "table"

HOLE_FIELDS = (SECTION, HOLE, DEPTH, OFFSET_MIN, OFFSET_MAX, EXAGGERATION)
HOLE_INTERVAL_FIELDS = (SECTION, HOLE, FROM, TO, CODE, OFFSET_MIN, OFFSET_MAX, EXAGGERATION)
TRACE_FIELDS = (SECTION, HOLE, DEPTH)
HOLE_SKIPPED_FIELDS = (TABLE, HOLE, SOURCE_FID, DEPTH, REASON)
TEXT_FIELDS = TEXT_FIELDS + (HOLE, CODE, TABLE)

# Fields the section sheet reads from other algorithms' outputs, and the
# one it writes in its own map layers (the end letters A, A′ of a line).
REPRESENTATIVE = "represent"
DOMAIN = "domain"
DOMAIN_FROM = "from_ch"
DOMAIN_TO = "to_ch"
DOMAIN_MEAN_DIP = "mean_dip"
END_LETTER = "end"
