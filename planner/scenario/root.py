"""The scenario's root model (``Scenario``) and its validation: a plain dict in, a ``Scenario`` or a
``ScenarioError`` naming every bad field out; the JSON Schema and the choices of a choice field.
"""

from __future__ import annotations

from typing import Literal, Optional

from pydantic import BaseModel, Field, ValidationError, field_validator

from planner.errors import ScenarioError
from planner.scenario.fields import _Model
from planner.scenario.line_spec import Route, Tracing
from planner.scenario.product_spec import ProductSpec
from planner.scenario.sections import (Calibration, Costs, Destination, Limits, Operation, PumpSpec, Schedule, Site,
                                       Vessel)
from planner.scenario.weather_spec import Weather, weather_problems
from planner.scenario.uncertainty_spec import Uncertainty

SCHEMA_VERSION = 1


class Scenario(_Model):
    schema_version: int = SCHEMA_VERSION
    name: str = Field(min_length=1, max_length=160)
    description: str = Field("", max_length=4000)
    site: Site
    product: ProductSpec
    route: Route
    tracing: Tracing = Field(default_factory=Tracing)
    operation: Operation
    suction: Optional[Route] = Field(None, description="route from the source outlet to the pump; none: pump at the outlet")
    pump: Optional[PumpSpec] = None
    source: Optional[Vessel] = None
    destination: Optional[Destination] = None
    costs: Costs = Field(default_factory=Costs)
    schedule: Schedule = Field(default_factory=Schedule)
    limits: Limits = Field(default_factory=Limits)
    calibration: Optional[Calibration] = Field(None, description="site factors fitted to logged transfers; none: all 1")
    weather: Optional[Weather] = Field(None, description="ambient and wind over the transfer; none: the site's, constant")
    uncertainty: Optional[Uncertainty] = Field(None, description="distributions of the uncertain inputs for "
                                                                 "`plan --uncertainty`; none: the defaults")

    @field_validator("schema_version")
    @classmethod
    def _version(cls, value):
        if value > SCHEMA_VERSION:
            raise ValueError(f"schema_version {value} is newer than this planner reads ({SCHEMA_VERSION}); update the planner")
        if value < 1:
            raise ValueError("schema_version must be at least 1")
        return value


def _loc(loc: tuple) -> str:
    text = ""
    for part in loc:
        if isinstance(part, int):
            text += f"[{part}]"
        else:
            text += ("." if text else "") + str(part)
    return text


def problems_from(error: ValidationError) -> list[tuple[str, str]]:
    problems = []
    for item in error.errors(include_url=False):
        loc = tuple(p for p in item["loc"] if not (isinstance(p, str) and ("function-" in p or p.startswith("Annotated"))))
        message = item["msg"]
        for prefix in ("Value error, ", "Assertion failed, "):
            if message.startswith(prefix):
                message = message[len(prefix):]
        if item["type"] == "extra_forbidden":
            message = "unknown field (check the spelling; see `python -m planner schema`)"
        if item["type"] == "missing":
            message = "required field is missing"
        problems.append((_loc(loc), message))
    return problems


def scenario_from_dict(data: dict) -> Scenario:
    """Validate a plain dict into a Scenario; raise ScenarioError naming every bad field."""
    if not isinstance(data, dict):
        raise ScenarioError([("", "a scenario must be a table/object at the top level")])
    try:
        scenario = Scenario.model_validate(data)
    except ValidationError as exc:
        raise ScenarioError(problems_from(exc)) from None
    except RecursionError:
        raise ScenarioError([("", "the scenario is nested too deeply to read")]) from None
    problems = weather_problems(scenario)
    if problems:
        raise ScenarioError(problems)
    from planner.scenario.budget import check_plan

    check_plan(scenario)   # the work budget: a scenario that asks for too much is refused here
    return scenario


def json_schema() -> dict:
    return Scenario.model_json_schema()


def field_choices(model: type[BaseModel], field: str) -> tuple:
    """The allowed values of a choice field (its ``Literal[...]``, also inside ``Optional``), in the
    order the schema lists them: ``field_choices(Tracing, "kind")`` -> ``("none", "electric_constant", ...)``.
    Raises ValueError for a field that is not a choice."""
    from typing import get_args, get_origin

    pending = [model.model_fields[field].annotation]
    while pending:
        annotation = pending.pop(0)
        if get_origin(annotation) is Literal:
            return tuple(get_args(annotation))
        pending.extend(a for a in get_args(annotation) if a is not type(None))
    raise ValueError(f"{model.__name__}.{field} is not a choice field")


def field_constraints(path: str) -> dict:
    """The schema's limits of the field at ``path`` (``"product.name"``, ``"route.segments[0].jacket_emissivity"``):
    ``{"max_length": 120}``, ``{"ge": 0.01, "le": 1.0}`` ... (empty for a field without any), so a form's
    widget takes the limit the validation applies.  Limits of a quantity (SI, checked by its parser) are
    not listed here."""
    import re
    from typing import get_args

    names = [n for n in re.split(r"[.\[\]]+", path) if n and not n.isdigit()]
    model: type[BaseModel] = Scenario
    for i, name in enumerate(names):
        info = model.model_fields[name]
        if i == len(names) - 1:
            found = {}
            pending = [info.annotation, *info.metadata]
            while pending:
                item = pending.pop(0)
                pending.extend(getattr(item, "__metadata__", ()))
                pending.extend(a for a in get_args(item) if not isinstance(a, (str, int, float)))
                for key in ("ge", "gt", "le", "lt", "max_length", "min_length"):
                    if isinstance(getattr(item, key, None), (int, float)) and not isinstance(item, type):
                        found[key] = getattr(item, key)
            return found
        pending, model = [info.annotation], None
        while pending and model is None:
            item = pending.pop(0)
            if isinstance(item, type) and issubclass(item, BaseModel):
                model = item
            pending.extend(get_args(item))
        if model is None:
            raise KeyError(f"{path}: {name} is not a section")
    return {}
