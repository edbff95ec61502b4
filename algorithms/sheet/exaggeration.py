"""One vertical exaggeration for every section-view layer of a sheet."""

from qgis.core import QgsProcessingException

from ..compat.null import plain
from ..outputs import fields as F


def exaggerations(layer):
    """The distinct ``ve`` values of a layer (empty when it has no ``ve``)."""
    index = layer.fields().lookupField(F.EXAGGERATION)
    if index < 0:
        return set()
    values = set()
    for value in map(plain, layer.uniqueValues(index)):
        try:
            values.add(round(float(value), 9))
        except (TypeError, ValueError):
            continue
    return values


def common_exaggeration(named_layers):
    """The one ``ve`` shared by ``named_layers`` ({parameter label: layer});
    a layer without ``ve`` is not counted. Different values are an error
    naming every layer and its value(s)."""
    found = {
        label: (layer.name(), values)
        for label, layer in named_layers.items()
        if layer is not None and (values := exaggerations(layer))
    }
    distinct = set().union(*(values for _, values in found.values())) if found else set()
    if len(distinct) > 1:
        listing = "; ".join(
            f"{label} '{name}' ×{', ×'.join(f'{v:g}' for v in sorted(values))}"
            for label, (name, values) in found.items()
        )
        raise QgsProcessingException(
            "The section-view layers were made at different vertical exaggerations "
            f"({listing}). Make them again at one exaggeration: a sheet drawn from "
            "mixed ones would put features at wrong elevations."
        )
    return distinct.pop() if distinct else None
