"""A weather file (``--weather FILE.csv``): the rows of ``[[weather.hours]]`` from a CSV file.

Header cells read ``quantity [unit]`` as in a calibration log (``scenario.columns``): ``time [h]`` (or
``[min]``, ``[s]`` ...: time from the start; ``time`` with no unit or ``[ISO 8601]``: timestamps with
their offset, which need ``schedule.start``), ``ambient_temperature [degC]`` (or ``[degF]``, ``[K]``) and,
optionally, ``wind_speed [m/s]`` (or ``[mph]``, ``[km/h]`` ...).  Every value is checked as the scenario's
field is (range, unit), and a refusal names the file's line and the field.  Lines starting with ``#`` are
comments.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

from pydantic import ValidationError

from planner.errors import ScenarioError, quoted
from planner.scenario.columns import TIMESTAMP_UNITS, cell_number, decode_text, delimiter_of, split_header
from planner.scenario.root import Scenario, problems_from
from planner.scenario.weather_spec import MAX_WEATHER_ROWS, Weather, weather_problems

OPTION = "--weather"
QUANTITIES = ("time", "ambient_temperature", "wind_speed")
MAX_WEATHER_BYTES = 2_000_000


def _refusal(message: str) -> ScenarioError:
    return ScenarioError([(OPTION, message)])


def _columns(header: list[str]) -> dict[str, tuple[int, str]]:
    """quantity -> (column index, unit) of the header line."""
    found: dict[str, tuple[int, str]] = {}
    for index, cell in enumerate(header):
        parsed = split_header(cell)
        if parsed is None or parsed[0] not in QUANTITIES:
            raise _refusal(f"header cell {quoted(cell.strip(), 40)} is not one of {', '.join(QUANTITIES)} as "
                           "'quantity [unit]', e.g. 'time [h]', 'ambient_temperature [degC]', 'wind_speed [m/s]'")
        if parsed[0] in found:
            raise _refusal(f"two columns give {parsed[0]}; keep one")
        found[parsed[0]] = (index, parsed[1])
    for needed in ("time", "ambient_temperature"):
        if needed not in found:
            raise _refusal(f"the file has no {needed} column; the header reads e.g. "
                           "'time [h],ambient_temperature [degC],wind_speed [m/s]'")
    for quantity, (_, unit) in found.items():
        if not unit and quantity != "time":
            raise _refusal(f"column {quantity}: give its unit in brackets, e.g. '{quantity} "
                           f"[{'degC' if quantity == 'ambient_temperature' else 'm/s'}]'")
    return found


def _cell(cells: list[str], quantity: str, column: tuple[int, str], decimal_comma: bool) -> str | None:
    """A cell as the scenario field reads it: "number unit", or the timestamp as written."""
    index, unit = column
    text = cells[index].strip()
    if not text:
        if quantity == "wind_speed":
            return None                 # the site's wind
        raise ValueError(f"{quantity} is blank")
    if quantity == "time" and unit.lower() in TIMESTAMP_UNITS:
        return text
    try:
        return f"{cell_number(text, decimal_comma)!r} {unit}"
    except ValueError:
        raise ValueError(f"{quantity} {quoted(text, 30)} is not a number") from None


def read_weather_rows(data: bytes, name: str = "weather.csv") -> tuple[list[dict], list[int]]:
    """The rows of a weather file as ``weather.hours`` entries (strings with units), and their file lines."""
    if len(data) > MAX_WEATHER_BYTES:
        raise _refusal(f"{quoted(name, 40)} is larger than {MAX_WEATHER_BYTES // 1_000_000} MB; a weather file "
                       f"holds at most {MAX_WEATHER_ROWS} rows")
    text = decode_text(data, quoted(name, 40), _refusal)
    lines = [ln for ln in text.splitlines() if ln.strip() and not ln.lstrip().startswith("#")]
    if not lines:
        raise _refusal(f"{quoted(name, 40)} is empty: give a header line and one row per time")
    delimiter = delimiter_of(lines[0])
    reader = csv.reader(io.StringIO(text), delimiter=delimiter)
    try:
        return _rows(reader, delimiter != ",", name)
    except csv.Error as exc:
        raise _refusal(f"{quoted(name, 40)} cannot be read as CSV ({exc})") from None


def _rows(reader, decimal_comma: bool, name: str) -> tuple[list[dict], list[int]]:
    header, columns, rows, numbers = None, {}, [], []
    for cells in reader:
        if not cells or all(not c.strip() for c in cells) or cells[0].lstrip().startswith("#"):
            continue
        if header is None:
            header, columns = cells, _columns(cells)
            continue
        where = f"{quoted(name, 40)} line {reader.line_num}"
        if len(rows) >= MAX_WEATHER_ROWS:
            raise _refusal(f"{quoted(name, 40)} has more than {MAX_WEATHER_ROWS} rows; give one row an hour or fewer")
        if len(cells) != len(header):
            raise _refusal(f"{where}: expected {len(header)} cells, found {len(cells)}")
        try:
            row = {q: _cell(cells, q, column, decimal_comma) for q, column in columns.items()}
        except ValueError as exc:
            raise _refusal(f"{where}: {exc}") from None
        rows.append({k: v for k, v in row.items() if v is not None})
        numbers.append(reader.line_num)
    if not rows:
        raise _refusal(f"{quoted(name, 40)} has a header but no rows")
    return rows, numbers


def with_weather_file(scenario: Scenario, path: str | Path) -> Scenario:
    """A copy of ``scenario`` whose ``[weather]`` is the table of the weather file at ``path`` (it replaces
    the scenario's own); every row is checked as the scenario's ``weather.hours`` are, and a refusal
    names the option, the file's line and the field."""
    path = Path(path)
    try:
        with path.open("rb") as handle:
            data = handle.read(MAX_WEATHER_BYTES + 1)
    except OSError as exc:
        raise _refusal(f"cannot open {quoted(str(path))}: {exc.strerror}") from None
    rows, lines = read_weather_rows(data, path.name)
    try:
        weather = Weather.model_validate({"profile": "table", "hours": rows})
    except ValidationError as exc:
        raise ScenarioError([_at_line(p, m, path.name, lines) for p, m in problems_from(exc)]) from None
    changed = scenario.model_copy(update={"weather": weather})
    problems = weather_problems(changed)
    if problems:
        raise ScenarioError([_at_line(p.removeprefix("weather."), m, path.name, lines) for p, m in problems])
    from planner.scenario.budget import check_plan

    check_plan(changed)       # the start-up worked out again at the weather costs passes: the budget counts them
    return changed


def _at_line(path: str, message: str, name: str, lines: list[int]) -> tuple[str, str]:
    """A problem at ``hours[i].field`` said at the file's line: ("--weather", "'f.csv' line 7, field: ...")."""
    if path.startswith("hours[") and "]" in path:
        index = int(path[len("hours["):path.index("]")])
        field = path[path.index("]") + 1:].lstrip(".") or "row"
        return OPTION, f"{quoted(name, 40)} line {lines[index]}, {field}: {message}"
    return (path if path.startswith("schedule") else OPTION), message
