"""The page in a real headless Chromium (Selenium + chromedriver): fill a design, watch the live
preview, download the packet, see an error beside its field.

The reference for the lengths is ``cutplan plan examples/porch-chimes.toml`` (its table and JSON)
through click's CliRunner.
"""

import json
import math
import re
import tempfile
import threading
import time
import zipfile

import pytest
from click.testing import CliRunner

from cutplan.cli import cli
from tests.web.browser import HEADLESS_FLAGS, find_browser, skip_or_fail
from tests.web.conftest import PORCH, ROOT

WAIT = 120
"""Longest wait for the page [s]: planning takes about a second, more on a busy machine."""


@pytest.fixture(scope="module")
def served():
    """(the page's Flask app, its address): the page under waitress in a thread of this process, so
    a test can reach its planner and the process's memo of 2-D solves serves it too."""
    from waitress import create_server

    from cutplan.web.app import create_app

    app = create_app()
    srv = create_server(app, host="127.0.0.1", port=0, threads=4)
    thread = threading.Thread(target=srv.run, daemon=True)
    thread.start()
    yield app, f"http://127.0.0.1:{srv.effective_port}"
    srv.close()
    thread.join(timeout=5)


@pytest.fixture(scope="module")
def server(served):
    return served[1]


@pytest.fixture(scope="module")
def porch_strike(tmp_path_factory):
    """A WAV of porch-1 ringing 1 % flat (about 17 cents), synthesized from its planned partials."""
    import dataclasses

    import cutplan
    from cutplan.audio.synth import RATE, piece_preview
    from cutplan.audio.wav import wav_bytes

    piece = cutplan.plan(cutplan.load_design(PORCH)).pieces[0]
    flat = dataclasses.replace(piece, partials_hz=tuple(f * 0.99 for f in piece.partials_hz))
    path = tmp_path_factory.mktemp("strike") / "porch-1.wav"
    path.write_bytes(wav_bytes(piece_preview(flat, seconds=4.0), RATE))
    return path, piece.partials_hz[0] * 0.99


@pytest.fixture(scope="module")
def chromium(server, porch_strike):
    """One headless Chromium for every test here (a start-up costs seconds): its microphone plays
    the synthesized strike (Chromium's fake capture device); a test that needs the page without
    JavaScript turns scripts off through the DevTools protocol (``_no_javascript``).  It depends on
    ``server`` so that it quits first and the server's keep-alive connections close with it."""
    binary, driver = find_browser()
    if binary is None:
        skip_or_fail(driver)
    from selenium import webdriver
    from selenium.webdriver.chrome.service import Service

    options = webdriver.ChromeOptions()
    for flag in (*HEADLESS_FLAGS, "--use-fake-device-for-media-stream", "--use-fake-ui-for-media-stream",
                 f"--use-file-for-fake-audio-capture={porch_strike[0]}", "--autoplay-policy=no-user-gesture-required"):
        options.add_argument(flag)
    profile = tempfile.TemporaryDirectory(prefix="cutplan-chromium-")
    options.add_argument(f"--user-data-dir={profile.name}")
    options.binary_location = binary
    d = webdriver.Chrome(service=Service(driver), options=options)
    yield d
    d.quit()
    profile.cleanup()


@pytest.fixture()
def browser(chromium):
    """The shared Chromium, on a blank page with its window, scripts and console log as a fresh one's."""
    chromium.get("about:blank")
    chromium.get_log("browser")  # what earlier tests logged is theirs, not this test's
    yield chromium
    chromium.execute_cdp_cmd("Emulation.setScriptExecutionDisabled", {"value": False})
    chromium.set_window_size(1400, 1000)
    chromium.get("about:blank")


def _no_javascript(d):
    """Turn the page's scripts off in this browser, as a visitor who blocks JavaScript has it
    (until the ``browser`` fixture turns them on again); WebDriver's own scripts still run."""
    d.execute_cdp_cmd("Emulation.setScriptExecutionDisabled", {"value": True})


def _wait(d, check, timeout=WAIT):
    from selenium.webdriver.support.ui import WebDriverWait

    return WebDriverWait(d, timeout, poll_frequency=0.1).until(lambda drv: check(drv))


def _set(d, name, value):
    from selenium.webdriver.common.by import By
    from selenium.webdriver.support.ui import Select

    el = d.find_element(By.ID, name)
    if el.tag_name == "select":
        Select(el).select_by_value(value)
    else:
        el.clear()
        el.send_keys(value)


def _rows(d):
    """[(label, note, cut length text)] of the preview's table, read in the browser."""
    return d.execute_script(
        "return Array.from(document.querySelectorAll('#preview tr[data-label]')).map(function (tr) {"
        " return [tr.dataset.label, tr.querySelector('.note').textContent, tr.querySelector('.cut').textContent]; });")


def _settled(d):
    return d.execute_script("return !document.getElementById('design').classList.contains('busy');")


def _cli_table():
    result = CliRunner().invoke(cli, ["plan", str(PORCH)])
    assert result.exit_code == 0
    rows = {}
    for line in result.output.splitlines():
        # "porch-1  D5  587.33  19-27/32 (503.9)  20-1/32 (508.6)  ..." under "length in (mm)  cut in (mm)"
        m = re.match(r"(porch-\d)\s+(\S+)\s+[\d.]+\s+\S+ \([\d.]+\)\s+(\S+) \(([\d.]+)\)", line)
        if m:
            rows[m.group(1)] = (m.group(2), m.group(3), float(m.group(4)))
    return rows


def test_fill_the_porch_design_and_see_the_command_lines_table(browser, server):
    d = browser
    d.get(server + "/")
    for name, value in [("title", "Porch chimes in D pentatonic"), ("units", "in"), ("set[1].name", "porch"),
                        ("set[1].kind", "chime"), ("set[1].scale", ""), ("set[1].root", ""), ("set[1].count", ""),
                        ("set[1].notes", "D5 E5 F#5 A5 B5"), ("set[1].material", "aluminum-6063-t5"),
                        ("set[1].section.stock", "al-1.000x0.065"), ("stock.lengths", "8 ft x 2"),
                        ("stock.kerf", "1/16 in"), ("stock.end_trim", "1/8 in"), ("stock.allowance", "risk 5 %")]:
        _set(d, name, value)
    expected = _cli_table()
    assert len(expected) == 5
    _wait(d, lambda drv: _settled(drv) and [r[0] for r in _rows(drv)] == sorted(expected))
    for label, note, cut in _rows(d):
        cli_note, cli_inches, cli_mm = expected[label]
        assert note == cli_note
        assert cut == f"{cli_inches} in ({cli_mm:.1f} mm)"  # same inches and mm as the terminal table
    cli_json = json.loads(CliRunner().invoke(cli, ["plan", str(PORCH), "--format", "json"]).stdout)
    web_mm = [float(re.search(r"\(([\d.]+) mm\)", cut).group(1)) for _, _, cut in _rows(d)]
    assert web_mm == [round(p["cut_length_mm"], 1) for p in cli_json["pieces"]]


def test_changing_the_root_updates_the_preview(browser, server):
    d = browser
    d.get(server + "/")  # the starter design: a major-pentatonic scale from G5
    first = _rows(d)[0]
    assert first[1] == "G5"
    _set(d, "set[1].root", "A5")
    _wait(d, lambda drv: _settled(drv) and _rows(drv) and _rows(drv)[0][1] == "A5")
    assert _rows(d)[0][2] != first[2]  # a higher root, a shorter first tube


def test_download_the_packet_zip(browser, server, tmp_path):
    from selenium.webdriver.common.by import By

    d = browser
    d.execute_cdp_cmd("Page.setDownloadBehavior", {"behavior": "allow", "downloadPath": str(tmp_path)})
    d.get(server + "/?example=porch-chimes")
    d.find_element(By.ID, "download-packet").click()
    target = tmp_path / "packet.zip"
    _wait(d, lambda drv: target.is_file() and not list(tmp_path.glob("*.crdownload")))
    time.sleep(0.2)
    with zipfile.ZipFile(target) as zf:
        names = set(zf.namelist())
    assert {"packet.pdf", "plan.csv", "plan.json", "cutlist.csv", "design.toml"} <= names
    assert any(re.fullmatch(r"templates/.+\.svg", n) for n in names)


def test_a_warning_appears_beside_the_field_of_its_key(browser, server):
    # a fixed 0.1 % allowance leaves a large chance of a sharp piece: the planner's warning is
    # keyed to stock.allowance, and the live preview puts it under that field and nowhere else
    from selenium.webdriver.common.by import By

    d = browser
    d.get(server + "/?example=porch-chimes")
    _set(d, "stock.allowance", "0.1 %")
    box = '.msgs[data-slot="stock.allowance"] .msg.warning'
    _wait(d, lambda drv: _settled(drv) and drv.find_elements(By.CSS_SELECTOR, box))
    assert "too short" in d.find_element(By.CSS_SELECTOR, box).text
    others = d.execute_script("return Array.from(document.querySelectorAll('.msgs .msg.warning'))"
                              ".map(function (m) { return m.closest('.msgs').dataset.slot; });")
    assert set(others) == {"stock.allowance"}


def test_an_error_appears_beside_its_field(browser, server):
    from selenium.webdriver.common.by import By

    d = browser
    d.get(server + "/?example=porch-chimes")
    _set(d, "stock.kerf", "1/16")  # no unit: the design rules ask for one
    box = '.msgs[data-slot="stock.kerf"] .msg.error'
    _wait(d, lambda drv: drv.find_elements(By.CSS_SELECTOR, box))
    text = d.find_element(By.CSS_SELECTOR, box).text
    assert text.startswith('Saw kerf: "1/16"')  # the field's label, not its key
    assert d.find_element(By.ID, "stock.kerf").get_attribute("aria-invalid") == "true"
    # the message sits right under the field, not in a list at the top
    field_box = d.find_element(By.ID, "stock.kerf").find_element(By.XPATH, "..")
    assert field_box.find_elements(By.CSS_SELECTOR, ".msg.error")
    assert "stale" in d.find_element(By.ID, "preview").get_attribute("class")


def test_trim_from_the_microphone(browser, server, porch_strike):
    from selenium.webdriver.common.by import By

    d = browser
    d.get(server + "/?example=porch-chimes")
    _set(d, "trim.piece", "porch-1")
    button = d.find_element(By.ID, "record-button")
    assert button.is_displayed()
    button.click()
    _wait(d, lambda drv: drv.find_elements(By.CSS_SELECTOR, "#trim-answer .trim-head")
          or "no microphone" in drv.find_element(By.ID, "record-state").text)
    head = d.find_element(By.CSS_SELECTOR, "#trim-answer .trim-head").text
    measured = float(re.search(r": ([\d.]+) Hz", head).group(1))
    # the synthesized strike is 1 % flat of porch-1's planned fundamental; allow 5 cents for
    # the browser's resampling and the 16-bit WAV made in the page
    assert abs(1200 * math.log2(measured / porch_strike[1])) < 5
    assert "flat by" in d.find_element(By.ID, "trim-answer").text


def test_play_buttons_fetch_the_sound_without_leaving_the_page(browser, server):
    from selenium.webdriver.common.by import By

    d = browser
    d.get(server + "/?example=porch-chimes")
    here = d.current_url
    d.find_element(By.CSS_SELECTOR, 'button[name="listen"][value="porch-1"]').click()
    d.find_element(By.CSS_SELECTOR, 'button[name="listen"][value="porch"]').click()
    fetched = "return performance.getEntriesByType('resource').filter(function (e) {" \
              " return /\\/listen$/.test(e.name) && e.responseStatus === 200; }).length;"
    _wait(d, lambda drv: drv.execute_script(fetched) >= 2)
    assert d.current_url == here and len(d.window_handles) == 1  # no new tab with JavaScript on
    errors = [e for e in d.get_log("browser") if e["level"] == "SEVERE" and "NotAllowedError" not in e["message"]]
    assert errors == []


def test_enter_in_a_field_keeps_every_set(browser, server):
    from selenium.webdriver.common.by import By
    from selenium.webdriver.common.keys import Keys

    d = browser
    d.get(server + "/?example=workshop-marimba")  # two sets: a remove button comes early in the form
    d.find_element(By.ID, "title").send_keys(" 2", Keys.ENTER)
    _wait(d, lambda drv: _settled(drv) and drv.find_element(By.CSS_SELECTOR, "#preview h2").text.endswith(" 2"))
    assert len(d.find_elements(By.CSS_SELECTOR, "fieldset.set")) == 2


def test_the_form_works_without_javascript(browser, server):
    from selenium.webdriver.common.by import By
    from selenium.webdriver.common.keys import Keys

    d = browser
    _no_javascript(d)
    d.get(server + "/?example=workshop-marimba")
    assert "js" not in d.find_element(By.TAG_NAME, "html").get_attribute("class").split()  # the page's script did not run
    field = d.find_element(By.ID, "set[1].range")
    field.clear()
    field.send_keys("D4..D5", Keys.ENTER)  # Enter submits through the Plan button, not "Remove this set"
    _wait(d, lambda drv: _rows(drv) and _rows(drv)[0][1] == "D4")
    assert len(d.find_elements(By.CSS_SELECTOR, "fieldset.set")) == 2
    kerf = d.find_element(By.ID, "stock.kerf")
    kerf.clear()
    kerf.send_keys("3")
    d.find_element(By.CSS_SELECTOR, 'button.primary[value="preview"]').click()
    box = '.msgs[data-slot="stock.kerf"] .msg.error'
    _wait(d, lambda drv: drv.find_elements(By.CSS_SELECTOR, box))
    assert d.find_element(By.CSS_SELECTOR, box).text.startswith('Saw kerf: "3"')  # the field's label


@pytest.mark.slow
def test_add_an_undercut_on_the_page_and_get_the_files_plan(browser, server, tmp_path, arched_pair_solves):
    """Uniform maple bars (workshop-marimba, its bar set and its resonators) get an arch entered on
    the page; the preview's cut lengths must equal `cutplan plan --format json` of the same file
    with the undercut line added.

    The bar set's range is cut to its first two notes in the same edit: two arched bars take the
    page's whole path (the undercut fields, the 2-D solves, the resonators under arched bars, the
    preview table) as the octave's eight do, at a quarter of the solves.  Those two bars are the
    web tests' arched pair (tests/web/conftest.py), whose 2-D solves are made once per run: the
    page's server (in this process) and the command line both find them remembered."""
    from selenium.webdriver.common.by import By

    arched_pair_solves()
    d = browser
    d.get(server + "/?example=workshop-marimba")
    uniform = _rows(d)
    assert d.find_element(By.ID, "set[1].undercut.ratios").is_displayed()
    assert not d.find_element(By.ID, "set[2].undercut.ratios").is_displayed()  # resonators have no arch
    # the fields are filled at once, then one input event: the page plans the arched set once,
    # not once for each partly typed value (each a fresh set of 2-D solves); typing itself is
    # covered by the other tests here
    d.execute_script(
        "var want = arguments[0];"
        "Object.keys(want).forEach(function (name) { document.getElementById(name).value = want[name]; });"
        "document.getElementById('set[1].undercut.ratios').dispatchEvent(new Event('input', {bubbles: true}));",
        {"set[1].range": "C4..D4", "set[1].undercut.ratios": "4", "set[1].undercut.arch_width": "0.5",
         "set[1].undercut.min_thickness": "6 mm"})
    _wait(d, lambda drv: _settled(drv) and _rows(drv) != uniform)
    text = (ROOT / "examples" / "workshop-marimba.toml").read_text(encoding="utf-8").replace(
        'section = { shape = "bar", width = "50 mm", thickness = "22 mm" }\n',
        'section = { shape = "bar", width = "50 mm", thickness = "22 mm" }\n'
        'undercut = { ratios = [4.0], arch_width = 0.5, min_thickness = "6 mm" }\n', 1).replace(
        'range = "C4..C5"', 'range = "C4..D4"', 1)
    assert "undercut = " in text and 'range = "C4..D4"' in text
    path = tmp_path / "arched.toml"
    path.write_text(text, encoding="utf-8")
    cli_json = json.loads(CliRunner().invoke(cli, ["plan", str(path), "--format", "json"]).stdout)
    expected = {p["label"]: p["cut_length_mm"] for p in cli_json["pieces"]}
    assert any("undercut" in p for p in cli_json["pieces"])
    assert sum(p["label"].startswith("bars-") for p in cli_json["pieces"]) == 2  # C4 and D4 of C major

    def same(drv):
        rows = {label: float(re.match(r"([\d.]+) mm", cut).group(1)) for label, _, cut in _rows(drv)}
        # the JSON carries 0.01 mm and the page shows 0.1 mm, so they agree to half the page's step
        return rows.keys() == expected.keys() and all(abs(rows[k] - expected[k]) <= 0.05 + 1e-9 for k in rows)

    _wait(d, lambda drv: _settled(drv) and same(drv))
    assert same(d)


def test_at_1280_px_the_tables_need_no_sideways_scrolling_and_labels_fit(browser, server, example_plan):
    """1280 px: a common laptop width (common practice). The marimba's bar table has the most columns."""
    # the session's plan of the example first (tests/conftest.py): the page's server runs in this
    # process, so it finds the arched bars' 2-D solves remembered instead of solving them again
    example_plan("music-room-marimba")
    d = browser
    d.set_window_size(1280, 1000)
    try:
        d.get(server + "/?example=music-room-marimba")
        _wait(d, lambda drv: _rows(drv))
        widths = d.execute_script(
            "return Array.from(document.querySelectorAll('#preview .table-wrap'))"
            ".map(function (e) { return [e.scrollWidth, e.clientWidth]; });")
        assert widths and all(scroll <= client for scroll, client in widths), widths
        # every option of every select is as wide as its box at most (no "(default: shear-correc")
        cut = d.execute_script(
            "var c = document.createElement('canvas').getContext('2d'); var out = [];"
            "document.querySelectorAll('form select').forEach(function (s) {"
            " if (!s.offsetParent) { return; } var st = getComputedStyle(s); c.font = st.font;"
            " var room = s.clientWidth - parseFloat(st.paddingLeft) - parseFloat(st.paddingRight) - 16;"
            " Array.from(s.options).forEach(function (o) {"
            "  if (c.measureText(o.text).width > room) { out.push(s.id + ': ' + o.text); } }); });"
            "return out;")
        assert cut == []
    finally:
        d.set_window_size(1400, 1000)


ARCHED = {"title": "garden bars", "set[1].name": "garden", "set[1].kind": "bar", "set[1].notes": "C4 D4",
          "set[1].material": "maple-sugar", "set[1].section.shape": "bar", "set[1].section.width": "50 mm",
          "set[1].section.thickness": "22 mm", "set[1].undercut.ratios": "4", "set[1].undercut.arch_width": "0.5",
          "set[1].undercut.min_thickness": "6 mm", "stock.lengths": "2.4 m"}
"""The web tests' arched pair (tests/web/conftest.py): two undercut bars, so a plan under way has
a count short of the whole to show."""


def test_a_long_plan_shows_how_far_it_has_got(browser, served, monkeypatch, arched_pair_solves):
    """The oracle for the count is the design itself: two notes, each an undercut bar to solve.

    The server's planner is held after the first bar until the page has shown how far it has got,
    so the page is seen reporting a plan under way however fast the bars are planned (their 2-D
    solves are remembered from the run's arched pair); then it finishes and the report goes."""
    app, server = served
    arched_pair_solves()
    release = threading.Event()
    real = app.planner.compute

    def held(data, lib=None, progress=None):
        def report(done, total):
            progress(done, total)
            if done == 1:
                assert release.wait(WAIT)
        return real(data, lib, None if progress is None else report)

    monkeypatch.setattr(app.planner, "compute", held)
    d = browser
    d.get(server + "/")
    _wait(d, _settled)
    d.execute_script(
        "var want = arguments[0], form = document.getElementById('design');"
        "window.cutplanSeen = [];"
        "var box = document.getElementById('progress');"
        "new MutationObserver(function () { if (!box.hidden) { window.cutplanSeen.push(box.textContent); } })"
        "  .observe(box, {childList: true, characterData: true, subtree: true, attributes: true});"
        "form.querySelectorAll('input[type=text], select').forEach(function (el) {"
        "  if (/^set\\[1\\]\\./.test(el.name) || el.name in want) { el.value = want[el.name] || ''; } });"
        "var kind = document.getElementById('set[1].kind');"
        "kind.dispatchEvent(new Event('change', {bubbles: true}));"
        "document.getElementById('title').dispatchEvent(new Event('input', {bubbles: true}));", ARCHED)
    try:
        _wait(d, lambda drv: drv.execute_script("return window.cutplanSeen.length > 0;"))
    finally:
        release.set()
    _wait(d, lambda drv: _settled(drv) and len(_rows(drv)) == 2 and _rows(drv)[0][0] == "garden-1")
    seen = d.execute_script("return window.cutplanSeen;")
    counts = [re.fullmatch(r"planning: (\d) of 2 arched bars solved", text) for text in seen]
    assert seen and all(counts), seen
    assert d.execute_script("return document.getElementById('progress').hidden;")  # gone once the preview is in
