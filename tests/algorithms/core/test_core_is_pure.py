"""The core imports no QGIS and its docstring examples run."""

import doctest
import importlib
import pkgutil
import subprocess
import sys

import pytest

import sectionwright.algorithms.core as core

CORE_MODULES = sorted(m.name for m in pkgutil.iter_modules(core.__path__))


def test_core_modules_import_without_qgis(tmp_path):
    (tmp_path / "qgis.py").write_text("raise ImportError('the core must not import qgis')\n")
    script = (
        "import importlib.util, sys\n"
        f"spec = importlib.util.spec_from_file_location('swcore', {str(core.__file__)!r},"
        f" submodule_search_locations=[{str(core.__path__[0])!r}])\n"
        "module = importlib.util.module_from_spec(spec); sys.modules['swcore'] = module\n"
        "spec.loader.exec_module(module)\n"
        f"for name in {CORE_MODULES!r}: importlib.import_module('swcore.' + name)\n"
        "assert not any(m.split('.')[0] == 'qgis' for m in sys.modules)\n"
    )
    env = {"PYTHONPATH": str(tmp_path), "PROJ_DATA": "/usr/share/proj", "PATH": "/usr/bin"}
    subprocess.run([sys.executable, "-c", script], check=True, env=env)


@pytest.mark.parametrize("name", CORE_MODULES)
def test_docstring_examples_run(name):
    module = importlib.import_module(f"sectionwright.algorithms.core.{name}")
    result = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.failed == 0
