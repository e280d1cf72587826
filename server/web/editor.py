"""The layer editor's one code path, shared by surfaces (as found) and upgrades (proposed)."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from server.documents.assembly import AssemblyResult
from server.documents.common import Units
from server.errors import Conflict, InputError
from server.services.number_text import NumberTextError, read_integer
from server.services.typical import typical_assemblies
from server.web.conflicts import stale_form
from server.web.forms import form_version
from server.web.layer_form import (
    AssemblyForm,
    LayerForm,
    attach_error,
    document_from_form,
    form_from_document,
    form_from_post,
)

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
    if version_error:
        form.errors["version"] = version_error
        status = 422
    elif doc is None:
        status = 422
    else:
        try:
            result = save(doc, version)
            message = message or "Saved."
        except InputError as exc:
            for err in exc.errors():
                attach_error(form, err.field, err.message)
            status = 422
        except Conflict:
            form.errors["version"] = stale_form()
            status = 409
    if status != 200:
        message = "Not saved: check the fields marked below."
    return form, result, message, status
