"""The page reads the server's material folders once, at start-up, and again only when asked
("Re-read the material tables"): the answer names a broken file, the tables read before keep
serving, a post from another site is refused, and a plan already under way is not disturbed.

The oracle for the moduli is the table text written here (the modulus read back is the one
written); the origin rule's oracle is the Fetch standard (WHATWG, "Fetch", the `Origin` and
`Sec-Fetch-Site` request headers).
"""

from __future__ import annotations

import threading

import pytest

from cutplan.planning import service
from cutplan.web.app import create_app
from cutplan.web.service import Planner
from tests.web.conftest import PORCH, example_mapping

GOOD = '[garden-steel]\ndescription = "garden steel"\nmodulus = "200 GPa"\ndensity = "7850 kg/m3"\n'
CHANGED = GOOD.replace("200 GPa", "190 GPa")
BROKEN = '[garden-steel]\nmodulus = "200 parsecs"\ndensity = "7850 kg/m3"\n'


def _design(material="garden-steel"):
    data = example_mapping(PORCH)
    data["set"][0]["material"] = material
    return data


def _reload(client, headers=None):
    """Press "Re-read the material tables" on the porch design's form."""
    from cutplan.web import form as webform

    fields = webform.form_from_mapping(example_mapping(PORCH))
    return client.post("/", data={**fields, "action": "reload-materials"}, headers=headers or {})


def test_reload_reads_the_folder_again_and_offers_the_new_table(tmp_path):
    (tmp_path / "garden.toml").write_text(GOOD, encoding="utf-8")
    app = create_app(materials_dirs=[tmp_path])
    client = app.test_client()
    assert app.planner.library.materials["garden-steel"].modulus == 200e9
    (tmp_path / "garden.toml").write_text(CHANGED, encoding="utf-8")
    (tmp_path / "more.toml").write_text(GOOD.replace("garden-steel", "porch-steel"), encoding="utf-8")
    # until asked, the page keeps the tables it read at start-up
    assert app.planner.library.materials["garden-steel"].modulus == 200e9
    resp = _reload(client)
    html = resp.get_data(as_text=True)
    assert resp.status_code == 200, html[:400]
    assert "material tables re-read" in html
    assert '<option value="porch-steel">' in html  # the form offers the new table at once
    assert app.planner.library.materials["garden-steel"].modulus == 190e9


def test_a_broken_table_is_named_and_the_old_tables_keep_serving(tmp_path):
    (tmp_path / "garden.toml").write_text(GOOD, encoding="utf-8")
    app = create_app(materials_dirs=[tmp_path])
    client = app.test_client()
    before = client.post("/api/plan", json=_design()).get_json()
    (tmp_path / "garden.toml").write_text(BROKEN, encoding="utf-8")
    resp = _reload(client)
    html = resp.get_data(as_text=True)
    assert resp.status_code == 422
    assert "garden.toml" in html and "garden-steel.modulus.value" in html
    assert "\\x0a" not in html and "Traceback" not in html
    after = client.post("/api/plan", json=_design())
    assert after.status_code == 200
    assert after.get_json()["pieces"] == before["pieces"]


def test_a_reload_from_another_site_is_refused(tmp_path):
    (tmp_path / "garden.toml").write_text(GOOD, encoding="utf-8")
    app = create_app(materials_dirs=[tmp_path])
    (tmp_path / "garden.toml").write_text(CHANGED, encoding="utf-8")
    resp = _reload(app.test_client(), {"Origin": "http://elsewhere.example", "Sec-Fetch-Site": "cross-site"})
    assert resp.status_code == 403
    assert app.planner.library.materials["garden-steel"].modulus == 200e9


def test_a_plan_under_way_finishes_on_its_tables_and_is_not_kept(tmp_path, monkeypatch):
    (tmp_path / "garden.toml").write_text(GOOD, encoding="utf-8")
    planner = Planner([tmp_path])
    started, release = threading.Event(), threading.Event()
    real_plan = service.plan  # the planner the one guarded plan service calls

    def slow_plan(design, *args, **kwargs):
        started.set()
        assert release.wait(60)
        return real_plan(design, *args, **kwargs)

    monkeypatch.setattr(service, "plan", slow_plan)
    out = {}
    worker = threading.Thread(target=lambda: out.setdefault("pair", planner.plan(_design())))
    worker.start()
    assert started.wait(60)
    (tmp_path / "garden.toml").write_text(CHANGED, encoding="utf-8")
    planner.reload()
    release.set()
    worker.join(60)
    old_design, old_plan = out["pair"]
    assert old_design.sets[0].material.modulus == 200e9  # the tables it started on
    new_design, new_plan = planner.plan(_design())  # not served from the cache of the old tables
    assert new_design.sets[0].material.modulus == 190e9
    # a stiffer tube of the same length sounds higher: the same pitch needs a longer tube (f ~ sqrt(E))
    assert new_plan.sets[0].pieces[0].length < old_plan.sets[0].pieces[0].length


def test_reload_in_worker_processes_plans_on_the_new_tables(tmp_path):
    (tmp_path / "garden.toml").write_text(GOOD, encoding="utf-8")
    planner = Planner([tmp_path], workers=1)
    try:
        first = planner.plan(_design())[0].sets[0].material.modulus
        (tmp_path / "garden.toml").write_text(CHANGED, encoding="utf-8")
        planner.reload()
        second = planner.plan(_design())[0].sets[0].material.modulus
    finally:
        planner.close()
    assert (first, second) == (pytest.approx(200e9), pytest.approx(190e9))
