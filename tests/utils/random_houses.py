"""Seeded random pure houses (server.physics.house_model) with their upgrades, for the array
core and optimiser tests: surfaces outdoors and facing buffer spaces (b computed or given),
air sealing, pipe runs, fixed or variable base (convex tables built from daily means, or a
table whose top clamp binds), cooling or none, every fuel."""

from __future__ import annotations

import random

import numpy as np

from server.physics import buffer_spaces as buffers
from server.physics import house_model as model
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
