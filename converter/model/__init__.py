"""Immutable model of a road design, as read from LandXML (or built by hand).

Lengths are in the file's linear unit, grades are ratios (rise/run) and angles
are radians. Every object may carry a :class:`SourceRef` so that errors found
later can still name the file and line. Nothing here reads files.
"""

from gradeline.model.base import MAX_MAGNITUDE, Broken, Notice, SourceRef
from gradeline.model.document import Alignment, Document, StationEquation
from gradeline.model.plan import (
    HCurve,
    HElement,
    HIrregular,
    HLine,
    HorizontalAlignment,
    HSpiral,
    PIEntry,
    Point,
    Stated,
)
from gradeline.model.profile import CurveKind, Profile, PVISpec
from gradeline.model.superelevation import Superelevation
from gradeline.model.surface import GroundPiece, GroundProfile, Surface
from gradeline.model.units import Units

__all__ = [
    "MAX_MAGNITUDE",
    "Notice",
    "Alignment",
    "Broken",
    "CurveKind",
    "Document",
    "GroundPiece",
    "GroundProfile",
    "HCurve",
    "HElement",
    "HIrregular",
    "HLine",
    "HSpiral",
    "HorizontalAlignment",
    "PIEntry",
    "PVISpec",
    "Point",
    "Profile",
    "SourceRef",
    "Stated",
    "StationEquation",
    "Superelevation",
    "Surface",
    "Units",
]
