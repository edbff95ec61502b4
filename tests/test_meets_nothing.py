"""Section lines that meet nothing: no unit boundary, no contact, no
attitude or collar within reach, empty optional layers, no ground at all.
Every algorithm runs to its Summary line, which reconciles, instead of
stopping with a traceback (issue: a line crossing no contact stopped
geologycrossings with an IndexError in contact_crossings)."""

import re

import processing
import pytest
from algorithm_runs import RUNS, memory
from feedback import LogFeedback
from map_files import ORIGIN, DemSpec, LayerSpec, ordinary_map, write_map

X0, Y0 = ORIGIN
INSIDE_ONE_UNIT = [(f"LINESTRING({X0 + 100} {Y0 + 1500}, {X0 + 600} {Y0 + 1600})", ["quiet"])]
OFF_THE_DEM = [(f"LINESTRING({X0 + 100} {Y0 + 1500}, {X0 + 600} {Y0 + 1600})", ["nowhere"])]
SMALL_DEM = DemSpec((X0 + 1200, Y0 + 100, X0 + 1900, Y0 + 900))


def empty(name, geometry, fields):
    return LayerSpec(name, geometry, fields, [])


CASES = {
    # the line stays inside one unit and crosses neither contact nor fault
    "no boundary, no contact": ordinary_map(INSIDE_ONE_UNIT),
    # attitudes and collars exist but are all far from the line
    "nothing within reach": ordinary_map(INSIDE_ONE_UNIT[:1]),
    "empty units and contacts": ordinary_map(
        units=empty("units", "Polygon", [("unit", "string")]),
        contacts=empty("contacts", "LineString", [("type", "string")]),
    ),
    "empty attitudes and collars": ordinary_map(
        attitudes=empty(
            "attitudes", "Point", [("dipdir", "real"), ("dip", "real"), ("text", "string")]
        ),
        collars=empty(
            "collars",
            "Point",
            [("hole", "string"), ("az", "real"), ("incl", "real"), ("depth", "real")],
        ),
    ),
    "empty surveys and intervals": ordinary_map(
        surveys=empty(
            "surveys",
            "None",
            [("hole", "string"), ("depth", "real"), ("az", "real"), ("incl", "real")],
        ),
        intervals=empty(
            "intervals",
            "None",
            [("hole", "string"), ("from_m", "real"), ("to_m", "real"), ("code", "string")],
        ),
    ),
    "no ground at all": ordinary_map(OFF_THE_DEM, dem=SMALL_DEM),
}


@pytest.fixture(scope="module")
def maps(tmp_path_factory):
    return {
        case: write_map(spec, tmp_path_factory.mktemp("nothing")) for case, spec in CASES.items()
    }


def summary(feedback):
    line = next(line for line in feedback.lines if line.startswith("Summary:"))
    return {k: int(v) for k, v in re.findall(r"(\w+)=(\d+)", line)}


@pytest.mark.parametrize("algorithm", sorted(set(RUNS) - {"sectionsheet"}))
@pytest.mark.parametrize("case", list(CASES))
def test_a_line_that_meets_nothing_still_runs_to_a_summary(
    provider, maps, tmp_path, case, algorithm
):
    run = RUNS[algorithm]
    feedback = LogFeedback()
    processing.run(run.algorithm, run.parameters(maps[case], memory, tmp_path), feedback=feedback)
    counts = summary(feedback)
    assert counts["read"] == counts["written"] + counts["skipped"]
    if run.rows_read is not None:
        assert counts["read"] == run.rows_read(maps[case])


def test_no_ground_at_all_is_skipped_with_its_reason(provider, maps, tmp_path):
    feedback = LogFeedback()
    result = processing.run(
        RUNS["profile"].algorithm,
        RUNS["profile"].parameters(maps["no ground at all"], memory, tmp_path),
        feedback=feedback,
    )
    assert [f["reason"] for f in result["SKIPPED"].getFeatures()] == ["no DEM coverage"]


def test_the_sheet_of_a_section_without_ground_says_so(provider, maps, tmp_path):
    from qgis.core import QgsProcessingException

    run = RUNS["sectionsheet"]
    with pytest.raises(QgsProcessingException, match="No section could be drawn"):
        processing.run(run.algorithm, run.parameters(maps["no ground at all"], memory, tmp_path))
