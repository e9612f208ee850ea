"""The scenario's ``[uncertainty]``: a distribution for each uncertain input of a plan, and how many
samples to draw.

Each input is one of four distributions with plain parameters in the user's units:

- ``{distribution = "normal", mean = ..., sd = ...}`` (cut at ``TAIL_SD`` = 4 standard deviations,
  beyond which lie 6 in 100,000 draws, so that every draw stays within the input's limits);
- ``{distribution = "lognormal", median = ..., log_sd = ...}`` (``log_sd`` the standard deviation of
  the natural logarithm: 0.18 is a scatter of about 20 %; factors only, cut at 4 ``log_sd``);
- ``{distribution = "uniform", low = ..., high = ...}``;
- ``{distribution = "triangular", low = ..., mode = ..., high = ...}``.

A spread of 0 (``sd = 0``, ``log_sd = 0``, ``low = high``) holds the input at one value.  The inputs
(``INPUTS``) and what each changes in a sampled plan:

| input | kind | applied as |
|---|---|---|
| ``viscosity_factor`` | factor | ``make_plan(viscosity_factor=)``, on top of ``[calibration]`` |
| ``ambient_bias`` | temperature difference | added to every ambient (``with_changes(ambient_shift=)``) |
| ``wind_factor`` | factor | multiplies every wind speed (``with_changes(wind_factor=)``) |
| ``heat_loss_factor`` | factor | multiplies ``calibration.heat_loss_factor`` |
| ``source_temperature_bias`` | temperature difference | added to ``source.temperature`` |
| ``pump_slip_factor`` | factor | multiplies ``calibration.slip_factor`` (positive-displacement pumps) |
| ``pump_head_factor`` | factor | multiplies the heads of the water curve (centrifugal pumps) |

An input left out takes its default (``planner.sweeps.odds_inputs.default_distribution``: each with
its figure and its source or "common practice").
"""

from __future__ import annotations

import math
from typing import Literal, Optional

from pydantic import Field, field_validator, model_validator

from planner.scenario.fields import _Model
from planner.scenario.quantities import Quantity

DISTRIBUTIONS = ("normal", "lognormal", "uniform", "triangular")
PARAMETERS = {"normal": ("mean", "sd"), "lognormal": ("median", "log_sd"), "uniform": ("low", "high"),
              "triangular": ("low", "mode", "high")}
ALL_PARAMETERS = ("mean", "sd", "median", "log_sd", "low", "mode", "high")
TAIL_SD = 4.0              # normal and lognormal draws are cut at this many standard deviations
DEFAULT_SAMPLES = 128      # a power of two (Sobol points come in powers of two)
MIN_SAMPLES = 16           # at least 4 scrambles of 4 points
MAX_SAMPLES = 4096
DEFAULT_SEED = 21
DEFAULT_CONFIDENCE = 0.9   # limits.confidence: the chance a plan must reach ("nine times out of ten")

# input -> (kind: "factor" or "temperature_difference", lowest and highest value a draw may take [SI],
#           words for messages)
INPUTS = {
    "viscosity_factor": ("factor", 0.05, 20.0, "the viscosity factor (the [calibration] factor's range)"),
    "ambient_bias": ("temperature_difference", -50.0, 50.0, "the ambient bias"),
    "wind_factor": ("factor", 0.0, 10.0, "the wind factor"),
    "heat_loss_factor": ("factor", 0.01, 20.0, "the heat-loss factor (the [calibration] factor's range)"),
    "source_temperature_bias": ("temperature_difference", -100.0, 100.0, "the source temperature bias"),
    "pump_slip_factor": ("factor", 0.0, 20.0, "the slip factor (the [calibration] factor's range)"),
    "pump_head_factor": ("factor", 0.5, 1.5, "the pump head factor"),
}


def _extremes(d) -> tuple[float, float]:
    """The lowest and highest value a distribution draws (normal and lognormal cut at TAIL_SD)."""
    if d.distribution == "normal":
        return d.mean - TAIL_SD * d.sd, d.mean + TAIL_SD * d.sd
    if d.distribution == "lognormal":
        return d.median * math.exp(-TAIL_SD * d.log_sd), d.median * math.exp(TAIL_SD * d.log_sd)
    return d.low, d.high


class _Distribution(_Model):
    """One input's distribution; the parameters its ``distribution`` needs, and no others."""

    distribution: Literal["normal", "lognormal", "uniform", "triangular"]

    @model_validator(mode="after")
    def _parameters(self):
        needed = PARAMETERS[self.distribution]
        given = [p for p in ALL_PARAMETERS if getattr(self, p, None) is not None]
        missing = [p for p in needed if p not in given]
        extra = [p for p in given if p not in needed]
        if missing or extra:
            words = [f"missing {', '.join(missing)}"] if missing else []
            words += [f"{', '.join(extra)} not used by it"] if extra else []
            raise ValueError(f"a {self.distribution} distribution takes {', '.join(needed)} ({'; '.join(words)})")
        if self.distribution == "triangular" and not (self.low <= self.mode <= self.high):
            raise ValueError("a triangular distribution needs low <= mode <= high")
        if self.distribution == "uniform" and not self.low <= self.high:
            raise ValueError("a uniform distribution needs low <= high")
        return self

    @property
    def parameters(self) -> dict:
        """The distribution's parameters (SI floats), in the order ``PARAMETERS`` lists them."""
        return {p: getattr(self, p) for p in PARAMETERS[self.distribution]}

    @property
    def extremes(self) -> tuple[float, float]:
        return _extremes(self)


_FACTOR = Field(None, ge=0.0, le=100.0)
_SPREAD = Field(None, ge=0.0, le=10.0)


class FactorDistribution(_Distribution):
    """A distribution of a factor (a plain number; 1 leaves the model as it is)."""

    mean: Optional[float] = _FACTOR
    sd: Optional[float] = _SPREAD
    median: Optional[float] = Field(None, gt=0.0, le=100.0)
    log_sd: Optional[float] = Field(None, ge=0.0, le=2.0, description="standard deviation of ln(factor)")
    low: Optional[float] = _FACTOR
    mode: Optional[float] = _FACTOR
    high: Optional[float] = _FACTOR


Shift = Quantity("temperature_difference", ge=-100.0, le=100.0, description="temperature difference")
Spread = Quantity("temperature_difference", ge=0.0, le=50.0, description="standard deviation")


class ShiftDistribution(_Distribution):
    """A distribution of a temperature difference added to a temperature (e.g. ``"1.5 K"``)."""

    distribution: Literal["normal", "uniform", "triangular"]
    mean: Optional[Shift] = None
    sd: Optional[Spread] = None
    low: Optional[Shift] = None
    mode: Optional[Shift] = None
    high: Optional[Shift] = None

    @field_validator("distribution", mode="before")
    @classmethod
    def _no_lognormal(cls, value):
        if value == "lognormal":
            raise ValueError("a temperature difference can be negative: give a normal, uniform or triangular "
                             "distribution (lognormal is for factors)")
        return value


class Uncertainty(_Model):
    """The uncertain inputs of a plan and the sampling (``plan --uncertainty``)."""

    samples: int = Field(DEFAULT_SAMPLES, description="Sobol points, a power of two from 16 to 4096")
    seed: int = Field(DEFAULT_SEED, ge=0, le=2 ** 32 - 1, description="seed of the scrambles")
    viscosity_factor: Optional[FactorDistribution] = None
    ambient_bias: Optional[ShiftDistribution] = None
    wind_factor: Optional[FactorDistribution] = None
    heat_loss_factor: Optional[FactorDistribution] = None
    source_temperature_bias: Optional[ShiftDistribution] = None
    pump_slip_factor: Optional[FactorDistribution] = None
    pump_head_factor: Optional[FactorDistribution] = None

    @field_validator("samples")
    @classmethod
    def _power_of_two(cls, value):
        return checked_samples(value)

    @field_validator(*INPUTS)
    @classmethod
    def _within_limits(cls, value, info):
        problem = limit_problem(info.field_name, value)
        if problem:
            raise ValueError(problem)
        return value


def checked_samples(value: int) -> int:
    """``value`` when it is a power of two from MIN_SAMPLES to MAX_SAMPLES; else ValueError saying so."""
    if isinstance(value, bool) or not isinstance(value, int) or not MIN_SAMPLES <= value <= MAX_SAMPLES \
            or value & (value - 1):
        raise ValueError(f"{value!r} samples: give a power of two from {MIN_SAMPLES} to {MAX_SAMPLES} (e.g. 64, "
                         f"{DEFAULT_SAMPLES}, 256): Sobol points keep their balance only in powers of two")
    return value


def limit_problem(name: str, distribution) -> str:
    """Words naming ``name`` and its limit when the distribution draws beyond the input's range, else ""."""
    if distribution is None:
        return ""
    kind, lowest, highest, words = INPUTS[name]
    low, high = distribution.extremes
    if lowest <= low and high <= highest:
        return ""
    unit = " K" if kind == "temperature_difference" else ""
    cut = " (normal and lognormal draws are cut at 4 standard deviations)" if distribution.distribution in \
        ("normal", "lognormal") else ""
    return (f"its draws reach {low:.4g}{unit} to {high:.4g}{unit}{cut}; {words} must stay within "
            f"{lowest:g}{unit} to {highest:g}{unit}: give a smaller spread")
