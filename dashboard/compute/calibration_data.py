"""The Calibration tab's fit as plain data (no Streamlit here): it runs in a worker process of
``dashboard.compute.workers`` (job ``calibration``), cached by ``compute.cache.cached_calibration``."""

from __future__ import annotations

import logging
import math
import tomllib

from planner.errors import PlannerError

# a fit replays every row some 15-40 times: the page takes logs up to this size (the command line takes more)
DASHBOARD_MAX_ROWS = 1500
log = logging.getLogger("dashboard")


def _plain(values) -> list:
    return [v if math.isfinite(v) else None for v in map(float, values)]


def fit_document(fit_key: str, log_bytes: bytes, log_name: str, map_text: str, names, executor=None) -> dict:
    """``fit_json`` of the fit plus the series (time, logged, modelled) and the calibration to apply;
    or ``{"error": message}``.  The replays run on ``executor`` (the dashboard worker's; None: here)."""
    from planner.calibration.fit import calibrated_scenario, fit_calibration
    from planner.calibration.log import column_map_from_dict, read_log
    from planner.calibration.report import fit_json
    from planner.scenario.schema import parse_scenario_text

    try:
        scenario = parse_scenario_text(fit_key, "json")
        column_map = column_map_from_dict(tomllib.loads(map_text), "column map") if map_text.strip() else None
        transfer_log = read_log(log_bytes, log_name, column_map)
        if transfer_log.rows > DASHBOARD_MAX_ROWS:
            return {"error": f"{log_name} has {transfer_log.rows} readable rows; the page fits logs of up to "
                             f"{DASHBOARD_MAX_ROWS} rows: resample it (e.g. one row a minute) or use "
                             "`python -m planner calibrate`"}
        result = fit_calibration(scenario, transfer_log, list(names), executor=executor)
    except tomllib.TOMLDecodeError as exc:
        return {"error": f"the column map cannot be read as TOML: {exc}"}
    except (PlannerError, ValueError, ArithmeticError) as exc:
        return {"error": str(exc)}
    data = fit_json(result)
    data["series"] = {"time_s": _plain(transfer_log.values["time"]),
                      "measured": {q: _plain(transfer_log.values[q]) for q in result.residuals},
                      "modelled": {q: _plain(result.replay.modelled[q]) for q in result.residuals}}
    data["calibration"] = calibrated_scenario(result).calibration.model_dump(mode="json", exclude_none=True)
    return data
