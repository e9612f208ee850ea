"""Issue 20, part 3: every refusal names its field and its limit, quotes at most about 80 characters of
the input, and nothing escapes as an internal error (unit strings with unbalanced brackets, integers
past Python's digit limit, byte-order marks, Walther laws out of range, logs that are binary, endless
or UTF-16, a ``--write`` to a full disk, share links with bytes after their end)."""

from __future__ import annotations

import base64
import json
import math
import re
import resource
import subprocess
import sys
import zlib

import pytest

from conftest import DEMO_DIR, DEMO_FILES, ROOT, base_scenario
from planner.calibration.log import LogError, read_log, read_log_file
from planner.cli import main
from planner.errors import QUOTE_CHARS, ScenarioError, quoted
from planner.records.links import LinkError, pack_scenario, unpack_scenario
from planner.scenario.schema import load_scenario, parse_scenario_text, scenario_from_dict, scenario_to_dict
from planner.scenario.units import UnitError, to_si

BARGE = DEMO_DIR / "fuel_oil_barge_discharge.toml"
DEMO_LOG = DEMO_DIR / "logs" / "barge_wren_2026-01-14.csv"
FIELD_LINE = re.compile(r"^error: (?:scenario is not valid:\n  )?(?:[^\n:]*\()?([a-z_\-][\w.\[\]\-]*)\)?: ", re.M)


def _cli(capsys, *argv) -> tuple[int, str]:
    try:
        code = main(list(argv))
    except SystemExit as exc:
        code = exc.code
    return code, capsys.readouterr().err


def _write(tmp_path, data: dict, name: str = "case.json"):
    path = tmp_path / name
    path.write_text(json.dumps(data), encoding="utf-8")
    return path


@pytest.mark.parametrize("text", ["5 m)", "15 m3/h)", "5 (m", "5 m((", "5 kg/(m*s"])
def test_unbalanced_brackets_are_a_unit_error_naming_the_field(text):
    # before: tokenize.TokenError from pint's parser, an "internal error" on the command line
    with pytest.raises(UnitError, match=r"^route\.length: the unit of .* has unbalanced brackets"):
        to_si(text, "length", "route.length")


def test_unbalanced_brackets_in_a_file_and_an_option_name_them(tmp_path, capsys):
    data = base_scenario()
    data["route"]["segments"][0]["length"] = "5 m)"
    code, err = _cli(capsys, "evaluate", str(_write(tmp_path, data)), "--json")
    assert code == 2 and "(route.segments[0].length): the unit of '5 m)' has unbalanced brackets" in err
    code, err = _cli(capsys, "evaluate", str(_write(tmp_path, base_scenario())), "--flow", "15 m3/h)")
    assert code == 2 and err.startswith("error: --flow: the unit of '15 m3/h)' has unbalanced brackets"), err


def test_messages_quote_at_most_about_80_characters(tmp_path, capsys):
    assert len(quoted("x" * 100_000)) < QUOTE_CHARS + 30 and "100,000 characters" in quoted("x" * 100_000)
    assert quoted(10 ** 5000) == "an integer of about 5,001 digits"        # repr itself would raise
    data = base_scenario()
    data["operation"]["flow"] = "5 " + "(" * 30 + "x" * 100_000
    code, err = _cli(capsys, "evaluate", str(_write(tmp_path, data)), "--json")
    assert code == 2 and "(operation.flow):" in err and len(err) < 400, err[:500]
    code, err = _cli(capsys, "evaluate", str(_write(tmp_path, base_scenario())), "--flow", "1" * 100_000)
    assert code == 2 and err.startswith("error: --flow: ") and len(err) < 400, err[:500]


@pytest.mark.parametrize("fmt", ["json", "toml"])
def test_an_integer_past_the_digit_limit_is_refused_at_its_field(fmt):
    # before: "Exceeds the limit (4300 digits) for integer string conversion ... sys.set_int_max_str_digits()"
    digits = "9" * 5000
    if fmt == "json":
        text = json.dumps(base_scenario()).replace('"length": 100.0', f'"length": {digits}')
    else:
        text = BARGE.read_text(encoding="utf-8").replace('length = "14 m"', f"length = {digits}")
    with pytest.raises(ScenarioError) as info:
        parse_scenario_text(text, fmt)
    assert info.value.problems == [("route.segments[0].length",
                                    "an integer of 5,000 digits is past the range of numbers (about 1e308 at most)")]
    assert "set_int_max_str_digits" not in str(info.value)


def test_an_integer_past_the_digit_limit_in_an_integer_field_names_it():
    text = \
        json.dumps(base_scenario()).replace('"schema_version": 1', '"schema_version": 1, "schedule": {"timeline_steps": '
                                            + "7" * 4500 + "}")
    with pytest.raises(ScenarioError) as info:
        parse_scenario_text(text, "json")
    assert [path for path, _ in info.value.problems] == ["schedule.timeline_steps"]


def test_a_byte_order_mark_at_the_start_of_a_scenario_file_is_read(tmp_path, capsys):
    # before: "Unexpected UTF-8 BOM (decode using utf-8-sig)" as the whole refusal
    path = tmp_path / "bom.json"
    path.write_text(json.dumps(base_scenario()), encoding="utf-8-sig")
    assert path.read_bytes()[:3] == b"\xef\xbb\xbf"
    assert load_scenario(path) == scenario_from_dict(base_scenario())
    toml = tmp_path / "bom.toml"
    toml.write_bytes(b"\xef\xbb\xbf" + BARGE.read_bytes())
    assert load_scenario(toml) == load_scenario(BARGE)


def _walther(viscosity: dict) -> dict:
    data = scenario_to_dict(load_scenario(BARGE))
    data["product"].pop("preset", None)
    data["product"]["viscosity"] = viscosity
    return data


def test_a_walther_lab_point_below_astm_d341_names_the_point():
    # before: "values[1] = 1.0000000000000002e-07 m2/s: below the ASTM D341 range" from the plan, naming no field
    data = _walther({"law": "walther", "points": [{"temperature": 20, "kinematic_viscosity": "5 cSt"},
                                                  {"temperature": 50, "kinematic_viscosity": "0.1 cSt"}]})
    with pytest.raises(ScenarioError) as info:
        scenario_from_dict(data)
    (path, message), = info.value.problems
    assert path == "product" and message.startswith("viscosity.points[1]: lab point 2 has a kinematic viscosity of 0.1 cSt")
    assert "ASTM D341" in message and "0.11 cSt" in message


def test_a_walther_law_that_overflows_names_the_viscosity_and_the_range():
    # a = 10, b = 3: log10 log10 Z = 10 - 3 log10 T is 3.2 at -90 degC, so Z = 10**1600 (past float range);
    # before: "temperature = 328.15 K: Walther law gives Z = 9.9e+282, below the ASTM D341 range"
    data = _walther({"law": "walther", "coefficients": {"a": 10.0, "b": 3.0}})
    with pytest.raises(ScenarioError) as info:
        scenario_from_dict(data)
    (path, message), = info.value.problems
    assert path == "product" and message.startswith("viscosity: the walther law with a = 10, b = 3 has no finite "
                                                    "viscosity at -90 °C")
    # the same law is fine at 55 degC once Z past 1e102 no longer overflows the standard's inverse
    from planner.correlations.viscosity import WaltherLaw, walther_cst_to_z

    nu = WaltherLaw(10.0, 3.0).kinematic(328.15) * 1e6
    assert walther_cst_to_z(nu) == pytest.approx(10.0 ** 10.0 ** (10.0 - 3.0 * math.log10(328.15)), rel=1e-12)


# ------------------------------------------------------------------------------ calibration logs


def test_dev_zero_as_a_log_is_refused_after_reading_at_most_the_cap():
    before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss      # kB on Linux
    with pytest.raises(LogError, match=r"^log: 'zero' is larger than 20 MB, the limit for a log"):
        read_log_file("/dev/zero")
    grown_mb = (resource.getrusage(resource.RUSAGE_SELF).ru_maxrss - before) / 1024
    assert grown_mb < 100, grown_mb            # the cap (20 MB) and one copy, not the endless file


def test_binary_and_odd_logs_are_named_refusals(tmp_path):
    text = DEMO_LOG.read_text(encoding="utf-8")
    with pytest.raises(LogError, match=r"^log: the log is not a text CSV file \(a NUL byte at byte 4"):
        read_log(b"abc\x00" + bytes(range(256)) * 20, "binary.dat")
    with pytest.raises(LogError, match=r"^log: 'wide.csv' cannot be read as CSV \(field larger than field limit"):
        read_log("time [min],flow [m3/h],discharge_pressure [bar]\n1,\"" + "x" * 200_000 + "\",3\n", "wide.csv")
    # a spreadsheet's "Unicode text": UTF-16 with its byte-order mark, tab-separated
    wide = read_log(text.replace(",", "\t").encode("utf-16"), "unicode.txt")
    plain = read_log(text.encode("utf-8"), "demo.csv")
    assert wide.rows == plain.rows == 98
    assert (wide.values["flow"] == plain.values["flow"]).all()
    assert read_log(b"\xef\xbb\xbf" + text.encode("utf-8"), "bom.csv").rows == 98
    with pytest.raises(LogError, match=r"^log: column 'flow \[m3/h\)\]': the unit of '0 m3/h\)' has unbalanced brackets"):
        read_log(text.replace("flow [m3/h]", "flow [m3/h)]"), "paren.csv")


def test_a_flow_of_1e_320_is_an_unread_row_naming_the_limit():
    # before: replayed, and the fit failed with "reynolds number: nan"
    lines = DEMO_LOG.read_text(encoding="utf-8").splitlines()
    header = next(i for i, line in enumerate(lines) if line.startswith("time"))
    cells = lines[header + 3].split(",")
    cells[1] = "1e-320"
    lines[header + 3] = ",".join(cells)
    log = read_log("\n".join(lines), "tiny.csv")
    assert (header + 4, "flow 1e-320 m3/h: flow must be 0 (pump stopped) or between 0.0036 m³/h (1e-6 m³/s) and "
                        "2 m³/s") in log.problems
    assert log.values["flow"].min() >= 1e-6


@pytest.mark.slow
@pytest.mark.parametrize("target", ["/dev/full", "{tmp}/no such folder/out.toml"])
def test_write_to_a_full_disk_or_a_missing_folder_is_a_named_refusal(tmp_path, target):
    # before: OSError, "internal error", exit 1
    target = target.format(tmp=tmp_path)
    out = subprocess.run([sys.executable, "-m", "planner", "calibrate", str(BARGE), str(DEMO_LOG), "--fit",
                          "viscosity_factor", "--write", target, "--overwrite", "--force"], cwd=ROOT,
                         capture_output=True, text=True, timeout=300)
    assert out.returncode == 2, out.stderr
    assert re.search(r"^error: --write: cannot write '.*: (No space left on device|No such file or directory); "
                     r"nothing was written", out.stderr, re.M), out.stderr
    assert "internal error" not in out.stderr
    assert not list(tmp_path.glob("**/*.part"))


def test_save_never_leaves_a_file_cut_short(tmp_path):
    from planner.scenario.schema import save_scenario

    path = tmp_path / "kept.toml"
    path.write_text("old contents", encoding="utf-8")
    path.chmod(0o640)
    save_scenario(load_scenario(BARGE), path)
    assert load_scenario(path) == load_scenario(BARGE) and (path.stat().st_mode & 0o777) == 0o640
    assert [p.name for p in tmp_path.iterdir()] == ["kept.toml"]


# ------------------------------------------------------------------------------ share links


def _pack_text(text: bytes, tail: bytes = b"") -> str:
    from planner.records.links import _ZDICT_V1

    compressor = zlib.compressobj(9, zlib.DEFLATED, 15, 9, zlib.Z_DEFAULT_STRATEGY, _ZDICT_V1)
    body = base64.urlsafe_b64encode(compressor.compress(text) + compressor.flush() + tail).decode().rstrip("=")
    return f"1.{body}.{zlib.crc32(text):08x}"


def test_links_with_long_integers_unbalanced_units_or_trailing_bytes_are_link_errors():
    good = json.dumps(scenario_to_dict(load_scenario(DEMO_FILES[0])))
    huge = good.replace('"wind_speed": 7.0', '"wind_speed": ' + "9" * 5000).encode()
    assert huge != good.encode()
    with pytest.raises(LinkError, match=r"site\.wind_speed: an integer of 5,000 digits is past the range"):
        unpack_scenario(_pack_text(huge))
    paren = good.replace('"wind_speed": 7.0', '"wind_speed": "7 m/s)"').encode()
    with pytest.raises(LinkError, match=r"site\.wind_speed: the unit of '7 m/s\)' has unbalanced brackets"):
        unpack_scenario(_pack_text(paren))
    with pytest.raises(LinkError, match=r"damaged \(5 bytes after its end\)"):
        unpack_scenario(_pack_text(good.encode(), tail=b"extra"))
    assert unpack_scenario(_pack_text(good.encode())) == scenario_from_dict(json.loads(good))
    assert unpack_scenario(pack_scenario(load_scenario(DEMO_FILES[0]))) == load_scenario(DEMO_FILES[0])


# ------------------------------------------------------------------------------ comparison values


@pytest.mark.parametrize("args, words", [
    (["--steam-pressures=-5,2"], "--steam-pressures: value 1 (-5 bar): -5.0 bar is out of range: must be at least 0 bar"),
    (["--flow-limits=1e9"], "--flow-limits: value 1 (1e+09 m³/h): 1000000000.0 m³/h is out of range: must be at most "
                            "7200 m³/h"),
    (["--steam-pressures=2,3,2"], "--steam-pressures: value 3 (2 bar) repeats value 1: give each value once"),
    (["--steam-pressures=-20,30", "--units=us"], "--steam-pressures: value 1 (-20 psi): -20.0 psi is out of range: "
                                                  "must be at least 0 psi"),
])
def test_comparison_values_are_checked_like_the_field_in_the_users_units(tmp_path, capsys, args, words):
    # before: steam at -5 bar(g) ran a plan, 1e9 gave "(ERROR)" rows, duplicates were compared
    code, err = _cli(capsys, "compare", str(BARGE), *args, "--json")
    assert code == 2 and words in err, err


def test_the_library_refuses_duplicates_and_values_the_field_refuses():
    from planner.sweeps.compare import compare
    from planner.checks.lever_values import ValuesError

    scenario = load_scenario(BARGE)
    with pytest.raises(ValuesError, match=r"values: value 2 \(3.00 bar\) repeats value 1"):
        compare(scenario, "steam_pressure", [3e5, 3e5 * (1 + 1e-12)])
    with pytest.raises(ValuesError, match=r"values: value 1 \(-5.00 bar\): tracing.steam_pressure: .* must be at least"):
        compare(scenario, "steam_pressure", [-5e5, 3e5])
