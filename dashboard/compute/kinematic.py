"""Kinematic viscosity beside the dynamic one, where operators read it (no Streamlit here; SI, m2/s).

Kinematic viscosity is the dynamic viscosity over the density at the same temperature, nu = mu / rho,
with the planner's own product (``planner.line.products.Product``: its ``density(T)`` and, on a
temperature grid, its ``kinematic_viscosity(T)``); the page shows it in cSt in both unit systems
(``planner.scenario.units.UNIT_SYSTEMS``: 1 cSt = 1 mm2/s).
"""

from __future__ import annotations

import numpy as np


def step_kinematic(nodes: dict, steps: dict, density) -> np.ndarray:
    """Kinematic viscosity [m2/s] at each mid-step of a march: the step's dynamic viscosity over the
    density at its bulk temperature (the step ends' temperatures interpolated at the mid-step; the
    product's density is linear in temperature, so this is the density of the step's mean temperature)."""
    x = np.asarray(steps["x"], dtype=float)
    temperature = np.interp(x, np.asarray(nodes["x"], dtype=float), np.asarray(nodes["temperature"], dtype=float))
    mu = np.asarray(steps["viscosity"], dtype=float)
    return mu / np.array([density(float(t)) for t in temperature])


def lab_kinematic(spec, product) -> list[float]:
    """Kinematic viscosity [m2/s] of each lab point: as given, or its dynamic viscosity over the product's
    density at the point's temperature."""
    return [p.kinematic_viscosity if p.kinematic_viscosity is not None
            else p.viscosity / product.density(p.temperature) for p in spec.viscosity.points]


def at_temperature(product, temperature_k: float | None) -> dict | None:
    """The product's dynamic [Pa s] and kinematic [m2/s] viscosity at one temperature [K] (None: none)."""
    if temperature_k is None:
        return None
    return {"temperature_k": temperature_k, "viscosity_pa_s": product.viscosity(temperature_k),
            "kinematic_m2_s": product.kinematic_viscosity(temperature_k)}
