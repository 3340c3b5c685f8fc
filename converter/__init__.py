"""gradeline: independent vertical geometry from LandXML road designs.

Pipeline: :mod:`gradeline.io.landxml` (reader) -> :mod:`gradeline.model`
(immutable objects) -> :mod:`gradeline.geometry.vertical` (numpy evaluation) ->
:mod:`gradeline.present.tables` and :mod:`gradeline.render.outputs` (rows, CSV/JSON) ->
:mod:`gradeline.cli` (thin command line).
"""

__version__ = "0.1.0"

__all__ = ["__version__"]
