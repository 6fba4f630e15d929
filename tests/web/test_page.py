"""The page without JavaScript (plain form posts), opening and saving designs, listening, trim.

References: the example design files themselves (a design opened into the form must plan to
the same pieces), and the ``trim`` command through click's CliRunner for the bench answers.
"""

import dataclasses
import html as html_lib
import io
import re
import tomllib
import xml.etree.ElementTree as ET

import pytest
from click.testing import CliRunner

from cutplan.cli import cli
from cutplan.web.form import form_from_mapping, mapping_from_form
from tests.web.conftest import EXAMPLES, PORCH, example_mapping


def _porch_fields():
    return form_from_mapping(example_mapping(PORCH))


def _slot(html, slot):
    """Text of the message box beside one field."""
    m = re.search(r'<div class="msgs" data-slot="' + re.escape(slot) + r'">(.*?)</div>', html, re.S)
    return html_lib.unescape(m.group(1)) if m else None


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_every_example_survives_the_form_unchanged(path):
    data = example_mapping(path)
    assert mapping_from_form(form_from_mapping(data)) == data


def test_plain_post_renders_the_plan(client):
    resp = client.post("/", data=_porch_fields())
    html = resp.get_data(as_text=True)
    assert resp.status_code == 200
    # porch-1 cut length from the example's plan: `cutplan plan examples/porch-chimes.toml` -> 508.6 mm
    assert re.search(r'data-label="porch-1">.*?508\.6 mm', html, re.S)
    assert html.count('<tr data-label="porch-') == 5
    assert "<svg" in html and 'class="chart"' in html


def test_plain_post_puts_the_error_beside_its_field(client):
    fields = _porch_fields()
    fields["stock.kerf"] = "1/16"
    fields["set[1].notes"] = "D5 H5"
    html = client.post("/", data=fields).get_data(as_text=True)
    assert 'Saw kerf: "1/16"' in _slot(html, "stock.kerf")  # the label the page shows, not the key
    assert '"H5"' in _slot(html, "set[1].notes")
    assert _slot(html, "title") == ""
    assert 'id="stock.kerf" name="stock.kerf" value="1/16"' in html  # what was typed stays in the field


def test_a_warning_sits_beside_the_field_it_concerns(client):
    # a fixed allowance of 0.1 % is far below the material spread the planner assumes, so the
    # planner warns about a sharp piece: the warning belongs beside the allowance field
    fields = {**_porch_fields(), "stock.allowance": "0.1 %"}
    res = client.post("/preview", data=fields).get_json()
    assert res["ok"] and list(res["warnings"]) == ["stock.allowance"]
    lines = res["warnings"]["stock.allowance"]
    assert all("too short" in line for line in lines)
    assert len(lines) < 5  # pieces with the same warning share a line
    assert all(f"porch-{i}" in " ".join(lines) for i in range(1, 6))
    html = client.post("/", data=fields).get_data(as_text=True)
    assert "too short" in _slot(html, "stock.allowance") and "too short" not in _slot(html, "set[1].notes")


def test_errors_about_a_whole_set_sit_beside_the_fields_they_concern(client):
    both = {**_porch_fields(), "set[1].scale": "major", "set[1].root": "D5", "set[1].count": "5"}
    res = client.post("/preview", data=both).get_json()
    assert list(res["errors"]) == ["set[1].pitch"]  # notes and a scale at once: beside the pitches
    short = {**_porch_fields(), "stock.lengths": "1 ft x 4"}  # every porch tube is longer than 1 ft
    res = client.post("/preview", data=short).get_json()
    assert list(res["errors"]) == ["stock.lengths"]


def test_add_and_remove_a_set_without_javascript(client):
    fields = _porch_fields()
    html = client.post("/", data={**fields, "action": "add-set"}).get_data(as_text=True)
    assert 'name="sets" value="2"' in html and 'data-set="2"' in html
    two = {**fields, "sets": "2", "set[2].name": "low", "set[2].kind": "chime", "set[2].notes": "D4",
           "set[2].material": "aluminum-6063-t5", "set[2].section.stock": "al-1.000x0.065"}
    html = client.post("/", data={**two, "action": "remove-set-1"}).get_data(as_text=True)
    assert 'name="sets" value="1"' in html and 'value="low"' in html and 'value="porch"' not in html


def test_open_a_design_file_into_the_form(client):
    raw = PORCH.read_bytes()
    resp = client.post("/", data={"action": "open", "design_file": (io.BytesIO(raw), "porch.toml")},
                       content_type="multipart/form-data")
    html = resp.get_data(as_text=True)
    assert resp.status_code == 200
    assert 'value="D5 E5 F#5 A5 B5"' in html and 'value="8 ft x 2"' in html
    bad = client.post("/", data={"action": "open", "design_file": (io.BytesIO(b"title = "), "x.toml")},
                      content_type="multipart/form-data")
    assert bad.status_code == 422 and "not valid TOML" in _slot(bad.get_data(as_text=True), "open")


def test_save_the_design_as_toml(client):
    resp = client.post("/design.toml", data=_porch_fields())
    assert resp.headers["Content-Disposition"].startswith("attachment")
    assert tomllib.loads(resp.get_data(as_text=True)) == example_mapping(PORCH)


def test_print_and_download_from_the_form(client):
    pdf = client.post("/packet.pdf", data=_porch_fields())
    assert pdf.mimetype == "application/pdf" and pdf.data.startswith(b"%PDF")
    zipped = client.post("/packet.zip", data=_porch_fields())
    assert zipped.mimetype == "application/zip" and zipped.data.startswith(b"PK")
    assert client.post("/api/packet", json=example_mapping(PORCH)).data == zipped.data


def test_listen_to_a_piece_and_a_set(client):
    for label in ("porch-1", "porch"):
        resp = client.post("/listen", data={**_porch_fields(), "listen": label})
        assert resp.mimetype == "audio/wav" and resp.data[:4] == b"RIFF" and resp.data[8:12] == b"WAVE"
    resp = client.post("/listen", data={**_porch_fields(), "listen": "porch-9"}, headers={"Accept": "application/json"})
    assert resp.status_code == 422 and resp.get_json()["errors"][0]["key"] == "listen"


def test_preview_json_for_the_live_page(client):
    res = client.post("/preview", data=_porch_fields()).get_json()
    assert res["ok"] and res["labels"] == [f"porch-{i}" for i in range(1, 6)]
    bad = client.post("/preview", data={**_porch_fields(), "tuning.a4": "520"}).get_json()
    assert not bad["ok"] and list(bad["errors"]) == ["tuning.a4"]


def test_chart_and_templates_are_well_formed_svg(client):
    html = client.post("/", data=_porch_fields()).get_data(as_text=True)
    svgs = re.findall(r"<svg.*?</svg>", html, re.S)
    assert len(svgs) >= 1 + 5  # the chart, then a template per piece (plus plate and wrap guide)
    for s in svgs:
        ET.fromstring(s)


def _cli_trim(*args):
    result = CliRunner().invoke(cli, ["trim", str(PORCH), "porch-1", *args])
    assert result.exit_code == 0, result.output
    return result.output


def _action_line(lines):
    return next(line.strip() for line in lines if re.match(r"\s*(flat|sharp|in tune)", line))


def _advice(lines):
    """The trim command's lines without indentation, wrapped lines joined again (the page adds its
    measurement line first and does not wrap)."""
    out = []
    for line in lines:
        if line.startswith("    ") and out:
            out[-1] += " " + line.strip()
        elif line.strip():
            out.append(line.strip())
    return out


def test_trim_from_a_tuner_reading_matches_the_trim_command(client):
    res = client.post("/api/trim", data={**_porch_fields(), "trim.piece": "porch-1", "trim.measured": "583.1"})
    answer = res.get_json()["trim"]
    assert answer["lines"][1:] == _advice(_cli_trim("--measured", "583.1").splitlines())
    page = client.post("/", data={**_porch_fields(), "action": "trim", "trim.piece": "porch-1",
                                  "trim.measured": "583.1"}).get_data(as_text=True)
    assert _action_line(answer["lines"]) in page


def test_trim_from_a_recording_matches_the_trim_command(client, tmp_path):
    import cutplan
    from cutplan.audio.synth import RATE, piece_preview
    from cutplan.audio.wav import wav_bytes

    piece = cutplan.plan(cutplan.load_design(PORCH)).pieces[0]
    flat = dataclasses.replace(piece, partials_hz=tuple(f * 0.99 for f in piece.partials_hz))  # ~17 cents flat
    wav = wav_bytes(piece_preview(flat), RATE)
    (tmp_path / "porch-1.wav").write_bytes(wav)
    res = client.post("/api/trim", data={**_porch_fields(), "trim.piece": "porch-1",
                                         "trim.recording": (io.BytesIO(wav), "take 1.wav")},
                      content_type="multipart/form-data").get_json()
    assert res["ok"]
    assert res["trim"]["measured_hz"] == pytest.approx(piece.partials_hz[0] * 0.99, rel=6e-4)  # within 1 cent
    cli_lines = _cli_trim("--recording", str(tmp_path / "porch-1.wav")).splitlines()
    assert res["trim"]["lines"][1:] == _advice(cli_lines)


def test_trim_errors_name_the_field(client):
    res = client.post("/api/trim", data={**_porch_fields(), "trim.piece": "porch-1", "trim.measured": "abc"})
    assert res.status_code == 422 and "trim.measured" in res.get_json()["errors"]
    res = client.post("/api/trim", data={**_porch_fields(), "trim.piece": "porch-1",
                                         "trim.recording": (io.BytesIO(b"not a wav"), "x.wav")},
                      content_type="multipart/form-data")
    assert res.status_code == 422 and "trim.recording" in res.get_json()["errors"]


def test_every_asset_is_served_from_the_package(client):
    html = client.get("/").get_data(as_text=True)
    refs = re.findall(r'(?:src|href)="([^"]+)"', html)
    assert refs and all(r.startswith("/") for r in refs), refs  # no other host, no CDN
    for ref in (r for r in refs if r.startswith("/static/")):
        with client.get(ref) as resp:
            assert resp.status_code == 200
    assert "default-src 'self'" in client.get("/").headers["Content-Security-Policy"]


def test_examples_are_chosen_from_the_list_never_a_path(client):
    assert 'value="porch"' in client.get("/?example=porch-chimes").get_data(as_text=True)
    starter = client.get("/").get_data(as_text=True)
    assert client.get("/?example=../../etc/passwd").get_data(as_text=True) == starter
