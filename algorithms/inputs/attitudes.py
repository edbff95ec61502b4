"""Attitude parameters and reading, shared by projectattitudes and
normalizeattitudes: conventions, fields, north reference."""

from dataclasses import dataclass, field
from typing import List

import numpy as np
import shapely
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
from ..core.wkb import from_wkb
from ..framework.base import DECLINATION, NORTH_REFERENCE
from ..framework.run_guard import ParameterProblem, stop_if_cancelled
from ..outputs.feature_writer import collector_paused

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
        (AZIMUTH_FIELD, "Azimuth field (dip direction or strike, degrees)"),
        (DIP_FIELD, "Dip field (degrees)"),
        (QUADRANT_FIELD, "Dip quadrant field (N, NE, E …)"),
        (TEXT_FIELD, "Attitude text field (e.g. 120/40, N30E 40SE)"),
    ):
        algorithm.addParameter(
            QgsProcessingParameterField(
                name, tr(label), parentLayerParameterName=parent, optional=True
            )
        )
    algorithm.add_north_parameters()
    algorithm.add_advanced(
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
    geometry_reasons: np.ndarray = None  # "" where the geometry is a usable point

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
        """Every feature's attributes, geometry, point and plane. Every
        feature leaves a few objects alive: the cycle collector, which
        would walk them all again and again (half the reading time), rests."""
        with collector_paused():
            return self._read(source, feedback, progress_share)

    def _read(self, source, feedback, progress_share):
        rows = AttitudeRows()
        chosen = {n: self.fields[n] for n in NEEDS[self.convention]}
        if self.declination_field:
            chosen[DECLINATION_FIELD] = self.declination_field
        for parameter, name in chosen.items():
            if source.fields().lookupField(name) < 0:
                raise ParameterProblem(parameter, f"the attitude layer has no field {name!r}.")
        wanted = list(dict.fromkeys(chosen.values()))  # one field may serve twice
        wkbs = []
        total = max(source.featureCount(), 1)
        features = source.getFeatures(QgsFeatureRequest(), SKIP_GEOMETRY_CHECKS)
        for number, feature in enumerate(features):
            rows.fids.append(feature.id())
            rows.attributes.append(feature.attributes())
            geometry = feature.geometry()
            rows.geometries.append(geometry)
            wkbs.append(bytes(geometry.asWkb()) or None)
            if number % 1000 == 0:
                stop_if_cancelled(feedback)
                feedback.setProgress(progress_share * number / total)
        rows.xyz, rows.geometry_reasons = point_positions(wkbs)
        indices = [source.fields().lookupField(name) for name in wanted]
        raw = {
            name: [plain(attributes[index]) for attributes in rows.attributes]
            for name, index in zip(wanted, indices)
        }
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


def point_positions(wkbs):
    """(x, y, z) per WKB (NaN z where 2-D) and why a geometry cannot be an
    attitude's position ("" where it can): null, empty, or a multi-point of
    more than one part. Vectorised; the positions of refused ones are NaN.

    >>> wkb = shapely.to_wkb(shapely.from_wkt(["POINT Z (1 2 3)", "MULTIPOINT (4 5)",
    ...     "POINT EMPTY", "MULTIPOINT (1 1, 2 2)"]), output_dimension=3).tolist()
    >>> xyz, reasons = point_positions(wkb + [None])
    >>> xyz[:2].tolist(), reasons.tolist()
    ([[1.0, 2.0, 3.0], [4.0, 5.0, nan]], ['', '', 'empty geometry', 'multi-part point', \
'null geometry'])
    """
    xyz = np.full((len(wkbs), 3), np.nan)
    reasons = np.full(len(wkbs), "", dtype=object)
    rest = np.flatnonzero(~_plain_points(wkbs, xyz))
    if len(rest):
        xyz[rest], reasons[rest] = _positions_by_geos([wkbs[i] for i in rest])
    return xyz, reasons


# ISO WKB of single points as QGIS writes them: {length: {type: z column}}
# (None: no z); 1 byte order, 4 bytes type, then 2-4 doubles.
_PLAIN_POINTS = {21: {1: None}, 29: {1001: 2, 2001: None}, 37: {3001: 2}}


def _plain_points(wkbs, xyz):
    """Reads, by numpy, the rows whose WKB is a little-endian single point
    with finite coordinates (nearly always all of them) into ``xyz``; True
    for those rows. The rest (null, empty, multi-points …) is GEOS's.

    >>> import struct
    >>> wkbs = [struct.pack("<BIddd", 1, 1001, 1, 2, 3), struct.pack("<BIdd", 1, 1, 4, 5)]
    >>> _plain_points(wkbs + [None], np.full((3, 3), np.nan)).tolist()
    [True, True, False]
    """
    lengths = np.fromiter((0 if w is None else len(w) for w in wkbs), np.int64, len(wkbs))
    done = np.zeros(len(wkbs), dtype=bool)
    for length, z_columns in _PLAIN_POINTS.items():
        rows = np.flatnonzero(lengths == length)
        if not len(rows):
            continue
        raw = np.frombuffer(b"".join([wkbs[i] for i in rows]), np.uint8).reshape(-1, length)
        kinds = raw[:, 1:5].copy().view("<u4")[:, 0]
        coords = raw[:, 5:].copy().view("<f8")
        finite = (raw[:, 0] == 1) & np.isfinite(coords).all(axis=1)
        for kind, z_column in z_columns.items():
            pick = finite & (kinds == kind)
            xyz[rows[pick], :2] = coords[pick, :2]
            if z_column is not None:
                xyz[rows[pick], 2] = coords[pick, z_column]
            done[rows[pick]] = True
    return done


def _positions_by_geos(wkbs):
    geometries = np.array([None] * len(wkbs), dtype=object)
    present = np.array([w is not None for w in wkbs], dtype=bool)
    geometries[present] = from_wkb([w for w in wkbs if w is not None])
    parts = shapely.get_num_geometries(geometries)
    single = geometries.copy()
    multi = shapely.get_type_id(geometries) == shapely.GeometryType.MULTIPOINT
    single[multi] = shapely.get_geometry(geometries[multi], 0)
    empty = present & shapely.is_empty(geometries)
    reasons = np.select(
        [~present, empty, present & (parts != 1)],
        ["null geometry", "empty geometry", "multi-part point"],
        "",
    ).astype(object)
    usable = reasons == ""
    xyz = np.full((len(wkbs), 3), np.nan)
    xyz[usable] = shapely.get_coordinates(single[usable], include_z=True)
    return xyz, reasons
