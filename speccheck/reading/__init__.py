"""From text to data: the YAML loader with node marks, the JSON Schema and its compiled
form, the value grammar, the units boundary (pint), the project configuration, inline
suppressions and measured-data files."""
