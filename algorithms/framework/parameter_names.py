"""The names of the parameters several algorithms share, in one place: the
helpers that read inputs name them in their messages (ParameterProblem),
and the base class declares them."""

INPUT = "INPUT"
LINE_ID_FIELD = "LINE_ID_FIELD"
SKIPPED = "SKIPPED"
VERTICAL_EXAGGERATION = "VERTICAL_EXAGGERATION"
UNITS = "UNITS"
UNIT_FIELD = "UNIT_FIELD"
DEM = "DEM"
DEM_BAND = "DEM_BAND"
Z_FACTOR = "Z_FACTOR"
MAX_DISTANCE = "MAX_DISTANCE"
NORTH_REFERENCE = "NORTH_REFERENCE"
DECLINATION = "DECLINATION"
