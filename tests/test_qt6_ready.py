"""Ready for Qt6 (QGIS 4), proven without a Qt6 build of QGIS: every Qt name
the source uses through ``qgis.PyQt`` must resolve in the real PyQt6
(requirements-pyqt6.txt, in a throwaway venv), no Qt5-only idiom may be
left, and the Qt5 spellings the compatibility package keeps for QGIS 3.22
must resolve in this QGIS's own Qt."""

import configparser
import importlib
import json
import os
import subprocess
import sys
import textwrap
from functools import cache
from pathlib import Path

import build_zip
import pyqt6_venv
import pytest
from qgis_names import name_problem
from qt_usage import resource_files, scan, source_files

ROOT = Path(__file__).resolve().parent.parent
RESOLVER = ROOT / "tests" / "pyqt6_resolve.py"
# Runs in the PyQt6 venv, not in QGIS: the one file that imports PyQt6 itself.
OUTSIDE_QGIS = {RESOLVER}
RELEASE_LEG = os.environ.get("SECTIONWRIGHT_RELEASE_LEG")
ON_HOST_ONLY = pytest.mark.skipif(
    bool(RELEASE_LEG),
    reason="the PyQt6 venv is built for the host's Python; the source is the same on every leg",
)


@cache
def scanned():
    plugin = {p.resolve() for p in build_zip.plugin_files() if p.suffix == ".py"}
    uses, findings = [], []
    for path in source_files(ROOT):
        if path.resolve() in OUTSIDE_QGIS:
            continue
        file_uses, file_findings = scan(path, ROOT, plugin_file=path.resolve() in plugin)
        uses += file_uses
        findings += file_findings
    return uses, findings


def resolve_in_pyqt6(names):
    """{name: None or why it does not resolve}, looked up by PyQt6 itself."""
    python = pyqt6_venv.ensure_venv()
    result = subprocess.run(
        [str(python), str(RESOLVER)],
        input=json.dumps(sorted(set(names))),
        capture_output=True,
        text=True,
        env={**os.environ, "QT_QPA_PLATFORM": "offscreen"},
        check=False,
    )
    assert result.returncode == 0, result.stderr
    return json.loads(result.stdout)


def test_no_qt5_only_idioms():
    _, findings = scanned()
    problems = [f"{f.where}: {f.idiom}: {f.detail}" for f in findings]
    problems += [
        f"{p.relative_to(ROOT)}: compiled resources: PyQt6 has no resource compiler"
        for p in resource_files(ROOT)
    ]
    assert not problems, "\n".join(problems)


@ON_HOST_ONLY
def test_every_qt_name_resolves_in_pyqt6():
    uses, _ = scanned()
    current = [u for u in uses if u.qt and not u.legacy]
    assert current, "the scan found no Qt names at all"
    why = resolve_in_pyqt6(u.name for u in current)
    problems = [f"{u.where}: {why[u.name]}" for u in current if why[u.name]]
    assert not problems, "\n".join(problems)


def test_compatibility_spellings_for_older_qgis_resolve_here():
    """The Qt5 branch of the compatibility package, checked against the
    running QGIS's Qt (3.22's PyQt5 on the host)."""
    uses, _ = scanned()
    problems = []
    for use in (u for u in uses if u.qt and u.legacy):
        module, *attributes = use.name.split(".")
        owner = importlib.import_module(f"qgis.PyQt.{module}")
        for attribute in attributes:
            owner = getattr(owner, attribute, None)
        if owner is None:
            problems.append(f"{use.where}: qgis.PyQt.{use.name} does not resolve")
    assert not problems, "\n".join(problems)


def test_metadata_lets_qgis_4_and_qt6_builds_install_it():
    metadata = configparser.ConfigParser()
    metadata.read(ROOT / "metadata.txt")
    general = metadata["general"]
    major, minor = (int(n) for n in general["qgisMaximumVersion"].split(".")[:2])
    assert (major, minor) >= (4, 99)
    assert general.getboolean("supportsQt6")


def test_qgis_names_are_scoped_and_no_aliases():
    """QGIS 4 takes enum members only scoped and need not keep the aliases
    3.30+ patches in; on this release every QGIS name must be such a one."""
    uses, _ = scanned()
    current = [u for u in uses if not u.qt and not u.legacy]
    assert current, "the scan found no QGIS names at all"
    problems = [f"{u.where}: {name_problem(u.name)}" for u in current if name_problem(u.name)]
    assert not problems, "\n".join(problems)


SAMPLE = """
from qgis.PyQt.QtCore import Qt, QVariant, QRegExp, pyqtSignal
from qgis.PyQt.QtWidgets import QAction, QDialog
from qgis.PyQt import QtGui
from PyQt5.QtCore import QTimer
from . import resources_rc

class Panel(QDialog):
    changed = pyqtSignal([int], [str])

    def run(self):
        self.changed[int].connect(print)
        QtGui.QPainter.Antialiasing
        QIcon(":/plugins/sectionwright/icon.svg")
        field = QgsField("dip", QVariant.Double)
        if Qgis.QGIS_VERSION_INT >= 33800:
            pass
        return self.exec_(), Qt.AlignLeft, Qt.AlignmentFlag.AlignRight
"""

COMPAT_SAMPLE = """
from qgis.PyQt.QtCore import QVariant

def field_types(qgis_version):
    if qgis_version >= 33800:
        from qgis.PyQt.QtCore import QMetaType
        return QMetaType.Type.Double
    return QVariant.Double

LATER = QVariant.String if Qgis.QGIS_VERSION_INT >= 50000 else None

try:
    from qgis.PyQt.QtGui import QAction
except ImportError:
    from qgis.PyQt.QtWidgets import QAction
"""


def _scan_sample(tmp_path, relative, text):
    path = tmp_path / relative
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(textwrap.dedent(text))
    return scan(path, tmp_path, plugin_file=True)


def test_the_scan_finds_each_qt5_idiom(tmp_path):
    uses, findings = _scan_sample(tmp_path, "plugin/panel.py", SAMPLE)
    assert {f.idiom for f in findings} == {
        "QVariant outside compatibility",
        "QVariant type constant",
        "QRegExp/QDesktopWidget",
        "Qt past qgis.PyQt",
        "compiled resources",
        "signal overload subscript",
        "exec_",
        "release check outside compatibility",
    }
    names = {u.name for u in uses}
    assert {"QtCore.Qt.AlignLeft", "QtWidgets.QAction", "QtGui.QPainter.Antialiasing"} <= names
    assert "QtCore.Qt.AlignmentFlag.AlignRight" in names


def test_the_scan_keeps_qt5_spellings_to_compat_branches_qgis_4_never_takes(tmp_path):
    uses, findings = _scan_sample(tmp_path, "algorithms/compat/types.py", COMPAT_SAMPLE)
    legacy = {u.name for u in uses if u.legacy}
    assert legacy == {"QtCore.QVariant.Double", "QtWidgets.QAction"}
    # A branch for QGIS 5 is not one that QGIS 4 never takes.
    assert [f.idiom for f in findings] == ["QVariant type constant"]


@ON_HOST_ONLY
def test_pyqt6_tells_qt5_spellings_apart():
    """The resolver itself: Qt5 spellings fail, with the Qt6 one named."""
    why = resolve_in_pyqt6(
        [
            "QtCore.Qt.AlignLeft",
            "QtCore.Qt.AlignmentFlag.AlignLeft",
            "QtWidgets.QAction",
            "QtGui.QAction",
            "QtGui.QPainter.Antialiasing",
            "QtCore.QVariant.Double",
            "QtCore.QMetaType.Type.Double",
        ]
    )
    assert why["QtCore.Qt.AlignmentFlag.AlignLeft"] is None
    assert why["QtGui.QAction"] is None
    assert why["QtCore.QMetaType.Type.Double"] is None
    assert "QtCore.Qt.AlignmentFlag.AlignLeft" in why["QtCore.Qt.AlignLeft"]
    assert "QtGui" in why["QtWidgets.QAction"]
    assert "QtGui.QPainter.RenderHint.Antialiasing" in why["QtGui.QPainter.Antialiasing"]
    assert why["QtCore.QVariant.Double"] is not None


@ON_HOST_ONLY
def test_a_built_venv_needs_no_network():
    pyqt6_venv.ensure_venv()
    unreachable = "http://127.0.0.1:9"
    offline = {
        **os.environ,
        "PIP_NO_INDEX": "1",
        "PIP_FIND_LINKS": "",
        "http_proxy": unreachable,
        "https_proxy": unreachable,
        "HTTP_PROXY": unreachable,
        "HTTPS_PROXY": unreachable,
    }
    result = subprocess.run(
        [sys.executable, str(ROOT / "scripts" / "pyqt6_venv.py")],
        capture_output=True,
        text=True,
        env=offline,
        check=False,
    )
    assert result.returncode == 0, result.stderr
    assert "building" not in result.stderr
    assert Path(result.stdout.strip()).exists()
