"""Test session set-up: the plugin imported as a package whatever the
checkout's folder is called, the provider registered once, the demo world
made once."""

import importlib.util
import os
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
PACKAGE = "sectionwright"

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("PROJ_DATA", "/usr/share/proj")
sys.path.insert(0, str(ROOT / "test_data"))
sys.path.insert(0, str(ROOT / "tests"))


def _import_plugin_package():
    if PACKAGE in sys.modules:
        return sys.modules[PACKAGE]
    spec = importlib.util.spec_from_file_location(
        PACKAGE, ROOT / "__init__.py", submodule_search_locations=[str(ROOT)]
    )
    module = importlib.util.module_from_spec(spec)
    sys.modules[PACKAGE] = module
    spec.loader.exec_module(module)
    return module


_import_plugin_package()


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
