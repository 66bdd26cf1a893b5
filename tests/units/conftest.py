"""Fixtures for the unit tests: a private cache directory, the table, and pint for reference."""

from __future__ import annotations

import logging
import os

import pytest


@pytest.fixture(autouse=True, scope="session")
def _private_unit_cache(tmp_path_factory):
    # Keep the tests' unit tables out of the user's ~/.cache.
    previous = os.environ.get("DIMCHECK_CACHE_DIR")
    os.environ["DIMCHECK_CACHE_DIR"] = str(tmp_path_factory.mktemp("units-cache"))
    yield
    if previous is None:
        os.environ.pop("DIMCHECK_CACHE_DIR", None)
    else:
        os.environ["DIMCHECK_CACHE_DIR"] = previous


@pytest.fixture(scope="session")
def table(_private_unit_cache):
    from dimcheck.units import load_unit_table

    return load_unit_table()


@pytest.fixture(scope="session")
def ureg():
    """pint, our reference library; its warnings about ambiguous names are noise here."""
    import pint

    logging.getLogger("pint").setLevel(logging.ERROR)
    return pint.UnitRegistry()
