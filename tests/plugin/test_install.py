"""The plugin zip installs into a throwaway profile and loads as QGIS loads it."""

import json
import os
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "scripts"))
import build_zip  # noqa: E402


@pytest.fixture(scope="module")
def profile(tmp_path_factory):
    """A throwaway QGIS profile with the zip unpacked into its plugins folder,
    as "Install from ZIP" does."""
    profile = tmp_path_factory.mktemp("profile")
    archive = build_zip.build(profile / "sectionwright.zip")
    with zipfile.ZipFile(archive) as z:
        assert {n.split("/")[0] for n in z.namelist()} == {"sectionwright"}
        z.extractall(profile / "python" / "plugins")
    return profile


def load(profile, *extra):
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen")
    done = subprocess.run(
        [
            sys.executable,
            str(Path(__file__).with_name("load_installed_plugin.py")),
            str(profile),
            *extra,
        ],
        capture_output=True,
        text=True,
        env=env,
        timeout=120,
    )
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout.strip().splitlines()[-1])


def test_zip_installs_and_registers_the_provider(profile):
    report = load(profile)
    assert report["available"] and report["started"]
    assert report["provider"] == "Sectionwright"
    assert report["algorithms"] == [
        "sectionwright:dipdomains",
        "sectionwright:formlines",
        "sectionwright:geologycrossings",
        "sectionwright:normalizeattitudes",
        "sectionwright:profile",
        "sectionwright:projectattitudes",
        "sectionwright:projectboreholes",
        "sectionwright:sectionsheet",
        "sectionwright:sectionsin3d",
        "sectionwright:structuraltrend",
    ]
    assert report["unloaded"]


def test_missing_shapely_gives_install_advice_not_a_traceback(profile):
    report = load(profile, "--without", "shapely")
    assert report["started"]
    assert report["provider"] is None
    advice = [m for tag, m in report["messages"] if tag == "Sectionwright"]
    assert advice and "shapely>=2.0" in advice[0] and "pip install" in advice[0]
    assert not any("Traceback" in m for _, m in report["messages"])
