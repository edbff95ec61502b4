"""Run in a fresh interpreter by test_install.py: loads the installed plugin
from a throwaway profile with qgis.utils, as QGIS does, and prints JSON.

    python load_installed_plugin.py PROFILE_DIR [--without shapely] [--run-profile WORLD_DIR]

With ``--run-profile`` it also runs ``sectionwright:profile`` on the demo
world's sections and DEM and reports the run's summary line and the numpy
and shapely it ran with.
"""

import importlib.abc
import json
import sys
from pathlib import Path

from qgis.core import QgsApplication


class Refuse(importlib.abc.MetaPathFinder):
    """Makes a package look uninstalled."""

    def __init__(self, name):
        self.name = name

    def find_spec(self, fullname, path, target=None):
        if fullname.split(".")[0] == self.name:
            raise ImportError(f"No module named '{fullname}'")
        return None


def run_profile(world):
    import numpy
    import processing
    import shapely
    from qgis.core import QgsProcessingFeedback

    class Log(QgsProcessingFeedback):
        lines = []

        def pushInfo(self, info):  # noqa: N802 (QGIS API)
            self.lines.append(info)

    feedback = Log()
    processing.run(
        "sectionwright:profile",
        {
            "INPUT": f"{world}/tarrowgill.gpkg|layername=sections",
            "LINE_ID_FIELD": "name",
            "DEM": f"{world}/dem.tif",
            "STEP": 50,
            "OUTPUT": "TEMPORARY_OUTPUT",
            "OUTPUT_SECTION": "TEMPORARY_OUTPUT",
        },
        feedback=feedback,
    )
    return {
        "summary": next((line for line in feedback.lines if line.startswith("Summary:")), None),
        "numpy": numpy.__version__,
        "shapely": shapely.__version__,
        "shapely_file": shapely.__file__,
    }


def main():
    profile = Path(sys.argv[1])
    if "--without" in sys.argv:
        refused = sys.argv[sys.argv.index("--without") + 1]
        sys.meta_path.insert(0, Refuse(refused))
    app = QgsApplication([], False, str(profile))
    app.initQgis()
    messages = []
    QgsApplication.messageLog().messageReceived.connect(
        lambda message, tag, level: messages.append([tag, message])
    )
    sys.path.append(str(Path(QgsApplication.pkgDataPath()) / "python" / "plugins"))
    from processing.core.Processing import Processing

    Processing.initialize()
    import qgis.utils

    if "--without" in sys.argv:
        # QGIS itself may have imported it already (3.40 does): forget it.
        for name in [m for m in sys.modules if m.split(".")[0] == refused]:
            del sys.modules[name]

    plugins = profile / "python" / "plugins"
    sys.path.insert(0, str(plugins))
    qgis.utils.plugin_paths = [str(plugins)]
    qgis.utils.updateAvailablePlugins()
    loaded = qgis.utils.loadPlugin("sectionwright") and qgis.utils.startProcessingPlugin(
        "sectionwright"
    )
    registry = QgsApplication.processingRegistry()
    provider = registry.providerById("sectionwright")
    report = {
        "available": "sectionwright" in qgis.utils.available_plugins,
        "started": bool(loaded),
        "provider": provider.name() if provider else None,
        "algorithms": sorted(a.id() for a in provider.algorithms()) if provider else [],
        "messages": messages,
    }
    if "--run-profile" in sys.argv and provider is not None:
        report.update(run_profile(Path(sys.argv[sys.argv.index("--run-profile") + 1])))
    qgis.utils.unloadPlugin("sectionwright")
    report["unloaded"] = registry.providerById("sectionwright") is None
    print(json.dumps(report))


main()
