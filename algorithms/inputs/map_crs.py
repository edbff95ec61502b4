"""The CRS of an input that lives on the map, checked before any transform."""

from ..framework.run_guard import ParameterProblem
from ..outputs.section_space import is_section_view


def require_map_crs(crs, parameter, what, instead):
    """``crs`` when it places ``what`` on the map; else an error for
    ``parameter`` saying what the layer is and to choose ``instead``.

    Section-view layers are offered wherever a line or point layer is (the
    dialogs cannot tell them apart), and no transform reaches the map from
    their chainage/elevation axes."""
    if not crs.isValid():
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
