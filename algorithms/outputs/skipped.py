"""SKIPPED rows, written one way by every algorithm."""

from . import fields as F
from .geometry_io import add_qgis_features


def write_skipped(sink, geometries, rows):
    """SKIPPED features: their QgsGeometry (None: no geometry) and attribute
    rows. ``sink`` None means the output was not asked for."""
    if sink is not None:
        add_qgis_features(sink, geometries, rows)


def skip_sections(sink, parts):
    """SKIPPED rows of section line parts (their ``reason`` set)."""
    write_skipped(
        sink,
        [part.geometry for part in parts],
        F.SKIPPED_SECTIONS.rows(
            {
                F.SECTION: [part.label for part in parts],
                F.SOURCE_FID: [part.fid for part in parts],
                F.REASON: [part.reason for part in parts],
            }
        ),
    )


def skip_features(sink, fields, geometries, attributes, fids, reasons):
    """SKIPPED rows of source features, carrying their own attributes
    (``fields``: CarriedFields over ``fields.SKIPPED_ROWS``)."""
    columns = fields.columns(attributes, {F.SOURCE_FID: fids, F.REASON: reasons})
    write_skipped(sink, geometries, fields.rows(columns))
