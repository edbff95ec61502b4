"""The parameters the demo, the tests and the benchmarks run the algorithms
with: which field of an input carries what, for the demo world's layers
(``tarrowgill.gpkg`` and ``dem.tif`` of make_demo.py) and for the small
layers the tests and benchmarks make themselves. Outputs and the settings
a run is about are the caller's:
``{**demo_profile(world), "VERTICAL_EXAGGERATION": 2, "OUTPUT_SECTION": …}``.
"""

from dataclasses import dataclass


def lines(layer):
    """Section lines labelled by their ``name`` field (every line layer here)."""
    return {"INPUT": layer, "LINE_ID_FIELD": "name"}


def numeric_attitudes(layer):
    """Attitudes as dip direction / dip in the fields ``az`` and ``dip``."""
    return {"ATTITUDES": layer, "CONVENTION": 0, "AZIMUTH_FIELD": "az", "DIP_FIELD": "dip"}


def geology(units, contacts):
    """Map units by their ``unit`` field, contacts by their ``type`` field."""
    return {
        "UNITS": units,
        "UNIT_FIELD": "unit",
        "CONTACTS": contacts,
        "CONTACT_TYPE_FIELD": "type",
    }


@dataclass(frozen=True)
class HoleFields:
    """The field names of a set of borehole tables."""

    hole: str
    azimuth: str
    inclination: str
    depth: str
    start: str
    end: str
    code: str


MADE_UP_HOLES = HoleFields("hole", "az", "incl", "depth", "from", "to", "code")
DEMO_HOLES = HoleFields("hole_id", "azimuth", "incl", "depth", "from_m", "to_m", "unit")


def boreholes(collars, surveys=None, intervals=None, fields=MADE_UP_HOLES):
    """Collars, and the surveys and logged intervals where given."""
    parameters = {
        "COLLARS": collars,
        "HOLE_ID_FIELD": fields.hole,
        "AZIMUTH_FIELD": fields.azimuth,
        "INCLINATION_FIELD": fields.inclination,
        "DEPTH_FIELD": fields.depth,
    }
    if surveys is not None:
        parameters.update(
            SURVEYS=surveys,
            SURVEY_HOLE_FIELD=fields.hole,
            SURVEY_DEPTH_FIELD=fields.depth,
            SURVEY_AZIMUTH_FIELD=fields.azimuth,
            SURVEY_INCLINATION_FIELD=fields.inclination,
        )
    if intervals is not None:
        parameters.update(
            INTERVALS=intervals,
            INTERVAL_HOLE_FIELD=fields.hole,
            INTERVAL_FROM_FIELD=fields.start,
            INTERVAL_TO_FIELD=fields.end,
            INTERVAL_CODE_FIELD=fields.code,
        )
    return parameters


# The demo world, in the folder ``world`` make_demo.make wrote.


def demo_layer(world, name):
    return f"{world}/tarrowgill.gpkg|layername={name}"


def demo_dem(world):
    return f"{world}/dem.tif"


def demo_lines(world):
    return lines(demo_layer(world, "sections"))


def demo_attitudes(world):
    """The field notebook (mixed text notation) and how far it is carried."""
    return {
        "ATTITUDES": demo_layer(world, "attitudes"),
        "CONVENTION": 3,
        "TEXT_FIELD": "attitude",
        "MAX_DISTANCE": 500,
    }


def demo_units(world):
    return {"UNITS": demo_layer(world, "units"), "UNIT_FIELD": "unit"}


def demo_geology(world):
    return geology(demo_layer(world, "units"), demo_layer(world, "contacts"))


def demo_boreholes(world):
    return boreholes(
        demo_layer(world, "collars"),
        demo_layer(world, "surveys"),
        demo_layer(world, "intervals"),
        DEMO_HOLES,
    )


def demo_profile(world):
    return {**demo_lines(world), "DEM": demo_dem(world), "STEP": 10}


def demo_projectattitudes(world):
    return {**demo_lines(world), **demo_attitudes(world), "DEM": demo_dem(world)}


def demo_geologycrossings(world):
    return {**demo_lines(world), "DEM": demo_dem(world), **demo_geology(world)}


def demo_projectboreholes(world):
    return {**demo_lines(world), **demo_boreholes(world), "MAX_DISTANCE": 600}


def demo_structuraltrend(world):
    return {**demo_attitudes(world), **demo_lines(world)}


def memory(*outputs):
    """The outputs named, as temporary layers."""
    return dict.fromkeys(outputs, "memory:")
