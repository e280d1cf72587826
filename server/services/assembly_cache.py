"""Assembly results kept between calls: a small LRU, exact by construction.

A house's calc/house, its compare page's fresh selection and its quote ask the assembly
calculator for the same assemblies again and again (~240 runs for the 40-surface load-test
house). A result depends only on the assembly document, the units, the field path its
messages name, and the catalog rows it reads; so the key is the document's canonical JSON,
the units and the field, and each entry records the (slug, row) pairs the calculation looked
up. An entry is used only when the caller's catalog holds the very same rows for those slugs
(a firm's edited material misses, a new catalog object with the same rows hits). Errors are
never kept: a refused assembly is computed (and refused) again.

Physics stays pure: the cache lives here, in the services.
"""

from __future__ import annotations

import threading
from collections import OrderedDict
from collections.abc import Callable, Iterator, Mapping

from server.documents.assembly import AssemblyInput, AssemblyResult
from server.documents.common import Units
from server.services.catalog import Catalog, MaterialSpec

#: most assembly results kept (a few hundred bytes to a few KB each; common practice sizing)
MAX_ENTRIES = 4096

_Key = tuple[str, str, str]
_Deps = tuple[tuple[str, MaterialSpec | None], ...]
_entries: OrderedDict[_Key, tuple[_Deps, AssemblyResult]] = OrderedDict()
_lock = threading.Lock()
_counts = {"hits": 0, "misses": 0}


class _Recording(Mapping[str, MaterialSpec]):
    """The caller's catalog, noting every slug the calculation reads."""

    def __init__(self, inner: Catalog) -> None:
        self.inner = inner
        self.read: dict[str, MaterialSpec | None] = {}

    def __getitem__(self, slug: str) -> MaterialSpec:
        value = self.inner[slug]
        self.read[slug] = value
        return value

    def get(self, slug: str, default: object = None) -> MaterialSpec | None:  # type: ignore[override]
        value = self.inner.get(slug)
        self.read[slug] = value
        return value if value is not None else default  # type: ignore[return-value]

    def __iter__(self) -> Iterator[str]:
        return iter(self.inner)

    def __len__(self) -> int:
        return len(self.inner)


def _copy(result: AssemblyResult) -> AssemblyResult:
    """A copy whose lists a caller may change without changing the kept result: what
    ``result.model_copy(update={"warnings": [...], "layers": [...]})`` makes (a shallow copy,
    the two lists new, both marked as set), without its general machinery."""
    if result.__pydantic_extra__ is not None or result.__pydantic_private__ is not None:
        return result.model_copy(
            update={"warnings": list(result.warnings), "layers": list(result.layers)}
        )
    made = AssemblyResult.__new__(type(result))
    fields = dict(result.__dict__)
    fields["warnings"] = list(result.warnings)
    fields["layers"] = list(result.layers)
    object.__setattr__(made, "__dict__", fields)
    object.__setattr__(made, "__pydantic_extra__", None)
    object.__setattr__(made, "__pydantic_fields_set__", result.__pydantic_fields_set__ | _LISTS)
    object.__setattr__(made, "__pydantic_private__", None)
    return made


_LISTS = frozenset({"warnings", "layers"})


def _same(row: MaterialSpec | None, kept: MaterialSpec | None) -> bool:
    """The catalog's row equals the kept one (the very same object first, the cheap test)."""
    return row is kept or row == kept


def cached(
    compute: Callable[..., AssemblyResult],
    assembly: AssemblyInput,
    *,
    units: Units,
    catalog: Catalog,
    field: str,
    document_json: str | None = None,
) -> AssemblyResult:
    """``compute(assembly, units=, catalog=, field=)``, or its kept result (module docstring);
    ``document_json``: ``assembly.model_dump_json()`` when the caller has it already."""
    json = assembly.model_dump_json() if document_json is None else document_json
    key = (json, str(units), field)
    with _lock:
        found = _entries.get(key)
        if found is not None and all(_same(catalog.get(slug), spec) for slug, spec in found[0]):
            _entries.move_to_end(key)
            _counts["hits"] += 1
            return _copy(found[1])
    recording = _Recording(catalog)
    result = compute(assembly, units=units, catalog=recording, field=field)
    deps = tuple(sorted(recording.read.items()))
    with _lock:
        _counts["misses"] += 1
        _entries[key] = (deps, _copy(result))
        _entries.move_to_end(key)
        while len(_entries) > MAX_ENTRIES:
            _entries.popitem(last=False)
    return result


def clear() -> None:
    """Forget every kept result (tests, benchmarks)."""
    with _lock:
        _entries.clear()
        _counts.update(hits=0, misses=0)


def counts() -> dict[str, int]:
    """Hits and misses since the last :func:`clear`."""
    with _lock:
        return dict(_counts)
