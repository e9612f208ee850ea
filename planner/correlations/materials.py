"""Insulation materials: thermal conductivity linear in mean temperature, with its source.

Each entry: (conductivity at the reference mean temperature [W/m K], reference mean temperature [K],
slope [W/m K per K], maximum service temperature [K], source).  Values are typical figures for
planning, not a manufacturer's data sheet: enter your own insulation's figure where you have it.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class InsulationMaterial:
    """An insulation material: conductivity linear in the layer's mean temperature [W/(m K)],
    k(T) = conductivity + slope (T - reference_temperature), at least 1e-4.

    Examples
    --------
    Calcium silicate at a 38 °C mean: ASTM C533 Type I allows at most 0.059 W/(m K) [1]:

    >>> INSULATION_MATERIALS["calcium_silicate"].conductivity_at(311.15) <= 0.059
    True

    References
    ----------
    [1] ASTM C533, Standard Specification for Calcium Silicate Block and Pipe Thermal Insulation,
        Type I [pub] (the other materials' figures: see their ``source``).
    """

    name: str
    conductivity: float          # W/m K at reference_temperature (mean temperature of the layer)
    reference_temperature: float  # K
    slope: float                 # W/m K per K
    max_service_temperature: float  # K
    source: str

    def conductivity_at(self, mean_temperature: float) -> float:
        return max(1e-4, self.conductivity + self.slope * (mean_temperature - self.reference_temperature))


INSULATION_MATERIALS: dict[str, InsulationMaterial] = {
    "mineral_wool": InsulationMaterial(
        "mineral_wool", 0.036, 311.15, 1.1e-4, 923.15,
        "about 0.036-0.049 W/m K at 38-150 degC mean [mem, unverified; typical pipe-section data]"),
    "calcium_silicate": InsulationMaterial(
        "calcium_silicate", 0.055, 311.15, 1.0e-4, 922.15,
        "ASTM C533 Type I: at most 0.059 W/m K at 38 degC mean [pub]; slope [mem]"),
    "cellular_glass": InsulationMaterial(
        "cellular_glass", 0.048, 297.15, 1.3e-4, 703.15,
        "about 0.048 W/m K (CIBSE Guide A) [pub]; slope [mem]"),
    "polyurethane_foam": InsulationMaterial(
        "polyurethane_foam", 0.025, 297.15, 1.0e-4, 383.15,
        "rigid PUR/PIR about 0.022-0.028 W/m K at 24 degC mean [mem, unverified]"),
    "aerogel_blanket": InsulationMaterial(
        "aerogel_blanket", 0.017, 297.15, 4.0e-5, 923.15,
        "about 0.015-0.021 W/m K at 0-100 degC mean [mem, unverified]"),
    "expanded_perlite": InsulationMaterial(
        "expanded_perlite", 0.065, 311.15, 1.2e-4, 922.15,
        "about 0.06-0.07 W/m K at 38 degC mean [mem, unverified]"),
}

# Wall conductivity by material [W/m K] (handbook order of magnitude; the wall is a small resistance).
WALL_CONDUCTIVITY = {
    "carbon_steel": 45.0,      # about 43-50 W/m K at 20-200 degC [mem]
    "stainless_steel": 16.0,   # 304/316 about 15-17 W/m K [mem]
    "rubber_hose": 0.25,       # reinforced elastomer about 0.2-0.3 W/m K [mem]
    "composite_hose": 0.2,     # multi-layer thermoplastic about 0.2 W/m K [mem]
}

# Absolute roughness by surface [m] (Moody-chart values, e.g. in White, Fluid Mechanics, Table 6.1).
ROUGHNESS = {
    "commercial_steel": 4.6e-5,
    "stainless_steel": 1.5e-5,
    "smooth_hose": 5.0e-6,
    "loading_arm": 4.6e-5,
}
