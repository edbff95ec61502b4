"""The plugin as "Install from ZIP" leaves it: unpacked into a throwaway
profile, loaded in a fresh interpreter by ``plugin/load_installed_plugin.py``."""

import json
import os
import subprocess
import sys
import zipfile
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "scripts"))
import build_zip  # noqa: E402

LOADER = Path(__file__).parent / "plugin" / "load_installed_plugin.py"


def install_into_profile(profile):
    archive = build_zip.build(profile / "sectionwright.zip")
    with zipfile.ZipFile(archive) as z:
        assert {n.split("/")[0] for n in z.namelist()} == {"sectionwright"}
        z.extractall(profile / "python" / "plugins")
    return profile


def load(profile, *extra, python=sys.executable, env=None):
    """The loader's JSON report; ``extra`` are its options."""
    env = env or dict(os.environ, QT_QPA_PLATFORM="offscreen")
    done = subprocess.run(
        [python, str(LOADER), str(profile), *extra],
        capture_output=True,
        text=True,
        env=env,
        timeout=300,
    )
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout.strip().splitlines()[-1])
