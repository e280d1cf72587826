"""The layer editor's form: typed text <-> AssemblyInput documents.

The form keeps exactly what the user typed. Parsing collects a message per field instead of
stopping at the first; the page shows each message beside its field and saves nothing until
every field parses and the assembly computes.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from pydantic import ValidationError

from server.documents.assembly import AssemblyInput
from server.documents.common import Units
from server.errors import field_path
from server.physics.units import INCH_M, format_inches
from server.services.number_text import NumberTextError, read_decimal, read_length
from server.web.forms import parse_length_field

LAYER_TYPES = {
    "r": "Fixed R",
    "material": "Library material",
    "conductivity": "Thickness + k",
    "framed": "Framed (cavity + framing)",
}
CAVITY_TYPES = {
    "batt": "Batt",
    "r": "Fill of known R",
    "material": "Library material",
    "conductivity": "k",
}
LAYER_KEYS = (
    "type", "name", "thickness", "r", "conductivity", "material",
    "cavity_type", "cavity_r", "batt_r", "batt_thickness", "cavity_material", "cavity_conductivity",
    "lumber", "spacing", "fraction", "framing_conductivity", "vapour_sd",
)  # fmt: skip


@dataclass
class LayerForm:
    values: dict[str, str]
    errors: dict[str, str] = field(default_factory=dict)

    def get(self, key: str) -> str:
        return self.values.get(key, "")


@dataclass
class AssemblyForm:
    heat_flow: str = "horizontal"
    films: str = "ashrae"
    method: str = "parallel_path"
    layers: list[LayerForm] = field(default_factory=list)
    errors: dict[str, str] = field(default_factory=dict)  # assembly-level: key -> message

    @property
    def has_errors(self) -> bool:
        return bool(self.errors) or any(layer.errors for layer in self.layers)


def _num(value: float | None) -> str:
    if value is None:
        return ""
    # enough digits that loading and saving a document unchanged keeps its numbers
    return f"{value:.12g}"


def _length_text(value: float | None, units: Units) -> str:
    if value is None:
        return ""
    if units == "ip":
        text = format_inches(value * INCH_M, 16).rstrip('"')
        # keep decimals that a fraction would round
        return text if abs(read_length(text) / INCH_M - value) < 1e-6 else _num(value)
    return _num(value)


def form_from_document(doc: dict[str, Any], units: Units) -> AssemblyForm:
    """Stored AssemblyInput dict (in ``units``) -> form text."""
    form = AssemblyForm(
        heat_flow=doc.get("heat_flow", "horizontal"),
        films=doc.get("films", "ashrae"),
        method=doc.get("method", "parallel_path"),
    )
    for layer in doc.get("layers", []):
        v: dict[str, str] = {"name": layer.get("name", "")}
        v["vapour_sd"] = _num(layer.get("vapour_sd_m"))
        v["thickness"] = _length_text(layer.get("thickness"), units)
        if "cavity" in layer and layer["cavity"] is not None:
            v["type"] = "framed"
            cav, fr = layer["cavity"], layer.get("framing") or {}
            if cav.get("batt"):
                v["cavity_type"] = "batt"
                v["batt_r"] = _num(cav["batt"].get("r_nominal"))
                v["batt_thickness"] = _length_text(cav["batt"].get("thickness_nominal"), units)
            elif cav.get("material"):
                v["cavity_type"], v["cavity_material"] = "material", cav["material"]
            elif cav.get("conductivity") is not None:
                v["cavity_type"], v["cavity_conductivity"] = (
                    "conductivity",
                    _num(cav["conductivity"]),
                )
            else:
                v["cavity_type"], v["cavity_r"] = "r", _num(cav.get("r"))
            v["lumber"] = fr.get("lumber") or ""
            v["spacing"] = _length_text(fr.get("spacing"), units)
            v["fraction"] = "" if fr.get("fraction") is None else _num(fr["fraction"] * 100)
            v["framing_conductivity"] = _num(fr.get("conductivity"))
        elif layer.get("material"):
            v["type"], v["material"] = "material", layer["material"]
        elif layer.get("conductivity") is not None:
            v["type"], v["conductivity"] = "conductivity", _num(layer["conductivity"])
        else:
            v["type"], v["r"] = "r", _num(layer.get("r"))
        form.layers.append(LayerForm(v))
    return form


def form_from_post(data: dict[str, str], count: int) -> AssemblyForm:
    """Raw posted fields ``layers-<i>-<key>`` -> form (typed text kept as is)."""
    form = AssemblyForm(
        heat_flow=data.get("heat_flow", "horizontal"),
        films=data.get("films", "ashrae"),
        method=data.get("method", "parallel_path"),
    )
    for i in range(count):
        values = {key: str(data.get(f"layers-{i}-{key}", "")).strip() for key in LAYER_KEYS}
        values["type"] = values["type"] or "r"
        form.layers.append(LayerForm(values))
    return form


def _parse_number(
    layer: LayerForm, key: str, units: Units, *, positive: bool = True
) -> float | None:
    text = layer.get(key).rstrip("%").strip()
    if not text:
        layer.errors[key] = "required"
        return None
    try:
        return read_decimal(text, decimal_comma=units == "si", low=0.0, low_open=positive)
    except NumberTextError as exc:
        layer.errors[key] = str(exc)
        return None


def _parse_length(
    layer: LayerForm, key: str, units: Units, *, required: bool = True
) -> float | None:
    return parse_length_field(layer.get(key), units, key, layer.errors, required=required)


def document_from_form(form: AssemblyForm, units: Units) -> dict[str, Any] | None:
    """Form -> AssemblyInput dict in ``units``, or None with messages set on the form."""
    layers: list[dict[str, Any]] = []
    for layer in form.layers:
        layer.errors.clear()
        kind = layer.get("type")
        out: dict[str, Any] = {"name": layer.get("name")[:120]}
        if layer.get("vapour_sd"):
            sd = _parse_number(layer, "vapour_sd", units, positive=False)
            if sd is not None:
                out["vapour_sd_m"] = sd
        if kind == "framed":
            thickness = _parse_length(layer, "thickness", units, required=not layer.get("lumber"))
            if thickness is not None:
                out["thickness"] = thickness
            cav_type = layer.get("cavity_type") or "r"
            if cav_type == "batt":
                r_nom = _parse_number(layer, "batt_r", units)
                t_nom = _parse_length(layer, "batt_thickness", units)
                cavity: dict[str, Any] = {"batt": {"r_nominal": r_nom, "thickness_nominal": t_nom}}
            elif cav_type == "material":
                cavity = {"material": layer.get("cavity_material") or None}
                if not cavity["material"]:
                    layer.errors["cavity_material"] = "choose a material"
            elif cav_type == "conductivity":
                cavity = {"conductivity": _parse_number(layer, "cavity_conductivity", units)}
            else:
                cavity = {"r": _parse_number(layer, "cavity_r", units)}
            framing: dict[str, Any] = {}
            if layer.get("lumber"):
                framing["lumber"] = layer.get("lumber")
            if layer.get("spacing"):
                framing["spacing"] = _parse_length(layer, "spacing", units)
            if layer.get("fraction"):
                pct = _parse_number(layer, "fraction", units, positive=False)
                if pct is not None:
                    if pct >= 100:
                        layer.errors["fraction"] = "must be less than 100 %"
                    framing["fraction"] = pct / 100
            elif not (layer.get("lumber") and layer.get("spacing")):
                layer.errors["fraction"] = "give the framing share (e.g. 25) or lumber and spacing"
            if layer.get("framing_conductivity"):
                framing["conductivity"] = _parse_number(layer, "framing_conductivity", units)
            out["cavity"], out["framing"] = cavity, framing
        elif kind == "material":
            out["material"] = layer.get("material") or None
            if not out["material"]:
                layer.errors["material"] = "choose a material"
            thickness = _parse_length(layer, "thickness", units, required=False)
            if thickness is not None:
                out["thickness"] = thickness
        elif kind == "conductivity":
            out["thickness"] = _parse_length(layer, "thickness", units)
            out["conductivity"] = _parse_number(layer, "conductivity", units)
        else:
            out["r"] = _parse_number(layer, "r", units, positive=False)
            thickness = _parse_length(layer, "thickness", units, required=False)
            if thickness is not None:
                out["thickness"] = thickness
        layers.append(out)
    if not form.layers:
        form.errors["layers"] = "add at least one layer"
    if form.has_errors:
        return None
    doc = {
        "heat_flow": form.heat_flow,
        "films": form.films,
        "method": form.method,
        "layers": layers,
    }
    try:
        AssemblyInput.model_validate(doc)
    except ValidationError as exc:
        for err in exc.errors():
            attach_error(
                form,
                field_path(err.get("loc", ())),
                err.get("msg", "").removeprefix("Value error, "),
            )
        return None
    return doc


_DOC_TO_FORM = {
    "r": "r", "thickness": "thickness", "conductivity": "conductivity", "material": "material",
    "cavity.r": "cavity_r", "cavity.conductivity": "cavity_conductivity",
    "cavity.material": "cavity_material", "cavity.batt.r_nominal": "batt_r",
    "cavity.batt.thickness_nominal": "batt_thickness", "framing.fraction": "fraction",
    "framing.lumber": "lumber", "framing.spacing": "spacing",
    "framing.conductivity": "framing_conductivity", "framing.material": "framing_conductivity",
    "vapour_sd_m": "vapour_sd",
}  # fmt: skip


def attach_error(form: AssemblyForm, path: str, message: str) -> None:
    """Put a document-path message (``layers[2].cavity.r``) beside the matching form field."""
    path = path.removeprefix("assembly.").lstrip(".")
    if path.startswith("layers["):
        index_text, _, rest = path[len("layers[") :].partition("]")
        try:
            index = int(index_text)
        except ValueError:
            index = -1
        if 0 <= index < len(form.layers):
            key = _DOC_TO_FORM.get(rest.lstrip("."), "name" if not rest else rest.split(".")[-1])
            if not rest:
                key = "type"
            form.layers[index].errors[key] = message
            return
    form.errors[path or "layers"] = message
