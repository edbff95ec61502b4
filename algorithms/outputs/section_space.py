"""The section view's engineering CRS (x = chainage, y = elevation × VE)."""

from qgis.core import QgsCoordinateReferenceSystem

SECTION_CRS_WKT = (
    'ENGCRS["Section view",EDATUM["Section datum"],CS[Cartesian,2],'
    'AXIS["chainage (x)",east,ORDER[1],LENGTHUNIT["metre",1]],'
    'AXIS["elevation (y)",north,ORDER[2],LENGTHUNIT["metre",1]]]'
)


def section_crs():
    """The section view's CRS, for sinks and layers."""
    return QgsCoordinateReferenceSystem.fromWkt(SECTION_CRS_WKT)


def is_section_view(crs):
    """Whether a layer's CRS is the section view (also after a round trip
    through a file format that rewrites its WKT)."""
    return crs.isValid() and not crs.authid() and '"Section view"' in crs.toWkt()
