"""The shape of an output: its fields' names, kinds and meanings, declared
once (in ``fields.py``) and turned into ``QgsFields`` here; rows are filled
by name from columns (``feature_writer.write_rows``)."""

from dataclasses import dataclass

from qgis.core import QgsField, QgsFields

from ..compat.qgis_compat import DOUBLE, LONG, STRING

TEXT = "text"
INTEGER = "integer"
REAL = "real"
QGIS_TYPES = {TEXT: STRING, INTEGER: LONG, REAL: DOUBLE}
MAX_NAME_LENGTH = 10  # a Shapefile export keeps the names


@dataclass(frozen=True)
class Field:
    name: str
    kind: str  # TEXT, INTEGER or REAL
    meaning: str

    def qgs_field(self):
        return QgsField(self.name, QGIS_TYPES[self.kind])


class Schema:
    """The fields of one output, in output order.

    >>> schema = Schema(Field("section", TEXT, "label"), Field("elev", REAL, "metres"))
    >>> schema.names
    ('section', 'elev')
    """

    def __init__(self, *fields):
        names = [f.name for f in fields]
        too_long = [n for n in names if len(n) > MAX_NAME_LENGTH]
        if too_long or len(set(names)) != len(names):
            raise ValueError(f"field names too long or repeated: {too_long or names}")
        self.fields = tuple(fields)

    @property
    def names(self):
        return tuple(f.name for f in self.fields)

    def __iter__(self):
        return iter(self.fields)

    def __len__(self):
        return len(self.fields)

    def __add__(self, other):
        return Schema(*self.fields, *other.fields)

    def qgs_fields(self):
        fields = QgsFields()
        for field in self.fields:
            fields.append(field.qgs_field())
        return fields
