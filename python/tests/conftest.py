"""Shared fixtures of the strewn Python tests (run by ctest as `python_module`).

ctest sets PYTHONPATH to the build tree's package, STREWN_PLUGIN_PATH to its plugins, STREWN_CLI
to the built `strewn` program and STREWN_SOURCE_DIR to the repository. Run by hand:
    PYTHONPATH=build/python STREWN_PLUGIN_PATH=build/lib/strewn/plugins STREWN_CLI=build/bin/strewn \\
        /usr/bin/python3 -m pytest python/tests
"""
import json
import os
import subprocess
from pathlib import Path

import pytest


def _required_env(name: str) -> str:
    value = os.environ.get(name)
    if not value:
        pytest.fail(f"{name} is not set (ctest sets it; see python/tests/conftest.py)")
    return value


@pytest.fixture(scope="session")
def source_dir() -> Path:
    env = os.environ.get("STREWN_SOURCE_DIR")
    return Path(env) if env else Path(__file__).resolve().parents[2]


@pytest.fixture(scope="session")
def cli():
    """Runs the built `strewn` program; returns (exit status, stdout, stderr)."""
    exe = _required_env("STREWN_CLI")

    def run(*args: str):
        done = subprocess.run([exe, *map(str, args)], capture_output=True, text=True, timeout=300)
        return done.returncode, done.stdout, done.stderr
    return run


@pytest.fixture(scope="session")
def cli_json(cli):
    def run(*args: str):
        status, out, err = cli(*args, "--format", "json")
        # 3: computed, and some limit is exceeded (README, "Exit status").
        assert status in (0, 3), f"strewn {' '.join(map(str, args))} failed ({status}): {err}"
        return json.loads(out)
    return run
