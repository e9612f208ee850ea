"""Share links: exact round trips, and an untrusted decoder that never crashes or hangs."""

from __future__ import annotations

import base64
import json
import zlib

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from conftest import DEMO_FILES
from planner.records.links import (LINK_VERSION, MAX_JSON_BYTES, LinkError, fits_in_url, link_url, pack_scenario,
                           parse_query, query_for, unpack_scenario)
from planner.scenario.schema import Scenario, load_scenario, scenario_to_dict

SCENARIOS = [load_scenario(p) for p in DEMO_FILES]
PAYLOADS = [pack_scenario(s) for s in SCENARIOS]
FUZZ_COUNTS = {"random": 0, "mutated": 0, "accepted": 0, "rejected": 0}


@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_round_trip_is_identical(path):
    scenario = load_scenario(path)
    params = query_for("line", scenario=scenario)
    shared = parse_query(params)
    assert shared.view == "line"
    assert scenario_to_dict(shared.scenario) == scenario_to_dict(scenario)
    assert shared.scenario == scenario
    assert fits_in_url(params)                     # demo scenarios fit in a link (< 2000 characters)
    assert len(link_url("http://terminal-intranet:8501", params)) < 2000


def test_saved_plan_links():
    assert parse_query(query_for("review", plan_id=12, revision=3)) == parse_query({"plan": "12", "rev": "3", "view": "review"})
    shared = parse_query({"plan": ["12"], "view": ["nonsense"]})
    assert (shared.plan_id, shared.revision, shared.view) == (12, None, "plan")
    with pytest.raises(LinkError, match="plan id"):
        parse_query({"plan": "12; DROP TABLE plans"})


def test_clear_messages_for_bad_links():
    good = PAYLOADS[0]
    version, body, check = good.split(".")
    cases = {
        "newer planner": f"{LINK_VERSION + 1}.{body}.{check}",
        "truncated|altered or cut": f"{version}.{body[:-8]}.{check}",
        "damaged": "1.@@@.0",
        "too long": "1." + "A" * 20_000 + ".0",
        "check value": f"{version}.{body}.zzzz",
    }
    for words, payload in cases.items():
        with pytest.raises(LinkError, match=words):
            unpack_scenario(payload)


def _pack_raw(data: bytes) -> str:
    from planner.records.links import _ZDICT_V1

    c = zlib.compressobj(9, zlib.DEFLATED, 15, 9, zlib.Z_DEFAULT_STRATEGY, _ZDICT_V1)
    packed = c.compress(data) + c.flush()
    return f"1.{base64.urlsafe_b64encode(packed).decode().rstrip('=')}.{zlib.crc32(data):08x}"


def test_compression_bomb_is_refused():
    with pytest.raises(LinkError, match="too large"):
        unpack_scenario(_pack_raw(b" " * (MAX_JSON_BYTES * 4)))


def test_valid_json_that_is_not_a_valid_scenario_is_refused():
    data = scenario_to_dict(SCENARIOS[0])
    data["route"]["segments"][0]["length"] = -5
    with pytest.raises(LinkError, match="not valid.*length"):
        unpack_scenario(_pack_raw(json.dumps(data).encode()))
    with pytest.raises(LinkError, match="not a scenario"):
        unpack_scenario(_pack_raw(b"[1, 2, 3]"))
    with pytest.raises(LinkError, match="nested too deeply|not JSON|not a scenario"):
        unpack_scenario(_pack_raw(b"[" * 100_000))


def _check(payload) -> None:
    try:
        result = unpack_scenario(payload)
    except LinkError as exc:
        assert str(exc)
        FUZZ_COUNTS["rejected"] += 1
        return
    assert isinstance(result, Scenario)
    FUZZ_COUNTS["accepted"] += 1


RANDOM_EXAMPLES, MUTATED_EXAMPLES = 3000, 2000


@settings(max_examples=RANDOM_EXAMPLES, deadline=1000, suppress_health_check=[HealthCheck.too_slow])
@given(st.one_of(st.text(max_size=300), st.binary(max_size=300).map(lambda b: b.decode("latin-1")),
                 st.builds(lambda v, b, c: f"{v}.{b}.{c}", st.integers(-2, 3), st.text("ABCabc012-_", max_size=80),
                           st.text("0123456789abcdef", max_size=10)),
                 st.builds(lambda v, b, c: f"{v}.{b}.{c}", st.sampled_from(["1", "²", "١", "1²", "01", "+1", " 1"]),
                           st.text("ABCabc012-_", max_size=40), st.sampled_from(["0", "ff", "²", "-1", "0x1f", "1_0"])),
                 st.none(), st.integers(), st.lists(st.text(max_size=5), max_size=3)))
def _fuzz_random_payloads(payload):
    FUZZ_COUNTS["random"] += 1
    _check(payload)


@settings(max_examples=MUTATED_EXAMPLES, deadline=1000, suppress_health_check=[HealthCheck.too_slow])
@given(st.sampled_from(PAYLOADS), st.lists(st.tuples(st.integers(0, 2000), st.sampled_from("AZaz09-_.=+/ ")),
                                           min_size=1, max_size=4), st.integers(0, 2000))
def _fuzz_mutated_payloads(payload, edits, cut):
    FUZZ_COUNTS["mutated"] += 1
    chars = list(payload)
    for position, char in edits:
        chars[position % len(chars)] = char
    mutated = "".join(chars)
    if cut % 3 == 0:
        mutated = mutated[: max(1, len(mutated) - cut)]
    _check(mutated)


@pytest.mark.slow
def test_fuzzed_payloads_are_all_accepted_or_refused_with_a_message():
    """Random and mutated payloads: each one decodes to a scenario or is refused with a LinkError that has
    a message (``_check``); anything else fails the search. The tally shows both searches really ran."""
    FUZZ_COUNTS.update(random=0, mutated=0, accepted=0, rejected=0)
    _fuzz_random_payloads()
    _fuzz_mutated_payloads()
    total = FUZZ_COUNTS["random"] + FUZZ_COUNTS["mutated"]
    print(f"\nlink fuzz: {total} payloads ({FUZZ_COUNTS['random']} random, {FUZZ_COUNTS['mutated']} mutated); "
          f"accepted {FUZZ_COUNTS['accepted']}, rejected with a message {FUZZ_COUNTS['rejected']}")
    # hypothesis runs max_examples cases unless it exhausts the space, which these strategies cannot
    assert FUZZ_COUNTS["random"] >= 0.9 * RANDOM_EXAMPLES
    assert FUZZ_COUNTS["mutated"] >= 0.9 * MUTATED_EXAMPLES
    assert FUZZ_COUNTS["accepted"] + FUZZ_COUNTS["rejected"] == total
    assert FUZZ_COUNTS["rejected"] >= 0.9 * total      # random text and edited base64 are almost never scenarios


@pytest.mark.parametrize("params, words", [
    ({"plan": "1²"}, "plan id is not a number"),
    ({"plan": "١٢"}, "plan id is not a number"),          # Arabic-Indic digits: isdigit() says yes
    ({"plan": "12", "rev": "³"}, "revision is not a number"),
    ({"plan": "1" * 13}, "plan id is not a number"),
    ({"s": "²." + PAYLOADS[0].split(".", 1)[1]}, "its version is not a number: digits 0-9, at most 6"),
    ({"s": "0." + PAYLOADS[0].split(".", 1)[1]}, "the link's version is 0: this planner reads link versions 1 to"),
    ({"s": PAYLOADS[0].rsplit(".", 1)[0] + ".²"}, "bad check value"),
])
def test_unusual_digits_are_refused_with_the_planners_message(params, words):
    with pytest.raises(LinkError, match=words):
        parse_query(params)
