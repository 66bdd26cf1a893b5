"""Shared test set-up: a private unit-table cache so tests never touch the user's."""

import os

import pytest


@pytest.fixture(autouse=True, scope="session")
def _private_cache(tmp_path_factory):
    if "DIMCHECK_CACHE_DIR" not in os.environ:
        os.environ["DIMCHECK_CACHE_DIR"] = str(tmp_path_factory.mktemp("dimcheck-cache"))
    yield
