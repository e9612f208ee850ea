"""Two dashboard servers over one PostgreSQL database, driven in Chromium (Playwright).

Two ``streamlit run dashboard/app.py`` processes on different ports share ``PLANNER_DB_URL`` (a throwaway
PostgreSQL 15 database, ``tests/pg_server.py``).  A plan saved and submitted in the first is opened by its
link, reviewed and approved in the second; then two supervisors, one on each server, approve the same
revision at once: exactly one approval is recorded and the other page says what happened.  The outcome is
read back through ``planner.records.store.PlanStore`` on the same database.
"""

from __future__ import annotations

import os

import pytest

from conftest import DEMO_FILES, make_people
from dashboard_server import chromium_browser, start_dashboard, stop_dashboard, wait_healthy
from planner.records.store import PlanStore
from planner.scenario.schema import load_scenario
from test_browser import ARTIFACTS, CHROMIUM, LAUNCH_ARGS, _fill, _free_port, _require_chromium, _sign_in, _wait_idle

pytestmark = [pytest.mark.postgres, pytest.mark.slow]  # two servers, PostgreSQL, Chromium: left out of the fast loop (-m "not slow")


@pytest.fixture(scope="module")
def shared(pg_server):
    _require_chromium()
    url = pg_server.new_database()
    store = PlanStore(url=url)
    people = make_people(store)
    yield url, store, people
    store.close()


@pytest.fixture(scope="module")
def servers(shared, tmp_path_factory):
    url = shared[0]
    folder = tmp_path_factory.mktemp("two-servers")
    started = []
    try:
        for i in range(2):
            port = _free_port()
            env = {**os.environ, "PLANNER_DB_URL": url}
            env.pop("PLANNER_DB_PATH", None)
            proc, log = start_dashboard(port, folder / f"server-{i}.log", env)
            started.append((proc, log, f"http://127.0.0.1:{port}", folder / f"server-{i}.log"))
        for proc, _, base, log_path in started:
            wait_healthy(base, proc, log_path)
        yield [base for _, _, base, _ in started]
    finally:
        for proc, log, _, _ in started:
            stop_dashboard(proc, log)


@pytest.fixture(scope="module")
def browser(servers):
    with chromium_browser(CHROMIUM, LAUNCH_ARGS) as chromium:
        yield chromium


def _page(browser, address: str):
    context = browser.new_context(viewport={"width": 1440, "height": 2200})
    page = context.new_page()
    page.set_default_timeout(120_000)
    page.goto(address)
    page.get_by_test_id("stMetricLabel").first.wait_for()
    _wait_idle(page)
    return context, page


def _ready_to_approve(page, comment: str) -> None:
    page.get_by_text("Supervisor's review").first.wait_for()
    _fill(page, "Comment", comment)
    page.get_by_text("I reviewed the inputs, the findings").first.click()
    _wait_idle(page)


def test_a_plan_saved_on_one_server_is_approved_on_the_other(shared, servers, browser):
    _, store, people = shared
    first, second = servers
    ARTIFACTS.mkdir(exist_ok=True)
    context_a, page_a = _page(browser, first)
    context_b = None
    try:
        _sign_in(page_a, "ana")
        page_a.get_by_test_id("stSidebar").get_by_role("button", name="Save plan", exact=True).click()
        page_a.get_by_text("Saved as revision 1").first.wait_for()
        [row] = store.plans()
        assert (row.name, row.author, row.state) == (load_scenario(DEMO_FILES[0]).name, "ana", "draft")
        page_a.get_by_role("tab", name="Review", exact=True).first.click()
        page_a.get_by_role("button", name="Submit for review", exact=True).click()
        page_a.get_by_text("submitted for review by ana").first.wait_for()
        assert store.revision(row.id, 1).state == "submitted"
        # the second server, another browser session: the link opens the Review tab
        context_b, page_b = _page(browser, f"{second}/?plan={row.id}&rev=1&view=review")
        _sign_in(page_b, "sam")
        _ready_to_approve(page_b, "checked on server two")
        page_b.get_by_role("button", name="Approve", exact=True).click()
        page_b.get_by_text("approved by sam: it is now read-only").first.wait_for()
        page_b.screenshot(path=str(ARTIFACTS / "two-servers-approved.png"))
        approved = store.revision(row.id, 1)
        assert approved.state == "approved"
        assert [(r.action, r.by) for r in store.reviews(row.id, 1)] == [("submit", "ana"), ("approve", "sam")]
        # the first server sees the approval on its next run: the inputs are locked there too
        page_a.reload()
        page_a.get_by_test_id("stMetricLabel").first.wait_for()
        assert store.verify().ok
    finally:
        context_a.close()
        if context_b is not None:
            context_b.close()


def test_two_approvals_racing_on_one_revision_give_one_winner(shared, servers, browser):
    _, store, people = shared
    saved = store.save("Race on the jetty", load_scenario(DEMO_FILES[1]), people["ana"])
    store.submit(saved.plan_id, 1, people["ana"])
    link = f"?plan={saved.plan_id}&rev=1&view=review"
    pages, contexts = [], []
    try:
        for base, name in zip(servers, ("sam", "sue")):
            context, page = _page(browser, f"{base}/{link}")
            contexts.append(context)
            _sign_in(page, name)
            _ready_to_approve(page, f"{name} says go")
            pages.append(page)
        buttons = [p.get_by_role("button", name="Approve", exact=True) for p in pages]
        for button in buttons:          # both clicks go out before either server has answered
            button.click(no_wait_after=True)
        outcomes = []
        for page in pages:
            page.wait_for_function(
                """() => document.body.innerText.includes(': it is now read-only.') ||
                         document.body.innerText.includes('Not done')""")
            _wait_idle(page)
            text = page.locator("body").inner_text()
            outcomes.append("won" if ": it is now read-only." in text and "Not done" not in text else text)
        trail = store.reviews(saved.plan_id, 1)
        assert [r.action for r in trail] == ["submit", "approve"]
        winner = trail[1].by
        assert outcomes.count("won") == 1, outcomes
        loser = [o for o in outcomes if o != "won"][0]
        assert f"Not done: revision 1 is already approved by {winner}" in loser
        assert store.revision(saved.plan_id, 1).state == "approved" and store.verify().ok
        for i, page in enumerate(pages):
            page.screenshot(path=str(ARTIFACTS / f"two-servers-race-{i}.png"))
    finally:
        for context in contexts:
            context.close()
