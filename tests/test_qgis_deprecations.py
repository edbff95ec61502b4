"""The QGIS 3.44 leg (SECTIONWRIGHT_QGIS_DEPRECATIONS=error) fails on QGIS's
own deprecated API, in the test process and in the QGIS processes tests
start, and on nothing else."""

import os
import subprocess
import sys
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


def test_a_deprecated_qgis_call_fails_in_a_child_process():
    script = (
        "from qgis.core import QgsApplication, QgsLayout, QgsLayoutItemLabel, QgsProject\n"
        "from qgis.PyQt.QtGui import QFont\n"
        "app = QgsApplication([], False)\n"
        "app.initQgis()\n"
        "QgsLayoutItemLabel(QgsLayout(QgsProject.instance())).setFont(QFont())\n"
    )
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True)
    assert done.returncode != 0
    assert "DeprecationWarning: QgsLayoutItemLabel.setFont() is deprecated" in done.stderr
