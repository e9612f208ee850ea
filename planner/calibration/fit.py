"""Fitting the calibration factors to a logged transfer by bounded least squares.

The residual of each measured quantity at each row is (logged - modelled) / sigma, where sigma is
that quantity's noise in this log: estimated from the log itself (second differences of the
series, robust median form: for white noise of standard deviation s, x[i+1] - 2 x[i] + x[i-1] has
standard deviation s sqrt 6; the median absolute deviation times 1.4826 estimates a standard
deviation [1]), never below an instrument floor.  The factors minimise the sum of squares within
their bounds (``scipy.optimize.least_squares``, trust-region reflective).

The 95 % interval of each factor is value +- t(0.975, n - p) times its standard error from the
linearised covariance s^2 (J^T J)^-1 at the solution, s^2 the residual variance [2]; the
correlation between fitted factors comes from the same matrix.

[1] NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.5.6 (median absolute deviation).
[2] Bates & Watts, Nonlinear Regression Analysis and Its Applications (Wiley, 1988), ch. 2.
"""

from __future__ import annotations

import math
from concurrent.futures import Executor
from dataclasses import dataclass, field
from datetime import datetime, timezone

import numpy as np
from scipy.optimize import least_squares
from scipy.stats import t as student_t

from planner.calibration.log import TransferLog
from planner.calibration.replay import (FACTOR_NAMES, Replay, Replayer, heater_holding_fraction, input_notes,
                                        pd_slip_applies, with_factors)
from planner.errors import ComputationError, ScenarioError
from planner.scenario.budget import check_calibration
from planner.scenario.units import si_unit_text
from planner.scenario.schema import Calibration, CalibrationSource, Scenario, calibration_of
from planner.scenario.wording import Q, Sentence

BOUNDS: dict[str, tuple[float, float]] = {"viscosity_factor": (0.1, 10.0), "heat_loss_factor": (0.05, 10.0),
                                          "slip_factor": (0.0, 10.0)}
DEFAULT_FIT = ("viscosity_factor", "heat_loss_factor")
# smallest noise credited to a logged quantity [SI; flow: fraction of the mean flow]
NOISE_FLOOR = {"discharge_pressure": 200.0, "suction_pressure": 200.0, "pump_inlet_temperature": 0.02,
               "outlet_temperature": 0.02, "flow": 0.001}
UNITS = {"discharge_pressure": si_unit_text("pressure"), "suction_pressure": si_unit_text("pressure"),
         "pump_inlet_temperature": si_unit_text("temperature"), "outlet_temperature": si_unit_text("temperature"),
         "flow": si_unit_text("volume_flow")}
# the kind of each residual (a difference: pressures and flows as such, temperatures as differences)
# and the decimals it is shown with
RESIDUAL_KINDS = {"discharge_pressure": ("pressure", 4), "suction_pressure": ("pressure", 4),
                  "pump_inlet_temperature": ("temperature_difference", 3),
                  "outlet_temperature": ("temperature_difference", 3), "flow": ("volume_flow", 3)}
MISMATCH_RATIO = 3.0        # residual RMS above this many times the log's noise: the model does not fit
RELATIVE_SE_MAX = 0.25      # standard error above this fraction of the value: not identifiable from the log
CORRELATION_MAX = 0.95
DIFF_STEP = 1e-3
MAX_NFEV = 40               # least_squares' limit on its own evaluations (the 2-point Jacobian's come on top)


def max_evaluations(factors: int) -> int:
    """Most replays of the whole log one fit of ``factors`` factors can make: ``least_squares`` (trf)
    stops at ``MAX_NFEV`` evaluations of its own, makes at most one Jacobian per evaluation at
    ``factors`` evaluations each (2-point differences, not counted in its ``nfev``), and the fitted
    factors are replayed once more for the result."""
    return MAX_NFEV * (factors + 1) + 1


@dataclass
class FactorFit:
    name: str
    value: float
    low: float                  # 95 % interval, within the bounds
    high: float
    standard_error: float | None
    at_bound: bool
    identifiable: bool


@dataclass
class FitResult:
    scenario: Scenario                        # as given (its calibration before the fit)
    log: TransferLog
    factors: dict[str, FactorFit]
    correlation: dict[str, float]             # "a/b" -> correlation coefficient
    residuals: dict[str, dict]                # quantity -> rms, noise, count, bias, unit
    warnings: list[str]
    replay: Replay                            # the model at the fitted factors
    evaluations: int
    degrees_of_freedom: int
    rows_set: int = 0
    notes: list[str] = field(default_factory=list)

    @property
    def mismatch(self) -> bool:
        return any(r["ratio"] > MISMATCH_RATIO for r in self.residuals.values())


def default_factors(scenario: Scenario, log: TransferLog) -> list[str]:
    """Viscosity and heat loss; and the slip where the log shows it (PD pump, speed logged)."""
    return list(DEFAULT_FIT) + (["slip_factor"] if pd_slip_applies(scenario, log) else [])


def noise_estimate(values: np.ndarray) -> float:
    """Noise standard deviation of a logged series from its second differences (robust) [its unit]."""
    x = np.asarray(values, dtype=float)
    x = x[np.isfinite(x)]      # blank cells and rows without a value are left out
    if x.size < 5:
        return 0.0
    d2 = x[2:] - 2.0 * x[1:-1] + x[:-2]
    return float(1.4826 * np.median(np.abs(d2 - np.median(d2))) / math.sqrt(6.0))


def compared_quantities(scenario: Scenario, log: TransferLog) -> list[str]:
    quantities = list(log.measured)
    if pd_slip_applies(scenario, log):
        quantities.append("flow")
    return quantities


def _sigmas(log: TransferLog, quantities: list[str]) -> dict[str, float]:
    sigmas = {}
    for q in quantities:
        floor = NOISE_FLOOR[q] * (float(np.mean(log.values["flow"][log.running])) if q == "flow" else 1.0)
        sigmas[q] = max(noise_estimate(log.values[q][log.running]), floor)
    return sigmas


def _check_names(scenario: Scenario, log: TransferLog, names: list[str]) -> None:
    unknown = [n for n in names if n not in FACTOR_NAMES]
    if unknown or not names:
        raise ComputationError(f"--fit: unknown factor {', '.join(unknown) or '(none given)'}; choose from {', '.join(FACTOR_NAMES)}")
    if len(set(names)) != len(names):
        raise ComputationError("--fit: a factor is named twice")
    if "slip_factor" in names and not pd_slip_applies(scenario, log):
        why = ("the pump is not positive-displacement" if scenario.pump is None or scenario.pump.kind != "positive_displacement"
               else "the log has no speed column")
        raise ComputationError(f"slip_factor cannot be fitted: {why} (the slip shows as logged flow against logged speed)")
    if "slip_factor" in names and scenario.pump.slip_flow <= 0.0:
        raise ComputationError("slip_factor cannot be fitted: the pump's slip_flow is 0, so the factor has nothing to multiply")


def _residual_function(evaluate, log, names, quantities, sigmas):
    measured = {q: log.values[q] for q in quantities}

    def residuals(x):
        model = evaluate(dict(zip(names, x))).modelled
        parts = []
        for q in quantities:
            r = (measured[q] - model[q]) / sigmas[q]
            parts.append(np.where(np.isfinite(r), r, 0.0))
        return np.concatenate(parts)
    return residuals


def fit_calibration(scenario: Scenario, log: TransferLog, names=None, executor: Executor | None = None) -> FitResult:
    """Fit the named factors (default: ``default_factors``) to the log; the other factors stay at the
    scenario's calibration.  ``executor``: where the replays' rows run (the caller's; None: here)."""
    names = default_factors(scenario, log) if names is None else list(names)
    _check_sections(scenario)
    _check_names(scenario, log, names)
    check_calibration(scenario, log.rows, max_evaluations(len(names)), len(names))   # before any work
    return _fit(scenario, log, names, Replayer(scenario, log, executor, max_evaluations(len(names))))


def _check_sections(scenario: Scenario) -> None:
    missing = [s for s in ("pump", "source", "destination") if getattr(scenario, s) is None]
    if missing:
        raise ScenarioError([(s, "replaying a logged transfer needs this section") for s in missing])


def _fit(scenario: Scenario, log: TransferLog, names: list[str], evaluate: Replayer) -> FitResult:
    quantities = compared_quantities(scenario, log)
    sigmas = _sigmas(log, quantities)
    fun = _residual_function(evaluate, log, names, quantities, sigmas)
    current = calibration_of(scenario)
    lower = np.array([BOUNDS[n][0] for n in names])
    upper = np.array([BOUNDS[n][1] for n in names])
    x0 = np.clip([max(getattr(current, n), 0.05) for n in names], lower + 1e-6, upper - 1e-6)
    try:
        solution = least_squares(fun, x0, bounds=(lower, upper), method="trf", diff_step=DIFF_STEP,
                                 x_scale=1.0, xtol=1e-5, ftol=1e-8, gtol=1e-8, max_nfev=MAX_NFEV)
    except ComputationError:
        raise
    except (ValueError, ArithmeticError) as exc:
        raise ComputationError(f"the fit failed: {exc}") from None
    final = evaluate(dict(zip(names, solution.x)))
    n_points = int(sum(np.isfinite(log.values[q] - final.modelled[q]).sum() for q in quantities))
    dof = max(n_points - len(names), 1)
    factors, correlation, warnings = _statistics(names, solution, dof, lower, upper)
    residuals = _residual_table(log, quantities, sigmas, final)
    result = FitResult(scenario, log, factors, correlation, residuals, warnings, final, evaluate.evaluations, dof,
                       int(final.sets.sum()), input_notes(scenario, log))
    _diagnose(result)
    return result


def _statistics(names, solution, dof, lower, upper):
    jac = np.asarray(solution.jac)
    s2 = float(np.sum(solution.fun ** 2)) / dof
    jtj = jac.T @ jac
    cov = np.linalg.pinv(jtj) * s2
    t_value = float(student_t.ppf(0.975, dof))
    factors, warnings = {}, []
    for j, name in enumerate(names):
        value = float(solution.x[j])
        column = float(np.linalg.norm(jac[:, j]))
        se = math.sqrt(cov[j, j]) if column > 1e-12 and cov[j, j] > 0 else math.inf
        identifiable = se <= RELATIVE_SE_MAX * max(abs(value), 0.05)
        at_bound = bool(value <= lower[j] * (1 + 1e-4) + 1e-9 or value >= upper[j] * (1 - 1e-4))
        low = max(value - t_value * se, float(lower[j]))
        high = min(value + t_value * se, float(upper[j]))
        factors[name] = FactorFit(name, value, low, high, se if math.isfinite(se) else None, at_bound, identifiable)
        if at_bound:
            warnings.append(f"{name} ended at its bound {value:.3g} (allowed {lower[j]:g} to {upper[j]:g}): the model "
                            "cannot reproduce this log with a sensible factor; check that the log is of this product and line")
    correlation = {}
    for a in range(len(names)):
        for b in range(a + 1, len(names)):
            denominator = math.sqrt(max(cov[a, a] * cov[b, b], 0.0))
            r = float(cov[a, b] / denominator) if denominator > 0 else 0.0
            correlation[f"{names[a]}/{names[b]}"] = r
            if abs(r) > CORRELATION_MAX and factors[names[a]].identifiable and factors[names[b]].identifiable:
                warnings.append(f"{names[a]} and {names[b]} are strongly correlated in this log (r = {r:+.2f}): it cannot "
                                "tell them apart; fit one of them, or use a log with more variation of flow and ambient")
    return factors, correlation, warnings


def _residual_table(log, quantities, sigmas, final: Replay) -> dict[str, dict]:
    table = {}
    for q in quantities:
        r = log.values[q] - final.modelled[q]
        r = r[np.isfinite(r)]
        rms = float(np.sqrt(np.mean(r ** 2))) if r.size else math.nan
        table[q] = {"rms": rms, "bias": float(np.mean(r)) if r.size else math.nan, "noise": sigmas[q],
                    "ratio": rms / sigmas[q], "count": int(r.size), "unit": UNITS[q]}
    return table


def _diagnose(result: FitResult) -> None:
    """Warnings in words: factors the log cannot determine, a log the model does not reproduce."""
    holding = None
    for name, factor in result.factors.items():
        if factor.identifiable:
            continue
        reason = (f"its 95 % interval is {factor.low:.3g} to {factor.high:.3g}: the logged quantities hardly change "
                  "with it against the log's noise")
        if name == "heat_loss_factor":
            fitted = with_factors(result.scenario, result.replay.factors)
            holding = heater_holding_fraction(fitted, result.log) if holding is None else holding
            if holding > 0.2:
                reason += (f"; the thermostat holds the setpoint over {holding:.0%} of the line, so the heater makes up "
                           "the heat loss and the temperatures hardly show it (trace power would)")
            elif not result.log.has("outlet_temperature"):
                reason += "; the log has no outlet_temperature"
        result.warnings.append(f"{name} is not identifiable from this log ({reason}); it is left at "
                               f"{factor.value:.3g} in the fit and is not written to [calibration] from this log")
    for q, row in result.residuals.items():
        if row["ratio"] > MISMATCH_RATIO:
            kind, digits = RESIDUAL_KINDS[q]
            result.warnings.append(Sentence(
                q + ": residual RMS {rms} is {ratio} times the log's noise ({noise}): the model does not reproduce "
                "this log — is it from another product or line, or from a start-up or stop the steady replay cannot "
                "follow?", rms=Q(row["rms"], kind, digits), ratio=Q(row["ratio"], "dimensionless", 0),
                noise=Q(row["noise"], kind, digits)))
    if result.rows_set:
        result.warnings.append(f"at {result.rows_set} rows the modelled product sets in the line; those rows do not fit")


def calibrated_scenario(result: FitResult, when: datetime | None = None) -> Scenario:
    """The scenario with the fitted factors in ``[calibration]``, naming the log and its hash.
    Factors that the log cannot determine keep their previous values."""
    previous = calibration_of(result.scenario).model_dump()
    fitted = {n: f.value for n, f in result.factors.items() if f.identifiable}
    fitted.update({f"{n}_standard_error": f.standard_error for n, f in result.factors.items() if f.identifiable})
    stamp = (when or datetime.now(timezone.utc)).replace(microsecond=0).isoformat()
    data = {**previous, **fitted, "source": CalibrationSource(file=result.log.name, sha256=result.log.sha256),
            "fitted_at": stamp}
    return result.scenario.model_copy(update={"calibration": Calibration(**data)})
