"""Runs of consecutive True values in a boolean array (shared by several modules)."""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

__all__ = ["true_runs"]


def true_runs(mask: ArrayLike) -> list[tuple[int, int]]:
    """(first, last) index of every run of consecutive True values.

    Examples
    --------
    >>> true_runs([False, True, True, False, True])
    [(1, 2), (4, 4)]
    """
    m = np.asarray(mask, dtype=bool).astype(np.int8)
    edges = np.diff(np.concatenate([[0], m, [0]]))
    starts = np.flatnonzero(edges == 1)
    ends = np.flatnonzero(edges == -1) - 1
    return list(zip(starts.tolist(), ends.tolist(), strict=True))
