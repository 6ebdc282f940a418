"""The contractor's quick question: one run of pipe, one valve closing at its end."""

from __future__ import annotations

import math
from dataclasses import dataclass

from knockproof import catalog
from knockproof.analysis.steady import water_at
from knockproof.physics import surge as sg
from knockproof.physics import wave_speed as ws
from knockproof.results import Closure


@dataclass(frozen=True)
class RunEstimate:
    """Closed-form surge for one run of pipe closed at its end (SI, gauge pressures)."""

    material: str
    nominal_size: str
    inside_diameter_m: float
    length_m: float
    flow_m3_per_s: float
    closure_time_s: float
    static_pressure_pa: float
    temperature_c: float
    restraint: str
    density_kg_m3: float
    velocity_m_per_s: float
    wave_speed_m_per_s: float
    critical_time_s: float
    closure: Closure
    joukowsky_surge_pa: float
    surge_pa: float
    peak_pressure_pa: float


def estimate_run(
    material: str,
    size: str,
    length_m: float,
    flow_m3_per_s: float,
    closure_time_s: float,
    static_pressure_pa: float,
    temperature_c: float = 15.0,
    restraint: str = "anchored",
) -> RunEstimate:
    """Velocity, wave speed, 2L/a, rapid or slow, surge and peak for one run of pipe.

    The run is taken as fed from a point that holds its pressure (a main much larger than the run),
    so the reflection length is the run's length.
    """
    m = catalog.get_material(material)
    s = catalog.get_size(material, catalog.normalize_nominal(size))
    w = water_at(temperature_c)
    a = ws.wave_speed(
        w.bulk_modulus,
        w.density,
        m.elastic_modulus_pa(temperature_c),
        m.poisson_ratio,
        s.inside_diameter_m,
        s.wall_m,
        restraint,
    )
    area = math.pi * s.inside_diameter_m**2 / 4.0
    v = flow_m3_per_s / area
    tcrit = sg.critical_time_s(length_m, a)
    surge = sg.closure_surge_pa(w.density, a, length_m, v, closure_time_s)
    return RunEstimate(
        material=material,
        nominal_size=s.nominal,
        inside_diameter_m=s.inside_diameter_m,
        length_m=length_m,
        flow_m3_per_s=flow_m3_per_s,
        closure_time_s=closure_time_s,
        static_pressure_pa=static_pressure_pa,
        temperature_c=temperature_c,
        restraint=restraint,
        density_kg_m3=w.density,
        velocity_m_per_s=v,
        wave_speed_m_per_s=a,
        critical_time_s=tcrit,
        closure="rapid" if sg.is_rapid_closure(closure_time_s, tcrit) else "slow",
        joukowsky_surge_pa=sg.joukowsky_surge_pa(w.density, a, v),
        surge_pa=surge,
        peak_pressure_pa=static_pressure_pa + surge,
    )
