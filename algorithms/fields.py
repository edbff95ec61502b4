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
