"""Every docstring example of the library runs and gives what it shows.

The examples are found by walking the package (every module outside the editor, which needs a
window), not from a hand-kept list; each module is one test. Expected values are the outputs
written in the docstrings, each of which says where it comes from.
"""

from __future__ import annotations

import doctest
import importlib
import pkgutil

import pytest

import outlinebench

MODULES = sorted(
    m.name
    for m in pkgutil.walk_packages(outlinebench.__path__, "outlinebench.")
    if not m.name.startswith("outlinebench.app")
)


@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples(name):
    module = importlib.import_module(name)
    finder = doctest.DocTestFinder()
    runner = doctest.DocTestRunner(optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    for test in finder.find(module, name, globs=vars(module).copy()):
        runner.run(test)
    result = runner.summarize(verbose=False)
    assert result.failed == 0, f"{result.failed} docstring example(s) of {name} failed"


def test_the_front_door_examples_are_found():
    # the README's three lines live in outlinebench.api's docstring
    assert "outlinebench.api" in MODULES
    tests = doctest.DocTestFinder().find(importlib.import_module("outlinebench.api"))
    assert sum(len(t.examples) for t in tests) >= 10
