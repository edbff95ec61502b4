"""Writing outputs: field names, carried fields, geometry, the section-view CRS, styles."""
