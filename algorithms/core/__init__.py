"""Sectionwright's computational core: numpy, shapely 2 and pyproj, no QGIS.

One module per family of functions; every public function is vectorised over
arrays and returns NaN for values it cannot compute instead of raising.
"""
