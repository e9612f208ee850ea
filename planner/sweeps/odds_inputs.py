"""The uncertain inputs of a plan: their distributions (the scenario's ``[uncertainty]`` or the
defaults below), the Sobol draws, and a scenario with one draw applied.

Defaults (each the distribution of a multiplier or a shift *on top of* the scenario's own value):

| input | default | source |
|---|---|---|
| ``viscosity_factor`` | with a fitted ``[calibration]``: lognormal, median 1, ``log_sd`` = standard error / factor | the calibration fit (``planner.calibration.fit``, its standard error from s²(JᵀJ)⁻¹; to first order the relative error is the standard deviation of the logarithm) |
| | without: lognormal, median 1, ``log_sd`` 0.18 (about 20 % a standard deviation) | a delivered batch scatters 10-30 % about the lab law [common practice, from memory, as issue 21 gives it]; 0.18 is the middle of that range |
| ``ambient_bias`` | normal, mean 0 K, sd 1.5 K | forecasts of the air temperature a day ahead miss by 1-2.5 K [common practice, from memory] |
| ``wind_factor`` | lognormal, median 1, ``log_sd`` 0.3 | forecasts miss the wind by 1-2 m/s [common practice, from memory], about 30 % of the 3-6 m/s of a breezy night |
| ``heat_loss_factor`` | with a fitted heat loss: lognormal, median 1, ``log_sd`` = standard error / factor | the calibration fit, as above |
| | without: triangular, low 1.0, mode 1.2, high 2.5 | aged, damaged or wet insulation loses 1.2 to several times its design heat [common practice, from memory, as issue 21 gives it]; the top of 2.5 is the planner's choice within it (a site with wet insulation gives its own) |
| ``source_temperature_bias`` | normal, mean 0 K, sd 2 K | one thermometer reading against the bulk of a railcar or barge that stratifies by a few kelvin [common practice, from memory; planner's choice] |
| ``pump_slip_factor`` (PD) | with a fitted slip: lognormal, median 1, ``log_sd`` = standard error / factor | the calibration fit, as above |
| | without: triangular, low 1.0, mode 1.0, high 2.0 | slip grows as clearances wear, up to about twice the catalogue figure before an overhaul [common practice, from memory; planner's choice] |
| ``pump_head_factor`` (centrifugal) | triangular, low 0.95, mode 1.0, high 1.0 | worn wear rings and impeller lower a curve by a few per cent before an overhaul [common practice, from memory; planner's choice] |

Only the inputs that act on the scenario are sampled: the slip on a positive-displacement pump, the
head on a centrifugal one.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from planner.errors import ScenarioError
from planner.scenario.quantities import SI
from planner.scenario.schema import FactorDistribution, Scenario, ShiftDistribution, calibration_of
from planner.scenario.uncertainty_spec import DEFAULT_SAMPLES, DEFAULT_SEED, INPUTS, TAIL_SD
from planner.transfer.changes import assign_field, with_changes

MAX_SEED = 2 ** 32 - 1
SCRAMBLES = 4                # independent scrambles of the Sobol points: each percentile's sampling error
VISCOSITY_RANGE = (0.05, 20.0)   # the [calibration] viscosity factor's range: the product of both stays in it
LAB_LAW_LOG_SD = 0.18        # viscosity of a delivered batch about the lab law (see the table above)

_SOURCES = {
    "viscosity_factor": "a delivered batch scatters 10-30 % about the lab law [common practice, from memory]: "
                        "log_sd 0.18, the middle",
    "ambient_bias": "day-ahead forecasts miss the air temperature by 1-2.5 K [common practice, from memory]",
    "wind_factor": "forecasts miss the wind by 1-2 m/s [common practice, from memory], about 30 % of 3-6 m/s",
    "heat_loss_factor": "insulation in service loses 1.2 to several times its design heat [common practice, from "
                        "memory]; high 2.5 is the planner's choice",
    "source_temperature_bias": "one thermometer reading against a stratified bulk [common practice, from memory; "
                               "planner's choice]",
    "pump_slip_factor": "slip grows with wear up to about twice the catalogue figure [common practice, from memory; "
                        "planner's choice]",
    "pump_head_factor": "a worn pump's curve lies a few per cent low [common practice, from memory; planner's choice]",
}
_CALIBRATED = {"viscosity_factor": "viscosity_factor", "heat_loss_factor": "heat_loss_factor",
               "pump_slip_factor": "slip_factor"}


@dataclass(frozen=True)
class InputSpec:
    """One sampled input: its name, the distribution and where it comes from (words)."""

    name: str
    distribution: FactorDistribution | ShiftDistribution
    source: str

    @property
    def kind(self) -> str:
        return INPUTS[self.name][0]

    def as_dict(self) -> dict:
        return {"input": self.name, "distribution": self.distribution.distribution,
                "parameters": self.distribution.parameters,
                "unit": "K" if self.kind == "temperature_difference" else "-", "source": self.source}


def applies(scenario: Scenario, name: str) -> bool:
    """Whether input ``name`` acts on this scenario (the slip on a PD pump, the head on a centrifugal one)."""
    kind = scenario.pump.kind if scenario.pump is not None else None
    if name == "pump_slip_factor":
        return kind == "positive_displacement"
    if name == "pump_head_factor":
        return kind == "centrifugal"
    return True


def default_distribution(scenario: Scenario, name: str) -> InputSpec:
    """The default of input ``name`` for this scenario (the calibration's standard error where fitted)."""
    calibration = calibration_of(scenario)
    fitted = _CALIBRATED.get(name)
    error = getattr(calibration, f"{fitted}_standard_error", None) if fitted else None
    if error is not None:
        value = getattr(calibration, fitted)
        return InputSpec(name, FactorDistribution(distribution="lognormal", median=1.0, log_sd=min(error / value, 2.0)),
                         f"[calibration] fit: standard error {error:.3g} of {fitted} {value:.3g}")
    factor = {
        "viscosity_factor": dict(distribution="lognormal", median=1.0, log_sd=LAB_LAW_LOG_SD),
        "wind_factor": dict(distribution="lognormal", median=1.0, log_sd=0.3),
        "heat_loss_factor": dict(distribution="triangular", low=1.0, mode=1.2, high=2.5),
        "pump_slip_factor": dict(distribution="triangular", low=1.0, mode=1.0, high=2.0),
        "pump_head_factor": dict(distribution="triangular", low=0.95, mode=1.0, high=1.0),
    }
    shift = {"ambient_bias": dict(distribution="normal", mean=SI(0.0), sd=SI(1.5)),
             "source_temperature_bias": dict(distribution="normal", mean=SI(0.0), sd=SI(2.0))}
    model = FactorDistribution(**factor[name]) if name in factor else ShiftDistribution(**shift[name])
    return InputSpec(name, model, _SOURCES[name])


def input_specs(scenario: Scenario) -> list[InputSpec]:
    """The inputs sampled for this scenario, in ``INPUTS`` order: the scenario's own distributions, the
    defaults for the rest."""
    given = scenario.uncertainty
    specs = []
    for name in INPUTS:
        if not applies(scenario, name):
            if given is not None and getattr(given, name) is not None:   # given, it would be ignored: say so
                kind = scenario.pump.kind.replace("_", "-") if scenario.pump is not None else "no"
                wants = "positive-displacement" if name == "pump_slip_factor" else "centrifugal"
                raise ScenarioError([(f"uncertainty.{name}", f"acts on a {wants} pump only; this scenario has a "
                                      f"{kind} pump: leave it out")])
            continue
        own = getattr(given, name) if given is not None else None
        specs.append(InputSpec(name, own, "[uncertainty] of the scenario") if own is not None
                     else default_distribution(scenario, name))
    return specs


def checked_seed(seed) -> int:
    """The seed of the sampling, a whole number from 0 to ``MAX_SEED`` (a ValueError says the limit)."""
    if isinstance(seed, bool) or not isinstance(seed, int) or not 0 <= seed <= MAX_SEED:
        raise ValueError(f"{seed!r}: give a whole number from 0 to {MAX_SEED}")
    return seed


def sampling_of(scenario: Scenario, samples: int | None = None, seed: int | None = None) -> tuple[int, int]:
    """Samples and seed: the options given (checked: a ValueError names ``--samples`` or ``--seed``), else the
    scenario's ``[uncertainty]``, else the defaults."""
    from planner.scenario.uncertainty_spec import checked_samples

    if samples is not None:
        try:
            checked_samples(samples)
        except ValueError as exc:
            raise ValueError(f"--samples: {exc}") from None
    if seed is not None:
        try:
            checked_seed(seed)
        except ValueError as exc:
            raise ValueError(f"--seed: {exc}") from None
    given = scenario.uncertainty
    samples = samples if samples is not None else (given.samples if given is not None else DEFAULT_SAMPLES)
    seed = seed if seed is not None else (given.seed if given is not None else DEFAULT_SEED)
    return samples, seed


def unit_points(dimensions: int, samples: int, seed: int, scrambles: int = SCRAMBLES):
    """``scrambles`` independently scrambled Sobol point sets of ``samples / scrambles`` points each in
    [0, 1)^dimensions, as one array (samples x dimensions), scramble after scramble.  The same seed gives
    the same points (common random numbers across the rows of a comparison)."""
    import numpy as np
    from scipy.stats import qmc

    each = samples // scrambles
    streams = np.random.SeedSequence(seed).spawn(scrambles)
    sets = [qmc.Sobol(dimensions, scramble=True, seed=np.random.default_rng(s)).random_base2(int(math.log2(each)))
            for s in streams]
    return np.vstack(sets)


def inverse_cdf(distribution, u):
    """Values of ``distribution`` at probabilities ``u`` (an array); normal and lognormal cut at TAIL_SD."""
    import numpy as np
    from scipy.stats import norm

    d = distribution
    if d.distribution in ("normal", "lognormal"):
        z = norm.ppf(np.clip(u, norm.cdf(-TAIL_SD), norm.cdf(TAIL_SD)))
        return d.mean + d.sd * z if d.distribution == "normal" else d.median * np.exp(d.log_sd * z)
    if d.distribution == "uniform" or d.low == d.high:
        return d.low + (d.high - d.low) * u
    from scipy.stats import triang

    return triang.ppf(u, (d.mode - d.low) / (d.high - d.low), loc=d.low, scale=d.high - d.low)


def draws(specs: list[InputSpec], samples: int, seed: int):
    """(unit points, values): the Sobol points (samples x inputs) and each input's values at them."""
    u = unit_points(len(specs), samples, seed)
    values = [inverse_cdf(spec.distribution, u[:, j]) for j, spec in enumerate(specs)]
    return u, values


def sampled_scenario(scenario: Scenario, draw: dict, **changes) -> tuple[Scenario, float]:
    """The scenario with one draw applied (``draw``: input name -> value, SI) and the viscosity factor
    for ``make_plan``; ``changes``: levers of ``with_changes`` (a comparison's row).  Inputs at their
    neutral value (factor 1, shift 0) leave their fields untouched."""
    changed = with_changes(scenario, ambient_shift=draw.get("ambient_bias", 0.0),
                           wind_factor=draw.get("wind_factor", 1.0), **changes)
    factors = {"heat_loss_factor": draw.get("heat_loss_factor", 1.0), "slip_factor": draw.get("pump_slip_factor", 1.0)}
    if any(f != 1.0 for f in factors.values()):
        calibration = calibration_of(changed).model_copy()
        for name, factor in factors.items():
            if factor != 1.0:
                assign_field(calibration, "calibration", name, SI(getattr(calibration, name) * factor))
        changed.calibration = calibration
    shift = draw.get("source_temperature_bias", 0.0)
    if shift:
        assign_field(changed.source, "source", "temperature", SI(changed.source.temperature + shift))
    head = draw.get("pump_head_factor", 1.0)
    if head != 1.0:
        for i, point in enumerate(changed.pump.curve):
            assign_field(point, f"pump.curve[{i}]", "head", SI(point.head * head))
    return changed, draw.get("viscosity_factor", 1.0)


def check_extremes(scenario: Scenario, specs: list[InputSpec]) -> None:
    """Refuse, naming the input, a distribution whose extreme draws make a scenario the fields refuse
    (an ambient past -90 degC, a source past the temperature ceiling), so that no sample is lost to
    bad input: a sample that cannot be planned then always means the plan has no answer there."""
    for spec in specs:
        for value in spec.distribution.extremes:
            try:
                changed, factor = sampled_scenario(scenario, {spec.name: value})
                viscosity = calibration_of(changed).viscosity_factor * factor
                if not VISCOSITY_RANGE[0] <= viscosity <= VISCOSITY_RANGE[1]:
                    raise ScenarioError([("calibration.viscosity_factor", f"times the draw {viscosity:.4g}, outside "
                                          f"{VISCOSITY_RANGE[0]:g} to {VISCOSITY_RANGE[1]:g}")])
            except ScenarioError as exc:
                field, message = exc.problems[0]
                unit = " K" if spec.kind == "temperature_difference" else ""
                raise ScenarioError([(_spread_field(scenario, spec.name), f"at its extreme draw {value:.4g}{unit} the "
                                      f"scenario's {field or 'value'} is refused ({message}): give a smaller spread"
                                      f"{_spread_hint(scenario, spec.name)}")]) from None


def _from_standard_error(scenario: Scenario, name: str) -> str | None:
    """``calibration.<factor>_standard_error`` when input ``name``'s distribution is the default made from it
    (no ``[uncertainty]`` of its own), else None."""
    own = getattr(scenario.uncertainty, name, None) if scenario.uncertainty is not None else None
    fitted = _CALIBRATED.get(name)
    if own is not None or fitted is None or getattr(calibration_of(scenario), f"{fitted}_standard_error", None) is None:
        return None
    return f"calibration.{fitted}_standard_error"


def _spread_field(scenario: Scenario, name: str) -> str:
    """The field that sets input ``name``'s spread: its ``[uncertainty]`` entry, or the standard error it defaults to."""
    return _from_standard_error(scenario, name) or f"uncertainty.{name}"


def _spread_hint(scenario: Scenario, name: str) -> str:
    field = _from_standard_error(scenario, name)
    return "" if field is None else f" (the default of uncertainty.{name}, lognormal with log_sd = {field} / the " \
                                    f"factor; or give uncertainty.{name} its own distribution)"
