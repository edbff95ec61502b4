"""QGIS glue: the plugin class, the Processing provider, icons."""
