"""The version of speccheck: the one place it is written (pyproject.toml reads it from here)."""

__version__ = "0.1.0"

# The project's home page, as in pyproject.toml's [project.urls] (a test keeps the two equal); the
# SARIF log gives it as the tool's informationUri.
PROJECT_URL = "https://speccheck.invalid/"
