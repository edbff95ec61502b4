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


def add_measuring_operations(project, layers=None):
    """Gives ``project``'s transform context a coordinate operation from the
    section view to each geographic CRS QGIS measures it in — the section
    view as written here and as the data sources of ``layers`` (default:
    the project's) spell it: a clone starts in its source's spelling.

    Every render context QGIS makes for a map (a canvas, a print layout's
    map, its scale bar) points its distance calculator from the map's CRS
    to an ellipsoid's geographic CRS — WGS 84's before the map's own
    ellipsoid is applied, then the project's —, and every layer whose
    extent changes works out that extent in WGS 84 for catalogues. An
    engineering CRS has no transform to any of them, and QGIS reports "No
    transform available" / "Cannot create transform" each time. The
    operation given lays the section view on the equator at the prime
    meridian by an inverse Mercator on the ellipsoid, true to scale there
    in every direction: a length QGIS measures through it is the section's
    own length in metres (within 2 ppm for a view 10 km high). The section
    view stays an engineering CRS, and no map CRS gets a transform to it.
    Returns whether the context changed."""
    context = project.transformContext()
    changed = False
    for source in _spellings(project.mapLayers().values() if layers is None else layers):
        for target, operation in _measuring_targets(project.ellipsoid()):
            if context.calculateCoordinateOperation(source, target) != operation:
                context.addCoordinateOperation(source, target, operation, False)
                changed = True
    if changed:
        project.setTransformContext(context)
    return changed


def _spellings(layers):
    spellings = {SECTION_CRS_WKT: section_crs()}
    for layer in layers:
        provider = layer.dataProvider() if layer is not None else None
        if provider is not None and is_section_view(provider.crs()):
            spellings.setdefault(provider.crs().toWkt(), provider.crs())
    return list(spellings.values())


def _measuring_targets(project_ellipsoid):
    """(geographic CRS, PROJ pipeline from the section view to it): WGS 84,
    the render context's starting ellipsoid and the project's."""
    starting = QgsRenderContext().distanceArea()
    own = QgsDistanceArea()
    calculators = [starting]
    if own.setEllipsoid(project_ellipsoid) and own.willUseEllipsoid():
        calculators.append(own)
    wgs84 = QgsCoordinateReferenceSystem("EPSG:4326")
    targets = {wgs84.toWkt(): (wgs84, _inverse_mercator(starting))}
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
