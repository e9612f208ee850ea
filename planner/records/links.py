"""Share links: a saved plan's revision by id, or a whole unsaved scenario packed into the URL.

Link data is untrusted.  Decoding only ever inflates bounded zlib data, parses JSON and validates
the result against the scenario schema: no pickle, no eval.  A corrupt, oversized, tampered or
future-version payload gives a ``LinkError`` with a message for the user.

Packed form (version 1): ``"1." + base64url(zlib(compact JSON, preset dictionary)) + "." + crc32``.
The JSON leaves out fields at their defaults and gives every quantity as its exact SI value with
its unit, so the scenario comes back identical; the preset dictionary (common key names and units)
shrinks typical scenarios to about 1.3-1.6 kB.  The CRC catches truncated or altered links; it is not a
signature — a link carries no authority: sign-off lives only with saved revisions.
"""

from __future__ import annotations

import base64
import binascii
import json
import re
import zlib
from dataclasses import dataclass
from urllib.parse import urlencode

from planner.errors import ScenarioError
from planner.scenario.budget import BudgetError
from planner.scenario.quantities import exact_dump
from planner.scenario.schema import Scenario, read_scenario_data, scenario_from_dict

LINK_VERSION = 1
MAX_PAYLOAD_CHARS = 12_000          # longer packed text is refused before decoding
MAX_JSON_BYTES = 256 * 1024         # inflating stops here (guards against compression bombs)
URL_BUDGET_CHARS = 2000             # beyond this, offer to save and share the id instead
# The views a link can open, in the order the dashboard shows them as tabs: the one list of view names
# (the dashboard maps each to its tab title, ``dashboard.views.VIEW_TITLES``).
VIEWS = ("plan", "inputs", "line", "time", "compare", "odds", "product", "calibration", "review")

# Version 1's preset dictionary.  Never change it: links already sent depend on it.
_ZDICT_V1 = json.dumps([
    "schema_version", "name", "description", "site", "ambient_temperature", "wind_speed",
    "design_ambient_temperature", "product", "preset", "density", "density_reference_temperature",
    "density_slope", "specific_heat", "thermal_conductivity", "viscosity", "law", "points", "temperature",
    "kinematic_viscosity", "coefficients", "rheology", "flow_index", "yield_stress", "no_flow_temperature",
    "max_temperature", "flash_point", "vapour_pressure", "water_activity", "route", "segments", "kind", "pipe",
    "hose", "loading_arm", "nps", "schedule", "inside_diameter", "wall_thickness", "length", "elevation_change",
    "fittings", "type", "count", "elbow_90_standard", "elbow_90_long_radius", "gate_valve", "ball_valve",
    "swing_check_valve", "insulation", "material", "mineral_wool", "calcium_silicate", "thickness",
    "jacket_emissivity", "traced", "untraced_length", "surroundings", "location", "outdoor", "indoor", "buried",
    "pressure_rating", "flange_class", "hazardous_area_class", "fitting_method", "hooper", "darby", "tracing",
    "electric_constant", "electric_self_regulating", "steam", "setpoint", "output", "zero_output_temperature",
    "circuits_per_metre", "heater_to_pipe_conductance", "max_exposure_temperature", "steam_pressure",
    "operation", "flow", "inlet_temperature", "suction", "pump", "positive_displacement", "centrifugal",
    "speed", "displacement", "slip_flow", "slip_reference_pressure", "slip_reference_viscosity",
    "relief_setting", "mechanical_efficiency", "motor_power", "npsh_required", "curve", "head", "efficiency",
    "source", "railcar", "truck", "barge", "tank", "shape", "horizontal_cylinder", "vertical_cylinder", "box",
    "diameter", "width", "initial_volume", "volume_to_move", "outlet_height", "pressure",
    "heat_loss_coefficient", "heating_power", "heating_medium", "destination", "initial_level", "max_level",
    "inlet", "bottom", "top", "max_pressure", "costs", "currency", "electricity_per_kwh", "steam_per_tonne",
    "demurrage_per_hour", "schedule", "planned_window", "start_mode", "prewarm", "push_cold",
    "line_start_temperature", "stop_duration", "timeline_steps", "limits", "touch_temperature",
    " K\"", " Pa\"", " m\"", " m**3/s\"", " m**3\"", " W/m\"", " W/m/K\"", " J/kg/K\"", " kg/m**3\"",
    " Pa*s\"", " m**2/s\"", " m/s\"", " s\"", " W\"", " revolution/second\"", " W/m**2/K\"",
    " kg/m**3/K\"", " dimensionless\"", "glucose_syrup_42de", "residual_fuel_380", "polyether_polyol",
], separators=(",", ":")).encode()


def _ascii_number(text: object, digits: int) -> int | None:
    """``text`` as a whole number written in 0-9 with at most ``digits`` digits, else None.
    (``str.isdigit`` also takes '²' and other digits that ``int`` refuses.)"""
    if isinstance(text, str) and re.fullmatch(r"[0-9]{1,%d}" % digits, text):
        return int(text)
    return None


class LinkError(ValueError):
    """A share link that cannot be used, with the reason in words."""


@dataclass(frozen=True)
class SharedView:
    """What a link asks to open."""

    scenario: Scenario | None = None
    plan_id: int | None = None
    revision: int | None = None
    view: str = "plan"


def pack_scenario(scenario: Scenario) -> str:
    data = exact_dump(scenario)     # SI values as "value unit" strings: the round trip is exact
    data["schema_version"] = scenario.schema_version   # always explicit
    text = json.dumps(data, separators=(",", ":"), ensure_ascii=False).encode("utf-8")
    compressor = zlib.compressobj(9, zlib.DEFLATED, 15, 9, zlib.Z_DEFAULT_STRATEGY, _ZDICT_V1)
    packed = compressor.compress(text) + compressor.flush()
    body = base64.urlsafe_b64encode(packed).decode("ascii").rstrip("=")
    return f"{LINK_VERSION}.{body}.{zlib.crc32(text):08x}"


def unpack_scenario(payload: object) -> Scenario:
    """The scenario inside a packed payload, or LinkError saying why not."""
    if not isinstance(payload, str):
        raise LinkError("the link's scenario data is missing or not text")
    if len(payload) > MAX_PAYLOAD_CHARS:
        raise LinkError(f"the link is too long ({len(payload)} characters; at most {MAX_PAYLOAD_CHARS})")
    parts = payload.strip().split(".")
    if len(parts) != 3:
        raise LinkError("the link's scenario data is damaged (expected version.data.check)")
    version_text, body, check = parts
    version = _ascii_number(version_text, 6)
    if version is None:
        raise LinkError("the link's scenario data is damaged (its version is not a number: digits 0-9, at most 6)")
    if version > LINK_VERSION:
        raise LinkError(f"the link was made by a newer planner (link version {version}; this one reads "
                        f"{LINK_VERSION}): update the planner")
    if version < 1:
        raise LinkError(f"the link's version is {version}: this planner reads link versions 1 to {LINK_VERSION}")
    try:
        packed = base64.urlsafe_b64decode(body + "=" * (-len(body) % 4))
    except (binascii.Error, ValueError):
        raise LinkError("the link's scenario data is damaged (not base64)") from None
    inflater = zlib.decompressobj(15, _ZDICT_V1)
    try:
        text = inflater.decompress(packed, MAX_JSON_BYTES)
        if inflater.unconsumed_tail or not inflater.eof:
            if inflater.unconsumed_tail:
                raise LinkError(f"the link's scenario is too large once unpacked (over {MAX_JSON_BYTES // 1024} kB)")
            raise LinkError("the link's scenario data is damaged (truncated)")
        if inflater.unused_data:
            raise LinkError(f"the link's scenario data is damaged ({len(inflater.unused_data):,} bytes after its end)")
    except zlib.error:
        raise LinkError("the link's scenario data is damaged (cannot be unpacked)") from None
    if not re.fullmatch(r"[0-9a-fA-F]{1,8}", check):
        raise LinkError("the link's scenario data is damaged (bad check value)")
    expected = int(check, 16)
    if zlib.crc32(text) != expected:
        raise LinkError("the link's scenario data does not match its check value: it was altered or cut")
    try:
        data = read_scenario_data(text.decode("utf-8"), "json")
    except (UnicodeDecodeError, ScenarioError, RecursionError):
        raise LinkError("the link's scenario data is damaged (not JSON)") from None
    if not isinstance(data, dict):
        raise LinkError("the link's scenario data is not a scenario")
    try:
        return scenario_from_dict(data)
    except BudgetError as exc:
        raise LinkError("the link's scenario asks for more work than the planner's budget: " + "; ".join(
            f"{field}: {message}" for field, message in exc.problems[:5])) from None
    except ScenarioError as exc:
        raise LinkError("the link's scenario is not valid: " + "; ".join(
            f"{field}: {message}" for field, message in exc.problems[:5])) from None
    except RecursionError:
        raise LinkError("the link's scenario data is nested too deeply") from None


def query_for(view: str = "plan", scenario: Scenario | None = None, plan_id: int | None = None,
              revision: int | None = None) -> dict[str, str]:
    """Query parameters that reopen a view: a saved revision by id, else the packed scenario."""
    if view not in VIEWS:
        raise ValueError(f"unknown view {view!r}; views are {', '.join(VIEWS)}")
    if plan_id is not None:
        params = {"plan": str(plan_id)}
        if revision is not None:
            params["rev"] = str(revision)
    elif scenario is not None:
        params = {"s": pack_scenario(scenario)}
    else:
        raise ValueError("a link needs a saved plan id or a scenario")
    params["view"] = view
    return params


def link_url(base_url: str, params: dict[str, str]) -> str:
    return base_url.rstrip("/") + "/?" + urlencode(params)


def fits_in_url(params: dict[str, str], base_url: str = "http://localhost:8501") -> bool:
    return len(link_url(base_url, params)) <= URL_BUDGET_CHARS


def parse_query(params: dict) -> SharedView:
    """Read untrusted query parameters (values may be str or lists of str)."""

    def one(key):
        value = params.get(key)
        if isinstance(value, (list, tuple)):
            value = value[0] if value else None
        return value

    view = one("view") or "plan"
    if view not in VIEWS:
        view = "plan"
    plan = one("plan")
    if plan is not None:
        plan_id = _ascii_number(plan, 12)
        if plan_id is None:
            raise LinkError("the link's plan id is not a number (digits 0-9, at most 12)")
        rev = one("rev")
        revision = None if rev is None else _ascii_number(rev, 9)
        if rev is not None and revision is None:
            raise LinkError("the link's revision is not a number (digits 0-9, at most 9)")
        return SharedView(plan_id=plan_id, revision=revision, view=view)
    payload = one("s")
    if payload is None:
        return SharedView(view=view)
    return SharedView(scenario=unpack_scenario(payload), view=view)
