"""Run every docstring example of the installed package (STYLE.md section 4).

Modules are imported under their installed names (``gradeline.*``), so the
examples see the same objects as the library's users.
"""

from __future__ import annotations

import doctest
import importlib
import pkgutil

import pytest

import gradeline

MODULES = sorted(
    m.name
    for m in pkgutil.walk_packages(gradeline.__path__, "gradeline.")
    if not m.name.endswith("__main__")
)


@pytest.mark.parametrize("name", MODULES)
def test_doctests(name: str) -> None:
    module = importlib.import_module(name)
    result = doctest.testmod(module, optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    assert result.failed == 0, f"{result.failed} doctest examples of {name} failed"


def test_doctests_are_collected() -> None:
    """The runner finds the examples: a silent zero would hide every failure."""
    total = 0
    for name in MODULES:
        finder = doctest.DocTestFinder()
        total += sum(len(t.examples) for t in finder.find(importlib.import_module(name)))
    assert total >= 40
