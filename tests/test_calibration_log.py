"""Reading logged transfers (planner/calibration/log.py): units, gauge pressures, timestamps, the
column map, and rows that cannot be read."""

from __future__ import annotations

import math

import numpy as np
import pytest

from planner.calibration.log import LogError, column_map_from_dict, read_log, read_log_file

# Conversion factors: NIST SP 811 (2008), Appendix B.8 — 1 psi = 6.894757e3 Pa, 1 gal (US) =
# 3.785412e-3 m³; °F: T/K = (t/°F + 459.67) / 1.8 (B.9); 1 bar = 1e5 Pa.
PSI_PA = 6.894757e3
GALLON_M3 = 3.785412e-3


def _log(text: str, **kw):
    return read_log(text, "test.csv", **kw)


def test_units_are_read_through_the_planner_registry():
    text = ("time [h],flow [gpm],discharge_pressure [psig],outlet_temperature [degF],speed [rpm]\n"
            + "".join(f"{i * 0.5},{100 + i},{50 + i},{104 + i},{300}\n" for i in range(6)))
    log = _log(text)
    assert log.values["time"][1] == pytest.approx(1800.0)
    assert log.values["flow"][0] == pytest.approx(100 * GALLON_M3 / 60.0, rel=1e-6)
    assert log.values["discharge_pressure"][2] == pytest.approx(52 * PSI_PA, rel=1e-6)   # gauge stays gauge
    assert log.values["outlet_temperature"][0] == pytest.approx((104 + 459.67) / 1.8, abs=1e-9)
    assert log.values["speed"][0] == pytest.approx(5.0)                                    # rev/s
    assert log.rows == 6 and not log.problems


def test_absolute_pressure_units_become_gauge():
    # standard atmosphere 101 325 Pa (ISO 2533 / NIST SP 811 B.8)
    text = "time [s],flow [m3/h],suction_pressure [bara]\n" + "".join(f"{i},10,{1.5}\n" for i in range(5))
    log = _log(text)
    assert log.values["suction_pressure"] == pytest.approx(np.full(5, 1.5e5 - 101325.0))


def test_iso_timestamps_give_seconds_from_the_first_row():
    stamps = ["2026-01-14T06:30:00", "2026-01-14T06:31:30", "2026-01-14T06:33:00", "2026-01-14T07:33:00",
              "2026-01-14T08:00:00"]
    text = "time,flow [m3/h],outlet_temperature [degC]\n" + "".join(f"{s},20,40\n" for s in stamps)
    log = _log(text)
    assert log.values["time"].tolist() == [0.0, 90.0, 180.0, 3780.0, 5400.0]
    assert log.start == "2026-01-14T06:30:00"


def test_timestamps_with_and_without_zone_are_refused():
    text = ("time,flow [m3/h],outlet_temperature [degC]\n2026-01-14T06:30:00Z,20,40\n"
            + "".join(f"2026-01-14T06:3{i}:00,20,40\n" for i in range(1, 6)))
    with pytest.raises(LogError, match="time zone"):
        _log(text)


def test_unreadable_rows_are_counted_with_reasons_and_lines():
    rows = ["time [min],flow [m3/h],discharge_pressure [bar],outlet_temperature [degC]"]
    rows += [f"{i},20,{4 + 0.01 * i},40" for i in range(10)]
    rows[3] = "2,twenty,4.02,40"          # line 4: not a number
    rows[5] = "4,20,4.04"                 # line 6: a cell missing
    rows[6] = "5,-3,4.05,40"              # line 7: negative flow
    rows[8] = "6.5,20,,40"                # line 9: blank pressure: kept, not compared
    rows[9] = "6.0,20,4.08,40"            # line 10: time goes back
    log = _log("\n".join(rows) + "\n")
    reasons = {g["reason"]: (g["count"], g["lines"]) for g in log.problem_summary()}
    assert reasons["flow 'twenty' is not a number"] == (1, [4])
    assert reasons["expected 4 cells, found 3"] == (1, [6])
    assert reasons["flow -3 m3/h: flow must be 0 (pump stopped) or between 0.0036 m³/h (1e-6 m³/s) and 2 m³/s"] == (1, [7])
    assert reasons["time is not after the previous row's"] == (1, [10])
    assert log.rows == 6 and log.rows_total == 10 and len(log.problems) == 4
    assert log.blanks == {"discharge_pressure": 1}
    assert log.rows + len(log.problems) == log.rows_total   # nothing dropped silently


def test_rows_with_the_pump_stopped_are_read_but_not_running():
    text = "time [min],flow [m3/h],discharge_pressure [bar]\n" + "".join(
        f"{i},{0 if 3 <= i <= 5 else 30},{0.2 if 3 <= i <= 5 else 4.5}\n" for i in range(10))
    log = _log(text)
    assert log.rows == 10 and log.stopped_rows == 3 and not log.problems
    assert log.running.tolist() == [True] * 3 + [False] * 3 + [True] * 4


def test_missing_columns_are_named():
    with pytest.raises(LogError, match="no flow column"):
        _log("time [min],discharge_pressure [bar]\n" + "1,2\n" * 6)
    with pytest.raises(LogError, match="none of discharge_pressure"):
        _log("time [min],flow [m3/h]\n" + "".join(f"{i},2\n" for i in range(6)))
    with pytest.raises(LogError, match=r"give the unit in brackets, e\.g\. 'flow \[m3/h\]'"):
        _log("time [min],flow,discharge_pressure [bar]\n1,2,3\n")
    with pytest.raises(LogError, match="wrong dimension"):
        _log("time [min],flow [bar],discharge_pressure [bar]\n1,2,3\n")
    with pytest.raises(LogError, match="both give flow"):
        _log("time [min],flow [m3/h],flow [gpm],discharge_pressure [bar]\n1,2,3,4\n")


def test_unknown_headers_are_listed_not_silently_used():
    text = "Time [min],FT-101 [m3/h],discharge_pressure [bar]\n" + "1,2,3\n" * 6
    with pytest.raises(LogError, match=r"columns not understood: 'FT-101 \[m3/h\]'; map them with --columns"):
        _log(text)


def test_column_map_renames_historian_headers(tmp_path):
    text = ("Timestamp;FT-101.PV;PT-102.PV;TT-103.PV;Quality\n"
            + "".join(f"2026-01-14T06:{30 + i}:00;{20 + i};{4.1};{38.5};Good\n" for i in range(6)))
    mapping = tmp_path / "map.toml"
    mapping.write_text('[columns]\n"Timestamp" = "time"\n"FT-101.PV" = "flow [m3/h]"\n'
                       '"PT-102.PV" = "discharge_pressure [bar]"\n"TT-103.PV" = "outlet_temperature [degC]"\n')
    path = tmp_path / "export.csv"
    path.write_text(text)
    log = read_log_file(path, mapping)
    assert log.values["flow"][3] == pytest.approx(23 / 3600.0)
    assert log.values["discharge_pressure"][0] == pytest.approx(4.1e5)
    assert log.ignored_headers == ["Quality"]
    with pytest.raises(LogError, match="unknown quantity 'flw'"):
        column_map_from_dict({"columns": {"FT-101.PV": "flw [m3/h]"}})
    with pytest.raises(LogError, match=r"needs a \[columns\] table"):
        column_map_from_dict({"FT-101.PV": "flow [m3/h]"})


def test_too_few_rows_and_empty_logs_say_so():
    with pytest.raises(LogError, match="is empty"):
        _log("\n# nothing\n")
    with pytest.raises(LogError, match=r"only 3 of 3 data rows could be read with the product moving \(at least 5 needed\)"):
        _log("time [min],flow [m3/h],discharge_pressure [bar]\n1,2,3\n2,2,3\n3,2,3\n")
    with pytest.raises(LogError, match="none of its 2 data rows"):
        _log("time [min],flow [m3/h],discharge_pressure [bar]\n1,x,3\n2,y,3\n")


def test_semicolons_with_decimal_commas():
    # a European historian export: semicolon-separated, decimal commas
    text = "time [min];flow [m3/h];discharge_pressure [bar]\n" + "".join(f"{i};12,5;4,75\n" for i in range(5))
    log = _log(text)
    assert log.values["flow"][0] == pytest.approx(12.5 / 3600.0)
    assert log.values["discharge_pressure"][4] == pytest.approx(4.75e5)


def test_hash_is_of_the_file_bytes(tmp_path):
    import hashlib

    text = "time [min],flow [m3/h],outlet_temperature [degC]\n" + "".join(f"{i},2,30\n" for i in range(5))
    path = tmp_path / "a.csv"
    path.write_bytes(text.encode())
    log = read_log_file(path)
    assert log.sha256 == hashlib.sha256(text.encode()).hexdigest() and log.name == "a.csv"
    assert math.isclose(log.values["outlet_temperature"][0], 303.15)
