"""The published JSON Schema of the spec format, shipped inside the package."""
