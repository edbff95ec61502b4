"""The defects found on maps and in Python environments the suite did not
use (issue 10); the shapely defaults have tests/test_shapely_defaults.py,
Cancel and progress tests/test_cancel_and_progress.py."""

import shutil
import subprocess
from pathlib import Path

import processing
import pytest
from algorithm_runs import RUNS, memory
from feedback import LogFeedback
from map_files import ORIGIN, ordinary_map, write_map
from qgis.core import QgsApplication, QgsProcessingException

from sectionwright.algorithms.outputs.section_space import is_section_view

ROOT = Path(__file__).resolve().parent.parent
X0, Y0 = ORIGIN


@pytest.fixture(scope="module")
def ordinary(tmp_path_factory):
    return write_map(ordinary_map(), tmp_path_factory.mktemp("ordinary"))


def test_1_a_line_that_crosses_no_contact_gives_no_contact_crossing(provider, tmp_path):
    far = [(f"LINESTRING({X0 + 100} {Y0 + 1500}, {X0 + 600} {Y0 + 1600})", ["far"])]
    world = write_map(ordinary_map(far), tmp_path)
    feedback = LogFeedback()
    result = processing.run(
        "sectionwright:geologycrossings",
        RUNS["geologycrossings"].parameters(world, memory, tmp_path),
        feedback=feedback,
    )
    assert [f["kind"] for f in result["OUTPUT"].getFeatures()] == []
    assert "Summary: read=1 written=1 skipped=0" in feedback.lines


@pytest.mark.parametrize("name", sorted(set(RUNS) - {"sectionsheet"}))
def test_3_every_section_space_output_carries_ve(provider, ordinary, tmp_path, name):
    run = RUNS[name]
    result = processing.run(run.algorithm, run.parameters(ordinary, memory, tmp_path))
    section_layers = [
        layer
        for layer in result.values()
        if hasattr(layer, "crs") and is_section_view(layer.crs()) and layer.featureCount()
    ]
    for layer in section_layers:
        assert "ve" in layer.fields().names(), layer.name()
        assert {f["ve"] for f in layer.getFeatures()} == {2.0}
    if name == "projectattitudes":
        assert result["OUTPUT_TICKS"] in section_layers


@pytest.mark.parametrize("name", sorted(run for run in RUNS if "sections" in RUNS[run].needs))
def test_4_a_section_view_layer_as_section_lines_is_refused_with_advice(
    provider, ordinary, tmp_path, name
):
    view = processing.run(
        "sectionwright:profile", RUNS["profile"].parameters(ordinary, memory, tmp_path)
    )["OUTPUT_SECTION"]
    parameters = RUNS[name].parameters(ordinary, memory, tmp_path)
    if "INPUT" not in parameters:
        pytest.skip(f"{name} reads no section lines itself")
    parameters.update(INPUT=view, LINE_ID_FIELD="section")
    with pytest.raises(QgsProcessingException) as refused:
        processing.run(f"sectionwright:{name}", parameters)
    message = str(refused.value)
    assert message.startswith("Section lines: this layer is a section view made by Sectionwright")
    assert "Choose the section lines drawn on the map" in message
    assert "Traceback" not in message


def test_6_the_test_session_profile_is_not_in_the_checkout():
    settings = Path(QgsApplication.qgisSettingsDirPath()).resolve()
    assert ROOT not in settings.parents
    assert not (ROOT / ".qgis-settings").exists()


def git(*arguments):
    if shutil.which("git") is None:
        pytest.skip("git is not installed here (a Debian root of test_releases.sh)")
    done = subprocess.run(["git", *arguments], cwd=ROOT, capture_output=True, text=True)
    if "not a git repository" in done.stderr:
        pytest.skip("the checkout's repository is not reachable here")
    return done


def test_6_no_qgis_profile_is_tracked_and_git_ignores_one():
    assert git("ls-files", ".qgis-settings").stdout == ""
    assert git("check-ignore", "-q", ".qgis-settings/profiles/default/qgis-auth.db").returncode == 0
