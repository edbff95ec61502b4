"""sectionwright:dipdomains through processing.run, on the section points of
projectattitudes."""

import numpy as np
import processing
import pytest
import run_parameters as P
from feedback import LogFeedback
from layers import attributes, line_layer, point_layer
from qgis.core import QgsProcessingException, QgsVectorLayer

X0, Y0 = 431000.0, 5127000.0
EAST_WEST = f"LINESTRING({X0} {Y0 + 1000}, {X0 + 4000} {Y0 + 1000})"  # azimuth 090
# (chainage, offset north of the line, dip direction, dip): three domains —
# ~20° toward the end, ~40° toward the end, ~30° toward the start. The
# attitude at 1200 is nearest the line but oblique (strike 15° off the line;
# its apparent dip is 40°: tan 72.9° · sin 15° = tan 40°).
ROWS = [
    (200.0, 50.0, 90.0, 20.0),
    (400.0, 10.0, 90.0, 21.0),
    (600.0, 80.0, 90.0, 19.0),
    (1000.0, 30.0, 90.0, 40.0),
    (1200.0, 5.0, 15.0, 72.9),
    (1400.0, 60.0, 90.0, 39.0),
    (2000.0, 20.0, 270.0, 30.0),
    (2200.0, 40.0, 270.0, 31.0),
]
DOMAIN_FIELDS = [
    "section",
    "domain",
    "from_ch",
    "to_ch",
    "count",
    "mean_dip",
    "dip_sd",
    "dips_to",
    "rep_fid",
]


def attitudes_on_section(rows=ROWS):
    points = point_layer(
        [
            (f"POINT({X0 + ch} {Y0 + 1000 + off})", [float(dd), float(dip)])
            for ch, off, dd, dip in rows
        ],
        [("az", "double"), ("dip", "double")],
    )
    result = processing.run(
        "sectionwright:projectattitudes",
        {
            "INPUT": line_layer([EAST_WEST], names=["S1"]),
            "LINE_ID_FIELD": "name",
            "ATTITUDES": points,
            "AZIMUTH_FIELD": "az",
            "DIP_FIELD": "dip",
            "OUTPUT": "memory:",
            "OUTPUT_TICKS": "memory:",
        },
    )
    return result["OUTPUT"]


def run(points, feedback=None, **extra):
    parameters = {"ATTITUDES": points, "OUTPUT": "memory:", "OUTPUT_DOMAINS": "memory:"}
    parameters.update(SKIPPED="memory:", **extra)
    return processing.run("sectionwright:dipdomains", parameters, feedback=feedback)


def by_chainage(layer):
    return {round(r["chainage"]): r for r in attributes(layer)}


def test_domains_representatives_and_reasons(provider):
    feedback = LogFeedback()
    result = run(attitudes_on_section(), feedback)
    rows = by_chainage(result["OUTPUT"])
    assert [rows[ch]["domain"] for ch in sorted(rows)] == [1, 1, 1, 2, 2, 2, 3, 3]
    chosen = sorted(ch for ch, r in rows.items() if r["represent"] == 1)
    assert chosen == [400, 1000, 2000]
    assert rows[400]["why"].startswith("nearest the line")
    # No DEM here: every attitude lacks an elevation; only the oblique one is worse.
    assert rows[1200]["why"] == "oblique, no elevation"
    assert rows[200]["why"] == f"redundant with {rows[400]['src_fid']}"
    assert rows[1400]["dom_dip"] == pytest.approx(np.mean([40.0, 40.0, 39.0]), abs=0.05)
    assert rows[2000]["dom_dip"] == pytest.approx(-30.5, abs=1e-6)
    domains = attributes(result["OUTPUT_DOMAINS"])
    assert list(domains[0]) == DOMAIN_FIELDS
    table = [(d["domain"], d["from_ch"], d["to_ch"], d["count"], d["dips_to"]) for d in domains]
    assert sorted(table) == [
        (1, pytest.approx(200.0), pytest.approx(600.0), 3, "end"),
        (2, pytest.approx(1000.0), pytest.approx(1400.0), 3, "end"),
        (3, pytest.approx(2000.0), pytest.approx(2200.0), 2, "start"),
    ]
    assert sorted(d["rep_fid"] for d in domains) == sorted(rows[ch]["src_fid"] for ch in chosen)
    first = next(d for d in domains if d["domain"] == 1)
    assert first["mean_dip"] == pytest.approx(20.0) and first["dip_sd"] == pytest.approx(
        np.std([20.0, 21.0, 19.0])
    )
    log = feedback.algorithm_log()
    assert "Section S1: 8 attitude(s) in 3 domain(s)." in log
    assert log[-1] == "Summary: read=8 written=8 skipped=0"


def test_input_order_does_not_matter(provider):
    forward = by_chainage(run(attitudes_on_section())["OUTPUT"])
    backward = by_chainage(run(attitudes_on_section(ROWS[::-1]))["OUTPUT"])
    for ch, row in forward.items():
        assert (row["domain"], row["represent"]) == (
            backward[ch]["domain"],
            backward[ch]["represent"],
        )


def test_a_larger_tolerance_merges_and_min_count_is_kept(provider):
    layer = attitudes_on_section()
    # β = 40²/2 = 800 exceeds what splitting 20° from 40° (three each) buys,
    # 20² · 3·3/6 = 600: they merge; the change of direction still splits.
    wide = by_chainage(run(layer, ANGLE_TOLERANCE=40.0)["OUTPUT"])
    assert [wide[ch]["domain"] for ch in sorted(wide)] == [1, 1, 1, 1, 1, 1, 2, 2]
    # Four at least: the six dipping toward the end form one domain; the two
    # dipping toward the start stay apart, forced by the change of direction.
    counted = attributes(run(layer, MIN_COUNT=4)["OUTPUT_DOMAINS"])
    assert sorted(d["count"] for d in counted) == [2, 6]


def section_points(rows):
    """A hand-made section-point layer: rows are (section, chainage, app_dip, dips_to)."""
    return point_layer(
        [(f"POINT({X0 + i} {Y0})", list(r)) for i, r in enumerate(rows)],
        [
            ("section", "string"),
            ("chainage", "double"),
            ("app_dip", "double"),
            ("dips_to", "string"),
        ],
    )


def test_rows_without_a_chainage_or_section_are_skipped_with_a_reason(provider):
    feedback = LogFeedback()
    points = section_points(
        [
            ("X", 10.0, 20.0, "end"),
            ("X", None, 20.0, "end"),
            (None, 5.0, 1.0, "end"),
            ("X", 30.0, 22.0, "end"),
        ]
    )
    result = run(points, feedback)
    assert sorted(r["reason"] for r in attributes(result["SKIPPED"])) == [
        "missing chainage",
        "no section",
    ]
    written = attributes(result["OUTPUT"])
    assert [r["domain"] for r in written] == [1, 1]
    # Without src_fid the feature id stands in for it; without travel and
    # app_dip_sd the tie goes to the smallest id.
    assert [r["represent"] for r in written] == [1, 0]
    assert feedback.algorithm_log()[-2:] == [
        "Summary: read=4 written=2 skipped=2",
        "Skipped: missing chainage=1, no section=1",
    ]


def test_a_layer_that_is_not_section_points_is_refused_by_name(provider):
    points = point_layer([("POINT(0 0)", [1.0])], [("dip", "double")])
    with pytest.raises(QgsProcessingException, match="Attitudes on sections: .* 'section'"):
        run(points)


def test_demo_sections_each_get_domains_and_one_representative_per_domain(provider, demo_dir):
    carried = processing.run(
        "sectionwright:projectattitudes",
        {
            **P.demo_lines(demo_dir),
            **P.demo_attitudes(demo_dir),
            **P.demo_units(demo_dir),
            **P.memory("OUTPUT", "OUTPUT_TICKS"),
        },
    )["OUTPUT"]
    result = run(carried)
    rows = attributes(result["OUTPUT"])
    domains = attributes(result["OUTPUT_DOMAINS"])
    assert len(rows) == carried.featureCount()
    assert sum(r["represent"] for r in rows) == len(domains)
    assert sum(d["count"] for d in domains) == len(rows)
    assert {d["section"] for d in domains} == {r["section"] for r in rows}
    assert all(r["why"] for r in rows)
    # Section A crosses the anticline: dips toward both ends.
    assert {d["dips_to"] for d in domains if d["section"] == "A"} >= {"start", "end"}


def test_chains_after_projectattitudes_in_a_graphical_model(provider):
    from qgis.core import (
        QgsProcessingModelAlgorithm,
        QgsProcessingModelChildAlgorithm,
        QgsProcessingModelChildParameterSource,
        QgsProcessingModelOutput,
        QgsProcessingModelParameter,
        QgsProcessingParameterFeatureSource,
    )

    static = QgsProcessingModelChildParameterSource.fromStaticValue
    model = QgsProcessingModelAlgorithm("domains", "tests")
    for name in ("lines", "points"):
        model.addModelParameter(
            QgsProcessingParameterFeatureSource(name, name), QgsProcessingModelParameter(name)
        )
    carry = QgsProcessingModelChildAlgorithm("sectionwright:projectattitudes")
    carry.setChildId("carry")
    for name, source in (("INPUT", "lines"), ("ATTITUDES", "points")):
        carry.addParameterSources(
            name, [QgsProcessingModelChildParameterSource.fromModelParameter(source)]
        )
    for name, value in (("AZIMUTH_FIELD", "az"), ("DIP_FIELD", "dip"), ("LINE_ID_FIELD", "name")):
        carry.addParameterSources(name, [static(value)])
    model.addChildAlgorithm(carry)
    domains = QgsProcessingModelChildAlgorithm("sectionwright:dipdomains")
    domains.setChildId("domains")
    domains.addParameterSources(
        "ATTITUDES", [QgsProcessingModelChildParameterSource.fromChildOutput("carry", "OUTPUT")]
    )
    output = QgsProcessingModelOutput("domain_table")
    output.setChildOutputName("OUTPUT_DOMAINS")
    domains.setModelOutputs({"domain_table": output})
    model.addChildAlgorithm(domains)
    points = point_layer(
        [(f"POINT({X0 + ch} {Y0 + 1000 + off})", [dd, dip]) for ch, off, dd, dip in ROWS],
        [("az", "double"), ("dip", "double")],
    )
    result = processing.run(
        model,
        {
            "lines": line_layer([EAST_WEST], names=["S1"]),
            "points": points,
            "domains:domain_table": "memory:",
        },
    )
    layer = result["domains:domain_table"]
    layer = QgsVectorLayer(layer) if isinstance(layer, str) else layer
    assert layer.featureCount() == 3


def test_an_empty_layer_gives_empty_outputs(provider):
    feedback = LogFeedback()
    result = run(section_points([]), feedback)
    assert result["OUTPUT"].featureCount() == 0 and result["OUTPUT_DOMAINS"].featureCount() == 0
    assert feedback.algorithm_log()[-1] == "Summary: read=0 written=0 skipped=0"


def test_rarely_changed_parameters_are_advanced(provider):
    from qgis.core import QgsApplication

    from sectionwright.algorithms.compat.qgis_compat import ADVANCED

    registry = QgsApplication.processingRegistry()
    for algorithm, name in (("dipdomains", "MIN_COUNT"), ("structuraltrend", "OBLIQUE_ANGLE")):
        definition = registry.algorithmById(f"sectionwright:{algorithm}").parameterDefinition(name)
        assert definition.flags() & ADVANCED
    domains = registry.algorithmById("sectionwright:dipdomains")
    assert not domains.parameterDefinition("ANGLE_TOLERANCE").flags() & ADVANCED
