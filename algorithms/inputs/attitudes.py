"""Attitude parameters and reading, shared by projectattitudes and
normalizeattitudes: conventions, fields, north reference."""

from dataclasses import dataclass, field
from typing import List

import numpy as np
from qgis.core import (
    QgsFeatureRequest,
    QgsProcessingParameterEnum,
    QgsProcessingParameterField,
)

from ..compat.null import plain
from ..compat.qgis_compat import SKIP_GEOMETRY_CHECKS
from ..core.attitudes import (
    DIP_DIRECTION,
    STRIKE_QUADRANT,
    STRIKE_RHR,
    TEXT_AS_DIP_DIRECTION,
    TEXT_AS_STRIKE,
    as_numbers,
    read_attitudes,
)
from ..core.north import GRID, MAGNETIC, TRUE, meridian_convergence, to_grid
from ..framework.base import DECLINATION, NORTH_REFERENCE
from ..framework.run_guard import ParameterProblem, stop_if_cancelled

CONVENTION = "CONVENTION"
AZIMUTH_FIELD = "AZIMUTH_FIELD"
DIP_FIELD = "DIP_FIELD"
QUADRANT_FIELD = "QUADRANT_FIELD"
TEXT_FIELD = "TEXT_FIELD"
DECLINATION_FIELD = "DECLINATION_FIELD"

CONVENTIONS = [
    "Dip direction / dip",
    "Strike / dip (right-hand rule)",
    "Strike / dip + dip quadrant",
    "Text notation (bare pairs: dip direction / dip)",
    "Text notation (bare pairs: right-hand-rule strike / dip)",
]

# Which fields each convention needs.
NEEDS = {
    DIP_DIRECTION: (AZIMUTH_FIELD, DIP_FIELD),
    STRIKE_RHR: (AZIMUTH_FIELD, DIP_FIELD),
    STRIKE_QUADRANT: (AZIMUTH_FIELD, DIP_FIELD, QUADRANT_FIELD),
    TEXT_AS_DIP_DIRECTION: (TEXT_FIELD,),
    TEXT_AS_STRIKE: (TEXT_FIELD,),
}


def add_attitude_parameters(algorithm, parent):
    tr = algorithm.tr
    algorithm.addParameter(
        QgsProcessingParameterEnum(
            CONVENTION,
            tr("How attitudes are written"),
            options=[tr(c) for c in CONVENTIONS],
            defaultValue=DIP_DIRECTION,
        )
    )
    for name, label in (
        (AZIMUTH_FIELD, "Azimuth field (dip direction or strike)"),
        (DIP_FIELD, "Dip field"),
        (QUADRANT_FIELD, "Dip quadrant field (N, NE, E …)"),
        (TEXT_FIELD, "Attitude text field (e.g. 120/40, N30E 40SE)"),
    ):
        algorithm.addParameter(
            QgsProcessingParameterField(
                name, tr(label), parentLayerParameterName=parent, optional=True
            )
        )
    algorithm.add_north_parameters()
    algorithm.addParameter(
        QgsProcessingParameterField(
            DECLINATION_FIELD,
            tr("Declination field (overrides the value where set)"),
            parentLayerParameterName=parent,
            optional=True,
        )
    )


@dataclass
class AttitudeRows:
    """The attitude features as read, and their planes (NaN + reason where
    unreadable). Azimuths are still as stored (not yet north-corrected)."""

    fids: List[int] = field(default_factory=list)
    attributes: List[list] = field(default_factory=list)
    geometries: list = field(default_factory=list)
    xyz: np.ndarray = None
    dip_direction: np.ndarray = None
    dip: np.ndarray = None
    declination: np.ndarray = None
    reasons: np.ndarray = None

    def __len__(self):
        return len(self.fids)


class AttitudeSettings:
    """The attitude parameters of one run, checked."""

    def __init__(self, algorithm, parameters, context):
        self.convention = algorithm.parameterAsEnum(parameters, CONVENTION, context)
        self.fields = {
            name: algorithm.parameterAsString(parameters, name, context)
            for name in (AZIMUTH_FIELD, DIP_FIELD, QUADRANT_FIELD, TEXT_FIELD)
        }
        for name in NEEDS[self.convention]:
            if not self.fields[name]:
                raise ParameterProblem(
                    name,
                    f"attitudes written as '{CONVENTIONS[self.convention]}' need this field; "
                    "choose it.",
                )
        self.north = algorithm.parameterAsEnum(parameters, NORTH_REFERENCE, context)
        self.declination = algorithm.parameterAsDouble(parameters, DECLINATION, context)
        self.declination_field = algorithm.parameterAsString(parameters, DECLINATION_FIELD, context)

    def read(self, source, feedback, progress_share=30.0):
        """Every feature's attributes, geometry, point and plane."""
        rows = AttitudeRows()
        chosen = {n: self.fields[n] for n in NEEDS[self.convention]}
        if self.declination_field:
            chosen[DECLINATION_FIELD] = self.declination_field
        for parameter, name in chosen.items():
            if source.fields().lookupField(name) < 0:
                raise ParameterProblem(parameter, f"the attitude layer has no field {name!r}.")
        wanted = list(dict.fromkeys(chosen.values()))  # one field may serve twice
        raw = {name: [] for name in wanted}
        xyz = []
        total = max(source.featureCount(), 1)
        features = source.getFeatures(QgsFeatureRequest(), SKIP_GEOMETRY_CHECKS)
        for number, feature in enumerate(features):
            stop_if_cancelled(feedback)
            rows.fids.append(feature.id())
            rows.attributes.append(feature.attributes())
            geometry = feature.geometry()
            rows.geometries.append(geometry)
            xyz.append(_point_xyz(geometry))
            for name in wanted:
                raw[name].append(plain(feature[name]))
            if number % 1000 == 0:
                feedback.setProgress(progress_share * number / total)
        rows.xyz = np.array(xyz, dtype=float).reshape(-1, 3)
        get = raw.get
        rows.dip_direction, rows.dip, rows.reasons = read_attitudes(
            self.convention,
            azimuth=get(self.fields[AZIMUTH_FIELD]),
            dip=get(self.fields[DIP_FIELD]),
            quadrant=get(self.fields[QUADRANT_FIELD]),
            text=get(self.fields[TEXT_FIELD]),
        )
        rows.declination = self._declinations(raw.get(self.declination_field), len(rows))
        return rows

    def _declinations(self, values, count):
        if values is None:
            return np.full(count, self.declination)
        numbers, _ = as_numbers(values, "declination")
        return np.where(np.isnan(numbers), self.declination, numbers)

    def to_grid(self, azimuth, xy, crs_wkt, declination):
        """Azimuths (any reference) as grid azimuths of ``crs_wkt`` at ``xy``;
        without a CRS, as true azimuths."""
        if self.north == GRID:
            return to_grid(azimuth, GRID, 0.0)
        convergence = 0.0 if crs_wkt is None else meridian_convergence(crs_wkt, xy[:, 0], xy[:, 1])
        return to_grid(azimuth, self.north, convergence, declination)

    @property
    def corrects_north(self):
        return self.north in (TRUE, MAGNETIC)


def _point_xyz(geometry):
    """(x, y, z) of a point geometry; NaN for null, empty or multi-part."""
    if geometry is None or geometry.isNull() or geometry.isEmpty():
        return (np.nan, np.nan, np.nan)
    parts = list(geometry.constParts())
    if len(parts) != 1:
        return (np.nan, np.nan, np.nan)
    point = parts[0]
    z = point.z() if point.is3D() else np.nan
    return (point.x(), point.y(), z)


def geometry_reason(geometry):
    """Why a feature's geometry cannot be used as an attitude's position."""
    if geometry is None or geometry.isNull():
        return "null geometry"
    if geometry.isEmpty():
        return "empty geometry"
    if len(list(geometry.constParts())) != 1:
        return "multi-part point"
    return ""
