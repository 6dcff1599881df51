"""speccheck: a linter for ultrafast laser experiment specs.

The package is layered; each subpackage imports only from the ones above it in
this list (``tests/test_layers.py`` enforces it):

* ``physics``  – tables and pure functions on SI floats: quantities, relations, pulse shapes,
  materials, dispersion, hazards, limits, the mistake catalogue, stage kinds;
* ``records``  – the immutable records checks produce (findings, sheet cells) and the rule catalogue;
* ``reading``  – text to data: the YAML loader, the schema, the value grammar, the units
  boundary, the project configuration, suppressions, measured-data files;
* ``checking`` – the generic engine, the column check, the path walk, the document checker;
* ``formats``  – the output formats;
* this package's top modules – the Python API (``api``), the command line (``cli``), the file
  system (``files``) and the starter specs (``starter``).

``speccheck.check(*paths)`` and ``speccheck.check_text(text)`` are the API (``speccheck.api``),
imported on first use so that the command line starts without it.
"""

from typing import TYPE_CHECKING, Any

from speccheck._version import __version__

if TYPE_CHECKING:
    from speccheck.api import Result, check, check_text

__all__ = ["Result", "__version__", "check", "check_text"]


def __getattr__(name: str) -> Any:
    if name in ("check", "check_text", "Result"):
        from speccheck import api

        return getattr(api, name)
    raise AttributeError(f"module 'speccheck' has no attribute {name!r}")
