"""The install advice, followed to the letter: the command the plugin prints
when shapely 2 is missing is run as printed, into a throwaway user site of
the Python QGIS runs (PYTHONUSERBASE); then the plugin loads from that
Python and ``profile`` runs, with QGIS's numpy unchanged."""

import os
import subprocess
import sys
from pathlib import Path

import pytest
from installed_plugin import load

from sectionwright.plugin import dependencies

# test_releases.sh copies the machine's CA bundle into each root for pip.
HOST_CA_BUNDLE = Path("/etc/ssl/certs/host-ca-bundle.crt")


def qgis_python():
    """The interpreter QGIS's Python bindings belong to: the base of the
    test venv on the development machine, the system Python in a root."""
    version = f"python{sys.version_info[0]}.{sys.version_info[1]}"
    return str(Path(sys.base_exec_prefix) / "bin" / version)


def printed_command(advice):
    lines = advice.splitlines()
    start = next(i for i, line in enumerate(lines) if "with this command" in line)
    return next(line.strip() for line in lines[start + 1 :] if line.strip())


def run_python(python, code, env):
    done = subprocess.run([python, "-c", code], capture_output=True, text=True, env=env, timeout=60)
    assert done.returncode == 0, done.stderr
    return done.stdout.strip()


def test_the_advice_names_the_interpreter_inside_desktop_qgis(monkeypatch):
    running = Path(sys.executable).resolve()
    # Desktop QGIS embeds Python: there sys.executable is the qgis program.
    monkeypatch.setattr(sys, "executable", "/usr/bin/qgis")
    python = Path(dependencies.qgis_python())
    assert python.name.startswith("python") and python.resolve() == running


def test_the_advice_pins_numpy_and_is_not_cut_short():
    import numpy

    advice = dependencies.install_advice(["shapely>=2.0"])
    command = printed_command(advice)
    assert f"numpy=={numpy.__version__}" in command
    assert "shapely>=2.0" in command
    assert command.split()[0].strip("'\"").rpartition("/")[2].startswith("python")


@pytest.fixture(scope="module")
def user_base(tmp_path_factory):
    return tmp_path_factory.mktemp("userbase")


def test_following_the_advice_gives_a_working_profile(profile, user_base, demo_dir):
    python = qgis_python()
    env = dict(
        os.environ,
        QT_QPA_PLATFORM="offscreen",
        PYTHONUSERBASE=str(user_base),
        PIP_DISABLE_PIP_VERSION_CHECK="1",
    )
    env.pop("PYTHONNOUSERSITE", None)
    if HOST_CA_BUNDLE.exists():  # inside a release root: the machine's own CA bundle
        env.update(PIP_CERT=str(HOST_CA_BUNDLE), PIP_CONFIG_FILE="/dev/null")
    env.pop("PYTHONPATH", None)
    numpy_before = run_python(python, "import numpy; print(numpy.__version__)", env)
    had_shapely_2 = (
        run_python(
            python, "import importlib.util as u; print(u.find_spec('shapely') is not None)", env
        )
        == "True"
        and not subprocess.run(
            [python, "-c", "import shapely; shapely.get_coordinates"], capture_output=True, env=env
        ).returncode
    )

    before = load(profile, "--without", "shapely", python=python, env=env)
    assert before["provider"] is None
    advice = next(m for tag, m in before["messages"] if tag == "Sectionwright")
    command = printed_command(advice)
    assert (
        command.split()[0].strip("'\"") == python
        or Path(command.split()[0].strip("'\"")).resolve() == Path(python).resolve()
    )
    assert f"numpy=={numpy_before}" in command

    done = subprocess.run(command, shell=True, capture_output=True, text=True, env=env, timeout=600)
    assert done.returncode == 0, done.stdout[-2000:] + done.stderr[-2000:]

    after = load(profile, "--run-profile", str(demo_dir), python=python, env=env)
    assert after["provider"] == "Sectionwright", after["messages"]
    assert after["numpy"] == numpy_before
    assert after["summary"] == "Summary: read=4 written=4 skipped=0"
    # Where the release lacks shapely 2 (Debian 12) the command put it in the
    # user site; where it has it (3.40, 3.44: hidden above) pip left it be.
    assert had_shapely_2 or after["shapely_file"].startswith(str(user_base))
