"""QGIS names as QGIS 4 takes them, judged in the running QGIS.

QGIS 4 is built on PyQt6, whose enums are scoped only
(``QgsFeatureSink.Flag.FastInsert``, not ``QgsFeatureSink.FastInsert``).
And from 3.30 on QGIS patches old names in for scripts written before an
enum moved into ``Qgis`` (``QgsWkbTypes.PointZ`` for ``Qgis.WkbType.PointZ``),
marking the value with ``is_monkey_patched``; QGIS 4 need not keep those
aliases. Removing them is the nearest thing to QGIS 4 a 3.x build can show.
"""

import enum
import importlib

import qgis.analysis
import qgis.core
import qgis.gui


def patched_aliases():
    """[(class, attribute name)] of every such alias in qgis.core/gui/analysis."""
    owners = {
        id(owner): owner
        for module in (qgis.core, qgis.gui, qgis.analysis)
        for owner in vars(module).values()
        if isinstance(owner, type)
    }
    return [
        (owner, name)
        for owner in owners.values()
        for name, value in list(vars(owner).items())
        if _is_alias(owner, name, value)
    ]


def name_problem(name):
    """Why the dotted QGIS name (``qgis.core.QgsWkbTypes.PointZ``) is not how
    QGIS 4 takes it, or None."""
    parts = name.split(".")
    path = ".".join(parts[:2])
    owner = importlib.import_module(path)
    attributes = parts[2:]
    for attribute in attributes:
        if not hasattr(owner, attribute):
            return f"{path} has no {attribute} in this QGIS"
        value = getattr(owner, attribute)
        if _is_alias(owner, attribute, value):
            return f"{path}.{attribute} is an alias QGIS 3.30+ patches in for old scripts"
        if isinstance(owner, type) and _is_enum(type(value)) and type(value) is not owner:
            scope = type(value).__qualname__
            return f"{path}.{attribute} is an unscoped enum member: {scope}.{attribute}"
        owner, path = value, f"{path}.{attribute}"
    return None


def _is_alias(owner, name, value):
    if getattr(value, "is_monkey_patched", False) is not True:
        return False
    if isinstance(value, type):  # a whole enum under an old name (QgsFeatureRequest.Flag)
        return value.__qualname__ != f"{owner.__qualname__}.{name}"
    return type(value) is not owner


def _is_enum(kind):
    return isinstance(kind, enum.EnumMeta) or type(kind).__name__ == "enumtype"
