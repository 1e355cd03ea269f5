"""Data shipped with the package (forms and sample surveys are mapped here by the build)."""
