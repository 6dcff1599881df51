"""The checking layer: the generic interval engine, the check of one column of the sheet,
the walk along the beam path, and the document checker that ties them together.  It does
no I/O: files come in as text, and the reader of measured data is injected."""
