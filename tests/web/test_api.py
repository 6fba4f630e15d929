"""The JSON API against the command line: the same design gives the same plan and the same files.

The reference for every check here is ``cutplan plan`` run through click's CliRunner on the
example design files (the command-line contract in DEVELOPERS.md), not the web code itself.
"""

import io
import json
import tomllib
import zipfile

import pytest

from cutplan.folder import MANIFEST
from tests.web.conftest import EXAMPLES, PORCH, example_mapping


@pytest.fixture(scope="module", params=EXAMPLES, ids=lambda p: p.stem)
def example(request, example_json, example_packet):
    """(design mapping, CLI plan JSON, CLI output folder) for one example: what ``cutplan plan
    EXAMPLE --format json`` printed and the folder ``cutplan plan EXAMPLE -o FOLDER`` wrote, each
    run once per test run and shared with the other tests that read them (tests/conftest.py).
    The planning there leaves the example's 2-D solves remembered in this process, so the API
    below finds them instead of solving the arched bars again; it still plans the design itself."""
    name = request.param.stem
    return example_mapping(request.param), example_json(name), example_packet(name)[1]


def test_api_plan_matches_the_command_line(client, example):
    data, cli_plan, _out = example
    resp = client.post("/api/plan", json=data)
    assert resp.status_code == 200
    web = resp.get_json()
    assert [p["label"] for p in web["pieces"]] == [p["label"] for p in cli_plan["pieces"]]
    assert [p["cut_length_mm"] for p in web["pieces"]] == [p["cut_length_mm"] for p in cli_plan["pieces"]]
    assert web == cli_plan  # the whole contract, not only the lengths


def test_api_packet_has_the_command_lines_bytes(client, example):
    data, _plan, out = example
    resp = client.post("/api/packet", json=data)
    assert resp.status_code == 200 and resp.mimetype == "application/zip"
    with zipfile.ZipFile(io.BytesIO(resp.data)) as zf:
        names = set(zf.namelist())
        # every file the command line wrote, less its folder bookkeeping (the list of files it wrote)
        cli_files = {str(p.relative_to(out)) for p in out.rglob("*") if p.is_file()} - {MANIFEST}
        assert names == cli_files | {"design.toml"}
        for name in cli_files:  # packet.pdf byte-identical, and every other file too
            assert zf.read(name) == (out / name).read_bytes(), name
        assert tomllib.loads(zf.read("design.toml").decode("utf-8")) == data


def test_same_design_gives_the_same_zip_bytes(client):
    data = example_mapping(PORCH)
    assert client.post("/api/packet", json=data).data == client.post("/api/packet", json=data).data


def _errors(client, data):
    resp = client.post("/api/plan", json=data)
    assert resp.status_code == 422
    return resp.get_json()["errors"]


@pytest.mark.parametrize(("path", "value", "key"), [
    (("set", 0, "notes"), ["D5", "H5"], "set[1].notes"),
    (("stock", "kerf"), "1/16", "stock.kerf"),            # a bare number: the unit is required
    (("set", 0, "section", "stock"), "al-9x9", "set[1].section.stock"),
    (("tuning", "a4"), 520, "tuning.a4"),                  # outside 400..480 Hz
    (("set", 0, "kind"), "gong", "set[1].kind"),
])
def test_errors_name_the_key(client, path, value, key):
    data = example_mapping(PORCH)
    target = data
    for k in path[:-1]:
        target = target[k]
    target[path[-1]] = value
    errors = _errors(client, data)
    assert key in [e["key"] for e in errors]
    assert all(e["message"].startswith(e["key"] + ":") for e in errors)


def test_unknown_key_and_non_json_are_refused(client):
    data = example_mapping(PORCH)
    data["colour"] = "red"
    assert [e["key"] for e in _errors(client, data)] == ["colour"]
    resp = client.post("/api/plan", data="title = 'x'", content_type="application/toml")
    assert resp.status_code == 422 and resp.get_json()["errors"][0]["key"] == "(design)"
    assert _errors(client, ["not", "a", "table"])[0]["key"] == "(design)"


def test_material_folders_are_never_taken_from_a_request(client, tmp_path):
    data = example_mapping(PORCH)
    data["material_dirs"] = [str(tmp_path)]
    assert [e["key"] for e in _errors(client, data)] == ["material_dirs"]
    resp = client.post("/api/packet", json=data)
    assert resp.status_code == 422


def test_stock_that_cannot_hold_the_pieces_is_a_stock_error(client):
    data = example_mapping(PORCH)
    data["stock"]["lengths"] = [{"length": "2 ft", "count": 1}]  # each piece fits, not all five
    assert "stock" in [e["key"] for e in _errors(client, data)]


def test_request_size_limits(client):
    big = {"title": "x" * 1_100_000}
    resp = client.post("/api/plan", data=json.dumps(big), content_type="application/json")
    assert resp.status_code == 413
    assert resp.get_json()["errors"][0]["key"] == "(request)"
    resp = client.post("/preview", data={"title": "x" * 1_100_000})
    assert resp.status_code == 413
    body = (b'--b\r\nContent-Disposition: form-data; name="design_file"; filename="big.toml"\r\n\r\n'
            + b"#" * (17 * 2**20) + b"\r\n--b--\r\n")  # over the 16 MB limit for uploads
    resp = client.post("/", data=body, content_type="multipart/form-data; boundary=b")
    assert resp.status_code == 413


def test_only_loopback_host_names_are_served(client):
    assert client.get("/", headers={"Host": "127.0.0.1:8750"}).status_code == 200
    assert client.get("/", headers={"Host": "attacker.example"}).status_code == 400
