"""Validity checks: is a march inside the stated ranges of the laws it used?  The viscosity law against
the temperatures it was fitted over, the inner-film correlations against their Prandtl ranges (their
sources beside the constants) and the bulk-to-wall viscosity ratio of the Sieder-Tate correction.
"""

from __future__ import annotations

import math

import numpy as np

from planner.checks.finding import Finding
from planner.checks.line_checks import LineRun, _segment_at, _t
from planner.correlations.friction import RE_LAMINAR_MAX
from planner.correlations.heat_transfer import VISCOSITY_RATIO_MAX, VISCOSITY_RATIO_MIN
from planner.scenario.wording import Q, Sentence

# Stated ranges of correlations the march uses (their sources; see heat_transfer.py, rheology.py)
SIEDER_TATE_PR_MAX = 16700.0       # Sieder & Tate (1936): 0.48 < Pr < 16 700
GNIELINSKI_PR_MAX = 2000.0         # Gnielinski (1976): 0.5 < Pr < 2000


def viscosity_range(product, temperatures: list[float]) -> list[Finding]:
    """The viscosity law used outside its lab points at any of ``temperatures`` [K]."""
    fit = product.fit
    outside = [t for t in temperatures if product.is_extrapolation(t)]
    if not outside:
        return []
    worst = max(outside, key=lambda t: max(fit.t_min - t, t - fit.t_max))
    return [Finding("VISCOSITY-EXTRAPOLATED", "caution", "Viscosity law extrapolated",
                    Sentence("{t} lies outside the lab points ({low} to {high})", t=_t(worst), low=_t(fit.t_min),
                             high=_t(fit.t_max)),
                    "Measure the viscosity at this temperature before relying on the pressures.",
                    value=worst, limit=fit.t_max if worst > fit.t_max else fit.t_min, quantity="temperature")]


def film_correlation_range(product, runs: list[LineRun]) -> list[Finding]:
    """The product's Prandtl number against the range of the film correlation in use."""
    worst_ratio, where = 0.0, None
    for run in runs:
        steps, nodes = run.result.steps, run.result.nodes
        for k in range(len(steps["x"])):
            t = float(np.interp(steps["x"][k], nodes["x"], nodes["temperature"]))
            pr = product.specific_heat(t) * steps["viscosity"][k] / product.conductivity(t)
            limit = SIEDER_TATE_PR_MAX if steps["reynolds"][k] <= RE_LAMINAR_MAX else GNIELINSKI_PR_MAX
            if pr > limit and pr / limit > worst_ratio:
                x = float(steps["x"][k])
                worst_ratio, where = pr / limit, (run.name, _segment_at(run.line.segments, x).name, x, pr, limit)
    if where is None:
        return []
    name, seg, x, pr, limit = where
    return [Finding("CORRELATION-RANGE", "caution", "Film correlation beyond its range",
                    Sentence("Prandtl number {pr} is above the {limit} its correlation was fitted to",
                             pr=Q(pr, "dimensionless"), limit=Q(limit, "dimensionless")),
                    "Read the product temperatures along the line with margin.", name, seg, x, pr, limit,
                    "dimensionless")]


def film_viscosity_ratio(runs: list[LineRun]) -> list[Finding]:
    """Bulk-to-wall viscosity ratio outside the range of the film's property correction (Sieder & Tate
    1936: 0.0044 < mu/mu_w < 9.75): the march holds the correction at the range's edge there, so the film
    coefficient (and the product temperature it sets) is less certain."""
    worst, where = 0.0, None
    for run in runs:
        steps = run.result.steps
        for k, ratio in enumerate(steps["viscosity_ratio"]):
            ratio = float(ratio)
            if VISCOSITY_RATIO_MIN <= ratio <= VISCOSITY_RATIO_MAX:
                continue
            limit = VISCOSITY_RATIO_MIN if ratio < VISCOSITY_RATIO_MIN else VISCOSITY_RATIO_MAX
            excess = math.inf if ratio <= 0.0 else abs(math.log(ratio / limit))
            if where is None or excess > worst:
                x = float(steps["x"][k])
                worst, where = excess, (run.name, _segment_at(run.line.segments, x).name, x, ratio, limit)
    if where is None:
        return []
    name, seg, x, ratio, limit = where
    side = "below" if ratio < limit else "above"
    return [Finding("FILM-VISCOSITY-RATIO", "caution", "Wall viscosity beyond the film correlation's range",
                    Sentence("bulk-to-wall viscosity ratio {ratio} is " + side + " the {limit} the film's "
                             "viscosity correction was fitted to; the correction is held at {limit}",
                             ratio=Q(ratio, "dimensionless"), limit=Q(limit, "dimensionless")),
                    "Read the product temperatures along this part of the line with margin (a wall much colder "
                    "or hotter than the product: a bare hose or arm, or strong tracing).",
                    name, seg, x, ratio, limit, "dimensionless")]


def _march_temperatures(runs: list[LineRun]) -> list[float]:
    values = []
    for run in runs:
        temps = run.result.nodes["temperature"]
        values.extend([float(temps.min()), float(temps.max())])
    return values
