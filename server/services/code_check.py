"""Code targets beside each surface and upgrade (prescriptive table, verify locally)."""

from __future__ import annotations

from typing import Any

from server.documents.assembly import AssemblyResult
from server.physics.code_targets import CodeTarget, CodeVerdict, check, target_for
from server.services.code_target_data import load_code_targets


def house_climate_zone(climate: dict[str, Any] | None) -> str | None:
    """The zone typed for the house, else the one read from its weather file."""
    climate = climate or {}
    zone = climate.get("climate_zone") or (climate.get("weather") or {}).get("climate_zone")
    return str(zone) if zone not in (None, "") else None


def code_verdict(
    climate: dict[str, Any] | None,
    kind: str,
    result: AssemblyResult | None,
    rows: tuple[CodeTarget, ...] | None = None,
) -> CodeVerdict | None:
    """How an assembly compares with the prescriptive target for its kind and zone, or None.

    ``rows`` is the firm's table (server.services.organization_code_targets.rows_for); default packaged.
    """
    zone = house_climate_zone(climate)
    if zone is None or result is None:
        return None
    try:
        target = target_for(rows if rows is not None else load_code_targets(), zone, kind)
    except ValueError:
        return None
    if target is None:
        return None
    return check(target, r_total_ip=result.r_ip_total, u_factor_ip=1.0 / result.r_ip_total)
