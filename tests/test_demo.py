"""The main job end to end: the demo command's two steps on a fresh folder."""

import subprocess
import sys
from pathlib import Path

import pytest
from osgeo import gdal
from qgis.core import QgsLayoutExporter, QgsProject

from sectionwright.algorithms.compat.qgis_compat import EXPORT_SUCCESS

ROOT = Path(__file__).resolve().parent.parent

pytestmark = pytest.mark.headless  # run_demo.py runs every step through qgis_process


def test_the_demo_makes_sections_sheets_and_a_project(tmp_path):
    outputs = []
    for script in ("run_demo.py", "make_demo_project.py"):
        done = subprocess.run(
            [sys.executable, str(ROOT / "scripts" / script), str(tmp_path)],
            capture_output=True,
            text=True,
            timeout=600,
        )
        assert done.returncode == 0, done.stderr[-3000:]
        outputs.append(done.stdout)
    assert "Form lines below the ground: Summary:" in outputs[0]
    summary = done.stdout
    assert "Project with 4 layouts" in summary
    info = subprocess.run(
        ["pdfinfo", str(tmp_path / "sections.pdf")], capture_output=True, text=True, check=True
    ).stdout
    assert "Pages:           4" in info

    project = QgsProject()
    assert project.read(str(tmp_path / "tarrowgill.qgz"))
    layouts = {layout.name(): layout for layout in project.layoutManager().layouts()}
    assert sorted(layouts) == ["Section A", "Section B", "Section C", "Section D"]
    assert all(layer.isValid() for layer in project.mapLayers().values())
    names = {layer.name() for layer in project.mapLayers().values()}
    assert {"Form lines (kink construction)", "Axial surfaces"} <= names
    picture = tmp_path / "reopened.png"
    settings = QgsLayoutExporter.ImageExportSettings()
    settings.dpi = 60
    result = QgsLayoutExporter(layouts["Section B"]).exportToImage(str(picture), settings)
    assert result == EXPORT_SUCCESS
    grey = gdal.Open(str(picture)).ReadAsArray()[:3].mean(axis=0)
    assert (grey < 200).mean() > 0.01
