"""One module per Processing algorithm: parameters in, core call, sinks out."""


def all_algorithms():
    from .dipdomains import DipDomainsAlgorithm
    from .formlines import FormLinesAlgorithm
    from .geologycrossings import GeologyCrossingsAlgorithm
    from .normalizeattitudes import NormalizeAttitudesAlgorithm
    from .profile import ProfileAlgorithm
    from .projectattitudes import ProjectAttitudesAlgorithm
    from .projectboreholes import ProjectBoreholesAlgorithm
    from .sectionsheet import SectionSheetAlgorithm
    from .sectionsin3d import SectionsIn3dAlgorithm
    from .structuraltrend import StructuralTrendAlgorithm

    return [
        ProfileAlgorithm(),
        ProjectAttitudesAlgorithm(),
        NormalizeAttitudesAlgorithm(),
        GeologyCrossingsAlgorithm(),
        ProjectBoreholesAlgorithm(),
        SectionSheetAlgorithm(),
        SectionsIn3dAlgorithm(),
        StructuralTrendAlgorithm(),
        DipDomainsAlgorithm(),
        FormLinesAlgorithm(),
    ]
