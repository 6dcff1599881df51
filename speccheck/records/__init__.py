"""The records a check produces: immutable findings and sheet cells, and the rule catalogue
they refer to by id."""
