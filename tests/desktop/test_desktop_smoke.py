"""Desktop QGIS for real (scripts/desktop_smoke.py): the `qgis` program on
an X server, a throwaway profile, the plugin installed from the built zip,
the demo project opened by a start-up script that records every message-bar
and log message, opens the section viewer and a dialog, and leaves."""

import shutil
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "scripts"))
import desktop_smoke  # noqa: E402

pytestmark = pytest.mark.skipif(
    not (shutil.which("qgis") and shutil.which("Xvfb") and shutil.which("import")),
    reason="needs the qgis program, Xvfb and ImageMagick (.ci/run installs them)",
)
CRITICAL = 2


@pytest.fixture(scope="module")
def report(demo_project, tmp_path_factory):
    work = tmp_path_factory.mktemp("desktop")
    result = desktop_smoke.run(demo_project / "tarrowgill.qgz", work, work / "screenshots")
    log = "\n".join(
        f"[{m['source']} {m['tag'] or '-'} level {m['level']} at {m['seconds']} s] "
        f"{m['message'].splitlines()[0] if m['message'] else ''}"
        for m in result["messages"]
    )
    print(f"Desktop message log:\n{log}")
    return result


def test_the_plugin_is_active_and_the_map_opens_at_the_sections(report):
    assert "sectionwright" in report["plugins"]
    x0, y0, x1, y1 = report["canvas_extent"]
    # The demo's section lines lie within about 12 km × 8 km.
    assert 5_000 < x1 - x0 < 30_000 and 3_000 < y1 - y0 < 30_000
    assert report["canvas_crs"] == "EPSG:32633"
    drawn = [row for row in report["layers"] if row["in_canvas"]]
    assert {"Section lines", "Units", "Attitudes (strike and dip)"} <= {r["name"] for r in drawn}
    assert all(r["crs"] != "Section view" for r in drawn)


def test_the_viewer_shows_the_sections(report):
    assert report["viewer"] == {"sections": ["A", "B", "C", "D"], "shown": "B"}


def test_outputs_run_from_the_desktop_load_styled_and_section_views_hidden(report):
    from sectionwright.algorithms.outputs.output_styles import SECTION_VIEW_GROUP

    added = {row["name"]: row for row in report["run_and_load"]}
    section = added.pop("Profile (section view)")
    assert section["group"] == SECTION_VIEW_GROUP and not section["visible"]
    assert added and all(row["visible"] for row in added.values()), added


# What is left on QGIS 3.22: when Processing loads a section-view output
# into a project whose map has a CRS, the desktop looks for a transform from
# the section view to the map's CRS, which does not exist (nor should it:
# section views would land on the map). Seen with the viewer closed too;
# the viewer's own canvas no longer asks (compat.viewer_canvas_crs).
SECTION_VIEW_LOADED_INTO_THE_MAP = "No transform available between Section view and EPSG:32633"


def test_no_error_from_the_plugin_python_or_qgis(report):
    errors = [
        m["message"]
        for m in report["messages"]
        if m["level"] >= CRITICAL and m["message"] != SECTION_VIEW_LOADED_INTO_THE_MAP
    ]
    assert errors == []


@pytest.mark.xfail(
    reason="open on QGIS 3.22: loading a section-view output into the map project "
    "looks for a transform from the section view to the map's CRS",
    strict=True,
)
def test_no_error_message_at_all(report):
    assert [m["message"] for m in report["messages"] if m["level"] >= CRITICAL] == []
