"""Renderers: serialise presentation records as DXF, CSV/JSON and text reports."""
