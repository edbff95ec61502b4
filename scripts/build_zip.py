"""Builds the installable plugin zip: dist/sectionwright.zip.

    python3 scripts/build_zip.py [OUT_ZIP]

The zip holds one folder, ``sectionwright/``, with what QGIS loads: the
root ``__init__.py``, ``metadata.txt``, ``README.md``, ``plugin/`` and
``algorithms/``. Install it with Plugins → Manage and Install Plugins →
Install from ZIP.
"""

import sys
import zipfile
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
FOLDER = "sectionwright"
CONTENT = ("__init__.py", "metadata.txt", "README.md", "plugin", "algorithms")


def plugin_files():
    for name in CONTENT:
        path = ROOT / name
        if path.is_file():
            yield path
            continue
        for file in sorted(path.rglob("*")):
            if file.is_file() and "__pycache__" not in file.parts and file.suffix != ".pyc":
                yield file


def build(out_zip=ROOT / "dist" / f"{FOLDER}.zip"):
    out_zip = Path(out_zip)
    out_zip.parent.mkdir(parents=True, exist_ok=True)
    with zipfile.ZipFile(out_zip, "w", zipfile.ZIP_DEFLATED) as archive:
        for file in plugin_files():
            archive.write(file, f"{FOLDER}/{file.relative_to(ROOT).as_posix()}")
    return out_zip


if __name__ == "__main__":
    print(build(*sys.argv[1:]))
