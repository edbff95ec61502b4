"""The old names QGIS 3.30+ patches in for scripts written before an enum
moved into ``Qgis`` (``QgsWkbTypes.PointZ`` for ``Qgis.WkbType.PointZ``).
QGIS marks the value with ``is_monkey_patched``; the alias is the name under
any other class than the value's own. QGIS 4 need not keep them: removing
them is the nearest thing to QGIS 4 that a 3.x build can show."""

import qgis.analysis
import qgis.core
import qgis.gui


def patched_aliases():
    """[(class, attribute name)] of every such alias in qgis.core/gui/analysis."""
    found = []
    for module in (qgis.core, qgis.gui, qgis.analysis):
        for owner in vars(module).values():
            if not isinstance(owner, type):
                continue
            for name, value in list(vars(owner).items()):
                marked = getattr(value, "is_monkey_patched", False) is True
                if marked and _is_alias(owner, name, value):
                    found.append((owner, name))
    return found


def _is_alias(owner, name, value):
    if isinstance(value, type):  # a whole enum under an old name (QgsFeatureRequest.Flag)
        return value.__qualname__ != f"{owner.__qualname__}.{name}"
    return type(value) is not owner
