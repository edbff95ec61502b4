"""The dependency check: versions, odd version strings, what to install."""

import types

from sectionwright.plugin import dependencies


def test_versions_and_builds_that_hide_their_version():
    # Debian forky's shapely 2.1 reports '0+unknown': its API decides.
    shapely_2 = types.SimpleNamespace(__version__="0+unknown", get_coordinates=None)
    shapely_1 = types.SimpleNamespace(__version__="0+unknown")
    assert dependencies._recent_enough(shapely_2, (2, 0), "get_coordinates")
    assert not dependencies._recent_enough(shapely_1, (2, 0), "get_coordinates")
    assert dependencies._recent_enough(types.SimpleNamespace(__version__="2.1.1"), (2, 0), "x")
    assert not dependencies._recent_enough(types.SimpleNamespace(__version__="1.8.5"), (2, 0), "x")


def test_advice_names_the_packages_and_the_command():
    advice = dependencies.install_advice(["shapely>=2.0"])
    assert "shapely>=2.0" in advice and "pip install" in advice
