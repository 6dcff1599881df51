"""speccheck: a linter for ultrafast laser experiment specs."""

__version__ = "0.1.0"
