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
ATTITUDE_FIELDS = (SECTION, SOURCE_FID, CHAINAGE, OFFSET, TRAVEL, ELEVATION, GROUND_ELEVATION,
                   DIP_DIRECTION, DIP, STRIKE, LINE_AZIMUTH, LINE_ANGLE, APPARENT_DIP, DIPS_TO,
                   PLOT_DIP, APPARENT_DIP_SD, FLAGS)
ORIENTATION_FIELDS = (DIP_DIRECTION, DIP, STRIKE)
TEXT_FIELDS = (SECTION, DIPS_TO, FLAGS, REASON)
INTEGER_FIELDS = (SOURCE_FID,)
