"""Desktop QGIS, for real, on a screen: the `qgis` program with a throwaway
profile, the plugin installed from the built zip, the demo project opened;
``desktop_session.py`` records every message and leaves.

    python scripts/desktop_smoke.py PROJECT.qgz WORK_DIR [SCREENSHOT_DIR]

Without a display an Xvfb server is started for the run. Prints the report
(JSON) and writes it to WORK_DIR/report.json.
"""

import json
import os
import shutil
import subprocess
import sys
import sysconfig
import time
import zipfile
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
import build_zip  # noqa: E402

SCREEN = "1600x1000x24"


def install_profile(work):
    """A profile folder with the plugin unpacked from the zip and enabled."""
    profiles = work / "profiles"
    default = profiles / "profiles" / "default"
    plugins = default / "python" / "plugins"
    plugins.mkdir(parents=True, exist_ok=True)
    with zipfile.ZipFile(build_zip.build(work / "sectionwright.zip")) as archive:
        archive.extractall(plugins)
    settings = default / "QGIS"
    settings.mkdir(parents=True, exist_ok=True)
    (settings / "QGIS3.ini").write_text(
        # GRASS and SAGA are not installed here: their providers would only
        # complain about it.
        "[PythonPlugins]\nsectionwright=true\ngrassprovider=false\nsagaprovider=false\n"
        "[qgis]\ncheckVersion=false\nshowTips=false\nshowTips322=false\n"
        "[UI]\nhidebrowser=false\n"
    )
    return profiles


def start_display():
    """An Xvfb display (number, process); the caller stops it."""
    for number in range(91, 120):
        if (
            not Path(f"/tmp/.X11-unix/X{number}").exists()
            and not Path(f"/tmp/.X{number}-lock").exists()
        ):
            server = subprocess.Popen(
                ["Xvfb", f":{number}", "-screen", "0", SCREEN, "-nolisten", "tcp"],
                stdout=subprocess.DEVNULL,
                stderr=subprocess.DEVNULL,
            )
            for _ in range(50):
                if Path(f"/tmp/.X11-unix/X{number}").exists():
                    return f":{number}", server
                time.sleep(0.1)
            server.terminate()
    raise RuntimeError("no free X display number for Xvfb")


def run(project, work, screenshots=None, timeout=240):
    work = Path(work)
    work.mkdir(parents=True, exist_ok=True)
    profiles = install_profile(work)
    report = work / "report.json"
    env = {
        key: value
        for key, value in os.environ.items()
        if key not in ("QT_QPA_PLATFORM", "QGIS_CUSTOM_CONFIG_PATH", "PYTHONHOME")
    }
    env.update(
        PYQGIS_STARTUP=str(HERE / "desktop_session.py"),
        SECTIONWRIGHT_SMOKE_REPORT=str(report),
        # shapely 2 from the development venv: Debian 12's QGIS Python lacks it.
        PYTHONPATH=os.pathsep.join(
            filter(None, [sysconfig.get_paths()["purelib"], env.get("PYTHONPATH")])
        ),
        PROJ_DATA=env.get("PROJ_DATA", "/usr/share/proj"),
        XDG_RUNTIME_DIR=env.get("XDG_RUNTIME_DIR", f"/tmp/runtime-{os.getuid()}"),
        HOME=str(work),
    )
    if screenshots:
        Path(screenshots).mkdir(parents=True, exist_ok=True)
        env["SECTIONWRIGHT_SCREENSHOTS"] = str(Path(screenshots).resolve())
    server = None
    if not env.get("DISPLAY"):
        env["DISPLAY"], server = start_display()
    try:
        done = subprocess.run(
            [
                shutil.which("qgis") or "qgis",
                "--profiles-path",
                str(profiles),
                "--profile",
                "default",
                "--nologo",
                "--noversioncheck",
                "--project",
                str(project),
            ],
            env=env,
            capture_output=True,
            text=True,
            timeout=timeout,
        )
    finally:
        if server is not None:
            server.terminate()
            server.wait(timeout=10)
    (work / "qgis-output.log").write_text(done.stdout + done.stderr, encoding="utf-8")
    if not report.exists():
        raise RuntimeError(
            f"QGIS left without a report ({done.returncode}):\n"
            f"{done.stdout[-3000:]}\n{done.stderr[-3000:]}"
        )
    return json.loads(report.read_text(encoding="utf-8"))


if __name__ == "__main__":
    result = run(Path(sys.argv[1]).resolve(), Path(sys.argv[2]), *sys.argv[3:4])
    print(json.dumps(result, indent=1))
