"""What the source asks of Qt and QGIS, read with ``ast`` (nothing is imported).

For every Python file of the checkout (hidden folders and caches aside) it
lists

- every Qt name used through ``qgis.PyQt``, as a dotted path relative to
  the Qt package: imports (``from qgis.PyQt.QtGui import QColor`` →
  ``QtGui.QColor``) and attribute chains on them (``Qt.AlignmentFlag.AlignLeft``
  → ``QtCore.Qt.AlignmentFlag.AlignLeft``), so that each can be looked up in
  PyQt6 (``pyqt6_resolve.py``), and likewise every name used through
  qgis.core, qgis.gui and qgis.analysis (``qgis_names.py`` judges them);
- every Qt5-only idiom, which would not run under QGIS 4 even where a name
  happens to resolve (``exec_``, QVariant type constants, ``QRegExp``,
  compiled resources, signal overload subscripts, Qt imported past
  ``qgis.PyQt`` …).

The compatibility package may spell a name the Qt5 way, but only in a branch
that QGIS 4 never takes: the else-branch of ``if <QGIS version> >= N``, the
statements after such an ``if`` whose body returns, or the body of
``if <QGIS version> < N``, with N at most 4.0 (for the Qt version: at most
6.0), and ``except ImportError`` after an import (which itself must resolve
in PyQt6). Names used there are listed as legacy: they must resolve in the
running QGIS's own Qt instead.
"""

import ast
import re
from dataclasses import dataclass
from pathlib import Path

QT_PACKAGE = "qgis.PyQt"
QGIS_PACKAGES = ("qgis.core", "qgis.gui", "qgis.analysis")
SKIPPED_FOLDERS = {"__pycache__", "dist", "demo", "node_modules"}
# The version each kind of check compares with, below which a branch is Qt5-era.
QGIS_4 = 40000
QT_6 = 0x060000
RELEASE_NAMES = {
    "QGIS_VERSION",
    "QGIS_VERSION_INT",
    "QT_VERSION",
    "QT_VERSION_STR",
    "PYQT_VERSION",
    "PYQT_VERSION_STR",
}
QT5_METHODS = {
    "exec_": "exec_() is Qt5-only: exec()",
    "print_": "print_() is Qt5-only: print()",
}
QT5_CLASSES = {
    "QRegExp": "QRegExp is gone in Qt6: QRegularExpression",
    "QRegExpValidator": "QRegExpValidator is gone in Qt6: QRegularExpressionValidator",
    "QDesktopWidget": "QDesktopWidget is gone in Qt6: QScreen (QGuiApplication.screens())",
}
SIGNAL_USES = {"connect", "emit", "disconnect"}
RESOURCE_CALLS = {"qInitResources", "qCleanupResources", "qRegisterResourceData"}


@dataclass(frozen=True)
class Use:
    # Qt names relative to the Qt package ("QtCore.Qt.AlignmentFlag.AlignLeft"),
    # QGIS names in full ("qgis.core.QgsWkbTypes.PointZ").
    name: str
    where: str  # "algorithms/sheet/page.py:97"
    legacy: bool  # in a compatibility branch QGIS 4 never takes

    @property
    def qt(self):
        return not self.name.startswith("qgis.")


@dataclass(frozen=True)
class Finding:
    idiom: str  # short name of the Qt5-only idiom, for counting
    where: str
    detail: str


def source_files(root):
    """Every .py file of the checkout, in a stable order."""
    root = Path(root)
    for path in sorted(root.rglob("*.py")):
        parts = path.relative_to(root).parts
        if any(p.startswith(".") or p in SKIPPED_FOLDERS for p in parts[:-1]):
            continue
        yield path


def resource_files(root):
    """Qt resource sources and their compiled modules (no Qt6 rcc for PyQt6)."""
    root = Path(root)
    found = []
    for pattern in ("*.qrc", "*_rc.py"):
        found += [
            p
            for p in root.rglob(pattern)
            if not any(part.startswith(".") for part in p.relative_to(root).parts)
        ]
    return sorted(found)


def is_compat(relative):
    return "compat" in Path(relative).parts[:-1]


def scan(path, root, plugin_file=False):
    """(uses, findings) of one file. ``plugin_file``: it ships in the plugin
    zip, where only the compatibility package may ask for a release."""
    relative = Path(path).relative_to(root).as_posix()
    tree = ast.parse(Path(path).read_text(encoding="utf-8"), filename=relative)
    scanner = _Scanner(relative, is_compat(relative), plugin_file)
    scanner.collect_imports(tree)
    scanner.visit(tree)
    return scanner.uses, scanner.findings


class _Scanner(ast.NodeVisitor):
    def __init__(self, relative, compat, plugin_file):
        self.relative = relative
        self.compat = compat
        self.plugin_file = plugin_file
        self.aliases = {}  # local dotted name -> Use.name it stands for
        self.uses = []
        self.findings = []
        self.legacy = 0

    def where(self, node):
        return f"{self.relative}:{node.lineno}"

    def use(self, name, node):
        self.uses.append(Use(name, self.where(node), self.legacy > 0))
        last = name.rsplit(".", 1)[-1]
        if last in QT5_CLASSES:
            self.find("QRegExp/QDesktopWidget", node, QT5_CLASSES[last])
        if name.startswith("QtCore.QVariant.") and name.split(".")[2][:1].isupper():
            self.find(
                "QVariant type constant",
                node,
                f"{name.split('.', 1)[1]}: field types come from the compatibility "
                "module (QMetaType from QGIS 3.38, which QGIS 4 requires)",
            )
        if name == "QtCore.QVariant" and not self.compat:
            self.find(
                "QVariant outside compatibility",
                node,
                "QVariant is not how Qt6 builds hand values over; "
                "NULL and field types go through the compatibility module",
            )

    def find(self, idiom, node, detail):
        if self.legacy == 0:
            self.findings.append(Finding(idiom, self.where(node), detail))

    # imports -------------------------------------------------------------

    def collect_imports(self, tree):
        """Aliases first, so a use above its (function-level) import counts."""
        for node in ast.walk(tree):
            if isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
                bound = _binding_path(node.module)
                if bound is not None:
                    for alias in node.names:
                        if alias.name != "*":
                            self.aliases[alias.asname or alias.name] = _join(bound, alias.name)
            elif isinstance(node, ast.Import):
                for alias in node.names:
                    bound = _binding_path(alias.name)
                    if bound is not None:
                        self.aliases[alias.asname or alias.name] = bound

    def visit_ImportFrom(self, node):  # noqa: N802 (ast's name)
        module = node.module or ""
        if node.level == 0 and _direct_qt(module):
            self.find("Qt past qgis.PyQt", node, f"from {module} import …: use qgis.PyQt")
        bound = _binding_path(module) if node.level == 0 else None
        for alias in node.names:
            if _is_resource_module(alias.name) or _is_resource_module(module):
                self.find("compiled resources", node, f"imports {alias.name}")
            if bound is None:
                continue
            if alias.name == "*":
                self.find("star import", node, f"from {module} import *: names cannot be checked")
            else:
                self.use(_join(bound, alias.name), node)

    def visit_Import(self, node):  # noqa: N802
        for alias in node.names:
            if _direct_qt(alias.name):
                self.find("Qt past qgis.PyQt", node, f"import {alias.name}: use qgis.PyQt")
            if _is_resource_module(alias.name):
                self.find("compiled resources", node, f"imports {alias.name}")
            bound = _binding_path(alias.name)
            if bound:
                self.use(bound, node)

    # uses ------------------------------------------------------------------

    def visit_Attribute(self, node):  # noqa: N802
        attributes, base = [], node
        while isinstance(base, ast.Attribute):
            attributes.append(base.attr)
            base = base.value
        attributes.reverse()
        for attribute in attributes:
            if attribute in QT5_METHODS:
                self.find(attribute, node, QT5_METHODS[attribute])
            if attribute in RELEASE_NAMES:
                self._release_check(node, attribute)
        if isinstance(base, ast.Subscript) and attributes[0] in SIGNAL_USES:
            self.find(
                "signal overload subscript",
                node,
                f"…[{ast.unparse(base.slice)}].{attributes[0]}: Qt6 signals lost most overloads",
            )
        if isinstance(base, ast.Name):
            self._chain([base.id, *attributes], node)
        else:
            self.visit(base)

    def visit_Name(self, node):  # noqa: N802
        if node.id in RELEASE_NAMES:
            self._release_check(node, node.id)

    def visit_Subscript(self, node):  # noqa: N802
        if _dotted(node.value).rsplit(".", 1)[-1] == "pyqtSignal":
            self.find("signal overload subscript", node, "pyqtSignal[…]: Qt5-only")
        self.generic_visit(node)

    def visit_Call(self, node):  # noqa: N802
        called = _dotted(node.func).rsplit(".", 1)[-1]
        if called == "pyqtSignal" and any(isinstance(a, ast.List) for a in node.args):
            self.find("signal overload subscript", node, "pyqtSignal([…], […]): overloaded signal")
        if called in RESOURCE_CALLS:
            self.find("compiled resources", node, f"{called}()")
        self.generic_visit(node)

    def visit_Constant(self, node):  # noqa: N802
        if isinstance(node.value, str) and re.match(r"(qrc)?:/", node.value):
            self.find("compiled resources", node, f"resource path {node.value!r}")

    def visit_Try(self, node):  # noqa: N802
        """In the compatibility package, ``except ImportError`` after an import
        that resolves in PyQt6 is a branch QGIS 4 never takes."""
        self._block(node.body)
        for handler in node.handlers:
            legacy = self.compat and _catches_import_error(handler)
            self.legacy += legacy
            self.visit(handler)
            self.legacy -= legacy
        self._block(node.orelse)
        self._block(node.finalbody)

    def visit_If(self, node):  # noqa: N802
        self._branches(node)

    def visit_IfExp(self, node):  # noqa: N802
        self._branches(node)

    def _branches(self, node):
        self.visit(node.test)
        legacy_body = _legacy_branch(node.test) if self.compat else None
        branches = ((node.body, legacy_body is True), (node.orelse, legacy_body is False))
        for branch, is_legacy in branches:
            self.legacy += is_legacy
            if isinstance(branch, list):
                self._block(branch)
            else:
                self.visit(branch)
            self.legacy -= is_legacy

    def generic_visit(self, node):
        for value in (value for _, value in ast.iter_fields(node)):
            if isinstance(value, list) and value and isinstance(value[0], ast.stmt):
                self._block(value)
            elif isinstance(value, list):
                for item in value:
                    if isinstance(item, ast.AST):
                        self.visit(item)
            elif isinstance(value, ast.AST):
                self.visit(value)

    def _block(self, statements):
        """Statements after ``if <new release>: return …`` are the old branch."""
        entered = 0
        for statement in statements:
            self.visit(statement)
            if self.compat and _returns_for_new_releases(statement):
                self.legacy += 1
                entered += 1
        self.legacy -= entered

    def _chain(self, names, node):
        for length in range(len(names), 0, -1):
            prefix = ".".join(names[:length])
            if prefix in self.aliases:
                self.use(_join(self.aliases[prefix], *names[length:]), node)
                return

    def _release_check(self, node, name):
        if self.plugin_file and not self.compat:
            self.find(
                "release check outside compatibility",
                node,
                f"{name}: only the compatibility module knows QGIS/Qt releases",
            )


def _binding_path(module):
    """``qgis.PyQt.QtCore`` → ``QtCore``, ``qgis.PyQt`` → ``""``, a QGIS module
    → itself, else None."""
    if any(module == p or module.startswith(p + ".") for p in QGIS_PACKAGES):
        return module
    if module == QT_PACKAGE:
        return ""
    if module.startswith(QT_PACKAGE + "."):
        return module[len(QT_PACKAGE) + 1 :]
    return None


def _direct_qt(module):
    return module.split(".")[0] in {"PyQt4", "PyQt5", "PyQt6", "PySide2", "PySide6", "sip"}


def _is_resource_module(name):
    last = name.rsplit(".", 1)[-1]
    return last == "resources" or last.endswith("_rc")


def _join(*parts):
    return ".".join(p for p in parts if p)


def _dotted(node):
    if isinstance(node, ast.Attribute):
        return f"{_dotted(node.value)}.{node.attr}"
    return node.id if isinstance(node, ast.Name) else ""


def _catches_import_error(handler):
    names = handler.type.elts if isinstance(handler.type, ast.Tuple) else [handler.type]
    return any(_dotted(n) in ("ImportError", "ModuleNotFoundError") for n in names if n)


def _returns_for_new_releases(statement):
    return (
        isinstance(statement, ast.If)
        and not statement.orelse
        and isinstance(statement.body[-1], (ast.Return, ast.Raise))
        and _legacy_branch(statement.test) is False
    )


def _legacy_branch(test):
    """True when the body is the Qt5-era branch of a version check, False when
    the else-branch is, None when ``test`` is no such check."""
    if not (isinstance(test, ast.Compare) and len(test.ops) == 1):
        return None
    left, op, right = test.left, test.ops[0], test.comparators[0]
    if isinstance(left, ast.Constant):
        left, right = right, left
        op = {ast.Lt: ast.Gt(), ast.LtE: ast.GtE(), ast.Gt: ast.Lt(), ast.GtE: ast.LtE()}.get(
            type(op), op
        )
    if not (isinstance(right, ast.Constant) and isinstance(right.value, int)):
        return None
    text = ast.unparse(left).lower()
    if "version" not in text:
        return None
    limit = QT_6 if "qt" in text and "qgis" not in text else QGIS_4
    if isinstance(op, (ast.GtE, ast.Gt)) and right.value <= limit:
        return False  # below N is the else-branch
    if isinstance(op, ast.Lt) and right.value <= limit:
        return True
    if isinstance(op, ast.LtE) and right.value < limit:
        return True
    return None
