"""The optional TOML configuration file (read with the standard library's tomllib)."""

from __future__ import annotations

import tomllib
from typing import Any

from gradeline.errors import InputError
from gradeline.model import SourceRef

__all__ = ["read_config"]


def read_config(path: str) -> dict[str, Any]:
    """Read a gradeline TOML configuration file.

    Raises
    ------
    InputError
        The file cannot be read or is not valid TOML.
    """
    try:
        with open(path, "rb") as fh:
            return tomllib.load(fh)
    except OSError as err:
        raise InputError(
            f"cannot read the file ({err.strerror})", SourceRef(path), "config"
        ) from None
    except tomllib.TOMLDecodeError as err:
        line = getattr(err, "lineno", None)
        msg = str(err).split(" (at line")[0]
        raise InputError(f"not valid TOML: {msg}", SourceRef(path, line), "config") from None
