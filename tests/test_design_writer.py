"""The one writer of design files (the page's saved design, ``from-stock -o``): what it writes
reads back equal with Python's own TOML reader (``tomllib``, the TOML 1.0 specification)."""

import tomllib
from pathlib import Path

import pytest

from cutplan.design.writer import design_toml

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_every_example_reads_back_equal(path):
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    text = design_toml(data, header=("written back",))
    assert text.startswith("# written back\n")
    assert tomllib.loads(text) == data


def test_awkward_strings_keys_and_numbers_read_back_equal():
    data = {"title": 'Porch "bells"\\ with a tab\tand a line\nbreak, é', "units": "in",
            "tuning": {"a4": 440.0, "temperament": "equal"},
            "odd key": [1, 2.5, -0.0, 1e-300, True],
            "set": [{"name": "bars", "kind": "bar", "notes": ["C5", "D5"], "section": {"bar": "38 mm x 19 mm"},
                     "undercut": {"ratios": [4.0, 10.0], "arch_width": 0.5}, "stock": {}},
                    {"name": "tubes", "kind": "chime", "count": 3}],
            "stock": {"lengths": [{"length": "8 ft", "count": 2, "price": 12.5}], "kerf": "1/8 in"}}
    assert tomllib.loads(design_toml(data)) == data


def test_keys_come_out_in_the_contracts_order_whatever_order_they_arrived_in():
    a = {"set": [{"notes": ["C5"], "kind": "bar", "name": "b"}], "title": "t",
         "tuning": {"temperament": "equal", "a4": 440}}
    b = {"tuning": {"a4": 440, "temperament": "equal"}, "title": "t",
         "set": [{"name": "b", "kind": "bar", "notes": ["C5"]}]}
    assert design_toml(a) == design_toml(b)
    assert design_toml(a).splitlines()[:3] == ['title = "t"', "", "[tuning]"]
