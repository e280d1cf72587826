"""Selections of a house's variants: one option index per choice group (see
:mod:`.variants`), made from sets of upgrade ids and back.

:class:`Selections` is the part of :class:`.variants.Variants` that only reads its groups and
upgrades; it holds no figures.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence

import numpy as np

from server.physics import house_model as model
from server.physics.variant_groups import ChoiceGroup, IntArray


def _claim(targets: dict[str, str], target: str, name: str) -> None:
    """Note that upgrade ``name`` changes ``target``; refuse a second upgrade of the same one."""
    if target in targets:
        raise ValueError(
            f"upgrades '{targets[target]}' and '{name}' both change "
            f"{target.replace(':', ' ')}; a package can change each surface, pipe run "
            "or the air leakage only once"
        )
    targets[target] = name


class Selections:
    """Selections over ``groups``; the subclass sets the four attributes below."""

    groups: tuple[ChoiceGroup, ...]
    upgrades: Mapping[str, model.Upgrade]
    _group_of: dict[str, int]
    _by_set: list[dict[frozenset[str], int]]

    @property
    def sizes(self) -> tuple[int, ...]:
        """Number of options of each group."""
        return tuple(len(g.options) for g in self.groups)

    def count(self) -> int:
        """Number of allowed sets of upgrades (the product of the groups' option counts)."""
        return math.prod(self.sizes)

    def selection(self, upgrade_ids: Sequence[str]) -> IntArray:
        """The selection (option index per group) of a set of upgrades.

        Raises
        ------
        ValueError
            An unknown upgrade, or two upgrades that change the same surface, pipe run or
            the air leakage.
        """
        chosen: dict[int, set[str]] = {}
        targets: dict[str, str] = {}
        for name in upgrade_ids:
            if name not in self._group_of:
                raise ValueError(f"there is no upgrade '{name}'")
            _claim(targets, model.upgrade_target(self.upgrades[name]), name)
            chosen.setdefault(self._group_of[name], set()).add(name)
        row = np.zeros(len(self.groups), dtype=np.int64)
        for g, names in chosen.items():
            row[g] = self._by_set[g][frozenset(names)]
        return row

    def prefix_selections(self, upgrade_ids: Sequence[str]) -> IntArray:
        """The selections of the first 1, 2, ..., n upgrades of ``upgrade_ids`` (one row each):
        row k equals :meth:`selection` of ``upgrade_ids[:k + 1]``, built in one pass (each row
        is the last one with one more upgrade). Raises as :meth:`selection` does."""
        rows = np.zeros((len(upgrade_ids), len(self.groups)), dtype=np.int64)
        chosen: dict[int, set[str]] = {}
        targets: dict[str, str] = {}
        row = np.zeros(len(self.groups), dtype=np.int64)
        for k, name in enumerate(upgrade_ids):
            if name not in self._group_of:
                raise ValueError(f"there is no upgrade '{name}'")
            _claim(targets, model.upgrade_target(self.upgrades[name]), name)
            g = self._group_of[name]
            names = chosen.setdefault(g, set())
            names.add(name)
            row[g] = self._by_set[g][frozenset(names)]
            rows[k] = row
        return rows

    def single_selections(self, upgrade_ids: Sequence[str]) -> IntArray:
        """The selection of each upgrade alone (one row each): row k equals :meth:`selection`
        of ``[upgrade_ids[k]]``. Raises ValueError on an unknown upgrade."""
        rows = np.zeros((len(upgrade_ids), len(self.groups)), dtype=np.int64)
        for k, name in enumerate(upgrade_ids):
            if name not in self._group_of:
                raise ValueError(f"there is no upgrade '{name}'")
            g = self._group_of[name]
            rows[k, g] = self._by_set[g][frozenset((name,))]
        return rows

    def upgrade_ids(self, selection: Sequence[int] | IntArray) -> tuple[str, ...]:
        """The upgrades of a selection, in the order the upgrades were given."""
        names = {
            name
            for g, o in enumerate(selection)
            for name in self.groups[g].options[int(o)].upgrade_ids
        }
        return tuple(name for name in self.upgrades if name in names)

    def all_selections(self) -> IntArray:
        """Every allowed selection, one row each (the cartesian product; mind its size)."""
        sizes = self.sizes
        if not sizes:
            return np.zeros((1, 0), dtype=np.int64)
        grid = np.indices(sizes, dtype=np.int64)
        return grid.reshape(len(sizes), -1).T.copy()
