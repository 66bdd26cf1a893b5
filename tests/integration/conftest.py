"""Shared set-up for the integration tests: dimcheck run as users and CI run it."""

import subprocess
import sys

import pytest


def pytest_configure(config):
    config.addinivalue_line("markers", "slow: takes a minute or more; still part of the default run")


def run_dimcheck(*args, cwd, timeout=120):
    return subprocess.run([sys.executable, "-m", "dimcheck", *args], cwd=cwd,
                          capture_output=True, text=True, timeout=timeout)


@pytest.fixture
def dimcheck():
    return run_dimcheck
