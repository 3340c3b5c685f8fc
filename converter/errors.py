"""Exceptions of gradeline.

Every problem with a user's input is a :class:`GradelineError` that knows where it
came from (file, line, element), so the CLI can print one line and exit 2.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from gradeline.model import SourceRef

__all__ = ["GradelineError", "InputError", "ModelError", "UsageError"]


class GradelineError(Exception):
    """Base class of every error gradeline raises on purpose.

    Parameters
    ----------
    message : str
        What is wrong and, where it helps, what to do about it.
    source : SourceRef, optional
        File and line the problem was found at.
    element : str, optional
        The XML element (or other named thing) at fault.
    choice : str, optional
        What the caller can choose to get past the error (``alignment``,
        ``profile``, ``surface``, ``mapping``, ``window``); the command line
        turns it into the option to give. Library messages never name options.
    """

    def __init__(
        self,
        message: str,
        source: SourceRef | None = None,
        element: str | None = None,
        *,
        choice: str | None = None,
    ) -> None:
        super().__init__(message)
        self.message = message
        self.source = source
        self.element = element
        self.choice = choice

    def __str__(self) -> str:
        parts = []
        if self.source is not None:
            where = self.source.path or "<input>"
            if self.source.line is not None:
                where += f":{self.source.line}"
            parts.append(where)
        if self.element:
            parts.append(self.element)
        parts.append(self.message)
        return ": ".join(parts)

    def located(self, source: SourceRef | None, element: str | None = None) -> GradelineError:
        """Return the same error with a location filled in where it had none."""
        err = type(self)(
            self.message,
            self.source if self.source is not None else source,
            self.element if self.element else element,
            choice=self.choice,
        )
        return err


class InputError(GradelineError):
    """The input file cannot be read or does not describe valid geometry."""


class ModelError(GradelineError, ValueError):
    """A model object was built with values that break its invariants."""


class UsageError(GradelineError):
    """A command-line value (station, option) is not usable."""
