"""Reading and writing scenarios: TOML or JSON text and files (size and long-integer guards), plain and
readable dicts, the one canonical JSON text, and saving without losing the old file on a failed write.
"""

from __future__ import annotations

import contextlib
import json
import re
import tomllib
from pathlib import Path

import tomli_w

from planner.errors import ScenarioError
from planner.scenario.quantities import readable_dump
from planner.scenario.root import Scenario, scenario_from_dict
from planner.scenario.units import LongInteger

MAX_SCENARIO_CHARS = 2_000_000   # a scenario file or text longer than this is refused unread


LONG_INTEGER_DIGITS = 4000      # below Python's int-to-str limit (4,300 digits)
_LONG_INTEGER_MARK = "\x00long integer:"
_LONG_TOML_INTEGER = re.compile(r"(?<![\w.\"'])[+-]?[0-9][0-9_]{%d,}(?![\w.\"'])" % LONG_INTEGER_DIGITS)


def json_integer(digits: str):
    """``json.loads``'s ``parse_int``: a LongInteger past ``LONG_INTEGER_DIGITS`` digits (never Python's
    int-to-str ValueError, which names no field)."""
    return int(digits) if len(digits) <= LONG_INTEGER_DIGITS else LongInteger(len(digits.lstrip("+-")))


def _toml_with_long_integers(text: str) -> object:
    """TOML whose integers may be too long for Python: each such integer is read as a LongInteger,
    so that the field it was given for is refused by name (tomllib has no integer hook)."""
    marked = _LONG_TOML_INTEGER.sub(lambda m: json.dumps(f"{_LONG_INTEGER_MARK}{len(m.group(0).lstrip('+-'))}"), text)
    return _unmark(tomllib.loads(marked))


def _unmark(data):
    if isinstance(data, dict):
        return {k: _unmark(v) for k, v in data.items()}
    if isinstance(data, list):
        return [_unmark(v) for v in data]
    if isinstance(data, str) and data.startswith(_LONG_INTEGER_MARK):
        return LongInteger(int(data[len(_LONG_INTEGER_MARK):]))
    return data


def read_scenario_data(text: str, fmt: str) -> object:
    """The plain data of a TOML or JSON text, or ScenarioError saying why it cannot be read.  A leading
    byte-order mark is dropped; an integer too long for Python is kept as a ``LongInteger`` (refused by
    its field's validator, which names the field)."""
    if len(text) > MAX_SCENARIO_CHARS:
        raise ScenarioError([("", f"the {fmt.upper()} text is {len(text):,} characters, more than a scenario "
                                  f"needs (at most {MAX_SCENARIO_CHARS:,})")])
    text = text.removeprefix("\ufeff")
    try:
        if fmt == "json":
            return json.loads(text, parse_int=json_integer)
        try:
            return tomllib.loads(text)
        except ValueError as exc:
            if isinstance(exc, tomllib.TOMLDecodeError) or not _LONG_TOML_INTEGER.search(text):
                raise
            return _toml_with_long_integers(text)
    except (tomllib.TOMLDecodeError, json.JSONDecodeError) as exc:
        raise ScenarioError([("", f"cannot read the {fmt.upper()} file: {exc}")]) from None
    except RecursionError:
        raise ScenarioError([("", f"cannot read the {fmt.upper()} file: it is nested too deeply")]) from None


def parse_scenario_text(text: str, fmt: str) -> Scenario:
    return scenario_from_dict(read_scenario_data(text, fmt))


def load_scenario(path: str | Path) -> Scenario:
    path = Path(path)
    try:
        with path.open("r", encoding="utf-8") as handle:
            text = handle.read(MAX_SCENARIO_CHARS + 1)
    except OSError as exc:
        raise ScenarioError([("", f"cannot open {path}: {exc.strerror}")]) from None
    except UnicodeDecodeError:
        raise ScenarioError([("", f"cannot read {path}: it is not UTF-8 text")]) from None
    fmt = "json" if path.suffix.lower() == ".json" else "toml"
    return parse_scenario_text(text, fmt)


def scenario_to_dict(scenario: Scenario) -> dict:
    """Plain numbers in the default units; optional fields left unset are dropped."""
    return scenario.model_dump(mode="json", exclude_none=True)


def scenario_to_readable_dict(scenario: Scenario, system: str = "SI") -> dict:
    """The scenario as a person writes it: quantities with their units in ``system`` ("10 bar",
    "55 degC"; "145 psi", "131 degF"), reading back to exactly the same scenario."""
    return readable_dump(scenario, system)


def scenario_to_toml(scenario: Scenario, system: str = "SI") -> str:
    """A TOML scenario file with every quantity written with its unit in ``system``."""
    return tomli_w.dumps(scenario_to_readable_dict(scenario, system))


def scenario_to_json(scenario: Scenario) -> str:
    """The scenario's one canonical JSON text: keys sorted, no spaces, not ASCII-escaped.  Saved revisions
    store it (``records.store``), the dashboard keys its caches and compares revisions with it; two
    scenarios with the same fields give the same text."""
    return json.dumps(scenario_to_dict(scenario), sort_keys=True, separators=(",", ":"), ensure_ascii=False)


def save_scenario(scenario: Scenario, path: str | Path, system: str = "SI") -> None:
    """Write the scenario file (JSON or TOML by the suffix) with its quantities in units of ``system``."""
    path = Path(path)
    if path.suffix.lower() == ".json":
        text = json.dumps(scenario_to_readable_dict(scenario, system), indent=2, ensure_ascii=False)
    else:
        text = scenario_to_toml(scenario, system)
    _write_whole(path, text.encode("utf-8"))


def _write_whole(path: Path, data: bytes) -> None:
    """Write ``data`` to ``path`` whole or not at all: a temporary file beside it, then renamed over it, so a
    full disk never leaves a file cut short (OSError is raised and the old file, if any, is unchanged)."""
    import os
    import tempfile

    if path.exists() and not path.is_file():   # a device or pipe (/dev/stdout, /dev/full): written in place,
        with path.open("wb") as out:           # never replaced by a file
            out.write(data)
        return
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name[:40]}.", suffix=".part", dir=path.parent)
    try:
        with os.fdopen(handle, "wb") as out:
            out.write(data)
            out.flush()
            os.fsync(out.fileno())
        os.chmod(temporary, path.stat().st_mode & 0o777 if path.exists() else 0o644)   # mkstemp makes it 0600
        os.replace(temporary, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(temporary)
        raise
