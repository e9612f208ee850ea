"""From a validated scenario to the objects the march works on, and one-call evaluation."""

from __future__ import annotations

from planner.errors import ComputationError
from planner.line.march import DEFAULT_STEP_M, Line, MarchResult, march
from planner.line.products import scenario_product
from planner.line.route import build_line
from planner.scenario.schema import Scenario, calibration_of
from planner.scenario.wording import Q, Sentence


def line_from_scenario(scenario: Scenario) -> Line:
    """The scenario's route, product and heating as a ``Line`` (with the ``[calibration]`` factors).

    Examples
    --------
    The oil line of ``scenario.examples``: one untraced segment of 100 m of NPS 2 Sch 40, inside
    diameter 52.48 mm [1]:

    >>> from planner.scenario.examples import example_scenario
    >>> line = line_from_scenario(example_scenario("oil line"))
    >>> line.length, len(line.segments), line.heaters[0].active, round(line.segments[0].inside_diameter * 1000, 2)
    (100.0, 1, False, 52.48)

    References
    ----------
    [1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
    """
    product = scenario_product(scenario)
    segments = build_line(scenario.route, scenario.site, calibration_of(scenario).heat_loss_factor)
    return Line(segments, product, scenario.tracing)


def evaluate(scenario: Scenario, flow: float | None = None, inlet_temperature: float | None = None,
             inlet_pressure: float | None = None, step: float = DEFAULT_STEP_M, line: Line | None = None) -> MarchResult:
    """The steady march for a scenario at its operating flow and inlet temperature (or those given).

    Examples
    --------
    The oil line of ``scenario.examples`` (1 Pa s, 900 kg/m^3, 2000 J/(kg K); 100 m of NPS 2 Sch 40,
    ID 52.48 mm, OD 60.3 mm [1], under 50 mm of insulation of 0.04 W/(m K); still air at 20 degC), 5 m^3/h in at 20 degC: laminar (Re = 30), so the pressure drop is
    Hagen-Poiseuille's 128 mu L Q / (pi D^4) = 7.460 bar [1] plus the developing entrance's
    K(inf) = 1.25 velocity heads, 0.0023 bar [3], and the viscous heating is that drop times the flow,
    1036.5 W [2] (by hand):

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil line")
    >>> summary = evaluate(scenario).summary
    >>> summary.laminar_fraction, round(summary.pressure_drop_pa / 1e5, 3), round(summary.viscous_heating_w, 1)
    (1.0, 7.463, 1036.5)

    References
    ----------
    [1] White, F. M., Fluid Mechanics, McGraw-Hill, section 6.4 (Hagen-Poiseuille flow).
    [2] Bird, R. B., Stewart, W. E., Lightfoot, E. N., Transport Phenomena, 2nd ed., Wiley, 2002,
        section 11.4 (viscous dissipation: the mechanical energy lost to friction is heat).
    [3] Shah, R. K., London, A. L., Laminar Flow Forced Convection in Ducts, Academic Press, 1978
        (incremental pressure drop of the hydrodynamic entrance) [mem].
    """
    from planner.scenario.budget import check_pass

    check_pass(scenario, step)     # the work budget, before any work
    line = line or line_from_scenario(scenario)
    flow = scenario.operation.flow if flow is None else flow
    t_in = scenario.operation.inlet_temperature if inlet_temperature is None else inlet_temperature
    p_in = scenario.operation.inlet_pressure if inlet_pressure is None else inlet_pressure
    if t_in <= scenario.product.no_flow_temperature:
        field = "operation.inlet_temperature" if inlet_temperature is None else "inlet temperature"
        raise ComputationError(Sentence(
            "{field}: {t} is at or below the product's no-flow temperature {limit} (product.no_flow_temperature): it "
            "will not flow", field=field, t=Q(t_in, "temperature"), limit=Q(scenario.product.no_flow_temperature,
                                                                            "temperature")))
    return march(line, flow, t_in, p_in, step=step)
