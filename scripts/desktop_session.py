"""Runs inside desktop QGIS (given as PYQGIS_STARTUP by desktop_smoke.py):
records every message-log and message-bar message from start-up on, waits
until the project on the command line is open and drawn, notes what the
canvas shows, optionally takes screenshots (the desktop with the project,
the section viewer on a section, an algorithm dialog), writes a JSON report
and leaves QGIS.

Environment: SECTIONWRIGHT_SMOKE_REPORT (the JSON file to write),
SECTIONWRIGHT_SCREENSHOTS (a folder; no screenshots without it).
"""

import json
import os
import subprocess
import time

from qgis.core import QgsApplication, QgsProject
from qgis.PyQt.QtCore import QTimer

REPORT = os.environ["SECTIONWRIGHT_SMOKE_REPORT"]
SCREENSHOTS = os.environ.get("SECTIONWRIGHT_SCREENSHOTS")
GIVE_UP_SECONDS = 120
SETTLE_SECONDS = 3.0

state = {"messages": [], "started": time.time(), "quiet_since": None, "bar": False}


def _level(level):
    return int(getattr(level, "value", level))


def _record(source, tag, message, level):
    entry = {
        "source": source,
        "tag": tag,
        "level": _level(level),
        "message": str(message),
        "seconds": round(time.time() - state["started"], 1),
    }
    if entry["level"] >= 2:
        import traceback

        # Where Python code raised it, the Python stack says who.
        entry["python_stack"] = traceback.format_stack()[:-2]
    state["messages"].append(entry)


def _install():
    import builtins

    # QGIS may run a PYQGIS_STARTUP file twice: connect once.
    if getattr(builtins, "_sectionwright_session", False):
        return False
    builtins._sectionwright_session = True
    QgsApplication.messageLog().messageReceived.connect(
        lambda message, tag, level: _record("log", tag, message, level)
    )
    return True


def _note_message_bar(iface):
    """The message bar's current item, once. QGIS also copies every bar
    message into the log (tag "Messages"); this catches the bar itself."""
    item = iface.messageBar().currentItem()
    if item is None:
        return
    text = " ".join(filter(None, [item.title(), item.text()]))
    key = (text, _level(item.level()))
    if key not in state.setdefault("bar_seen", set()):
        state["bar_seen"].add(key)
        _record("bar", "message bar", text, item.level())


def _screenshot(name):
    if not SCREENSHOTS:
        return None
    QgsApplication.processEvents()
    time.sleep(0.5)
    QgsApplication.processEvents()
    path = os.path.join(SCREENSHOTS, f"{name}.png")
    subprocess.run(["import", "-window", "root", path], check=False, timeout=60)
    return path


def _wait_drawn(canvas, seconds=10.0):
    end = time.time() + seconds
    while time.time() < end:
        QgsApplication.processEvents()
        if not canvas.isDrawing():
            time.sleep(0.3)
            QgsApplication.processEvents()
            if not canvas.isDrawing():
                return
        time.sleep(0.1)


def _layer_tree(project, canvas):
    shown = {layer.id() for layer in canvas.layers()}
    rows = []
    for node in project.layerTreeRoot().findLayers():
        layer = node.layer()
        rows.append(
            {
                "name": layer.name() if layer else None,
                "group": node.parent().name() if node.parent() else "",
                "visible": node.isVisible(),
                "in_canvas": bool(layer) and layer.id() in shown,
                "crs": layer.crs().authid() or layer.crs().description() if layer else "",
                "valid": bool(layer) and layer.isValid(),
                "renderer": type(layer.renderer()).__name__
                if layer is not None and hasattr(layer, "renderer") and layer.renderer()
                else "",
            }
        )
    return rows


def _viewer_and_dialog(iface):
    """The section viewer on the second section, then an algorithm dialog."""
    import qgis.utils

    shots = {}
    plugin = qgis.utils.plugins.get("sectionwright")
    viewer = getattr(plugin, "show_section_viewer", None)
    if viewer is not None:
        panel = viewer()
        sections = panel.section_labels()
        if sections:
            panel.show_section(sections[min(1, len(sections) - 1)])
        _wait_drawn(panel.canvas)
        shots["viewer"] = _screenshot("viewer")
        state["viewer"] = {"sections": sections, "shown": panel.current_section()}
    import processing

    dialog = processing.createAlgorithmDialog("sectionwright:projectattitudes")
    if dialog is not None:
        dialog.show()
        dialog.resize(900, 820)
        shots["dialog"] = _screenshot("dialog")
        dialog.close()
    return shots


def _run_and_load():
    """Topographic profile run as the dialog runs it, its outputs loaded:
    which groups they land in, shown or not, with which renderer."""
    import processing

    project = QgsProject.instance()
    lines, dem = project.mapLayersByName("Section lines"), project.mapLayersByName("DEM")
    if not lines or not dem:
        return None
    before = set(project.mapLayers())
    processing.runAndLoadResults(
        "sectionwright:profile",
        {
            "INPUT": lines[0],
            "DEM": dem[0],
            "STEP": 50,
            "VERTICAL_EXAGGERATION": 2,
            "OUTPUT_LINE": "TEMPORARY_OUTPUT",
            "OUTPUT": "TEMPORARY_OUTPUT",
            "OUTPUT_SECTION": "TEMPORARY_OUTPUT",
        },
    )
    QgsApplication.processEvents()
    added = []
    for layer_id in set(project.mapLayers()) - before:
        layer = project.mapLayer(layer_id)
        node = project.layerTreeRoot().findLayer(layer_id)
        added.append(
            {
                "name": layer.name(),
                "group": node.parent().name() if node and node.parent() else "",
                "visible": bool(node and node.isVisible()),
                "renderer": type(layer.renderer()).__name__ if layer.renderer() else "",
            }
        )
    return sorted(added, key=lambda row: row["name"])


def _finish(iface):
    _note_message_bar(iface)
    project = QgsProject.instance()
    canvas = iface.mapCanvas()
    extent = canvas.extent()
    report = {
        "project": project.fileName(),
        "canvas_crs": canvas.mapSettings().destinationCrs().authid(),
        "canvas_extent": [
            extent.xMinimum(),
            extent.yMinimum(),
            extent.xMaximum(),
            extent.yMaximum(),
        ],
        "layers": _layer_tree(project, canvas),
        "screenshots": {"desktop": _screenshot("desktop")},
    }
    try:
        report["screenshots"].update(_viewer_and_dialog(iface))
        report["run_and_load"] = _run_and_load()
        _wait_drawn(canvas)
        report["screenshots"]["results"] = _screenshot("results")
    except Exception as error:  # reported, so the test can show it
        _record("smoke", "desktop_session", f"viewer/dialog/run step failed: {error!r}", 2)
    import qgis.utils

    report["plugins"] = sorted(qgis.utils.active_plugins)
    report["messages"] = state["messages"]
    report["viewer"] = state.get("viewer")
    with open(REPORT, "w", encoding="utf-8") as out:
        json.dump(report, out, indent=1)
    # QGIS's own teardown is not under test here.
    os._exit(0)


def _poll():
    from qgis.utils import iface

    if time.time() - state["started"] > GIVE_UP_SECONDS:
        _record("smoke", "desktop_session", "gave up waiting for the project", 2)
        return _finish(iface) if iface else os._exit(3)
    if iface is None:
        return QTimer.singleShot(250, _poll)
    if not state["bar"]:
        state["bar"] = True
        iface.mainWindow().setGeometry(0, 0, 1600, 1000)
    _note_message_bar(iface)
    project_open = bool(QgsProject.instance().fileName())
    drawing = iface.mapCanvas().isDrawing()
    if not project_open or drawing:
        state["quiet_since"] = None
    elif state["quiet_since"] is None:
        state["quiet_since"] = time.time()
    elif time.time() - state["quiet_since"] > SETTLE_SECONDS:
        return _finish(iface)
    QTimer.singleShot(250, _poll)


if _install():
    QTimer.singleShot(250, _poll)
