"""Output fields that carry the source's own attributes beside computed ones."""

from qgis.core import QgsField, QgsFields

# A GeoPackage key copied as an ordinary field makes QGIS 3.22 write
# duplicate fids; src_fid carries it instead.
NEVER_CARRIED = {"fid"}


class CarriedFields:
    """The source fields kept (minus keys and names the computed fields
    replace) followed by the fields of the ``computed`` schema. Like a
    schema it gives ``qgs_fields()``; ``columns`` names the source's values."""

    def __init__(self, source_fields, computed):
        computed_lower = {n.lower() for n in computed.names}
        self.computed = computed
        self.fields = QgsFields()
        self.kept = []
        self.kept_names = []
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
            self.kept_names.append(source_field.name())
        for field in computed:
            self.fields.append(field.qgs_field())

    def qgs_fields(self):
        return self.fields

    def columns(self, source_attributes, computed_columns):
        """{name: values} of every output field: the kept source attributes
        (a list per feature) and the computed columns."""
        columns = {
            name: [attributes[index] for attributes in source_attributes]
            for name, index in zip(self.kept_names, self.kept)
        }
        columns.update(computed_columns)
        return columns

    def log_replaced(self, feedback, layer_name):
        if self.replaced:
            feedback.pushInfo(
                f"Fields of {layer_name} replaced by computed ones: {', '.join(self.replaced)}."
            )
