"""The layer editor's one code path, shared by surfaces (as found) and upgrades (proposed)."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from server.documents.assembly import AssemblyResult
from server.documents.common import Units
from server.errors import InputError
from server.services.number_text import NumberTextError, read_integer
from server.services.typical import typical_assemblies
from server.web.forms import form_version
from server.web.layer_form import (
    AssemblyForm,
    LayerForm,
    attach_error,
    document_from_form,
    form_from_document,
    form_from_post,
)
from server.web.saving import save_or_rerender

MAX_LAYERS = 40
SaveFn = Callable[[dict[str, Any], int | None], AssemblyResult]


def _apply_action(form: AssemblyForm, action: str) -> str:
    """Add / remove / move a layer in the form. Returns a short message for the screen reader."""
    verb, _, index_text = action.partition(":")
    try:
        index = int(index_text) if index_text else -1
    except ValueError:
        return ""
    layers = form.layers
    if verb == "add" and len(layers) < MAX_LAYERS:
        layers.append(LayerForm({"type": "r", "name": "", "r": ""}))
        return "Layer added at the inside face; fill in its R."
    if verb == "remove" and 0 <= index < len(layers):
        removed = layers.pop(index)
        return f"Removed {removed.get('name') or f'layer {index + 1}'}."
    if verb == "up" and 0 < index < len(layers):
        layers[index - 1], layers[index] = layers[index], layers[index - 1]
        return f"Moved layer {index + 1} out one place."
    if verb == "down" and 0 <= index < len(layers) - 1:
        layers[index + 1], layers[index] = layers[index], layers[index + 1]
        return f"Moved layer {index + 1} in one place."
    return ""


def run_editor(
    data: dict[str, str], *, units: Units, save: SaveFn
) -> tuple[AssemblyForm, AssemblyResult | None, str, int]:
    """Apply the posted action, validate, and save through ``save`` when everything computes.

    Returns the form (typed text kept), the result (None when not computed), a status message
    and the HTTP status the plain (non-htmx) page should have.
    """
    try:
        count = min(read_integer(data.get("layer_count", "0") or "0", low=0), MAX_LAYERS)
    except NumberTextError:
        count = 0
    try:
        version, version_error = form_version(data), ""
    except InputError as exc:
        version, version_error = None, exc.message
    form = form_from_post(data, count)
    action = data.get("action", "")
    if action.startswith("typical:") and action[8:] in typical_assemblies():
        typical = typical_assemblies()[action[8:]]
        form = form_from_document(typical.assembly(units).model_dump(exclude_none=True), units)
        message = f"Replaced the layers with: {typical.label}."
    else:
        message = _apply_action(form, action)
    result = None
    status = 200
    doc = document_from_form(form, units)

    def refused(errors: dict[str, str], refusal: int) -> tuple[AssemblyResult | None, int]:
        for field, text in errors.items():  # beside the layer fields; the conflict at the head
            attach_error(form, field, text)
        return None, refusal

    if version_error:
        form.errors["version"] = version_error
        status = 422
    elif doc is None:
        status = 422
    else:
        result, status = save_or_rerender(call=lambda: save(doc, version), rerender=refused,
                                          saved=lambda saved: (saved, 200), conflict_key="version")  # fmt: skip
        if status == 200:
            message = message or "Saved."
    if status != 200:
        message = "Not saved: check the fields marked below."
    return form, result, message, status
