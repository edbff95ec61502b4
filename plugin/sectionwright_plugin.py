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

    def unload(self):
        if self.provider is not None:
            QgsApplication.processingRegistry().removeProvider(self.provider)
            self.provider = None
        self.initialised = False

    def _report_missing(self, missing):
        advice = install_advice(missing)
        QgsMessageLog.logMessage(advice, LOG_TAG, CRITICAL)
        if self.iface is not None and hasattr(self.iface, "messageBar"):
            self.iface.messageBar().pushMessage(
                LOG_TAG, advice.splitlines()[0] + " See the log for the command.", CRITICAL, 0
            )
