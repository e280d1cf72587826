"""The layer editor's form: document -> form text -> document, and typed text kept when wrong."""

from __future__ import annotations

from typing import Any

import pytest

from server.services.convert import convert_assembly
from server.services.typical import typical_assemblies
from server.web.layer_form import (
    AssemblyForm,
    attach_error,
    document_from_form,
    form_from_document,
    form_from_post,
)

TYPICAL = typical_assemblies()
SLUGS = sorted(TYPICAL)
#: layer keys the form does not carry yet: checked on their own in
#: test_round_trip_keeps_vapour_sd, so the numeric round trip below stays meaningful
NOT_IN_FORM: set[str] = set()  # every document field has a form field


def _strip(value: Any) -> Any:
    """Drop keys the form adds, and None values, so the two documents compare by content."""
    if isinstance(value, dict):
        return {k: _strip(v) for k, v in value.items() if v is not None}
    if isinstance(value, list):
        return [_strip(v) for v in value]
    return value


def _assert_same_document(
    before: dict[str, Any], after: dict[str, Any], skip: frozenset[str] = frozenset()
) -> None:
    # the form adds "method" (its default) and a "name" for each layer: not compared
    for key in ("heat_flow", "films"):
        assert after[key] == before[key]
    assert len(after["layers"]) == len(before["layers"])
    for index, (old, new) in enumerate(zip(before["layers"], after["layers"], strict=True)):
        old, new = _strip(old), _strip(new)
        for key in skip:
            old.pop(key, None)
        if not old.get("name"):
            new.pop("name", None)
        _assert_close(old, new, f"layers[{index}]")


def _assert_close(old: Any, new: Any, where: str) -> None:
    if isinstance(old, dict):
        assert isinstance(new, dict), where
        assert set(old) == set(new), (where, set(old) ^ set(new))
        for key in old:
            _assert_close(old[key], new[key], f"{where}.{key}")
    elif isinstance(old, int | float) and not isinstance(old, bool):
        assert new == pytest.approx(old, rel=1e-9, abs=1e-12), where
    else:
        assert new == old, where


@pytest.mark.parametrize("slug", SLUGS)
def test_round_trip_ip(slug: str) -> None:
    doc = TYPICAL[slug].document_ip
    form = form_from_document(doc, "ip")
    back = document_from_form(form, "ip")
    assert back is not None, [layer.errors for layer in form.layers]
    assert not form.has_errors
    assert back["method"] == "parallel_path"  # the form adds the default method
    _assert_same_document(doc, back, skip=frozenset(NOT_IN_FORM))


_WITH_SD = [s for s in SLUGS if any("vapour_sd_m" in x for x in TYPICAL[s].document_ip["layers"])]


@pytest.mark.parametrize("slug", _WITH_SD[:1] or ["wall-2x4-16-r13"])
def test_round_trip_keeps_vapour_sd(slug: str) -> None:
    doc = TYPICAL[slug].document_ip
    back = document_from_form(form_from_document(doc, "ip"), "ip")
    assert back is not None
    for old, new in zip(doc["layers"], back["layers"], strict=True):
        assert new.get("vapour_sd_m") == old.get("vapour_sd_m")


@pytest.mark.parametrize("slug", ["wall-2x4-16-r13", "attic-2x6-16-r19"])
def test_round_trip_si(slug: str) -> None:
    doc = convert_assembly(TYPICAL[slug].document_ip, "ip", "si")
    form = form_from_document(doc, "si")
    back = document_from_form(form, "si")
    assert back is not None, [layer.errors for layer in form.layers]
    _assert_same_document(doc, back, skip=frozenset(NOT_IN_FORM))


def test_form_text_uses_trade_fractions_in_ip() -> None:
    # 7/16 in OSB shows as the fraction 7/16; 0.5 in gypsum as 1/2; 25 % framing as "25"
    form = form_from_document(TYPICAL["wall-2x4-16-r13"].document_ip, "ip")
    assert form.layers[1].get("thickness") == "7/16"
    assert form.layers[3].get("thickness") == "1/2"
    assert form.layers[2].get("fraction") == "25"
    assert form.layers[2].get("type") == "framed"
    assert form.layers[2].get("cavity_type") == "batt"


# --- posted text -------------------------------------------------------------------------------


def _post(count: int, **fields: str) -> dict[str, str]:
    data = {"heat_flow": "horizontal", "films": "ashrae", "method": "parallel_path"}
    for key, value in fields.items():
        index, _, name = key.partition("_")
        data[f"layers-{index.removeprefix('l')}-{name}"] = value
    return data


def _one(**fields: str) -> AssemblyForm:
    return form_from_post(_post(1, **{f"l0_{k}": v for k, v in fields.items()}), 1)


@pytest.mark.parametrize(
    ("fields", "key", "typed"),
    [
        ({"type": "conductivity", "thickness": "abc", "conductivity": "1.11"}, "thickness", "abc"),
        ({"type": "r", "r": "-1"}, "r", "-1"),
        ({"type": "conductivity", "thickness": "1/2", "conductivity": "zero"}, "conductivity", "zero"),
        (
            {"type": "framed", "thickness": "3-1/2", "cavity_type": "r", "cavity_r": "13",
             "fraction": "100", "framing_conductivity": "0.8"},
            "fraction",
            "100",
        ),
        (
            {"type": "framed", "thickness": "3-1/2", "cavity_type": "batt", "batt_r": "",
             "batt_thickness": "3-1/2", "fraction": "25"},
            "batt_r",
            "",
        ),
        (
            {"type": "framed", "thickness": "3-1/2", "cavity_type": "r", "cavity_r": "13"},
            "fraction",
            "",
        ),
    ],
)  # fmt: skip
def test_invalid_text_is_kept_with_its_message(
    fields: dict[str, str], key: str, typed: str
) -> None:
    form = _one(**fields)
    assert document_from_form(form, "ip") is None
    layer = form.layers[0]
    # what the person typed is still there, and the message sits beside that field
    assert layer.get(key) == typed
    assert key in layer.errors and layer.errors[key]
    # the other typed fields are kept too
    for other, value in fields.items():
        assert layer.get(other) == value


def test_messages_are_plain_words() -> None:
    form = _one(type="r", r="-1")
    document_from_form(form, "ip")
    assert form.layers[0].errors["r"] == "must be zero or more"
    form = _one(type="framed", thickness="3-1/2", cavity_type="r", cavity_r="13", fraction="100")
    document_from_form(form, "ip")
    assert "100" in form.layers[0].errors["fraction"]


@pytest.mark.parametrize(
    ("typed", "inches"),
    # 3-1/2 = 3.5 in; 89 mm / 25.4 = 3.503937 in; 5 1/2" = 5.5 in
    [("3-1/2", 3.5), ("89 mm", 89 / 25.4), ('5 1/2"', 5.5)],
)
def test_trade_lengths_accepted_in_ip(typed: str, inches: float) -> None:
    form = _one(type="conductivity", name="drywall", thickness=typed, conductivity="1.11")
    doc = document_from_form(form, "ip")
    assert doc is not None, form.layers[0].errors
    assert doc["layers"][0]["thickness"] == pytest.approx(inches, rel=1e-12)
    assert doc["layers"][0]["conductivity"] == pytest.approx(1.11)
    assert form.layers[0].get("thickness") == typed


def test_bare_number_is_mm_in_si() -> None:
    form = _one(type="conductivity", thickness="89", conductivity="0.16")
    doc = document_from_form(form, "si")
    assert doc is not None
    assert doc["layers"][0]["thickness"] == pytest.approx(89.0, rel=1e-12)


def test_framed_from_lumber_needs_no_thickness() -> None:
    # a 2x4 at 16 in with no thickness and no share typed: the document takes both from lumber
    form = _one(type="framed", cavity_type="r", cavity_r="13", lumber="2x4", spacing="16")
    doc = document_from_form(form, "ip")
    assert doc is not None, form.layers[0].errors
    layer = doc["layers"][0]
    assert "thickness" not in layer
    assert layer["framing"] == {"lumber": "2x4", "spacing": 16.0}


def test_no_layers_is_an_assembly_error() -> None:
    form = form_from_post({"heat_flow": "horizontal"}, 0)
    assert document_from_form(form, "ip") is None
    assert "layers" in form.errors


def test_document_errors_land_beside_their_field() -> None:
    # a document-path message goes to the matching form key of the right layer
    form = form_from_document(TYPICAL["wall-2x4-16-r13"].document_ip, "ip")
    attach_error(form, "layers[2].framing.fraction", "must be less than 1")
    attach_error(form, "layers[1].thickness", "must be greater than zero")
    attach_error(form, "layers[9].r", "out of range")  # no such layer: assembly-level
    assert form.layers[2].errors == {"fraction": "must be less than 1"}
    assert form.layers[1].errors == {"thickness": "must be greater than zero"}
    assert form.errors == {"layers[9].r": "out of range"}
