"""The throwaway venv holding the pinned PyQt6 (requirements-pyqt6.txt).

It lives outside the checkout, in ``$SECTIONWRIGHT_PYQT6_CACHE`` (default
``/var/cache/sectionwright-pyqt6``), one folder per pin set and Python
version, so that a run without network works whenever the folder is there,
and a changed pin builds a new one (the old ones are removed then). Building
takes the cache's lock, so parallel runs in several worktrees build once.

    python3 scripts/pyqt6_venv.py      # builds if needed, prints its python
"""

import fcntl
import hashlib
import os
import shutil
import subprocess
import sys
import venv
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
REQUIREMENTS = ROOT / "requirements-pyqt6.txt"
CACHE = Path(os.environ.get("SECTIONWRIGHT_PYQT6_CACHE", "/var/cache/sectionwright-pyqt6"))
READY = "sectionwright-ready"


def venv_key():
    """Pins and the base Python's version: either changing needs a new venv."""
    digest = hashlib.sha256(REQUIREMENTS.read_bytes())
    digest.update(f"{sys.version_info.major}.{sys.version_info.minor}".encode())
    return digest.hexdigest()[:16]


def venv_python(folder):
    return folder / "bin" / "python"


def ensure_venv():
    """Path of the venv's python, building the venv first when it is missing."""
    folder = CACHE / venv_key()
    if (folder / READY).exists():
        return venv_python(folder)
    CACHE.mkdir(parents=True, exist_ok=True)
    with open(CACHE / "build.lock", "w") as lock:
        fcntl.flock(lock, fcntl.LOCK_EX)
        if not (folder / READY).exists():
            _build(folder)
    return venv_python(folder)


def _build(folder):
    print(f"pyqt6_venv: building {folder}", file=sys.stderr)
    for stale in CACHE.iterdir():
        if stale.is_dir():
            shutil.rmtree(stale)
    # No system site-packages: Debian's PyQt5 must not be visible to the check.
    venv.EnvBuilder(with_pip=True, clear=True).create(folder)
    subprocess.run(
        [
            str(venv_python(folder)),
            "-m",
            "pip",
            "install",
            "--quiet",
            "--disable-pip-version-check",
            "--no-deps",
            "--only-binary",
            ":all:",
            "-r",
            str(REQUIREMENTS),
        ],
        check=True,
    )
    (folder / READY).write_text(REQUIREMENTS.read_text())


if __name__ == "__main__":
    print(ensure_venv())
