"""NULL attribute values as plain ``None``, whatever Qt QGIS is built on.

QGIS on Qt5 (3.x) hands a NULL attribute over as a null ``QVariant``
(``qgis.core.NULL``); QGIS on Qt6 (4.x, and the Qt6 builds of 3.x) hands
over ``None``, and ``qgis.core.NULL`` is ``None`` there. Code that reads
attribute values passes them through ``plain`` and only ever sees ``None``.
"""

from qgis.PyQt.QtCore import QVariant


def plain(value):
    """``None`` for a NULL (a null QVariant or None), else the value itself."""
    if isinstance(value, QVariant) and value.isNull():
        return None
    return value
