"""Seeded random pure houses (server.physics.house_model) with their upgrades, for the array
core and optimiser tests: surfaces outdoors and facing buffer spaces (b computed or given),
air sealing, pipe runs, fixed or variable base (convex tables built from daily means, or a
table whose top clamp binds), cooling or none, every fuel; and with systems (bins, ducts,
ventilation, altitude) and windows' sun (:func:`random_systems_house`)."""

from __future__ import annotations

import dataclasses
import random

import numpy as np

from server.physics import buffer_spaces as buffers
from server.physics import ducts as duct_physics
from server.physics import house_model as model
from server.physics import systems as sysm
from server.physics import ventilation as vent_physics
from server.physics.fuels import fuel_by_slug

FUELS = ("natural_gas", "propane", "heating_oil", "electric_resistance", "heat_pump", "wood")


def degree_day_table(rng: random.Random, bases_c: list[float]) -> tuple[float, ...]:
    """HDD(τ) = Σ_days max(0, τ − T_day) [K·day] of a random year of daily means: convex."""
    mean, swing = rng.uniform(2.0, 14.0), rng.uniform(6.0, 14.0)
    days = np.arange(365)
    noise = np.array([rng.gauss(0.0, 3.0) for _ in days])
    temps = mean - swing * np.cos(2 * np.pi * days / 365) + noise
    return tuple(float(np.maximum(b - temps, 0.0).sum()) for b in bases_c)


def _options(rng: random.Random, room: int, most: int) -> int:
    """How many upgrades a target gets so that the product of option counts stays <= room."""
    wanted = rng.randint(0, most)
    while wanted > 0 and room // (wanted + 1) < 1:
        wanted -= 1
    return wanted


def random_house(
    rng: random.Random,
    *,
    max_sets: int = 4096,
    variable: bool | None = None,
    spaces: bool | None = None,
    clamp: bool = False,
) -> tuple[model.House, list[model.Upgrade]]:
    """A house of at most ``max_sets`` allowed sets of upgrades (product of option counts)."""
    variable = rng.random() < 0.5 if variable is None else variable
    spaces = rng.random() < 0.5 if spaces is None else spaces
    room = max_sets
    surfaces: list[model.Surface] = []
    upgrades: list[model.Upgrade] = []
    space_rows: list[buffers.BufferSpace] = []
    if spaces:
        space_rows.append(
            buffers.BufferSpace(
                "crawl",
                exposed=(buffers.ExposedPart(rng.uniform(10, 60), rng.uniform(0.2, 3.0)),),
                volume_m3=rng.uniform(50, 300),
                air_changes_per_h=rng.uniform(0.2, 3.0),
            )
        )
        if rng.random() < 0.5:
            space_rows.append(buffers.BufferSpace("garage", b=rng.uniform(0.3, 0.95)))
    for index in range(rng.randint(2, 7)):
        choices = _options(rng, room, 3)
        room //= choices + 1
        adjacent = buffers.OUTDOORS
        if space_rows and rng.random() < 0.6:
            adjacent = rng.choice(space_rows).id
        area = rng.uniform(5.0, 120.0)
        u = rng.uniform(0.2, 3.0)
        sid = f"s{index}"
        surfaces.append(model.Surface(sid, "wall", area, u, adjacent))
        for k in range(choices):
            # mostly better, sometimes worse; rebates sometimes above the cost
            better = rng.random() < 0.85
            new_u = u * (rng.uniform(0.1, 0.95) if better else rng.uniform(1.05, 1.5))
            cost = rng.uniform(0.0, 40.0) * area + rng.choice([0.0, rng.uniform(0, 800)])
            rebate = rng.choice([0.0, 0.0, rng.uniform(0, cost * 1.1 + 1)])
            upgrades.append(model.AssemblyUpgrade(f"{sid}-u{k}", sid, new_u, cost, rebate))
    leak = None
    if rng.random() < 0.7:
        flow = rng.uniform(0.3, 2.0)
        leak = model.AirLeakage(flow, rng.uniform(12, 22), rng.uniform(200, 600))
        choices = _options(rng, room, 3)
        room //= choices + 1
        for k in range(choices):
            after = flow * rng.uniform(0.4, 1.0)
            cost = rng.uniform(200, 3000)
            upgrades.append(
                model.AirSealingUpgrade(f"air-{k}", after, cost, rng.choice([0.0, 150.0]))
            )
    pipes: list[model.PipeRunLoss] = []
    for index in range(rng.randint(0, 2)):
        pid = f"p{index}"
        r = rng.uniform(0.5, 3.0)
        run = model.PipeRunLoss(
            pid, rng.uniform(2, 30), r, rng.uniform(-5, 50), rng.uniform(500, 8760)
        )
        pipes.append(run)
        choices = _options(rng, room, 2)
        room //= choices + 1
        for k in range(choices):
            new_r = r * rng.uniform(1.5, 8)
            upgrades.append(
                model.PipeInsulationUpgrade(f"{pid}-i{k}", pid, new_r, rng.uniform(20, 600))
            )
    vb = None
    if variable:
        bases = [float(b) for b in range(-4, 25, rng.choice([1, 2, 4]))]
        setpoint = rng.uniform(18.0, 22.0)
        if clamp:
            # the top base below the setpoint: balance points straddle it, the top clamp binds
            bases = [b for b in bases if b <= setpoint - 3.0]
            gains = rng.uniform(600.0, 3000.0)
        else:
            gains = rng.uniform(200.0, 1500.0)
        vb = model.VariableBase(setpoint, gains, tuple(bases), degree_day_table(rng, bases))
    fuel = fuel_by_slug(rng.choice(FUELS))
    efficiency = rng.uniform(2.0, 4.0) if fuel.slug == "heat_pump" else rng.uniform(0.6, 0.98)
    cooling = None
    if rng.random() < 0.6:
        price = rng.uniform(0.05, 0.4)
        if rng.random() < 0.5:
            cooling = model.Cooling(price, seer=rng.uniform(10, 22))
        else:
            cooling = model.Cooling(price, cop=rng.uniform(2.5, 5))
    price = rng.uniform(0.05, 3.0) * (100 if fuel.slug == "wood" else 1)
    house = model.House(
        surfaces=tuple(surfaces),
        climate=model.Climate(rng.uniform(1000, 4000), rng.uniform(0, 800), vb),
        heating=model.Heating(fuel, efficiency, price),
        economics=model.Economics(
            discount_rate=rng.uniform(0.0, 0.08),
            escalation_rate=rng.uniform(-0.02, 0.05),
            years=rng.randint(5, 40),
        ),
        air_leakage=leak,
        cooling=cooling,
        pipe_runs=tuple(pipes),
        spaces=tuple(space_rows),
    )
    return house, upgrades


def random_systems_house(
    rng: random.Random,
    *,
    max_sets: int = 4096,
    bins: bool = True,
    ducts: bool = False,
    ventilation: bool = False,
    sun: bool = False,
) -> tuple[model.House, list[model.Upgrade]]:
    """A :func:`random_house` with systems: temperature bins, ducts in a buffer space (b
    computed or given), outdoors or indoors with sealing and insulation upgrades, mechanical
    ventilation and altitude, and windows whose sun moves the variable base (their
    upgrades change the SHGC). At most ``max_sets`` allowed sets."""
    duct_room = 9 if ducts else 1
    house, upgrades = random_house(
        rng, max_sets=max(1, max_sets // duct_room), variable=True if sun else None, spaces=True
    )
    vb = house.climate.variable_base
    surfaces = list(house.surfaces)
    if sun and vb is not None:
        bases = np.array(vb.bases_c)
        for i, s in enumerate(surfaces):
            if rng.random() < 0.6:
                # mean plane irradiance over the heating days at base τ: rising with τ
                start, rise = rng.uniform(10.0, 60.0), rng.uniform(0.0, 6.0)
                steps = np.abs([rng.gauss(0.0, 1.0) for _ in bases]).cumsum()
                plane = tuple(float(v) for v in start + rise * (bases - bases[0]) + steps)
                surfaces[i] = dataclasses.replace(
                    s, kind="window", shgc=rng.uniform(0.2, 0.8), solar_w_per_m2=plane
                )
        kinds = {s.id: s.kind for s in surfaces}
        upgrades = [
            dataclasses.replace(u, shgc=rng.choice([None, rng.uniform(0.1, 0.7)]))
            if isinstance(u, model.AssemblyUpgrade) and kinds[u.surface_id] == "window"
            else u
            for u in upgrades
        ]
    bin_rows: tuple[tuple[float, float], ...] = ()
    if bins:
        bin_rows = tuple(
            (float(t), rng.uniform(0.0, 600.0)) for t in range(-20, 26, rng.choice([2, 5]))
        )
    duct_system = None
    if ducts:
        places = ["conditioned", "outdoors"] + [s.id for s in house.spaces]
        duct_system = duct_physics.DuctSystem(
            supply=duct_physics.DuctSide(
                rng.choice(places), rng.uniform(0.0, 0.2), rng.uniform(0.7, 2.0), rng.uniform(5, 30)
            ),
            returns=duct_physics.DuctSide(
                rng.choice(places), rng.uniform(0.0, 0.2), rng.uniform(0.7, 2.0), rng.uniform(2, 15)
            ),
            air_flow_m3_per_s=rng.uniform(0.3, 0.8),
            temperature_rise_k=rng.uniform(25.0, 40.0),
        )
        for k in range(rng.randint(0, 2)):
            upgrades.append(
                sysm.DuctSealingUpgrade(
                    f"seal-{k}",
                    supply_leakage_after=rng.choice([None, rng.uniform(0.0, 0.05)]),
                    return_leakage_after=rng.uniform(0.0, 0.05),
                    installed_cost=rng.uniform(200, 1500),
                )
            )
        for k in range(rng.randint(0, 2)):
            upgrades.append(
                sysm.DuctInsulationUpgrade(
                    f"wrap-{k}",
                    supply_r_after=rng.uniform(1.0, 2.5),
                    return_r_after=rng.choice([None, rng.uniform(1.0, 2.5)]),
                    installed_cost=rng.uniform(200, 1500),
                )
            )
    vent = None
    elevation = None
    if ventilation:
        kind = rng.choice(["hrv", "erv", "exhaust", "supply"])
        recovery = rng.uniform(0.5, 0.8) if kind in ("hrv", "erv") else 0.0
        vent = vent_physics.MechanicalVentilation(kind, rng.uniform(0.01, 0.06), recovery)
        elevation = rng.choice([None, rng.uniform(0.0, 2500.0)])
    systems = sysm.Systems(
        indoor_c=rng.uniform(19.0, 22.0),
        heating_base_c=rng.uniform(12.0, 18.0),
        season_outdoor_c=rng.choice([None, None, rng.uniform(-5.0, 8.0)]),
        ducts=duct_system,
        bins=bin_rows,
        ventilation=vent,
        air_heat_capacity=vent_physics.air_heat_capacity_si(elevation),
        elevation_m=elevation,
    )
    return dataclasses.replace(house, surfaces=tuple(surfaces), systems=systems), upgrades
