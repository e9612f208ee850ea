"""State that survives a refresh, in Chromium: the address names the view, the unit system and either the
open saved revision or the session's draft of unsaved edits (``dashboard/url_state.py``), so F5 comes back to
the same place with the same inputs; signing in is asked again (no token leaves the server's session).
Hostile addresses (a path as draft id, an unknown draft, a bad unit system) give a message and the default
scenario, never a traceback or a file outside the drafts folder."""

from __future__ import annotations

import re
from urllib.parse import parse_qs, urlparse

import pytest

from conftest import make_people
from dashboard_server import chromium_browser, running_dashboard
from planner.records.store import PlanStore
from test_browser import CHROMIUM, LAUNCH_ARGS, _fill, _open_tab, _require_chromium, _sign_in, \
    _wait_idle, metrics, settled_metrics

pytestmark = pytest.mark.slow  # Chromium: left out of the fast loop (-m "not slow")


@pytest.fixture(scope="module")
def server_db(tmp_path_factory):
    return tmp_path_factory.mktemp("refresh") / "plans.sqlite"


@pytest.fixture(scope="module")
def server(server_db):
    _require_chromium()
    make_people(PlanStore(path=server_db), names=("root", "ana", "sam"))
    with running_dashboard(server_db) as url:
        yield url


@pytest.fixture(scope="module")
def browser(server):
    with chromium_browser(CHROMIUM, LAUNCH_ARGS) as chromium:
        yield chromium


@pytest.fixture
def page(browser, server):
    context = browser.new_context(viewport={"width": 1440, "height": 2200})
    page = context.new_page()
    page.set_default_timeout(180_000)
    try:
        page.goto(server)
        page.get_by_test_id("stMetricLabel").first.wait_for()
        _wait_idle(page)
        yield page
    finally:
        context.close()


def _query(page) -> dict[str, str]:
    return {k: v[0] for k, v in parse_qs(urlparse(page.url).query).items()}


def _wait_query(page, **wanted) -> dict[str, str]:
    """Until the address says ``wanted`` (the app writes it at the end of its run)."""
    page.wait_for_function("""wanted => Object.entries(wanted).every(([k, v]) =>
                               new URL(location.href).searchParams.get(k) === v)""", arg=wanted)
    return _query(page)


def _reload(page) -> None:
    page.reload()
    page.get_by_test_id("stMetricLabel").first.wait_for()
    _wait_idle(page)


def _selected_tab(page) -> list[str]:
    return page.evaluate("""() => [...document.querySelectorAll('[role=tab][aria-selected=true]')]
                                  .map(t => t.innerText.trim())""")


def test_a_refresh_keeps_the_view_the_units_and_unsaved_edits(page):
    page.get_by_test_id("stSidebar").get_by_text("US customary", exact=True).click()
    _wait_idle(page)
    page.wait_for_function("""() => [...document.querySelectorAll('[data-testid=stMetricValue]')]
                              .some(m => m.innerText.includes('gpm'))""")   # the rerun in US units has drawn
    _wait_idle(page)
    before = metrics(page)                                   # the demo's plan, in the same units
    _open_tab(page, "Inputs")
    _open_tab(page, "Site & limits")
    _fill(page, "Ambient temperature [°F]", "5")           # -15 degC: a colder day than the demo's
    query = _wait_query(page, units="US", view="inputs")
    assert re.fullmatch(r"[A-Za-z0-9_-]{22}", query.get("draft", "")), page.url
    edited = settled_metrics(page, unlike=before)           # the edit changed the plan
    _reload(page)
    assert _query(page) == query                             # the same draft, view and units
    assert settled_metrics(page) == edited                  # the edited plan, not the demo's
    assert "Inputs" in _selected_tab(page)
    _open_tab(page, "Site & limits")
    field = page.get_by_role("spinbutton", name="Ambient temperature [°F]", exact=True)
    assert float(field.input_value()) == pytest.approx(5.0, abs=0.05)
    radio = page.get_by_test_id("stSidebar").get_by_role("radio", name="US customary")
    assert radio.is_checked()


def test_a_saved_plan_stays_open_across_a_refresh_and_sign_in_is_asked_again(page):
    side = page.get_by_test_id("stSidebar")
    _sign_in(page, "ana")                                    # an operator (planner role)
    _fill(page, "Plan name", "Refresh check", within=side)
    side.get_by_role("button", name="Save plan", exact=True).click()
    page.get_by_text("Saved as revision 1").first.wait_for()
    _wait_idle(page)
    _open_tab(page, "Review")
    query = _wait_query(page, rev="1", view="review")
    assert "plan" in query and "draft" not in query
    _reload(page)
    assert _query(page) == query
    assert "Review" in _selected_tab(page)
    side.get_by_role("button", name="Sign in", exact=True).wait_for()       # signed out by the refresh
    assert side.get_by_text("Refresh check").count() >= 1                   # the saved plan is open
    page.get_by_role("button", name="Submit for review", exact=True).wait_for()
    _sign_in(page, "ana")
    page.get_by_role("button", name="Submit for review", exact=True).click()
    page.get_by_text("submitted for review by ana").first.wait_for()
    _wait_idle(page)
    side.get_by_role("button", name="Sign out", exact=True).click()
    _wait_idle(page)
    _sign_in(page, "sam")                                    # the supervisor
    _reload(page)
    assert "Review" in _selected_tab(page) and _query(page) == query
    _sign_in(page, "sam")
    page.get_by_role("button", name="Approve", exact=True).wait_for()
    # the findings themselves in the Review view (the barge demo has two warnings), not only their counts
    page.get_by_text(re.compile(r"^Warnings \(2\)$")).first.wait_for()


@pytest.mark.parametrize("address, words", [
    ("/?draft=..%2F..%2Fetc%2Fpasswd&view=review&units=XX", "draft id is not valid"),
    ("/?draft=" + "A" * 22 + "&view=line", "no longer kept"),
    ("/?draft=%3Cimg%20src%3Dx%20onerror%3Dalert(1)%3E", "draft id is not valid"),
])
def test_a_bad_or_hostile_address_shows_a_message_and_the_default(browser, server, address, words):
    context = browser.new_context(viewport={"width": 1440, "height": 1600})
    page = context.new_page()
    page.set_default_timeout(180_000)
    try:
        page.goto(server + address)
        page.get_by_test_id("stMetricLabel").first.wait_for()
        _wait_idle(page)
        page.get_by_text(words).first.wait_for()
        assert page.get_by_text("Showing the default scenario instead").count() >= 1
        query = _wait_query(page, view="plan", units="SI")
        assert re.fullmatch(r"[A-Za-z0-9_-]{22}", query["draft"]) and query["draft"] != "A" * 22
        assert page.locator("img[src=x]").count() == 0
    finally:
        context.close()
