"""Pytest plugin, loaded before pytest-qgis (``-p`` in pytest.ini): the QGIS
profile of a test session is a throwaway folder in the system's temporary
directory, removed when the session ends.

pytest-qgis puts the profile (settings, ``qgis.db``, an authentication
database ``qgis-auth.db``) in ``<rootdir>/.qgis-settings``, that is, in the
checkout; it has no option to put it elsewhere. Its one function that picks
the place is given a view of the configuration whose root is the
throwaway folder; everything else in pytest keeps the real root.
"""

import shutil
import tempfile
from pathlib import Path

import pytest
from pytest_qgis import plugin as pytest_qgis_plugin

PROFILE_ROOT = Path(tempfile.mkdtemp(prefix="sectionwright-qgis-profile-"))


class _ProfileRoot:
    """The pytest configuration, seen with the throwaway folder as its root."""

    def __init__(self, config):
        self._config = config
        self.rootpath = PROFILE_ROOT

    def __getattr__(self, name):
        return getattr(self._config, name)


_load_settings = pytest_qgis_plugin._load_qgis_settings
pytest_qgis_plugin._load_qgis_settings = lambda config: _load_settings(_ProfileRoot(config))


@pytest.hookimpl(trylast=True)
def pytest_unconfigure(config):
    shutil.rmtree(PROFILE_ROOT, ignore_errors=True)
