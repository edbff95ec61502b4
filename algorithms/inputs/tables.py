"""Reading plain table rows (collars, surveys, intervals) into arrays."""

import numpy as np
from qgis.core import QgsFeatureRequest

from ..compat.null import plain
from ..compat.qgis_compat import NO_GEOMETRY_REQUEST
from ..framework.run_guard import ParameterProblem


def read_columns(source, columns, layer_name, with_geometry=False, field_parameters=None):
    """{column: list of raw values} for the named fields (None for NULL),
    the feature ids, and the geometries when asked. ``columns`` maps each
    column to its field name, ``field_parameters`` to the parameter that
    chose it: a field missing from the layer is an error of that parameter
    (else of ``layer_name``)."""
    indices = {}
    for key, name in columns.items():
        if name:
            indices[key] = source.fields().lookupField(name)
            if indices[key] < 0:
                raise ParameterProblem(
                    (field_parameters or {}).get(key, layer_name),
                    f"the {layer_name} layer has no field {name!r}.",
                )
    request = QgsFeatureRequest().setSubsetOfAttributes(list(indices.values()))
    if not with_geometry:
        request.setFlags(NO_GEOMETRY_REQUEST)
    rows, fids, geometries = [], [], []
    for feature in source.getFeatures(request):
        fids.append(feature.id())
        rows.append(feature.attributes())
        if with_geometry:
            geometries.append(feature.geometry())
    values = {key: [None] * len(rows) for key in columns}
    for key, index in indices.items():
        values[key] = [plain(row[index]) for row in rows]
    return values, fids, geometries


def labels(values):
    """Stripped text labels; None for missing."""
    return [None if v is None or not str(v).strip() else str(v).strip() for v in values]


def lookup(keys, known):
    """Index in ``known`` (a {label: index} map) of every key; -1 if absent."""
    return np.array([known.get(k, -1) if k is not None else -1 for k in keys], dtype=int)
