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

DOMAIN_POINT_FIELDS = (DOMAIN, DOMAIN_DIP, REPRESENT, WHY)
DOMAIN_FIELDS = (
    SECTION,
    DOMAIN,
    FROM_CHAINAGE,
    TO_CHAINAGE,
    COUNT,
    MEAN_DIP,
    DIP_SPREAD,
    DIPS_TO,
    REPRESENTATIVE_FID,
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

TREND_FIELDS = (
    AREA,
    COUNT_N,
    MEAN_DIP_DIRECTION,
    MEAN_DIP,
    AXIS_TREND,
    AXIS_PLUNGE,
    EIGENVALUE_1,
    EIGENVALUE_2,
    EIGENVALUE_3,
    SHAPE,
    BEST_AZIMUTH,
    PATTERN,
)
LINE_CHECK_FIELDS = (
    SECTION,
    AREA,
    LINE_AZIMUTH,
    BEST_AZIMUTH,
    MISFIT,
    NEAR_COUNT,
    OBLIQUE_COUNT,
    ADVICE,
)
TREND_SKIPPED_FIELDS = (TABLE, SOURCE_FID, REASON)
TEXT_FIELDS = TEXT_FIELDS + (WHY, AREA, PATTERN, ADVICE)
INTEGER_FIELDS = INTEGER_FIELDS + (
    DOMAIN,
    REPRESENT,
    COUNT,
    REPRESENTATIVE_FID,
    COUNT_N,
    NEAR_COUNT,
    OBLIQUE_COUNT,
)
