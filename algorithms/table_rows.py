"""Reading plain table rows (collars, surveys, intervals) into arrays."""
import numpy as np
from qgis.core import NULL, QgsFeatureRequest, QgsProcessingException


def _plain(value):
    return None if value is None or value == NULL else value


def read_columns(source, columns, parameter, with_geometry=False):
    """{column: list of raw values} for the named fields (None for NULL),
    the feature ids, and the geometries when asked. A field missing from the
    layer is an error naming ``parameter``'s field parameter."""
    for key, name in columns.items():
        if name and source.fields().lookupField(name) < 0:
            raise QgsProcessingException(f"{key}: the {parameter} layer has no field {name!r}.")
    request = QgsFeatureRequest()
    if not with_geometry:
        request.setFlags(QgsFeatureRequest.NoGeometry)
    values = {key: [] for key in columns}
    fids, geometries = [], []
    for feature in source.getFeatures(request):
        fids.append(feature.id())
        if with_geometry:
            geometries.append(feature.geometry())
        for key, name in columns.items():
            values[key].append(_plain(feature[name]) if name else None)
    return values, fids, geometries


def labels(values):
    """Stripped text labels; None for missing."""
    return [None if v is None or not str(v).strip() else str(v).strip() for v in values]


def lookup(keys, known):
    """Index in ``known`` (a {label: index} map) of every key; -1 if absent."""
    return np.array([known.get(k, -1) if k is not None else -1 for k in keys], dtype=int)
