"""Checks that QGIS's Python has what the computation needs, and says
exactly what to install when it does not."""

import importlib
import sys

REQUIRED = (
    # (import name, minimum version, pip requirement, a name only that version has)
    ("numpy", (1, 20), "numpy", "broadcast_shapes"),
    ("shapely", (2, 0), "shapely>=2.0", "get_coordinates"),
    ("pyproj", (3, 0), "pyproj>=3.0", "Transformer"),
)


def _version_tuple(text):
    """(major, minor) of a version string; None when it is not one (some
    distributions' builds report '0+unknown')."""
    numbers = []
    for piece in str(text).split("+")[0].split(".")[:2]:
        if not piece.isdigit():
            return None
        numbers.append(int(piece))
    return tuple(numbers) if numbers and numbers != [0] else None


def _recent_enough(module, minimum, probe):
    version = _version_tuple(getattr(module, "__version__", ""))
    if version is None:
        return hasattr(module, probe)
    return version >= minimum


def missing_requirements():
    """pip requirements for the packages that are absent or too old."""
    missing = []
    for module_name, minimum, requirement, probe in REQUIRED:
        try:
            module = importlib.import_module(module_name)
        except ImportError:
            missing.append(requirement)
            continue
        if not _recent_enough(module, minimum, probe):
            missing.append(requirement)
    return missing


def install_advice(missing):
    """The message shown to the user: what is missing and how to add it."""
    requirements = " ".join(f'"{r}"' for r in missing)
    return (
        "Sectionwright needs Python packages that this QGIS does not have: "
        f"{', '.join(missing)}. Install them into QGIS's Python, then restart QGIS.\n"
        f'  Windows (OSGeo4W Shell) or macOS: "{sys.executable}" -m pip install {requirements}\n'
        f"  Linux: python3 -m pip install --user {requirements}\n"
        "On Debian 12 / Ubuntu 22.04 the distribution's shapely is 1.8, too old: "
        "use the pip command (with --break-system-packages where pip asks for it)."
    )


def ensure_proj_data():
    """Points pyproj at QGIS's own PROJ data when pyproj has none of its own
    (typical for a pip-installed pyproj beside a distribution's QGIS)."""
    import pyproj.datadir
    from qgis.core import QgsProjUtils

    try:
        pyproj.datadir.get_data_dir()
        return
    except pyproj.exceptions.DataDirError:
        pass
    for path in QgsProjUtils.searchPaths():
        try:
            pyproj.datadir.set_data_dir(path)
            pyproj.datadir.get_data_dir()
            return
        except pyproj.exceptions.DataDirError:
            continue
