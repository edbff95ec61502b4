"""The QGIS 3.44 leg (SECTIONWRIGHT_QGIS_DEPRECATIONS=error) fails on QGIS's
own deprecated API and on nothing else."""

import os
import warnings

import pytest
from qgis.core import QgsLayout, QgsLayoutItemLabel, QgsProject
from qgis.PyQt.QtGui import QFont

pytestmark = pytest.mark.skipif(
    os.environ.get("SECTIONWRIGHT_QGIS_DEPRECATIONS") != "error",
    reason="only the QGIS 3.44 leg turns QGIS deprecations into errors",
)


# QgsLayoutItemLabel.setFont is deprecated from QGIS 3.40 on (text formats).
def test_a_deprecated_qgis_call_fails(qgis_app):
    label = QgsLayoutItemLabel(QgsLayout(QgsProject.instance()))
    with pytest.raises(DeprecationWarning, match="QgsLayoutItemLabel.setFont"):
        label.setFont(QFont())


def test_other_deprecations_do_not_fail():
    warnings.warn("numpy.some_function is deprecated", DeprecationWarning, stacklevel=1)
