"""Output fields that carry the source's own attributes beside computed ones."""

from qgis.core import QgsField, QgsFields

from ..compat.qgis_compat import DOUBLE, LONG, STRING
from . import fields as F

# A GeoPackage key copied as an ordinary field makes QGIS 3.22 write
# duplicate fids; src_fid carries it instead.
NEVER_CARRIED = {"fid"}


def computed_field(name):
    kind = STRING if name in F.TEXT_FIELDS else LONG if name in F.INTEGER_FIELDS else DOUBLE
    return QgsField(name, kind)


def computed_fields(names):
    """QgsFields of computed values only."""
    fields = QgsFields()
    for name in names:
        fields.append(computed_field(name))
    return fields


class CarriedFields:
    """The source fields kept (minus keys and names the computed fields
    replace) followed by the computed fields."""

    def __init__(self, source_fields, computed_names):
        computed_lower = {n.lower() for n in computed_names}
        self.fields = QgsFields()
        self.kept = []
        self.replaced = []
        for index, source_field in enumerate(source_fields):
            name = source_field.name().lower()
            if name in NEVER_CARRIED:
                continue
            if name in computed_lower:
                self.replaced.append(source_field.name())
                continue
            self.fields.append(QgsField(source_field))
            self.kept.append(index)
        for name in computed_names:
            self.fields.append(computed_field(name))

    def row(self, source_attributes, computed_values):
        return [source_attributes[i] for i in self.kept] + list(computed_values)

    def log_replaced(self, feedback, layer_name):
        if self.replaced:
            feedback.pushInfo(
                f"Fields of {layer_name} replaced by computed ones: {', '.join(self.replaced)}."
            )
