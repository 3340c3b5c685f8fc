"""gradeline: independent vertical geometry from LandXML road designs.

Pipeline: :mod:`converter.landxml` (reader) -> :mod:`converter.model`
(immutable objects) -> :mod:`converter.vertical` (numpy evaluation) ->
:mod:`converter.tables` and :mod:`converter.outputs` (rows, CSV/JSON) ->
:mod:`converter.cli` (thin command line).
"""

__version__ = "0.1.0"

__all__ = ["__version__"]
