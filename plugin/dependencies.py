"""Checks that QGIS's Python has what the computation needs, and says
exactly what to install when it does not."""

import importlib
import sys

REQUIRED = (
    # (import name, minimum version, pip requirement)
    ("numpy", (1, 20), "numpy"),
    ("shapely", (2, 0), "shapely>=2.0"),
    ("pyproj", (3, 0), "pyproj>=3.0"),
)


def _version_tuple(text):
    numbers = []
    for piece in text.split(".")[:2]:
        digits = "".join(ch for ch in piece if ch.isdigit())
        numbers.append(int(digits or 0))
    return tuple(numbers)


def missing_requirements():
    """pip requirements for the packages that are absent or too old."""
    missing = []
    for module_name, minimum, requirement in REQUIRED:
        try:
            module = importlib.import_module(module_name)
        except ImportError:
            missing.append(requirement)
            continue
        if _version_tuple(getattr(module, "__version__", "0")) < minimum:
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
