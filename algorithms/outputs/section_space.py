"""The section view's engineering CRS (x = chainage, y = elevation × VE),
and the coordinate operation that lets QGIS measure in it."""

from qgis.core import QgsCoordinateReferenceSystem, QgsDistanceArea, QgsRenderContext

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


def add_measuring_operations(project):
    """Gives ``project``'s transform context a coordinate operation from the
    section view to each geographic CRS QGIS measures distances in.

    Every render context QGIS makes for a map (a canvas, a print layout's
    map, its scale bar) points its distance calculator from the map's CRS
    to an ellipsoid's geographic CRS — WGS 84's before the map's own
    ellipsoid is applied, then the project's. An engineering CRS has no
    transform to any of them, and QGIS reports "No transform available" /
    "Cannot create transform" each time. The operation given lays the
    section view on the equator at the prime meridian by an inverse
    Mercator on that ellipsoid, which is true to scale there in every
    direction: a length QGIS measures through it is the section's own
    length in metres (within 2 ppm for a view 10 km high). The section view
    stays an engineering CRS; only these measuring CRSs get the operation.
    Returns whether the context changed."""
    context = project.transformContext()
    source = section_crs()
    changed = False
    for target, operation in _measuring_targets(project.ellipsoid()):
        if context.calculateCoordinateOperation(source, target) != operation:
            context.addCoordinateOperation(source, target, operation, False)
            changed = True
    if changed:
        project.setTransformContext(context)
    return changed


def _measuring_targets(project_ellipsoid):
    """(geographic CRS, PROJ pipeline from the section view to it) for the
    render context's starting ellipsoid and the project's."""
    starting = QgsRenderContext().distanceArea()
    calculators = [starting]
    own = QgsDistanceArea()
    if own.setEllipsoid(project_ellipsoid) and own.willUseEllipsoid():
        calculators.append(own)
    targets = {}
    for calculator in calculators:
        target = calculator.ellipsoidCrs()
        if target.isValid():
            targets[target.toWkt()] = (target, _inverse_mercator(calculator))
    return list(targets.values())


def _inverse_mercator(calculator):
    return (
        "+proj=pipeline +step +inv +proj=merc "
        f"+a={calculator.ellipsoidSemiMajor()!r} +b={calculator.ellipsoidSemiMinor()!r} "
        "+step +proj=unitconvert +xy_in=rad +xy_out=deg"
    )
