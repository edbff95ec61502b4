"""The print-layout section sheet: per-section layers and pages."""
