"""The Processing provider: id ``sectionwright``."""

from pathlib import Path

from qgis.core import QgsProcessingProvider
from qgis.PyQt.QtGui import QIcon

ICON = Path(__file__).parent / "icons" / "sectionwright.svg"


def icon():
    return QIcon(str(ICON))


class SectionwrightProvider(QgsProcessingProvider):
    def id(self):
        return "sectionwright"

    def name(self):
        return "Sectionwright"

    def longName(self):
        return "Sectionwright — geological cross-sections"

    def icon(self):
        return icon()

    def loadAlgorithms(self):
        from ..algorithms import all_algorithms

        for algorithm in all_algorithms():
            self.addAlgorithm(algorithm)
