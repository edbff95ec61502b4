"""SKIPPED rows, written one way by every algorithm."""

import numpy as np

from . import fields as F
from .feature_writer import write_rows


def write_skipped(sink, fields, geometries, columns):
    """SKIPPED features: their QgsGeometry (None: no geometry) and
    ``columns`` of ``fields``. ``sink`` None means the output was not asked
    for."""
    if sink is not None:
        write_rows(sink, fields, geometries, columns)


def skip_sections(sink, parts):
    """SKIPPED rows of section line parts (their ``reason`` set)."""
    write_skipped(
        sink,
        F.SKIPPED_SECTIONS.qgs_fields(),
        [part.geometry for part in parts],
        {
            F.SECTION: [part.label for part in parts],
            F.SOURCE_FID: [part.fid for part in parts],
            F.REASON: [part.reason for part in parts],
        },
    )


def skip_features(sink, fields, geometries, attributes, fids, reasons):
    """SKIPPED rows of source features, carrying their own attributes
    (``fields``: CarriedFields over ``fields.SKIPPED_ROWS``)."""
    columns = fields.columns(attributes, {F.SOURCE_FID: fids, F.REASON: reasons})
    write_skipped(sink, fields.qgs_fields(), geometries, columns)


def skip_refused(ledger, sink, fields, reasons, features):
    """One row per source feature, ``reasons`` "" where it is used: every row
    counted as read in the ``ledger``, the refused ones counted as skipped and
    written to SKIPPED (``features``: their geometries, attribute lists and
    ids, in the rows' order). Returns the indices of the rows used, counted
    as written."""
    geometries, attributes, fids = features
    ledger.read = len(reasons)
    refused = np.flatnonzero(reasons != "")
    for reason in reasons[refused]:
        ledger.skip(reason)
    skip_features(
        sink,
        fields,
        [geometries[i] for i in refused],
        [attributes[i] for i in refused],
        np.asarray(fids)[refused],
        reasons[refused],
    )
    used = np.flatnonzero(reasons == "")
    ledger.written = len(used)
    return used
