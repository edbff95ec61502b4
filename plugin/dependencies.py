"""Checks that QGIS's Python has what the computation needs, and says
exactly what to install when it does not."""

import importlib
import importlib.util
import os
import shlex
import subprocess
import sys
import sysconfig
from pathlib import Path

REQUIRED = (
    # (import name, minimum version, pip requirement, a name only that version has)
    ("numpy", (1, 20), "numpy", "broadcast_shapes"),
    ("shapely", (2, 0), "shapely>=2.0", "get_coordinates"),
    ("pyproj", (3, 0), "pyproj>=3.0", "Transformer"),
)
# Installed packages that pip must leave as they are: QGIS's own GDAL
# bindings are built against the numpy QGIS ships, and a newer shapely would
# otherwise pull numpy 2 beside a GDAL built for numpy 1.
KEEP_AS_INSTALLED = ("numpy",)


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


def _looks_like_python(path):
    return Path(path).name.lower().startswith("python")


def qgis_python():
    """The interpreter QGIS runs plugins in. Inside desktop QGIS
    ``sys.executable`` is the QGIS program itself (``qgis``, ``qgis-bin.exe``,
    ``QGIS.app``), so the interpreter is looked for beside the Python prefix
    QGIS embeds, by the version it runs."""
    if sys.executable and _looks_like_python(sys.executable) and Path(sys.executable).exists():
        return sys.executable
    major, minor = sys.version_info[:2]
    names = (f"python{major}.{minor}", f"python{major}", "python")
    if os.name == "nt":
        names = ("python.exe", f"python{major}.exe", f"python{major}{minor}.exe")
    prefixes = dict.fromkeys((sys.exec_prefix, sys.base_exec_prefix, sys.prefix, sys.base_prefix))
    for prefix in prefixes:
        for folder in ("bin", "", "Scripts", "apps/Python{}{}".format(major, minor)):
            for name in names:
                candidate = Path(prefix, folder, name)
                if candidate.is_file():
                    return str(candidate)
    return f"python{major}.{minor}"


def _in_virtual_environment():
    return sys.prefix != sys.base_prefix


def _externally_managed():
    """Whether pip refuses to install into this Python without being told
    (PEP 668: Debian 12, Ubuntu 23.04 and later …)."""
    stdlib = sysconfig.get_path("stdlib")
    return bool(stdlib) and (Path(stdlib) / "EXTERNALLY-MANAGED").exists()


def _kept_pins():
    pins = []
    for name in KEEP_AS_INSTALLED:
        try:
            module = importlib.import_module(name)
        except ImportError:
            continue
        version = getattr(module, "__version__", "")
        if _version_tuple(version) is not None:
            pins.append(f"{name}=={version}")
    return pins


def install_arguments(missing):
    """The pip command, as a list of arguments, that installs ``missing``
    into QGIS's own Python while keeping its numpy."""
    pinned = _kept_pins()
    pinned_names = {pin.split("==")[0] for pin in pinned}
    wanted = [r for r in missing if r.split(">")[0].split("=")[0] not in pinned_names]
    arguments = [qgis_python(), "-m", "pip", "install"]
    if not _in_virtual_environment():
        arguments.append("--user")
        if _externally_managed():
            arguments.append("--break-system-packages")
    return arguments + wanted + pinned


def install_command(missing):
    """The command line to paste into a terminal (a Windows shell or a POSIX
    shell, as the system is)."""
    arguments = install_arguments(missing)
    if os.name == "nt":
        return subprocess.list2cmdline(arguments)
    return shlex.join(arguments)


def install_advice(missing):
    """The message shown to the user: what is missing and how to add it."""
    lines = [
        f"Sectionwright needs Python packages that this QGIS does not have: {', '.join(missing)}.",
        "Install them into QGIS's own Python with this command (in a terminal; on Windows "
        "in the OSGeo4W Shell), then restart QGIS:",
        "",
        f"    {install_command(missing)}",
        "",
        "The command keeps the numpy that QGIS has (its GDAL bindings are built for it).",
    ]
    if importlib.util.find_spec("pip") is None:
        lines.append(
            "This Python has no pip yet: on Debian or Ubuntu install it first with "
            "'sudo apt install python3-pip'."
        )
    return "\n".join(lines)


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
