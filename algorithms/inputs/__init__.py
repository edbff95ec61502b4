"""Reading inputs: section lines, DEMs, attitudes, map layers, tables."""
