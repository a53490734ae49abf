"""Cost of the liquid-property calls a solver makes: prints microseconds per call.

Run: .venv/bin/python tests/benchmarks/bench_fluid_properties.py
"""

from __future__ import annotations

import subprocess
import sys
import timeit


def per_call_us(stmt, number: int) -> float:
    return min(timeit.repeat(stmt, number=number, repeat=5)) / number * 1e6


def main() -> None:
    code = "import workbench.core.fluid, workbench.core.pipes, workbench.core.atmosphere"
    t = timeit.timeit(lambda: subprocess.run([sys.executable, "-c", code], check=True), number=3) / 3
    print(f"python start + import fluid, pipes, atmosphere: {t * 1e3:8.1f} ms")

    from workbench.core import fluid
    from workbench.core.atmosphere import atmospheric_pressure
    from workbench.core.fluid import catalogue, water
    from workbench.core.pipes import pipe_dimensions

    fluid.water_properties(293.15)  # first call pays the import of chemicals (~0.2 s)
    print(f"water_properties, cached (same T, p):        "
          f"{per_call_us(lambda: fluid.water_properties(293.15), 100_000):8.2f} us")

    def uncached():
        water._water_cached.cache_clear()
        fluid.water_properties(293.15)

    print(f"water_properties, uncached (IAPWS-95 solve): {per_call_us(uncached, 2_000):8.2f} us")
    fluid.liquid_properties("ethylene_glycol", 293.15)

    def liquid_uncached():
        catalogue._liquid_cached.cache_clear()
        fluid.liquid_properties("ethylene_glycol", 293.15)

    print(f"liquid_properties (DIPPR), uncached:         {per_call_us(liquid_uncached, 2_000):8.2f} us")
    print(f"atmospheric_pressure:                        "
          f"{per_call_us(lambda: atmospheric_pressure(1234.0), 100_000):8.2f} us")
    pipe_dimensions("4", "40")
    print(f"pipe_dimensions('4 in', '40'):               "
          f"{per_call_us(lambda: pipe_dimensions('4 in', '40'), 20_000):8.2f} us")


if __name__ == "__main__":
    main()
