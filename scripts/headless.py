"""Running Sectionwright algorithms with QGIS's headless runner.

Debian's ``/usr/bin/qgis_process`` wrapper passes a desktop option and
fails; the binary ``qgis_process.bin`` beside it works. It finds the plugin
through ``QGIS_PLUGINPATH`` (a folder holding ``sectionwright/``, here a
link to this checkout), loads it when enabled in the settings of the
profile that ``QGIS_CUSTOM_CONFIG_PATH`` names (a throwaway one), and runs
the system Python, so the venv's packages (shapely 2) go on ``PYTHONPATH``,
after whatever ``PYTHONPATH`` the caller set (the newest-shapely leg of
scripts/test_releases.sh puts its shapely there).
"""

import json
import os
import shutil
import subprocess
import sysconfig
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def qgis_process_binary():
    for candidate in ("qgis_process.bin", "qgis_process"):
        path = shutil.which(candidate) or (Path("/usr/bin") / candidate)
        if Path(path).exists():
            return str(path)
    raise FileNotFoundError("qgis_process not found: install the Debian package 'qgis'")


def prepare(work_dir, plugin_source=ROOT):
    """A plugin folder and a throwaway profile with the plugin enabled."""
    work_dir = Path(work_dir)
    plugins = work_dir / "plugins"
    plugins.mkdir(parents=True, exist_ok=True)
    link = plugins / "sectionwright"
    if not link.exists():
        link.symlink_to(Path(plugin_source).resolve(), target_is_directory=True)
    settings = work_dir / "profile" / "profiles" / "default" / "QGIS"
    settings.mkdir(parents=True, exist_ok=True)
    (settings / "QGIS3.ini").write_text("[PythonPlugins]\nsectionwright=true\n")
    return plugins, work_dir / "profile"


def environment(plugins, profile):
    env = dict(os.environ)
    site_packages = sysconfig.get_paths()["purelib"]
    env.update(
        QGIS_PLUGINPATH=str(plugins),
        QGIS_CUSTOM_CONFIG_PATH=str(profile),
        QT_QPA_PLATFORM="offscreen",
        PROJ_DATA=env.get("PROJ_DATA", "/usr/share/proj"),
        PYTHONPATH=os.pathsep.join(filter(None, [env.get("PYTHONPATH"), site_packages])),
    )
    return env


def run(algorithm, parameters, work_dir=None, timeout=600):
    """Runs ``algorithm`` with ``parameters`` (name → value); returns the
    runner's JSON report (``results``, ``log`` …). Raises on failure with the
    runner's own message. The plugin link and the profile go into
    ``work_dir``, by default a temporary folder removed afterwards."""
    if work_dir is None:
        with tempfile.TemporaryDirectory(prefix="sectionwright-headless-") as scratch:
            return run(algorithm, parameters, scratch, timeout)
    plugins, profile = prepare(work_dir)
    arguments = [f"{name}={value}" for name, value in parameters.items()]
    done = subprocess.run(
        [qgis_process_binary(), "--json", "run", algorithm, "--", *arguments],
        capture_output=True,
        text=True,
        env=environment(plugins, profile),
        timeout=timeout,
    )
    if done.returncode != 0:
        raise RuntimeError(
            f"qgis_process {algorithm} failed ({done.returncode}):\n"
            f"{done.stdout[-2000:]}\n{done.stderr[-2000:]}"
        )
    return json.loads(done.stdout)


def gpkg_layer(path, table):
    """The value a Processing output parameter takes for a GeoPackage layer."""
    return f"ogr:dbname='{path}' table=\"{table}\" (geom)"
