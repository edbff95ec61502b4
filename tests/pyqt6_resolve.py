"""Resolves Qt names in the real PyQt6; run by the PyQt6 venv's python
(see scripts/pyqt6_venv.py), never by QGIS's.

Reads a JSON list of dotted names relative to the PyQt6 package
(``QtCore.Qt.AlignmentFlag.AlignLeft``, ``QtGui.QAction``, ``sip``) from
standard input and writes a JSON object: name → null when it resolves, else
why not, with the Qt6 spelling when one can be found.
"""

import enum
import importlib
import json
import pkgutil
import sys

import PyQt6


def qt_modules():
    """The PyQt6 modules that import here (some need libraries not installed)."""
    found = {}
    for info in pkgutil.iter_modules(PyQt6.__path__):
        if info.name.startswith("Qt") or info.name == "sip":
            try:
                found[info.name] = importlib.import_module(f"PyQt6.{info.name}")
            except ImportError:
                continue
    return found


def resolve(name, modules):
    module_name, *attributes = name.split(".")
    if module_name not in modules:
        return f"PyQt6 has no module {module_name}"
    owner, path = modules[module_name], module_name
    for attribute in attributes:
        if not hasattr(owner, attribute):
            return f"{path} has no {attribute}" + hint(owner, path, attribute, modules)
        owner, path = getattr(owner, attribute), f"{path}.{attribute}"
    return None


def hint(owner, path, attribute, modules):
    """The Qt6 spelling: a scoped enum member, or the module a class moved to."""
    if isinstance(owner, type):
        scopes = [
            scope
            for scope, value in vars(owner).items()
            if isinstance(value, enum.EnumMeta) and attribute in value.__members__
        ]
        if scopes:
            return f" (unscoped enum; Qt6: {path}.{scopes[0]}.{attribute})"
        return ""
    if path in modules:
        homes = [name for name, module in modules.items() if hasattr(module, attribute)]
        if homes:
            return f" (in Qt6 it is in {', '.join(homes)})"
    return ""


if __name__ == "__main__":
    modules = qt_modules()
    names = json.load(sys.stdin)
    json.dump({name: resolve(name, modules) for name in names}, sys.stdout)
