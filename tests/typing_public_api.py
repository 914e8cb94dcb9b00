"""Type-checked by tests/test_types.py, never run: the public API as a user's code calls it.

A name the type checker cannot see (a function made at run time, a name dropped from a module)
fails here as 'Module has no attribute'.  Each line is a call the README and the docstrings show.
"""

from __future__ import annotations

import numpy as np

import stillair
from stillair.correlations import CORRELATIONS, GEOMETRIES, NusseltResult, get_correlation, methods_for, nusselt
from stillair.gases import GAS_PROPERTY_TABLE, GasProperties, gas_properties, parse_gas

density: float | np.ndarray = stillair.gas_density("air", 20.0)
conductivity = stillair.gas_conductivity("argon:0.9, air:0.1", 10.0, 101325.0)
beta_ideal = stillair.air_expansion(20.0, ideal=True)
beta_real = stillair.gas_expansion("argon", np.array([0.0, 20.0]), 90000.0, ideal=False)
properties: GasProperties = gas_properties("krypton", 15.0)
air = (stillair.air_density(20.0), stillair.air_viscosity(20.0), stillair.air_kinvisc(20.0),
       stillair.air_conductivity(20.0), stillair.air_cp(20.0), stillair.air_diffusivity(20.0),
       stillair.air_prandtl(20.0))
gas = (stillair.gas_viscosity("co2", 20.0), stillair.gas_kinvisc("co2", 20.0), stillair.gas_cp("co2", 20.0),
       stillair.gas_diffusivity("co2", 20.0), stillair.gas_prandtl("co2", 20.0))
components: tuple[tuple[str, float], ...] = parse_gas("argon:0.9, air:0.1")
names = [info.name for info in GAS_PROPERTY_TABLE]

result: NusseltResult = nusselt("hplate", "auto", "hot-up", ra=1e8, pr=0.71)
methods: list[str] = methods_for("cavity")
title: str = get_correlation("hcyl", "churchill-chu").title
spread = stillair.nu_spread("hcyl", 1e6, 0.71)
registered = (len(CORRELATIONS), sorted(GEOMETRIES))

h_gap = stillair.h_cavity(20.0, 10.0, 0.02, 1.0)
h_plate = stillair.h_vplate(60.0, 20.0, 0.5)
nu = stillair.nu_vplate(1e8, 0.71)
network = stillair.solve_network([["wall", "in", "out", "conduction", 0.1, 0.5, 2.0, None, None, None]],
                                 [["in", "T", 20.0], ["out", "T", 0.0]])
heat: float = network.heat["wall"]
vented = stillair.solve_network([["vent", "air", "out", "vent", 0.01, 0.01, 0.5, None, None, None]],
                                [["air", "Q", 50.0], ["out", "T", 20.0]])
mass_flow: float = vented.branches["vent"].mass_flow
stack: float | np.ndarray = stillair.stack_flow(40.0, 20.0, 0.01, 0.01, 0.5, extra_loss=3.8)
fan_flow: float | np.ndarray = stillair.airflow_for(200.0, 10.0, t_air=25.0)

dew: float | np.ndarray = stillair.dew_point(20.0, 0.5)
humid = (stillair.saturation_pressure(-5.0, over="ice"), stillair.vapour_pressure(20.0, 0.5),
         stillair.humidity_ratio(20.0, 0.5, 90000.0), stillair.surface_rh(20.0, 0.5, 12.0),
         stillair.temperature_factor(15.0, 20.0, 0.0))
answer: stillair.HeatForTemperature = stillair.heat_for_temperature(
    [["wall", "box", "room", "resistance", 0.5]], [["room", "T", 20.0]], "box", 45.0)
allowed: float = answer.heat
insulation: float | np.ndarray = stillair.insulation_thickness(6.0, 25.0, 20.0, 0.035, 0.9, "hcyl", 0.06)
