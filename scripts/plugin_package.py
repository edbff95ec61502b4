"""Imports this checkout as the package ``sectionwright`` (whatever the
folder is called), for tests, benchmarks and scripts that run outside QGIS's
plugin loader."""

import importlib.util
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
PACKAGE = "sectionwright"


def import_plugin():
    if PACKAGE in sys.modules:
        return sys.modules[PACKAGE]
    spec = importlib.util.spec_from_file_location(
        PACKAGE, ROOT / "__init__.py", submodule_search_locations=[str(ROOT)]
    )
    module = importlib.util.module_from_spec(spec)
    sys.modules[PACKAGE] = module
    spec.loader.exec_module(module)
    return module


def start_qgis():
    """A headless QGIS with Processing, the native algorithms and the
    Sectionwright provider; returns (application, provider) — keep both."""
    import os

    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    from qgis.core import QgsApplication

    app = QgsApplication([], False)
    app.initQgis()
    sys.path.append(str(Path(QgsApplication.pkgDataPath()) / "python" / "plugins"))
    from processing.core.Processing import Processing
    from qgis.analysis import QgsNativeAlgorithms

    Processing.initialize()
    registry = QgsApplication.processingRegistry()
    if registry.providerById("native") is None:
        registry.addProvider(QgsNativeAlgorithms())
    import_plugin()
    from sectionwright.plugin.provider import SectionwrightProvider

    provider = SectionwrightProvider()
    registry.addProvider(provider)
    return app, provider
