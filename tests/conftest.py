"""Test session set-up: the plugin imported as a package whatever the
checkout's folder is called, the provider registered once, the demo world
made once."""

import os
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("PROJ_DATA", "/usr/share/proj")
sys.path.insert(0, str(ROOT / "test_data"))
sys.path.insert(0, str(ROOT / "tests"))
sys.path.insert(0, str(ROOT / "scripts"))
from plugin_package import import_plugin  # noqa: E402

import_plugin()

from osgeo import gdal  # noqa: E402

gdal.UseExceptions()  # the tests' own GDAL calls (newer GDAL asks to choose)


# sip names the class first: "QgsField constructor is deprecated",
# "QgsLayoutItemLabel.setFont() is deprecated".
QGIS_DEPRECATIONS = r"(Qgs|Qgis)\w*(\.\w+\(\)| constructor) is deprecated"


def pytest_configure(config):
    """SECTIONWRIGHT_QGIS_DEPRECATIONS=error (the QGIS 3.44 leg): QGIS's own
    deprecation warnings fail the test; other libraries' deprecations stay
    ignored (pytest.ini). Only in this process: the QGIS processes some tests
    start reset the warning filters themselves (qgis.utils)."""
    if os.environ.get("SECTIONWRIGHT_QGIS_DEPRECATIONS") == "error":
        config.addinivalue_line("filterwarnings", f"error:{QGIS_DEPRECATIONS}:DeprecationWarning")


@pytest.fixture(scope="session")
def provider(qgis_processing):
    """The Sectionwright provider, registered once per session."""
    from qgis.core import QgsApplication

    from sectionwright.plugin.provider import SectionwrightProvider

    registry = QgsApplication.processingRegistry()
    existing = registry.providerById("sectionwright")
    if existing is not None:
        return existing
    instance = SectionwrightProvider()
    assert registry.addProvider(instance)
    return instance


@pytest.fixture(scope="session")
def demo_dir(tmp_path_factory):
    """The Tarrowgill demo world, written once per session."""
    import make_demo

    return make_demo.make(tmp_path_factory.mktemp("tarrowgill"))


@pytest.fixture(scope="session")
def demo_project(tmp_path_factory):
    """The demo command's two steps (run_demo.py, make_demo_project.py) on a
    fresh folder, once per session: the folder with tarrowgill.qgz."""
    import subprocess

    folder = tmp_path_factory.mktemp("demo_project")
    for script in ("run_demo.py", "make_demo_project.py"):
        done = subprocess.run(
            [sys.executable, str(ROOT / "scripts" / script), str(folder)],
            capture_output=True,
            text=True,
            timeout=600,
        )
        assert done.returncode == 0, done.stderr[-3000:]
    return folder
