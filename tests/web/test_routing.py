"""Warnings and errors are records (code, design key, message); the page places them by key
and code, never by the words of the message.

References: the design keys of the design contract (DEVELOPERS.md) and the porch example; the
warnings themselves come from the planner's own rules (a slender-model comparison, the sharp
risk of a fixed allowance), whose numbers are checked elsewhere.
"""

import dataclasses

from cutplan.design import design_from_mapping
from cutplan.design.notices import Notice
from cutplan.materials import load_library
from cutplan.planning.planner import plan
from cutplan.web import view
from cutplan.web.form import form_from_mapping
from tests.web.conftest import PORCH, example_mapping


def _porch():
    data = example_mapping(PORCH)
    design = design_from_mapping(data, lambda dirs: load_library(list(dirs)), "design", ".")[0]
    return design, plan(design)


def test_a_warning_goes_by_its_key_even_when_its_words_name_another_field():
    # a message that speaks of "allowance" and "longer than common stock" but is keyed to the
    # section must sit beside the section: the words decide nothing
    design, the_plan = _porch()
    odd = Notice("test", "set[1].section", "allowance longer than common stock stubby short column")
    first = dataclasses.replace(the_plan.sets[0].pieces[0], warnings=(odd,))
    sets = (dataclasses.replace(the_plan.sets[0], pieces=(first,) + the_plan.sets[0].pieces[1:]),)
    placed = view.place_warnings(dataclasses.replace(the_plan, sets=sets), design,
                                 {"set[1].section", "set[1].notes", "stock.allowance", "stock.lengths", "form"})
    assert placed == {"set[1].section": [f"{first.label}: {odd.message}"]}


def test_a_warning_keyed_to_a_field_the_page_does_not_show_falls_back_to_its_set():
    design, the_plan = _porch()
    first = dataclasses.replace(the_plan.pieces[0], warnings=(Notice("test", "set[1].hanging.breeze", "w"),))
    sets = (dataclasses.replace(the_plan.sets[0], pieces=(first,)),)
    placed = view.place_warnings(dataclasses.replace(the_plan, sets=sets), design, {"set[1]", "form"})
    assert placed == {"set[1]": [f"{first.label}: w"]}


def test_errors_about_a_whole_set_go_by_their_code_not_their_words():
    slots = {"set[1]", "set[1].pitch", "stock.lengths", "set[1].stock.lengths", "form"}
    worded = [{"code": "invalid", "key": "set[1]", "message": "set[1]: needs exactly one of: notes; longest stock"}]
    assert list(view.place_errors(worded, slots)) == ["set[1]"]
    coded = [{"code": "pitch-choice", "key": "set[1]", "message": "set[1]: x"},
             {"code": "longer-than-stock", "key": "set[1]", "message": "set[1]: y"}]
    placed = view.place_errors(coded, slots)
    assert list(placed) == ["set[1].pitch", "stock.lengths"]
    assert placed["set[1].pitch"][0].endswith(": x") and placed["stock.lengths"][0].endswith(": y")
    assert list(view.place_errors(coded[1:], slots, own_stock={"set[1]"})) == ["set[1].stock.lengths"]


def test_the_slender_model_warning_sits_beside_the_model_field(client):
    # a slender (Euler-Bernoulli) porch set: the planner compares it with the default model and
    # warns; the warning concerns the model the builder chose, so it sits beside that field
    fields = {**form_from_mapping(example_mapping(PORCH)), "set[1].model": "slender"}
    res = client.post("/preview", data=fields).get_json()
    assert res["ok"] and "set[1].model" in res["warnings"]
    assert all("slender model" in line for line in res["warnings"]["set[1].model"])
    assert not any("slender model" in line for slot, lines in res["warnings"].items() if slot != "set[1].model"
                   for line in lines)


def test_the_json_plan_states_each_warning_as_a_record(client):
    data = example_mapping(PORCH)
    data["stock"]["allowance"] = "0.1 %"
    body = client.post("/api/plan", json=data).get_json()
    piece = body["pieces"][0]
    assert piece["warnings"] and [r["message"] for r in piece["warning_records"]] == piece["warnings"]
    assert {(r["code"], r["key"]) for r in piece["warning_records"]} == {("sharp-risk", "stock.allowance")}


def test_a_refused_design_answers_error_records_with_a_code(client):
    data = example_mapping(PORCH)
    data["stock"]["kerf"] = "1/16"
    body = client.post("/api/plan", json=data).get_json()
    (err,) = body["errors"]
    assert err["key"] == "stock.kerf" and err["code"] == "invalid" and err["message"].startswith("stock.kerf: ")
