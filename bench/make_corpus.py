"""Write a generated, fully annotated corpus of about 60,000 lines for benchmarks.

The code is invented (a family of small thermal-fluid models, one per module) and is never
run; it exists so that the benchmark measures dimcheck where every value has a unit, the
opposite of an unannotated library such as scipy. A few modules carry one unit bug each.

    python bench/make_corpus.py OUT_FOLDER [--lines 60000]
"""

from __future__ import annotations

import argparse
from pathlib import Path

UNITS = '''from typing import Annotated

import numpy as np

Length = Annotated[float, "m"]
Time = Annotated[float, "s"]
Mass = Annotated[float, "kg"]
Speed = Annotated[float, "m/s"]
Pressure = Annotated[float, "Pa"]
Density = Annotated[float, "kg/m^3"]
Viscosity = Annotated[float, "Pa*s"]
Temperature = Annotated[float, "K"]
Power = Annotated[float, "W"]
Profile = Annotated[np.ndarray, "K"]

G = 9.80665  # [m/s^2]
'''

MODEL = '''"""Model {index}: an invented heated duct section, for benchmarks only."""
import math
from dataclasses import dataclass
from typing import Annotated

import numpy as np

from .units import G, Density, Length, Mass, Pressure, Profile, Speed, Temperature, Time, Viscosity, Power
{import_previous}


@dataclass
class Duct{index}:
    length: Length
    diameter: Length
    roughness: Annotated[float, "mm"]

    @property
    def area(self) -> Annotated[float, "m^2"]:
        return math.pi * self.diameter ** 2 / 4


def reynolds_{index}(rho: Density, u: Speed, d: Length, mu: Viscosity) -> Annotated[float, "1"]:
    return rho * u * d / mu


def friction_{index}(re: Annotated[float, "1"], rel: Annotated[float, "1"]) -> Annotated[float, "1"]:
    if re < 2300:
        return 64 / re
    return 0.25 / math.log10(rel / 3.7 + 5.74 / re ** 0.9) ** 2


def pressure_drop_{index}(duct: Duct{index}, rho: Density, u: Speed, mu: Viscosity) -> Pressure:
    re = reynolds_{index}(rho, u, duct.diameter, mu)
    f = friction_{index}(re, duct.roughness / 1000 / duct.diameter)
    return f * duct.length / duct.diameter * rho * u ** 2 / 2


def head_{index}(dp: Pressure, rho: Density) -> Length:
    return dp / (rho * G)


def flow_time_{index}(volume: Annotated[float, "m^3"], duct: Duct{index}, u: Speed) -> Time:
    rate = duct.area * u
    return volume / rate


def heating_{index}(m_dot: Annotated[float, "kg/s"], cp: Annotated[float, "J/(kg*K)"],
                    t_in: Temperature, t_out: Temperature) -> Power:
    rise = t_out - t_in
    return m_dot * cp * rise


def profile_{index}(z: Annotated[np.ndarray, "m"], t0: Temperature, slope: Annotated[float, "K/m"]) -> Profile:
    temps = t0 + slope * z
    mean = np.mean(temps)
    spread = np.max(temps) - np.min(temps)
    return np.clip(temps, mean - spread, mean + spread)


def decay_{index}(t: Time, tau: Time, start: Temperature, ambient: Temperature) -> Temperature:
    return ambient + (start - ambient) * math.exp(-t / tau)


def combine_{index}(a, b):
    return a + b


def summary_{index}(duct: Duct{index}, rho: Density, u: Speed, mu: Viscosity) -> Length:
    dp = pressure_drop_{index}(duct, rho, u, mu)
    total = combine_{index}(head_{index}(dp, rho), duct.length)
    {bug}
    return total
'''


def write_corpus(out: Path, lines: int) -> int:
    package = out / "corpus"
    package.mkdir(parents=True, exist_ok=True)
    (package / "__init__.py").write_text("")
    (package / "units.py").write_text(UNITS)
    written, index = UNITS.count("\n"), 0
    while written < lines:
        previous = f"from .model_{index - 1:04d} import head_{index - 1}" if index else ""
        bug = "wrong = total + u" if index % 50 == 7 else "checked = total + duct.diameter"
        text = MODEL.format(index=index, import_previous=previous, bug=bug)
        (package / f"model_{index:04d}.py").write_text(text)
        written += text.count("\n")
        index += 1
    return written


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("out")
    parser.add_argument("--lines", type=int, default=60000)
    args = parser.parse_args()
    total = write_corpus(Path(args.out), args.lines)
    print(f"wrote about {total} lines under {args.out}/corpus")


if __name__ == "__main__":
    main()
