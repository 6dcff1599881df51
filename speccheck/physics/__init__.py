"""Physics as data: tables and pure functions on SI floats, with their sources.

Nothing here reads files, parses text, or makes findings; everything above
builds on it.
"""
