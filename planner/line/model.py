"""From a validated scenario to the objects the march works on, and one-call evaluation."""

from __future__ import annotations

from planner.errors import ComputationError
from planner.line.march import DEFAULT_STEP_M, Line, MarchResult, march
from planner.line.products import scenario_product
from planner.line.route import build_line
from planner.scenario.schema import Scenario, calibration_of
from planner.scenario.wording import Q, Sentence


def line_from_scenario(scenario: Scenario) -> Line:
    product = scenario_product(scenario)
    segments = build_line(scenario.route, scenario.site, calibration_of(scenario).heat_loss_factor)
    return Line(segments, product, scenario.tracing)


def evaluate(scenario: Scenario, flow: float | None = None, inlet_temperature: float | None = None,
             inlet_pressure: float | None = None, step: float = DEFAULT_STEP_M, line: Line | None = None) -> MarchResult:
    """The steady march for a scenario at its operating flow and inlet temperature (or those given)."""
    from planner.scenario.budget import check_pass

    check_pass(scenario, step)     # the work budget, before any work
    line = line or line_from_scenario(scenario)
    flow = scenario.operation.flow if flow is None else flow
    t_in = scenario.operation.inlet_temperature if inlet_temperature is None else inlet_temperature
    p_in = scenario.operation.inlet_pressure if inlet_pressure is None else inlet_pressure
    if t_in <= scenario.product.no_flow_temperature:
        raise ComputationError(Sentence(
            "inlet temperature {t} is at or below the product's no-flow temperature {limit}: it will not flow",
            t=Q(t_in, "temperature"), limit=Q(scenario.product.no_flow_temperature, "temperature")))
    return march(line, flow, t_in, p_in, step=step)
