"""Benchmark of stillair.gases (a plain script: prints numbers, asserts nothing).

    python tests/bench/bench_gases.py
"""

import time
import timeit

import numpy as np
import CoolProp.CoolProp as CP

from stillair import gases


def per_call(function, number):
    return min(timeit.repeat(function, number=number, repeat=5)) / number


def main():
    print("first use (table build, includes CoolProp evaluation):")
    for gas in gases.GAS_NAMES + ("argon:0.9, air:0.1",):
        start = time.perf_counter()
        gases.gas_conductivity(gas, 10.0)
        print(f"  {gas:<20} {1e3 * (time.perf_counter() - start):8.1f} ms")

    rng = np.random.default_rng(0)
    t10k = rng.uniform(-20.0, 200.0, 10_000)
    p10k = rng.uniform(5.0e4, 1.5e5, 10_000)
    print("10,000 temperatures in one call:")
    for label, call in [
        ("air_conductivity(t)", lambda: gases.air_conductivity(t10k)),
        ("gas_viscosity('argon', t)", lambda: gases.gas_viscosity("argon", t10k)),
        ("gas_conductivity(mixture, t)", lambda: gases.gas_conductivity("argon:0.9, air:0.1", t10k)),
        ("air_conductivity(t, p varying)", lambda: gases.air_conductivity(t10k, p10k)),
        ("gas_properties('air', t)", lambda: gases.gas_properties("air", t10k)),
    ]:
        print(f"  {label:<32} {1e3 * per_call(call, 20):8.2f} ms")

    print("single scalar calls:")
    repeated = lambda: gases.air_conductivity(20.0)
    repeated()
    print(f"  {'air_conductivity(20.0), repeated':<44} {1e6 * per_call(repeated, 20000):6.2f} us")
    temperatures = [float(x) for x in rng.uniform(-20.0, 200.0, 400_000)]
    for label, function in [
        ("air_conductivity(t), new t each call", lambda t: gases.air_conductivity(t)),
        ("gas_conductivity(mixture, t), new t", lambda t: gases.gas_conductivity("argon:0.9, air:0.1", t)),
        ("gas_properties('air', t), new t", lambda t: gases.gas_properties("air", t)),
        ("gas_properties('krypton', t, 9e4), new t", lambda t: gases.gas_properties("krypton", t, 9e4)),
    ]:
        gases._scalar_state.cache_clear()
        sample = iter(temperatures)
        print(f"  {label:<44} {1e6 * per_call(lambda: function(next(sample)), 20000):6.2f} us")
    props_si = lambda: CP.PropsSI("L", "T", 293.15, "P", 101325.0, "Air")
    label = 'CoolProp PropsSI("L", "T", 293.15, "P", ..., "Air")'
    print(f"  {label:<44} {1e6 * per_call(props_si, 5000):6.2f} us")
    state = CP.AbstractState("HEOS", "Air")

    def abstract_state():
        state.update(CP.PT_INPUTS, 101325.0, 293.15)
        return state.conductivity()

    print(f"  {'CoolProp AbstractState update + k':<44} {1e6 * per_call(abstract_state, 5000):6.2f} us")


if __name__ == "__main__":
    main()
