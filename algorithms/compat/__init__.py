"""The only place that knows QGIS/Qt release differences."""
