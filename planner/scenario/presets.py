"""Generic product presets: ILLUSTRATIVE values, invented to be plausible, not data sheets.

Each preset is written in the scenario-file form (so ``product = {preset = "..."}`` works and any
field can be overridden).  Before a real transfer, replace them with the product's own lab data.
"""

from __future__ import annotations

PRODUCT_PRESETS: dict[str, dict] = {
    "glucose_syrup_42de": {
        "name": "Glucose syrup, 42 DE, about 80 % solids (illustrative)",
        "illustrative": True,
        "density": "1415 kg/m3", "density_reference_temperature": "20 degC", "density_slope": "-0.55 kg/m3/K",
        "specific_heat": "2.55 kJ/kg/K", "thermal_conductivity": "0.36 W/m/K",
        "viscosity": {"law": "vft", "points": [
            {"temperature": "25 degC", "viscosity": "60000 cP"},
            {"temperature": "40 degC", "viscosity": "12000 cP"},
            {"temperature": "60 degC", "viscosity": "2600 cP"},
        ]},
        "no_flow_temperature": "15 degC", "max_temperature": "70 degC", "water_activity": 0.78,
    },
    "cane_molasses": {
        "name": "Cane molasses (illustrative)",
        "illustrative": True,
        "density": "1400 kg/m3", "density_reference_temperature": "20 degC", "density_slope": "-0.5 kg/m3/K",
        "specific_heat": "2.3 kJ/kg/K", "thermal_conductivity": "0.34 W/m/K",
        "viscosity": {"law": "andrade", "points": [
            {"temperature": "20 degC", "viscosity": "22000 cP"},
            {"temperature": "50 degC", "viscosity": "2100 cP"},
        ]},
        "no_flow_temperature": "5 degC", "max_temperature": "55 degC", "water_activity": 0.65,
    },
    "refined_palm_oil": {
        "name": "Refined palm oil (illustrative)",
        "illustrative": True,
        "density": "890 kg/m3", "density_reference_temperature": "50 degC", "density_slope": "-0.65 kg/m3/K",
        "specific_heat": "2.05 kJ/kg/K", "thermal_conductivity": "0.17 W/m/K",
        "viscosity": {"law": "andrade", "points": [
            {"temperature": "45 degC", "viscosity": "32 cP"},
            {"temperature": "70 degC", "viscosity": "14 cP"},
        ]},
        "no_flow_temperature": "36 degC", "max_temperature": "65 degC", "vapour_pressure": "100 Pa",
    },
    "residual_fuel_380": {
        "name": "Residual fuel oil, 380 cSt class (illustrative)",
        "illustrative": True,
        "density": "985 kg/m3", "density_reference_temperature": "15 degC", "density_slope": "-0.62 kg/m3/K",
        "specific_heat": "1.85 kJ/kg/K", "thermal_conductivity": "0.12 W/m/K",
        "viscosity": {"law": "walther", "points": [
            {"temperature": "50 degC", "kinematic_viscosity": "370 cSt"},
            {"temperature": "100 degC", "kinematic_viscosity": "33 cSt"},
        ]},
        "no_flow_temperature": "27 degC", "max_temperature": "120 degC", "flash_point": "75 degC",
        "vapour_pressure": "2 kPa",
    },
    "paving_bitumen_70_100": {
        "name": "Paving bitumen, 70/100 pen (illustrative)",
        "illustrative": True,
        "density": "1020 kg/m3", "density_reference_temperature": "25 degC", "density_slope": "-0.6 kg/m3/K",
        "specific_heat": "1.9 kJ/kg/K", "thermal_conductivity": "0.16 W/m/K",
        "viscosity": {"law": "walther", "points": [
            {"temperature": "135 degC", "kinematic_viscosity": "300 cSt"},
            {"temperature": "170 degC", "kinematic_viscosity": "70 cSt"},
        ]},
        "no_flow_temperature": "100 degC", "max_temperature": "200 degC", "flash_point": "230 degC",
        "vapour_pressure": "500 Pa",
    },
    "polyether_polyol": {
        "name": "Polyether polyol, 3000 MW triol type (illustrative)",
        "illustrative": True,
        "density": "1020 kg/m3", "density_reference_temperature": "25 degC", "density_slope": "-0.75 kg/m3/K",
        "specific_heat": "1.95 kJ/kg/K", "thermal_conductivity": "0.18 W/m/K",
        "viscosity": {"law": "vft", "points": [
            {"temperature": "10 degC", "viscosity": "1900 cP"},
            {"temperature": "25 degC", "viscosity": "620 cP"},
            {"temperature": "50 degC", "viscosity": "160 cP"},
        ]},
        "no_flow_temperature": "-25 degC", "max_temperature": "80 degC", "vapour_pressure": "100 Pa",
    },
    "filled_resin_paste": {
        "name": "Filled resin paste, shear-thinning with yield (illustrative)",
        "illustrative": True,
        "density": "1350 kg/m3", "density_reference_temperature": "25 degC", "density_slope": "-0.7 kg/m3/K",
        "specific_heat": "1.6 kJ/kg/K", "thermal_conductivity": "0.3 W/m/K",
        "rheology": "herschel_bulkley", "flow_index": 0.6, "yield_stress": "18 Pa",
        "viscosity": {"law": "andrade", "points": [
            {"temperature": "25 degC", "viscosity": "40000 cP"},
            {"temperature": "55 degC", "viscosity": "9000 cP"},
        ]},
        "no_flow_temperature": "10 degC", "max_temperature": "75 degC", "vapour_pressure": "200 Pa",
    },
}
