"""Reading a logged transfer: a CSV file of flow, pressures and temperatures against time.

Header cells read ``quantity [unit]``, e.g. ``flow [m3/h]``, ``discharge_pressure [bar]``,
``outlet_temperature [degC]``; any unit ``planner.scenario.units`` reads.  Pressures are gauge
(``barg``/``psig`` say so explicitly; ``bara``/``psia`` are converted to gauge with the standard
atmosphere).  ``time`` is a number with its unit (``time [min]``) or, with no unit (or
``[ISO 8601]``), timestamps such as ``2026-01-14T06:30:00``.  A column map (TOML, ``[columns]``
table: ``"historian header" = "quantity [unit]"``) renames other headers.

Cells are separated by commas, semicolons or tabs (from the header line); with semicolons or tabs
a decimal comma is read too ("4,55").

Rows with flow 0 (pump stopped) are read: they count for the volumes moved, but are not replayed.

Every data row is either read or reported with its reason: nothing is dropped silently.  Blank
cells of a measured quantity keep the row (that quantity is just not compared there).
"""

from __future__ import annotations

import csv
import hashlib
import io
import math
import tomllib
from dataclasses import dataclass, field
from datetime import datetime
from pathlib import Path

import numpy as np

from planner.errors import PlannerError, quoted
from planner.scenario.columns import TIMESTAMP_UNITS, cell_number as _number, decode_text, delimiter_of as _delimiter, split_header
from planner.scenario.units import ATMOSPHERE_PA, UnitError, to_si

# quantity -> unit kind (planner.scenario.units)
QUANTITIES: dict[str, str] = {
    "time": "time",
    "flow": "volume_flow",
    "discharge_pressure": "pressure",
    "suction_pressure": "pressure",
    "pump_inlet_temperature": "temperature",
    "outlet_temperature": "temperature",
    "source_temperature": "temperature",
    "ambient_temperature": "temperature",
    "speed": "rotational_speed",
}
REQUIRED = ("time", "flow")
MEASURED = ("discharge_pressure", "suction_pressure", "pump_inlet_temperature", "outlet_temperature")
# limits a logged value must respect to be read [SI]; a running flow is at least the scenario's smallest
# operation.flow (MIN_RUNNING_FLOW): below it (1e-320 m³/s) the line's Reynolds number has no value
MIN_RUNNING_FLOW = 1.0e-6
LIMITS: dict[str, tuple[float, float, str]] = {
    "flow": (0.0, 2.0, "flow must be 0 (pump stopped) or between 0.0036 m³/h (1e-6 m³/s) and 2 m³/s"),
    "discharge_pressure": (-1.0e5, 5.0e7, "gauge pressure must lie between -1 bar and 500 bar"),
    "suction_pressure": (-1.0e5, 5.0e7, "gauge pressure must lie between -1 bar and 500 bar"),
    "pump_inlet_temperature": (173.15, 773.15, "temperature must lie between -100 °C and 500 °C"),
    "outlet_temperature": (173.15, 773.15, "temperature must lie between -100 °C and 500 °C"),
    "source_temperature": (173.15, 773.15, "temperature must lie between -100 °C and 500 °C"),
    "ambient_temperature": (173.15, 373.15, "ambient must lie between -100 °C and 100 °C"),
    "speed": (0.0, 500.0, "speed must lie between 0 and 30 000 rpm"),
}
MIN_ROWS = 5
MAX_ROWS = 5000
MAX_BYTES = 20_000_000
MAX_COLUMN_MAP_BYTES = 100_000
_TIMESTAMP_UNITS = TIMESTAMP_UNITS


class LogError(PlannerError):
    """A log that cannot be used, with the reason (and the column or row) in words."""


@dataclass
class Column:
    quantity: str
    header: str          # the header cell as written in the file
    unit: str            # as given ("" for timestamps)
    scale: float = 1.0   # SI = offset + scale * number
    offset: float = 0.0
    timestamps: bool = False


@dataclass
class TransferLog:
    """A readable log: SI arrays per quantity (time in s from the first readable row)."""

    name: str
    sha256: str
    values: dict[str, np.ndarray]
    columns: dict[str, Column]
    line_numbers: np.ndarray               # file line of each readable row (header is line 1)
    rows_total: int
    problems: list[tuple[int, str]] = field(default_factory=list)   # (file line, reason) of unread rows
    blanks: dict[str, int] = field(default_factory=dict)             # measured quantity -> blank cells
    ignored_headers: list[str] = field(default_factory=list)
    start: str | None = None                                         # first timestamp, if given as such

    @property
    def rows(self) -> int:
        return int(self.line_numbers.size)

    def has(self, quantity: str) -> bool:
        return quantity in self.values and bool(np.isfinite(self.values[quantity]).any())

    @property
    def running(self) -> np.ndarray:
        """Rows with the product moving; rows with flow 0 (pump stopped) count for the volumes moved
        but are not replayed."""
        return self.values["flow"] > 0.0

    @property
    def stopped_rows(self) -> int:
        return int(np.sum(~self.running))

    @property
    def measured(self) -> list[str]:
        return [q for q in MEASURED if self.has(q)]

    def problem_summary(self) -> list[dict]:
        """Unread rows grouped by reason: count and the first few file lines."""
        groups: dict[str, list[int]] = {}
        for line, reason in self.problems:
            groups.setdefault(reason, []).append(line)
        return [{"reason": r, "count": len(lines), "lines": lines[:5]} for r, lines in groups.items()]


def read_column_map(path: str | Path) -> dict[str, str]:
    """``[columns]`` of a TOML file: historian header -> ``quantity [unit]``."""
    path = Path(path)
    try:
        with path.open("rb") as handle:
            raw = handle.read(MAX_COLUMN_MAP_BYTES + 1)
        if len(raw) > MAX_COLUMN_MAP_BYTES:
            raise LogError(f"--columns: {quoted(str(path))} is larger than {MAX_COLUMN_MAP_BYTES // 1000} kB; a column "
                           "map is a short [columns] table")
        data = tomllib.loads(raw.decode("utf-8-sig"))
    except OSError as exc:
        raise LogError(f"--columns: cannot open {quoted(str(path))}: {exc.strerror}") from None
    except UnicodeDecodeError:
        raise LogError(f"--columns: {quoted(str(path))} is not UTF-8 text") from None
    except tomllib.TOMLDecodeError as exc:
        raise LogError(f"--columns: cannot read {quoted(str(path))} as TOML: {exc}") from None
    except ValueError:         # an integer past Python's digit limit
        raise LogError(f"--columns: cannot read {quoted(str(path))} as TOML: it holds a number too long to read") from None
    return column_map_from_dict(data, "--columns")


def column_map_from_dict(data: dict, where: str = "column map") -> dict[str, str]:
    table = data.get("columns") if isinstance(data, dict) else None
    if not isinstance(table, dict) or not table:
        raise LogError(f"{where}: needs a [columns] table, e.g. \"FT-101.PV\" = \"flow [m3/h]\"")
    out = {}
    for header, target in table.items():
        if not isinstance(target, str):
            raise LogError(f"{where}: columns.{quoted(header, 40)} must be a string like \"flow [m3/h]\"")
        _parse_header(target, f"{where}: columns.{quoted(header, 40)}", strict=True)
        out[str(header).strip()] = target
    return out


def _parse_header(text: str, where: str, strict: bool = False) -> tuple[str, str] | None:
    """(quantity, unit) of a ``quantity [unit]`` cell; None when it is not one of QUANTITIES
    (``strict``: a LogError instead)."""
    parsed = split_header(text)
    if parsed is None:
        if strict:
            raise LogError(f"{where}: {quoted(text)} does not read 'quantity [unit]', e.g. 'flow [m3/h]'")
        return None
    quantity, unit = parsed
    if quantity not in QUANTITIES:
        if strict:
            raise LogError(f"{where}: unknown quantity {quoted(quantity, 40)}; quantities are {', '.join(QUANTITIES)}")
        return None
    return quantity, unit


def _unit_map(quantity: str, unit: str, header: str) -> Column:
    """The affine map number -> SI of a column's unit (gauge pressures; a/g suffixes understood)."""
    kind = QUANTITIES[quantity]
    if quantity == "time" and unit.lower() in _TIMESTAMP_UNITS:
        return Column(quantity, header, unit, timestamps=True)
    if not unit:
        raise LogError(f"column {quoted(header, 40)}: give the unit in brackets, e.g. '{quantity} [{_example_unit(kind)}]'")
    shift = 0.0
    text = unit
    if kind == "pressure":
        lowered = unit.lower().replace("(", "").replace(")", "").replace(" ", "")
        for suffix, atmosphere in (("g", 0.0), ("a", -ATMOSPHERE_PA)):
            base = lowered[:-1]
            if lowered.endswith(suffix) and base in ("bar", "psi", "kpa", "mpa", "pa"):
                text, shift = {"kpa": "kPa", "mpa": "MPa", "pa": "Pa"}.get(base, base), atmosphere
                break
    try:
        zero = to_si(f"0 {text}", kind, f"column {quoted(header, 40)}")
        one = to_si(f"1 {text}", kind, f"column {quoted(header, 40)}")
    except UnitError as exc:
        raise LogError(str(exc)) from None
    return Column(quantity, header, unit, scale=one - zero, offset=zero + shift)


def _example_unit(kind: str) -> str:
    return {"time": "min", "volume_flow": "m3/h", "pressure": "bar", "temperature": "degC",
            "rotational_speed": "rpm"}[kind]


def _columns(header: list[str], column_map: dict[str, str] | None) -> tuple[dict[int, Column], list[str]]:
    mapped = {k.strip(): v for k, v in (column_map or {}).items()}
    found: dict[int, Column] = {}
    ignored = []
    seen: dict[str, str] = {}
    for index, cell in enumerate(header):
        cell = cell.strip()
        parsed = _parse_header(mapped.get(cell, cell), f"column {quoted(cell, 40)}")
        if parsed is None:
            if cell:
                ignored.append(cell)
            continue
        quantity, unit = parsed
        if quantity in seen:
            raise LogError(f"columns {quoted(seen[quantity], 40)} and {quoted(cell, 40)} both give {quantity}; keep one")
        seen[quantity] = cell
        found[index] = _unit_map(quantity, unit, cell)
    missing = [q for q in REQUIRED if q not in seen]
    if missing:
        hint = f" (columns not understood: {', '.join(quoted(h, 40) for h in ignored[:8])}; map them with --columns)" if ignored else ""
        raise LogError(f"the log has no {' or '.join(missing)} column; header cells read 'quantity [unit]', "
                       f"e.g. 'time [min]', 'flow [m3/h]'{hint}")
    if not any(q in seen for q in MEASURED):
        raise LogError(f"the log has none of {', '.join(MEASURED)}: nothing to compare the model with")
    return found, ignored


def _decode(data: bytes) -> str:
    """The log's text (``scenario.columns.decode_text``); binary data is refused."""
    return decode_text(data, "the log", LogError)


def _read_row(cells: list[str], columns: dict[int, Column], decimal_comma: bool = False) -> tuple[dict[str, float], object]:
    """SI values of one row and its timestamp (or None); ValueError with the reason."""
    row: dict[str, float] = {}
    stamp = None
    for index, col in columns.items():
        cell = cells[index].strip()
        q = col.quantity
        if not cell:
            if q in REQUIRED:
                raise ValueError(f"{q} is blank")
            row[q] = math.nan
            continue
        if col.timestamps:
            try:
                stamp = datetime.fromisoformat(cell)
            except ValueError:
                raise ValueError(f"time {quoted(cell, 40)} is not an ISO 8601 timestamp") from None
            continue
        try:
            value = col.offset + col.scale * _number(cell, decimal_comma)
        except ValueError:
            raise ValueError(f"{q} {quoted(cell, 40)} is not a number") from None
        low, high, text = LIMITS.get(q, (-math.inf, math.inf, ""))
        if value > high or value < low or (q == "flow" and 0.0 < value < MIN_RUNNING_FLOW):
            raise ValueError(f"{q} {cell if len(cell) <= 30 else quoted(cell, 30)} {col.unit}: {text}")
        row[q] = value
    return row, stamp


def _parse_rows(reader, columns: dict[int, Column], width: int, decimal_comma: bool = False):
    """Readable rows, their file lines, timestamps and the problems of the rest."""
    rows, lines, stamps, problems = [], [], [], []
    comments = 0
    for cells in reader:
        line = reader.line_num
        if not cells or all(not c.strip() for c in cells):
            continue
        if cells[0].lstrip().startswith("#"):
            comments += 1
            continue
        if len(rows) + len(problems) >= MAX_ROWS * 2:
            raise LogError(f"the log has more than {MAX_ROWS * 2} data rows; resample it (e.g. one row a minute)")
        if len(cells) != width:
            problems.append((line, f"expected {width} cells, found {len(cells)}"))
            continue
        try:
            row, stamp = _read_row(cells, columns, decimal_comma)
        except ValueError as exc:
            problems.append((line, str(exc)))
            continue
        rows.append(row)
        lines.append(line)
        stamps.append(stamp)
    return rows, lines, stamps, problems


def _times(rows, stamps, timestamps: bool) -> tuple[list[float], str | None]:
    if not timestamps:
        return [r["time"] for r in rows], None
    aware = {s.tzinfo is not None and s.utcoffset() is not None for s in stamps}
    if len(aware) > 1:
        raise LogError("time: the log mixes timestamps with and without a time zone; use one kind")
    first = stamps[0]
    return [(s - first).total_seconds() for s in stamps], first.isoformat()


def _increasing(times, rows, lines, problems):
    """Keep rows whose time is after the last kept row's; report the others."""
    keep, last = [], -math.inf
    for i, t in enumerate(times):
        if t > last:
            keep.append(i)
            last = t
        else:
            problems.append((lines[i], "time is not after the previous row's"))
    return keep


def read_log(data: bytes | str, name: str = "log.csv", column_map: dict[str, str] | None = None) -> TransferLog:
    """Read a logged transfer from the bytes (or text) of a CSV file; see the module docstring.  Every
    refusal is a LogError starting ``log: `` (or ``--columns: ``)."""
    try:
        return _read_log(data, name, column_map)
    except csv.Error as exc:     # e.g. a field past the csv module's limit: a file that is not a log
        raise LogError(f"log: {quoted(name, 40)} cannot be read as CSV ({exc}); export the log as CSV text") from None
    except LogError as exc:
        if str(exc).startswith(("log", "--columns", "column map")):
            raise
        raise LogError(f"log: {exc}") from None


def _read_log(data: bytes | str, name: str, column_map: dict[str, str] | None) -> TransferLog:
    raw = data.encode("utf-8") if isinstance(data, str) else bytes(data)
    if len(raw) > MAX_BYTES:
        raise LogError(f"the log is {len(raw) / 1e6:.0f} MB; the limit is {MAX_BYTES / 1e6:.0f} MB")
    text = _decode(raw)
    body = [ln for ln in text.splitlines() if ln.strip() and not ln.lstrip().startswith("#")]
    if not body:
        raise LogError(f"{quoted(name, 40)}: the log is empty")
    delimiter = _delimiter(body[0])
    reader = csv.reader(io.StringIO(text), delimiter=delimiter)
    header = None
    for cells in reader:
        if cells and any(c.strip() for c in cells) and not cells[0].lstrip().startswith("#"):
            header = cells
            break
    columns, ignored = _columns(header, column_map)
    rows, lines, stamps, problems = _parse_rows(reader, columns, len(header), decimal_comma=delimiter != ",")
    total = len(rows) + len(problems)
    if not rows:
        raise LogError(f"{quoted(name, 40)}: none of its {total} data rows could be read; first reasons: "
                       + "; ".join(f"line {ln}: {why}" for ln, why in problems[:3]))
    timestamps = columns[[i for i, c in columns.items() if c.quantity == "time"][0]].timestamps
    times, start = _times(rows, stamps, timestamps)
    keep = _increasing(times, rows, lines, problems)
    running = sum(1 for i in keep if rows[i]["flow"] > 0.0)
    if running < MIN_ROWS:
        raise LogError(f"{quoted(name, 40)}: only {running} of {total} data rows could be read with the product moving "
                       f"(at least {MIN_ROWS} needed)")
    if len(keep) > MAX_ROWS:
        raise LogError(f"{quoted(name, 40)}: {len(keep)} readable rows; the fit takes at most {MAX_ROWS}: resample the log")
    t0 = times[keep[0]]
    values = {"time": np.array([times[i] - t0 for i in keep])}
    for col in columns.values():
        if col.quantity != "time":
            values[col.quantity] = np.array([rows[i][col.quantity] for i in keep])
    blanks = {q: int(np.isnan(v).sum()) for q, v in values.items() if q != "time" and np.isnan(v).any()}
    problems.sort()
    return TransferLog(name, hashlib.sha256(raw).hexdigest(), values,
                       {c.quantity: c for c in columns.values()}, np.array([lines[i] for i in keep]), total,
                       problems, blanks, ignored, start)


def read_log_file(path: str | Path, columns: str | Path | None = None) -> TransferLog:
    """Read a log file; at most MAX_BYTES are read (``/dev/zero`` or a huge file is refused, not loaded)."""
    path = Path(path)
    try:
        with path.open("rb") as handle:
            data = handle.read(MAX_BYTES + 1)
    except OSError as exc:
        raise LogError(f"log: cannot open the log {quoted(str(path))}: {exc.strerror}") from None
    if len(data) > MAX_BYTES:
        raise LogError(f"log: {quoted(path.name, 40)} is larger than {MAX_BYTES / 1e6:.0f} MB, the limit for a log; "
                       "resample it (e.g. one row a minute)")
    column_map = read_column_map(columns) if columns is not None else None
    return read_log(data, path.name, column_map)
