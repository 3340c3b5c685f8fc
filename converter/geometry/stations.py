"""Station labels: parsing, formatting and station equations.

US customary stationing counts 100-ft stations (``12+34.56``); metric
stationing counts 1000-m stations (``1+234.567``) -- common practice.
Internally every station is a continuous *internal* station; the labelled
station shown to people differs from it after a station equation.
"""

from __future__ import annotations

import bisect
import math
import re
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from gradeline.errors import UsageError
from gradeline.model import StationEquation
from gradeline.model.units import Units

__all__ = [
    "Stationing",
    "format_station",
    "parse_station",
]

_STATION_RE = re.compile(r"^\s*([+-]?)(\d+)\+(\d+)(\.\d*)?\s*$")
_PLAIN_RE = re.compile(r"^\s*[+-]?(\d+(\.\d*)?|\.\d+)\s*$")


def format_station(value: float, station_length: float = 100.0, decimals: int = 2) -> str:
    """Format a station for people: ``1234.5`` -> ``12+34.50``.

    The value is rounded once, to ``decimals``, before it is split into
    stations and remainder, so a label can never read ``12+100.00``.

    Parameters
    ----------
    value : float
        Labelled station in file units.
    station_length : float
        100 (US customary) or 1000 (metric).
    decimals : int
        Decimal places of the remainder.

    Examples
    --------
    >>> format_station(1234.5)
    '12+34.50'
    >>> format_station(1299.9999)
    '13+00.00'
    >>> format_station(-50.0)
    '-0+50.00'
    >>> format_station(1234.5678, 1000.0, 3)
    '1+234.568'
    """
    if not math.isfinite(value):
        return str(value)
    text = f"{abs(value):.{decimals}f}"
    whole, _, frac = text.partition(".")
    q, r = divmod(int(whole), int(station_length))
    width = len(str(int(station_length) - 1))
    body = f"{q}+{r:0{width}d}" + (f".{frac}" if decimals > 0 else "")
    is_zero = set(whole + frac) <= {"0"}
    return ("-" if value < 0 and not is_zero else "") + body


def parse_station(text: str, station_length: float = 100.0) -> float:
    """Parse a station label (``12+34.56``) or a plain number (``1234.56``).

    Parameters
    ----------
    text : str
        The label. The part after ``+`` must have as many whole digits as the
        station length needs (two for 100-ft stations, three for 1000-m ones).
    station_length : float
        100 (US customary) or 1000 (metric).

    Raises
    ------
    UsageError
        When the text is not a station.

    Examples
    --------
    >>> parse_station("12+34.56")
    1234.56
    >>> parse_station("-0+50")
    -50.0
    >>> parse_station("1+234.567", 1000.0)
    1234.567
    """
    m = _STATION_RE.match(text)
    width = len(str(int(station_length) - 1))
    if m:
        sign, full, rest, frac = m.groups()
        if len(rest) != width:
            raise UsageError(
                f"station {text.strip()!r}: expected {width} digits after '+' "
                f"(stations of {station_length:g})"
            )
        value = int(full) * station_length + float(rest + (frac or ""))
        return -value if sign == "-" else value
    if _PLAIN_RE.match(text):
        value = float(text)
        if math.isfinite(value):
            return value
    example = format_station(1234.5, station_length, 2)
    raise UsageError(f"{text.strip()!r} is not a station; write it like {example}")


@dataclass(frozen=True, slots=True)
class Stationing:
    """Map internal stations to labelled stations and back.

    Parameters
    ----------
    units : Units
        Decides station length (100 ft / 1000 m) and label decimals.
    equations : tuple of StationEquation
        Station equations in increasing internal order.

    Notes
    -----
    Region 1 runs up to the first equation and is labelled with the internal
    station itself; region k + 1 starts at equation k and is labelled
    ``staAhead + (internal - staInternal)`` (LandXML 1.2, ``StaEquation``).
    """

    units: Units = Units()
    equations: tuple[StationEquation, ...] = ()

    @property
    def station_length(self) -> float:
        """Length of one station in file units."""
        return self.units.station_length

    @property
    def decimals(self) -> int:
        """Decimals of station labels: 2 in feet, 3 in metres (common practice)."""
        return 3 if self.units.metric else 2

    def end_tolerance(self, lo: float, hi: float) -> float:
        """How close to an end a station counts as on it.

        Half a unit of the last printed decimal (0.005 ft, 0.0005 m), or 1e-6 of
        the largest station, whichever is larger: a label printed for an end
        always lands on that end, and exported coordinates rounded by another
        program do not leave a sliver of alignment uncovered.

        Examples
        --------
        >>> Stationing(Units("meter")).end_tolerance(0.0, 37.3)
        0.0005
        >>> round(Stationing(Units("meter")).end_tolerance(0.0, 1266.2), 7)
        0.0012662
        """
        return max(0.5 * 10.0**-self.decimals, 1e-6 * max(abs(lo), abs(hi), 1.0))

    def _tables(self) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
        starts = np.array([-np.inf] + [e.internal for e in self.equations])
        offsets = np.array([0.0] + [e.ahead - e.internal for e in self.equations])
        return starts, offsets

    def region(self, internal: ArrayLike) -> NDArray[np.intp]:
        """Region number (1-based) of each internal station."""
        starts, _ = self._tables()
        s = np.asarray(internal, dtype=np.float64)
        return np.searchsorted(starts, s, side="right")

    def label_value(self, internal: ArrayLike) -> NDArray[np.float64]:
        """Labelled station of each internal station.

        Examples
        --------
        >>> eq = StationEquation(back=1500.0, ahead=1400.0, internal=1500.0)
        >>> Stationing(Units("foot"), (eq,)).label_value([1000.0, 1600.0]).tolist()
        [1000.0, 1500.0]
        """
        starts, offsets = self._tables()
        s = np.asarray(internal, dtype=np.float64)
        idx = np.searchsorted(starts, s, side="right") - 1
        return s + offsets[idx]

    def label(self, internal: float) -> str:
        """Label text of one internal station, e.g. ``12+34.56``.

        Scalar fast path: no arrays; a bisection over the equations, if any.
        """
        s = float(internal)
        eqs = self.equations
        if eqs:
            k = bisect.bisect_right([e.internal for e in eqs], s)
            if k:
                s = s + (eqs[k - 1].ahead - eqs[k - 1].internal)
        return format_station(s, self.station_length, self.decimals)

    def _fmt(self, labelled: float) -> str:
        return format_station(labelled, self.station_length, self.decimals)

    def equation_labels(self, eq: StationEquation) -> tuple[str, str]:
        """Back and ahead station labels of an equation, formatted like every station."""
        return self._fmt(eq.back), self._fmt(eq.ahead)

    def labels(self, internal: ArrayLike) -> list[str]:
        """Label texts of an array of internal stations."""
        values = self.label_value(internal)
        return [format_station(float(v), self.station_length, self.decimals) for v in values]

    def regions_of_label(self, labelled: float, lo: float, hi: float) -> list[tuple[int, float]]:
        """Every (region, internal station) in [lo, hi] that carries ``labelled``."""
        starts, offsets = self._tables()
        ends = np.append(starts[1:], np.inf)
        found: list[tuple[int, float]] = []
        for k in range(len(starts)):
            internal = labelled - offsets[k]
            a, b = max(starts[k], lo), min(ends[k], hi)
            if a <= internal <= b and not any(abs(f[1] - internal) < 1e-9 for f in found):
                found.append((k + 1, float(internal)))
        return found

    def internal_of(self, text: str, lo: float, hi: float) -> float:
        """Internal station of a label typed by a user, within [lo, hi].

        A label that occurs twice (after an equation that steps back) needs
        its region: ``12+50@2``.

        Raises
        ------
        UsageError
            Not a station, outside [lo, hi], in an equation gap, or ambiguous.
        """
        body, _, region_text = text.partition("@")
        labelled = parse_station(body, self.station_length)
        tol = self.end_tolerance(lo, hi)
        # a label within the end tolerance of an end is that end (ends print rounded)
        found = [
            (r, lo if abs(s - lo) <= tol else hi if abs(s - hi) <= tol else s)
            for r, s in self.regions_of_label(labelled, lo - tol, hi + tol)
        ]
        if region_text:
            try:
                want = int(region_text)
            except ValueError:
                raise UsageError(f"{text!r}: region after '@' must be a number") from None
            found = [f for f in found if f[0] == want]
        rng = f"{self.label(lo)} to {self.label(hi)}"
        if not found:
            for eq in self.equations:
                if lo <= eq.internal <= hi and min(eq.back, eq.ahead) < labelled < max(
                    eq.back, eq.ahead
                ):
                    raise UsageError(
                        f"station {body.strip()} falls in the gap of the station equation "
                        f"back {self._fmt(eq.back)} = ahead {self._fmt(eq.ahead)}"
                    )
            raise UsageError(f"station {body.strip()} is not on the alignment ({rng})")
        if len(found) > 1:
            options = ", ".join(f"{body.strip()}@{r}" for r, _ in found)
            raise UsageError(
                f"station {body.strip()} occurs {len(found)} times because of a station "
                f"equation; write one of {options}"
            )
        return found[0][1]

    def round_stations(self, interval: float, lo: float, hi: float) -> NDArray[np.float64]:
        """Internal stations in [lo, hi] whose labels are multiples of ``interval``."""
        if not (interval > 0 and math.isfinite(interval)):
            raise UsageError(f"interval must be a positive number, got {interval:g}")
        if (hi - lo) / interval > 2_000_000:
            raise UsageError(
                f"interval {interval:g} gives {(hi - lo) / interval:,.0f} stations "
                "(at most 2,000,000); choose a larger interval"
            )
        starts, offsets = self._tables()
        ends = np.append(starts[1:], np.inf)
        out: list[NDArray[np.float64]] = []
        for k in range(len(starts)):
            a, b = max(starts[k], lo), min(ends[k], hi)
            if a > b:
                continue
            la, lb = a + offsets[k], b + offsets[k]
            first = math.ceil(la / interval - 1e-9)
            last = math.floor(lb / interval + 1e-9)
            labels = np.arange(first, last + 1, dtype=np.float64) * interval
            internal = labels - offsets[k]
            keep = (internal >= a - 1e-9) & (
                (internal < b) if k < len(starts) - 1 and b < hi else (internal <= b + 1e-9)
            )
            out.append(np.clip(internal[keep], lo, hi))
        return np.concatenate(out) if out else np.empty(0)
