"""CSV files with ``quantity [unit]`` header cells: the one reading of their text, header cells, delimiters
and numbers, shared by the calibration's transfer logs (``calibration.log``) and the weather files
(``scenario.weather_file``).

- Text: UTF-16 when it starts with a UTF-16 byte-order mark, else UTF-8 (a byte-order mark dropped), else
  Windows-1252; a NUL byte is binary data and refused.
- Header cells read ``quantity [unit]`` (``flow [m3/h]``, ``ambient temperature [degC]``); the quantity is
  lower-cased with spaces as underscores.
- Cells are separated by commas, semicolons or tabs (the most frequent of them in the header line); with
  semicolons or tabs a decimal comma is read too ("4,55").
"""

from __future__ import annotations

import math
import re

from planner.errors import PlannerError

HEADER = re.compile(r"^\s*([A-Za-z][A-Za-z0-9_ ]*?)\s*(?:\[(.*)\])?\s*$")
TIMESTAMP_UNITS = {"", "iso", "iso8601", "iso 8601", "timestamp"}    # a time column of timestamps


def split_header(text: str) -> tuple[str, str] | None:
    """(quantity, unit) of a ``quantity [unit]`` header cell (unit "" when none is given), or None when
    the cell does not read so.

    >>> split_header("Ambient temperature [degC]"), split_header("time"), split_header("3 [x]")
    (('ambient_temperature', 'degC'), ('time', ''), None)
    """
    match = HEADER.match(text or "")
    if not match:
        return None
    return match.group(1).strip().lower().replace(" ", "_"), (match.group(2) or "").strip()


def decode_text(data: bytes, what: str = "the file", error=PlannerError) -> str:
    """The text of a CSV file's bytes (see the module docstring); for binary data, raises ``error(message)``
    (an exception class, or a function making the exception) with ``what`` named."""
    if data[:2] in (b"\xff\xfe", b"\xfe\xff"):
        try:
            return data.decode("utf-16")
        except UnicodeDecodeError:
            raise error(f"{what} starts with a UTF-16 byte-order mark but is not UTF-16 text; export it as "
                        "CSV (UTF-8)") from None
    nul = data.find(b"\x00")
    if nul >= 0:
        raise error(f"{what} is not a text CSV file (a NUL byte at byte {nul + 1:,}: binary data); export "
                    f"{what.removeprefix('the ')} as CSV text")
    for encoding in ("utf-8-sig", "cp1252"):
        try:
            return data.decode(encoding)
        except UnicodeDecodeError:
            continue
    return data.decode("latin-1")


def delimiter_of(first_line: str) -> str:
    """The cell delimiter of a file whose header line is ``first_line``: comma, semicolon or tab."""
    counts = {d: first_line.count(d) for d in (",", ";", "\t")}
    return max(counts, key=counts.get) if max(counts.values()) > 0 else ","


def cell_number(cell: str, decimal_comma: bool = False) -> float:
    """A cell's finite number; ValueError otherwise."""
    if decimal_comma and "," in cell and "." not in cell:
        cell = cell.replace(",", ".")
    value = float(cell)
    if not math.isfinite(value):
        raise ValueError(cell)
    return value
