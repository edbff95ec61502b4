"""The bad-input matrix: what each algorithm says to an input it cannot use.

Every case names the exact fragment the run must give: an error message
(which begins with the parameter's label, as the dialog shows it), the
reason of a SKIPPED row, or the Summary line of a run that goes through.
The inputs are files, as a user hands them over (map_files.py).
"""

import os
import re
from dataclasses import dataclass, field

import processing
import pytest
from algorithm_runs import RUNS, memory
from feedback import LogFeedback
from map_files import ORIGIN, LayerSpec, ordinary_map, write_map
from osgeo import gdal, osr
from qgis.core import QgsProcessingException

X0, Y0 = ORIGIN
GOOD_LINE = (f"LINESTRING({X0 + 200} {Y0 + 500}, {X0 + 1800} {Y0 + 500})", ["A"])
ATTITUDE_FIELDS = [("dipdir", "real"), ("dip", "real"), ("text", "string")]
COLLAR_FIELDS = [("hole", "string"), ("az", "real"), ("incl", "real"), ("depth", "real")]
SURVEY_FIELDS = [("hole", "string"), ("depth", "real"), ("az", "real"), ("incl", "real")]
INTERVAL_FIELDS = [("hole", "string"), ("from_m", "real"), ("to_m", "real"), ("code", "string")]
NEAR = f"POINT({X0 + 700} {Y0 + 520})"
FAR = f"POINT({X0 + 700} {Y0 + 1900})"


@dataclass
class Case:
    algorithm: str
    expect: str  # "error", "skipped" or "summary"
    fragment: str
    parameters: dict = field(default_factory=dict)  # values, or callables (map, folder) -> value
    layers: dict = field(default_factory=dict)  # map layers replaced (ordinary_map keywords)
    sections: list = None


def lines_with(*rows):
    return [GOOD_LINE, *rows]


def attitudes(*rows):
    return {"attitudes": LayerSpec("attitudes", "Point", ATTITUDE_FIELDS, [*rows])}


def collars(*rows):
    return {"collars": LayerSpec("collars", "Point", COLLAR_FIELDS, [*rows])}


def surveys(*rows):
    return {"surveys": LayerSpec("surveys", "None", SURVEY_FIELDS, [(None, r) for r in rows])}


def intervals(*rows):
    return {"intervals": LayerSpec("intervals", "None", INTERVAL_FIELDS, [(None, r) for r in rows])}


def layer(name):
    return lambda m, folder: m.layer(name)


def raster(make):
    return lambda m, folder: make(folder)


def rgb_image(folder):
    path = str(folder / "photo.tif")
    data = gdal.GetDriverByName("GTiff").Create(path, 20, 20, 3, gdal.GDT_Byte, ["PHOTOMETRIC=RGB"])
    data.SetGeoTransform((X0, 100, 0, Y0 + 2000, 0, -100))
    reference = osr.SpatialReference()
    reference.ImportFromEPSG(32618)
    data.SetProjection(reference.ExportToWkt())
    data = None
    return path


def dem_without_crs(folder):
    path = str(folder / "nocrs.tif")
    data = gdal.GetDriverByName("GTiff").Create(path, 20, 20, 1, gdal.GDT_Float32)
    data.SetGeoTransform((X0, 100, 0, Y0 + 2000, 0, -100))
    data.GetRasterBand(1).Fill(300.0)
    data = None
    return path


def section_view(m, folder):
    return processing.run(
        "sectionwright:profile",
        {
            "INPUT": m.layer("sections"),
            "DEM": str(m.dem),
            "OUTPUT": "memory:",
            "OUTPUT_SECTION": "memory:",
        },
    )["OUTPUT_SECTION"]


def read_only_copy(m, folder):
    os.chmod(m.gpkg, 0o444)
    return m.layer("sections")


LINES_NO_CRS = LayerSpec("sections", "LineString", [("name", "string")], [GOOD_LINE], epsg=None)
EMPTY_LINES = LayerSpec("sections", "LineString", [("name", "string")], [])
SECTION_LINES = "Section lines: "
CASES = {
    # profile
    "profile: points as section lines": Case(
        "profile",
        "error",
        SECTION_LINES + "this layer holds points; choose a layer of lines.",
        {"INPUT": layer("attitudes")},
    ),
    "profile: polygons as section lines": Case(
        "profile", "error", SECTION_LINES + "this layer holds polygons", {"INPUT": layer("units")}
    ),
    "profile: a table as section lines": Case(
        "profile",
        "error",
        SECTION_LINES + "this layer holds no geometry (a plain table)",
        {"INPUT": layer("surveys")},
    ),
    "profile: an empty section line layer": Case(
        "profile", "summary", "Summary: read=0 written=0 skipped=0", sections=[]
    ),
    "profile: section lines without CRS": Case(
        "profile",
        "error",
        SECTION_LINES + "the section lines have no coordinate reference system",
        layers={"sections": LINES_NO_CRS},
    ),
    "profile: a step that is not a number": Case(
        "profile",
        "error",
        "Sampling step (lines' CRS units; 0 = the DEM's cell size): 'ten' is not a number.",
        {"STEP": "ten"},
    ),
    "profile: a section view as section lines": Case(
        "profile",
        "error",
        SECTION_LINES + "this layer is a section view made by Sectionwright",
        {"INPUT": section_view},
    ),
    "profile: a label field the lines lack": Case(
        "profile",
        "error",
        "Section label field (empty: name, label, section or id, else feature id): "
        "the section lines have no field 'nosuch'.",
        {"LINE_ID_FIELD": "nosuch"},
    ),
    "profile: a vector layer as DEM": Case("profile", "error", "DEM: ", {"DEM": layer("units")}),
    "profile: an RGB image as DEM": Case(
        "profile",
        "error",
        "DEM: band 1 of this raster holds red values of an image, not elevations",
        {"DEM": raster(rgb_image)},
    ),
    "profile: a DEM without CRS": Case(
        "profile",
        "error",
        "DEM: the raster has no coordinate reference system",
        {"DEM": raster(dem_without_crs)},
    ),
    "profile: a band that does not exist": Case(
        "profile",
        "error",
        "DEM band: the DEM has 1 band(s); band 5 does not exist.",
        {"DEM_BAND": 5},
    ),
    "profile: a negative step": Case(
        "profile",
        "error",
        "Sampling step (lines' CRS units; 0 = the DEM's cell size): -10 is not allowed; "
        "the value must be at least 0.",
        {"STEP": -10.0},
    ),
    "profile: VE 0": Case(
        "profile",
        "error",
        "Vertical exaggeration: 0 is not allowed; the value must be at least 0.001.",
        {"VERTICAL_EXAGGERATION": 0.0},
    ),
    "profile: an unwritable output path": Case(
        "profile",
        "error",
        "Profile points (map, one per sample): the output cannot be written there",
        {"OUTPUT": "/proc/sectionwright/points.gpkg"},
    ),
    "profile: a section line with no geometry": Case(
        "profile", "skipped", "null geometry", sections=lines_with((None, ["nothing"]))
    ),
    "profile: an empty section line": Case(
        "profile",
        "skipped",
        "empty geometry",
        sections=lines_with(("LINESTRING EMPTY", ["hollow"])),
    ),
    "profile: a section line of no length": Case(
        "profile",
        "skipped",
        "zero-length line",
        sections=lines_with((f"LINESTRING({X0 + 5} {Y0 + 5}, {X0 + 5} {Y0 + 5})", ["dot"])),
    ),
    "profile: a section line off the DEM": Case(
        "profile",
        "skipped",
        "no DEM coverage",
        sections=lines_with((f"LINESTRING({X0 - 5000} {Y0}, {X0 - 4000} {Y0})", ["away"])),
    ),
    "profile: a read-only GeoPackage of lines": Case(
        "profile", "summary", "Summary: read=3 written=3 skipped=0", {"INPUT": read_only_copy}
    ),
    # projectattitudes
    "projectattitudes: lines as attitudes": Case(
        "projectattitudes",
        "error",
        "Attitudes (bedding, foliation … points): this layer holds lines; "
        "choose a layer of points.",
        {"ATTITUDES": layer("sections")},
    ),
    "projectattitudes: no azimuth field for the convention": Case(
        "projectattitudes",
        "error",
        "Azimuth field (dip direction or strike, degrees): attitudes written as "
        "'Dip direction / dip' need this field",
        {"AZIMUTH_FIELD": ""},
    ),
    "projectattitudes: a dip field the layer lacks": Case(
        "projectattitudes",
        "error",
        "Dip field (degrees): the attitude layer has no field 'nosuch'.",
        {"DIP_FIELD": "nosuch"},
    ),
    "projectattitudes: a text field read as dips": Case(
        "projectattitudes",
        "skipped",
        "non-numeric dip: 'steep'",
        {"DIP_FIELD": "text"},
        layers=attitudes((NEAR, [90.0, 30.0, "steep"])),
    ),
    "projectattitudes: dip over 90": Case(
        "projectattitudes",
        "skipped",
        "dip out of range",
        layers=attitudes((NEAR, [90.0, 95.0, ""])),
    ),
    "projectattitudes: negative dip": Case(
        "projectattitudes",
        "skipped",
        "dip out of range",
        layers=attitudes((NEAR, [90.0, -5.0, ""])),
    ),
    "projectattitudes: azimuth over 360": Case(
        "projectattitudes",
        "skipped",
        "azimuth out of range",
        layers=attitudes((NEAR, [400.0, 30.0, ""])),
    ),
    "projectattitudes: a NULL dip": Case(
        "projectattitudes", "skipped", "missing dip", layers=attitudes((NEAR, [90.0, None, ""]))
    ),
    "projectattitudes: an attitude with no geometry": Case(
        "projectattitudes", "skipped", "null geometry", layers=attitudes((None, [90.0, 30.0, ""]))
    ),
    "projectattitudes: an attitude out of reach": Case(
        "projectattitudes",
        "skipped",
        "beyond max distance",
        {"MAX_DISTANCE": 100.0},
        layers=attitudes((FAR, [90.0, 30.0, ""])),
    ),
    "projectattitudes: a negative maximum distance": Case(
        "projectattitudes",
        "error",
        "Maximum distance from the section (lines' CRS units): -1 is not allowed",
        {"MAX_DISTANCE": -1.0},
    ),
    "projectattitudes: plunge of 90": Case(
        "projectattitudes",
        "error",
        "Plunge (degrees below horizontal; only for projection along a plunge): 90 is not "
        "allowed; the value must be at least 0 and at most 89.9.",
        {"PLUNGE": 90.0},
    ),
    "projectattitudes: units without a unit field": Case(
        "projectattitudes",
        "error",
        "Unit field: choose the field that names the unit.",
        {"UNIT_FIELD": ""},
    ),
    "projectattitudes: none of the lines usable": Case(
        "projectattitudes",
        "error",
        SECTION_LINES + "none of the section lines can be used",
        sections=[(None, ["nothing"])],
    ),
    # normalizeattitudes
    "normalizeattitudes: unreadable text": Case(
        "normalizeattitudes",
        "skipped",
        "unparsed text: 'garbage'",
        layers=attitudes((NEAR, [None, None, "garbage"])),
    ),
    "normalizeattitudes: a quadrant that contradicts the strike": Case(
        "normalizeattitudes",
        "skipped",
        "quadrant contradicts strike",
        layers=attitudes((NEAR, [None, None, "N30E 40NE"])),
    ),
    "normalizeattitudes: no text field for text notation": Case(
        "normalizeattitudes",
        "error",
        "Attitude text field (e.g. 120/40, N30E 40SE): attitudes written as 'Text notation",
        {"TEXT_FIELD": ""},
    ),
    # geologycrossings
    "geologycrossings: points as contacts": Case(
        "geologycrossings",
        "error",
        "Contacts and faults (lines): this layer holds points",
        {"CONTACTS": layer("attitudes")},
    ),
    "geologycrossings: lines as units": Case(
        "geologycrossings",
        "error",
        "Map units (polygons): this layer holds lines",
        {"UNITS": layer("contacts")},
    ),
    "geologycrossings: a contact type field the layer lacks": Case(
        "geologycrossings",
        "error",
        "Contact type field (e.g. contact, fault): the contacts layer has no field 'nosuch'.",
        {"CONTACT_TYPE_FIELD": "nosuch"},
    ),
    "geologycrossings: a unit field the layer lacks": Case(
        "geologycrossings",
        "error",
        "Unit field: the units layer has no field 'nosuch'.",
        {"UNIT_FIELD": "nosuch"},
    ),
    "geologycrossings: a negative trace window": Case(
        "geologycrossings",
        "error",
        "Contact attitude from its trace within (lines' CRS units; 0 = off): -5 is not allowed",
        {"TRACE_WINDOW": -5.0},
    ),
    # projectboreholes
    "projectboreholes: no hole id field": Case(
        "projectboreholes", "error", "Hole id field: ", {"HOLE_ID_FIELD": ""}
    ),
    "projectboreholes: a depth field the collars lack": Case(
        "projectboreholes",
        "error",
        "Total depth field (metres along the hole): the collar layer has no field 'nosuch'.",
        {"DEPTH_FIELD": "nosuch"},
    ),
    "projectboreholes: a survey field not chosen": Case(
        "projectboreholes",
        "error",
        "Survey depth field (metres along the hole): choose the field of the surveys table.",
        {"SURVEY_DEPTH_FIELD": ""},
    ),
    "projectboreholes: depth zero": Case(
        "projectboreholes",
        "skipped",
        "depth not positive",
        layers=collars((NEAR, ["H0", 0.0, 60.0, 0.0])),
    ),
    "projectboreholes: inclination over 90": Case(
        "projectboreholes",
        "skipped",
        "inclination out of range",
        layers=collars((NEAR, ["H0", 0.0, 120.0, 100.0])),
    ),
    "projectboreholes: a duplicate hole id": Case(
        "projectboreholes",
        "skipped",
        "duplicate hole id",
        layers=collars((NEAR, ["H0", 0.0, 60.0, 100.0]), (NEAR, ["H0", 0.0, 60.0, 100.0])),
    ),
    "projectboreholes: a collar without hole id": Case(
        "projectboreholes",
        "skipped",
        "missing hole id",
        layers=collars((NEAR, [None, 0.0, 60.0, 100.0])),
    ),
    "projectboreholes: a collar out of reach": Case(
        "projectboreholes",
        "skipped",
        "beyond max distance",
        {"MAX_DISTANCE": 50.0},
        layers=collars((FAR, ["H0", 0.0, 60.0, 100.0])),
    ),
    "projectboreholes: surveys out of order": Case(
        "projectboreholes",
        "skipped",
        "survey out of depth order",
        layers=surveys(["H0", 80.0, 0.0, 60.0], ["H0", 40.0, 0.0, 60.0], ["H0", 80.0, 0.0, 61.0]),
    ),
    "projectboreholes: a survey of a hole with no collar": Case(
        "projectboreholes",
        "skipped",
        "no collar for hole",
        layers=surveys(["ghost", 10.0, 0.0, 60.0]),
    ),
    "projectboreholes: overlapping intervals": Case(
        "projectboreholes",
        "skipped",
        "overlaps the interval above",
        layers=intervals(["H0", 0.0, 50.0, "A"], ["H0", 40.0, 90.0, "B"]),
    ),
    "projectboreholes: an interval below total depth": Case(
        "projectboreholes",
        "skipped",
        "beyond total depth",
        layers=intervals(["H0", 100.0, 900.0, "A"]),
    ),
    "projectboreholes: an interval from below to above": Case(
        "projectboreholes", "skipped", "empty interval", layers=intervals(["H0", 60.0, 20.0, "A"])
    ),
    # sectionsheet
    "sectionsheet: an output that is not a sheet format": Case(
        "sectionsheet",
        "error",
        "Section sheets: the file must end in .pdf, .png or .svg.",
        {"OUTPUT": lambda m, folder: str(folder / "sheet.docx")},
    ),
    "sectionsheet: an output folder that does not exist": Case(
        "sectionsheet",
        "error",
        "Section sheets: cannot write into /nonexistent",
        {"OUTPUT": "/nonexistent/sheet.pdf"},
    ),
    "sectionsheet: a profile without section field": Case(
        "sectionsheet",
        "error",
        "Profile (section view, from Topographic profile): give the section-view profile",
        {"PROFILE": layer("units")},
    ),
}

# Only the one collar H0 near line A where a case gives its own collars;
# surveys and intervals refer to it.
H0 = collars((NEAR, ["H0", 0.0, 60.0, 100.0]))


def case_map(case):
    replace = dict(case.layers)
    if case.algorithm == "projectboreholes" and "collars" not in replace:
        replace.update(H0)
        replace.setdefault("surveys", surveys()["surveys"])
        replace.setdefault("intervals", intervals()["intervals"])
    return ordinary_map(case.sections, **replace)


@pytest.mark.parametrize("name", list(CASES))
def test_bad_input(provider, tmp_path, name):
    case = CASES[name]
    world = write_map(case_map(case), tmp_path / "map")
    run = RUNS[case.algorithm]
    parameters = run.parameters(world, memory, tmp_path)
    for key, value in case.parameters.items():
        parameters[key] = value(world, tmp_path) if callable(value) else value
    feedback = LogFeedback()
    try:
        if case.expect == "error":
            # No feedback of ours here: the context processing.run makes keeps
            # a pointer to it, and the error's traceback keeps both alive
            # until the garbage collector frees them in no particular order.
            with pytest.raises(QgsProcessingException) as refused:
                processing.run(run.algorithm, parameters)
            message = str(refused.value)
            del refused
            assert case.fragment in message and "Traceback" not in message, message
            return
        result = processing.run(run.algorithm, parameters, feedback=feedback)
    finally:
        os.chmod(world.gpkg, 0o644)
    if case.expect == "summary":
        assert case.fragment in feedback.lines
    else:
        reasons = [f["reason"] for f in result["SKIPPED"].getFeatures()]
        assert case.fragment in reasons, reasons


def test_the_matrix_has_at_least_40_cases():
    assert len(CASES) >= 40
    assert re.compile(r"^[a-z]+: ").match(next(iter(CASES)))
