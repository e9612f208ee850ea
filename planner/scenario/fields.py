"""The scenario's field types: quantity types with the limits a planner can defend (bounds in SI), the
temperature ceiling of the models, and the base of every section model (no unknown fields).
"""

from __future__ import annotations

from pydantic import BaseModel, ConfigDict

from planner.scenario.quantities import Quantity

# The highest temperature the planner's models are meant for (air, insulation, product data): the
# schema's highest input, and a stop wherever a plan computes past it.
TEMPERATURE_CEILING_K = 773.15

# Quantity types with the limits a planner can defend; bounds in SI.
Temperature = Quantity("temperature", gt=0.0, le=TEMPERATURE_CEILING_K, description="temperature")
Length = Quantity("length", ge=0.01, le=50_000.0, description="length along the line")
Elevation = Quantity("length", ge=-500.0, le=500.0, description="rise from segment inlet to outlet (negative: falls)")
Thickness = Quantity("small_length", gt=0.0, le=0.5, description="thickness")
Diameter = Quantity("small_length", gt=0.002, le=2.0, description="diameter")
Roughness = Quantity("small_length", ge=0.0, le=0.01, description="absolute roughness")
Conductivity = Quantity("conductivity", gt=0.0, le=500.0, description="thermal conductivity")
GaugePressure = Quantity("pressure", ge=-1.0e5, le=5.0e7, description="gauge pressure")
Rating = Quantity("pressure", gt=0.0, le=5.0e7, description="pressure rating (gauge)")
Flow = Quantity("volume_flow", ge=1.0e-6, le=2.0, description="volumetric flow rate")
WindSpeed = Quantity("speed", ge=0.0, le=60.0, description="wind speed")
# Electric trace heaters deliver up to a few hundred W per metre of heater run (mineral-insulated series
# cables are the strongest; polymer self-regulating and power-limiting heaters stay below about 100 W/m)
# [common practice, from memory]; all runs together are held to HEAT_PER_METRE_MAX per metre of pipe.
HEATER_OUTPUT_MAX_W_M = 500.0
HEAT_PER_METRE_MAX_W_M = 2000.0
LinearPower = Quantity("linear_power", ge=0.0, le=HEATER_OUTPUT_MAX_W_M, description="heater output per metre of heater run")
LinearConductance = Quantity("linear_conductance", gt=0.0, le=1000.0, description="conductance per metre")
Density = Quantity("density", gt=100.0, le=5000.0, description="density")
DensitySlope = Quantity("density_slope", ge=-10.0, le=10.0, description="change of density per kelvin")
SpecificHeat = Quantity("specific_heat", gt=100.0, le=10_000.0, description="specific heat capacity")
SpecificHeatSlope = Quantity("dimensionless", ge=-50.0, le=50.0, description="change of specific heat per kelvin [J/(kg·K²)]")
ConductivitySlope = Quantity("dimensionless", ge=-0.01, le=0.01, description="change of conductivity per kelvin [W/(m·K²)]")
DynamicViscosity = Quantity("dynamic_viscosity", gt=0.0, le=1.0e7, description="dynamic viscosity")
KinematicViscosity = Quantity("kinematic_viscosity", gt=0.0, le=1.0e4, description="kinematic viscosity")
YieldStress = Quantity("yield_stress", ge=0.0, le=1.0e5, description="yield stress")
# Air or soil around a line: -90 to +70 degC spans the recorded extremes at the Earth's surface
# ([mem] unverified: about -89 and +57 degC); the air and viscosity models are not used beyond it.
COLDEST_K = 183.15     # the lowest ambient temperature a scenario may give: a wall can be that cold
Ambient = Quantity("temperature", ge=COLDEST_K, le=343.15, description="ambient temperature")
VapourPressure = Quantity("pressure", ge=0.0, le=1.0e7, description="vapour pressure (absolute)")


# the pump's, vessels' and schedule's quantities (used by `plan`; `evaluate` needs only those above)
Head = Quantity("length", gt=0.0, le=2000.0, description="pump head")
Volume = Quantity("volume", gt=0.0, le=1.0e6, description="volume")
Power = Quantity("power", gt=0.0, le=1.0e7, description="power")
Speed = Quantity("rotational_speed", gt=0.0, le=500.0, description="rotational speed")
Duration = Quantity("time", gt=0.0, le=30 * 86400.0, description="duration")


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", validate_assignment=True)
