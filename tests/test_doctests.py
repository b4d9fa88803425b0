"""The examples in the solver's docstrings run, and show what the code gives.

Each correlation's docstring shows a call next to a published or closed-form value (the source is
named in the docstring text); running them here puts them in CI, which runs only ``pytest``.
"""

from __future__ import annotations

import doctest
import importlib
import inspect
import pkgutil

import pytest

import solver
from solver import correlations

SOLVER_MODULES = sorted(m.name for m in pkgutil.iter_modules(solver.__path__, "solver."))


@pytest.mark.parametrize("name", SOLVER_MODULES)
def test_docstring_examples_pass(name):
    module = importlib.import_module(name)
    result = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE, verbose=False)
    assert result.failed == 0, f"{result.failed} of {result.attempted} docstring examples in {name} failed"


def test_every_public_correlation_has_an_example():
    """A correlation added without a runnable example would not be checked against its source."""
    finder = doctest.DocTestFinder(recurse=False)
    missing = []
    for name in correlations.__all__:
        obj = getattr(correlations, name)
        if not inspect.isfunction(obj):
            continue
        tests = finder.find(obj, name, globs=vars(correlations))
        if not any(t.examples for t in tests):
            missing.append(name)
    assert not missing, f"public correlations without a docstring example: {missing}"
