"""Ids beyond the database's integer range are 'not found' on every route, never a 500."""

from __future__ import annotations

import pytest
from fastapi.testclient import TestClient

HUGE = [2**31, 2**63]  # above PostgreSQL's integer and SQLite's 64-bit integer


@pytest.mark.parametrize("big", HUGE)
def test_huge_ids_are_404(client: TestClient, big: int) -> None:
    for path in (f"/houses/{big}", f"/houses/{big}/compare", f"/api/v1/houses/{big}/document",
                 f"/houses/1/surfaces/{big}", f"/houses/1/upgrades/{big}"):  # fmt: skip
        assert client.get(path).status_code == 404, path
    for path in (
        f"/price-book/{big}",
        f"/houses/1/share-links/{big}/revoke",
        f"/admin/users/{big}/active",
    ):
        assert client.post(path, data={}).status_code in (404, 405, 422), path
