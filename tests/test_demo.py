"""The main job end to end: the demo command's two steps on a fresh folder."""

import subprocess
import sys
from pathlib import Path

import pytest
from osgeo import gdal
from qgis.core import QgsLayoutExporter, QgsProject, QgsWkbTypes

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
    assert "Project with 1 layout of 5 pages" in summary
    info = subprocess.run(
        ["pdfinfo", str(tmp_path / "sections.pdf")], capture_output=True, text=True, check=True
    ).stdout
    assert "Pages:           5" in info  # overview + one per section

    import qgis._3d

    qgis._3d.Qgs3D.initialize()  # 3-D renderers are read only once registered
    project = QgsProject()
    assert project.read(str(tmp_path / "tarrowgill.qgz"))
    layouts = {layout.name(): layout for layout in project.layoutManager().layouts()}
    assert sorted(layouts) == ["Tarrowgill — demo sections"]
    assert all(layer.isValid() for layer in project.mapLayers().values())
    assert not [x for x in project.mapLayers().values() if x.providerType() == "memory"]
    fences = {x.name(): x for x in project.mapLayers().values() if x.name().endswith("(3-D)")}
    assert sorted(fences) == [
        "Axial surfaces (3-D)",
        "Boreholes (3-D)",
        "Form lines (3-D)",
        "Geology strip (3-D)",
        "Ground (3-D)",
        "Logged intervals (3-D)",
    ]
    assert all(
        QgsWkbTypes.hasZ(x.wkbType()) and x.renderer3D() is not None for x in fences.values()
    )
    names = {layer.name() for layer in project.mapLayers().values()}
    assert {"Form lines (kink construction)", "Axial surfaces"} <= names
    picture = tmp_path / "reopened.png"
    settings = QgsLayoutExporter.ImageExportSettings()
    settings.dpi = 60
    settings.pages = [2]  # section B
    layout = layouts["Tarrowgill — demo sections"]
    result = QgsLayoutExporter(layout).exportToImage(str(picture), settings)
    assert result == EXPORT_SUCCESS
    (picture,) = tmp_path.glob("reopened*.png")
    grey = gdal.Open(str(picture)).ReadAsArray()[:3].mean(axis=0)
    assert (grey < 200).mean() > 0.01
