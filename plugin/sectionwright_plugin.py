"""The plugin object QGIS creates: registers the provider, or explains what
is missing."""

from qgis.core import QgsApplication, QgsMessageLog

from ..algorithms.compat.qgis_compat import CRITICAL
from .dependencies import ensure_proj_data, install_advice, missing_requirements

LOG_TAG = "Sectionwright"


class SectionwrightPlugin:
    def __init__(self, iface):
        self.iface = iface
        self.provider = None
        self.initialised = False
        self.viewer = None
        self.viewer_action = None

    def initProcessing(self):  # noqa: N802 (name fixed by QGIS)
        # QGIS calls this from its own Processing start-up and again through
        # initGui in the desktop: register once.
        if self.initialised:
            return
        self.initialised = True
        missing = missing_requirements()
        if missing:
            self._report_missing(missing)
            return
        ensure_proj_data()
        from .provider import SectionwrightProvider

        self.provider = SectionwrightProvider()
        QgsApplication.processingRegistry().addProvider(self.provider)

    def initGui(self):  # noqa: N802 (name fixed by QGIS)
        self.initProcessing()
        if self.provider is None or self.iface is None:
            return
        from ..algorithms.compat.qgis_compat import QAction
        from .provider import icon

        self.viewer_action = QAction(icon(), "Section viewer", self.iface.mainWindow())
        self.viewer_action.setToolTip("Sectionwright: show one section at a time")
        self.viewer_action.triggered.connect(self.show_section_viewer)
        self.iface.addPluginToMenu("Sectionwright", self.viewer_action)
        self.iface.addToolBarIcon(self.viewer_action)

    def show_section_viewer(self):
        """Opens (once) and returns the section viewer panel."""
        from .section_viewer import SectionViewerPanel, dock_area

        if self.viewer is None:
            self.viewer = SectionViewerPanel(self.iface, self.iface.mainWindow())
            self.iface.addDockWidget(dock_area(), self.viewer)
        self.viewer.show()
        self.viewer.raise_()
        return self.viewer

    def unload(self):
        if self.viewer_action is not None:
            self.iface.removePluginMenu("Sectionwright", self.viewer_action)
            self.iface.removeToolBarIcon(self.viewer_action)
            self.viewer_action = None
        if self.viewer is not None:
            self.iface.removeDockWidget(self.viewer)
            self.viewer.deleteLater()
            self.viewer = None
        if self.provider is not None:
            QgsApplication.processingRegistry().removeProvider(self.provider)
            self.provider = None
        self.initialised = False

    def _report_missing(self, missing):
        advice = install_advice(missing)
        QgsMessageLog.logMessage(advice, LOG_TAG, CRITICAL)
        if self.iface is not None and hasattr(self.iface, "messageBar"):
            # The bar shows one line; "Show more" opens the whole advice, with
            # the command to copy.
            self.iface.messageBar().pushMessage(
                LOG_TAG,
                advice.splitlines()[0] + " Show more for the command to run.",
                advice,
                CRITICAL,
                0,
            )
