"""Shared fixtures for the web tests: the Flask test client and the example designs."""

import tomllib
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))
PORCH = ROOT / "examples" / "porch-chimes.toml"


def example_mapping(path):
    """The design file's keys, as a client would send them to the JSON API."""
    return tomllib.loads(Path(path).read_text(encoding="utf-8"))


@pytest.fixture(scope="session")
def app():
    from cutplan.web.app import create_app

    return create_app()


@pytest.fixture()
def client(app):
    return app.test_client()

