import sys

import pytest


def pytest_runtest_logreport(report):
    """A failure's report at once: QGIS can abort while pytest-qgis tears the
    application down, before pytest prints its summary."""
    if report.failed:
        print(report.longreprtext[-3000:], file=sys.stderr, flush=True)


@pytest.fixture(scope="session", autouse=True)
def layer_tree_view(qgis_iface):
    """A real layer tree view for the stand-in interface: Processing (3.44)
    adds result layers through it."""
    from qgis.core import QgsLayerTreeModel, QgsProject
    from qgis.gui import QgsLayerTreeView

    view = QgsLayerTreeView()
    view.setModel(QgsLayerTreeModel(QgsProject.instance().layerTreeRoot()))
    qgis_iface.layerTreeView = lambda: view
    return view
