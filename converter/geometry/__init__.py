"""Exact geometry over numpy arrays: stations, vertical and horizontal alignment, ground."""
