"""Sectionwright — QGIS plugin entry point (QGIS needs it at the plugin root)."""


def classFactory(iface):  # noqa: N802 (name fixed by QGIS)
    from .plugin.sectionwright_plugin import SectionwrightPlugin

    return SectionwrightPlugin(iface)
