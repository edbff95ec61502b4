"""The CRS of an input that lives on the map, checked before any transform."""

from ..framework.run_guard import ParameterProblem
from ..outputs.section_space import is_section_view


def require_map_crs(crs, parameter, what, instead):
    """``crs`` when it places ``what`` on the map; else an error for
    ``parameter`` saying what the layer is and to choose ``instead``.

    Section-view layers are offered wherever a line or point layer is (the
    dialogs cannot tell them apart), and no transform reaches the map from
    their chainage/elevation axes."""
    if not crs.isValid() or _undefined(crs):
        raise ParameterProblem(
            parameter,
            f"{what} have no coordinate reference system. Set one in the layer's "
            "properties (Source) and run again.",
        )
    if is_section_view(crs):
        raise ParameterProblem(
            parameter,
            "this layer is a section view made by Sectionwright (x = chainage, "
            "y = elevation × vertical exaggeration), not a map layer. "
            f"Choose {instead}.",
        )
    return crs


def _undefined(crs):
    """GDAL's stand-ins for a layer stored without CRS ("Undefined
    geographic SRS", "Undefined Cartesian SRS"), which QGIS reads as valid."""
    return crs.description().startswith("Undefined") or '"Undefined ' in crs.toWkt()


def require_lonlat(extent, parameter, what):
    """A layer in a geographic CRS whose coordinates are no longitudes and
    latitudes has the wrong CRS set (projected coordinates, degrees CRS)."""
    if (
        extent.xMinimum() < -180.5
        or extent.xMaximum() > 360.5
        or max(abs(extent.yMinimum()), abs(extent.yMaximum())) > 90.5
    ):
        raise ParameterProblem(
            parameter,
            f"{what} are in a geographic CRS (degrees) but their coordinates reach "
            f"x = {extent.xMaximum():.0f}, y = {extent.yMaximum():.0f}: these are no longitudes "
            "and latitudes. Set the layer's real CRS in its properties (Source).",
        )
