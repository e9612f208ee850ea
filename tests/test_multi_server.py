"""Two dashboard servers over one PostgreSQL database, driven in Chromium (Playwright).

Two ``streamlit run dashboard/app.py`` processes on different ports share ``PLANNER_DB_URL`` (a throwaway
PostgreSQL 15 database, ``tests/pg_server.py``).  A plan saved and submitted in the first is opened by its
link, reviewed and approved in the second; then two supervisors, one on each server, approve the same
revision at once: exactly one approval is recorded and the other page says what happened.  The outcome is
read back through ``planner.records.store.PlanStore`` on the same database.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
import urllib.request

import pytest

from conftest import DEMO_FILES, PASSWORDS, ROOT, make_people
from planner.records.store import PlanStore
from planner.scenario.schema import load_scenario
from test_browser import ARTIFACTS, CHROMIUM, LAUNCH_ARGS, _free_port, _require_chromium, _wait_idle

pytestmark = pytest.mark.postgres


@pytest.fixture(scope="module")
def shared(pg_server):
    _require_chromium()
    url = pg_server.new_database()
    store = PlanStore(url=url)
    people = make_people(store)
    yield url, store, people
    store.close()


def _start(url: str, port: int, log_path):
    env = {**os.environ, "PLANNER_DB_URL": url}
    env.pop("PLANNER_DB_PATH", None)
    log = open(log_path, "w")
    proc = subprocess.Popen(
        [sys.executable, "-m", "streamlit", "run", "dashboard/app.py", "--server.headless", "true",
         "--server.port", str(port), "--server.address", "127.0.0.1", "--browser.gatherUsageStats", "false"],
        cwd=ROOT, stdout=log, stderr=subprocess.STDOUT, start_new_session=True, env=env)
    return proc, log


def _wait_healthy(base: str, proc, log_path) -> None:
    deadline = time.monotonic() + 120
    while True:
        try:
            with urllib.request.urlopen(base + "/_stcore/health", timeout=2) as response:
                if response.read().decode().strip() == "ok":
                    return
        except OSError:
            pass
        if proc.poll() is not None or time.monotonic() > deadline:
            raise RuntimeError(f"a dashboard server did not start:\n{log_path.read_text()[-3000:]}")
        time.sleep(0.3)


def _stop(proc, log) -> None:
    try:
        os.killpg(proc.pid, signal.SIGTERM)
        proc.wait(timeout=15)
    except ProcessLookupError:
        pass
    except subprocess.TimeoutExpired:
        os.killpg(proc.pid, signal.SIGKILL)
        proc.wait(timeout=15)
    log.close()


@pytest.fixture(scope="module")
def servers(shared, tmp_path_factory):
    url = shared[0]
    folder = tmp_path_factory.mktemp("two-servers")
    started = []
    try:
        for i in range(2):
            port = _free_port()
            proc, log = _start(url, port, folder / f"server-{i}.log")
            started.append((proc, log, f"http://127.0.0.1:{port}", folder / f"server-{i}.log"))
        for proc, _, base, log_path in started:
            _wait_healthy(base, proc, log_path)
        yield [base for _, _, base, _ in started]
    finally:
        for proc, log, _, _ in started:
            _stop(proc, log)


@pytest.fixture(scope="module")
def browser(servers):
    from playwright.sync_api import sync_playwright

    playwright = sync_playwright().start()
    chromium = None
    try:
        chromium = playwright.chromium.launch(executable_path=str(CHROMIUM), args=LAUNCH_ARGS)
        yield chromium
    finally:
        if chromium is not None:
            chromium.close()
        playwright.stop()


def _page(browser, address: str):
    context = browser.new_context(viewport={"width": 1440, "height": 2200})
    page = context.new_page()
    page.set_default_timeout(120_000)
    page.goto(address)
    page.get_by_test_id("stMetricLabel").first.wait_for()
    _wait_idle(page)
    return context, page


def _fill(page, label: str, value: str) -> None:
    field = page.get_by_label(label, exact=True)
    field.fill(value)
    field.press("Enter")
    _wait_idle(page)


def _sign_in(page, name: str) -> None:
    sidebar = page.get_by_test_id("stSidebar")
    _fill(sidebar, "Account name", name)
    _fill(sidebar, "Password", PASSWORDS[name])
    sidebar.get_by_role("button", name="Sign in", exact=True).click()
    sidebar.get_by_text(f"Signed in as {name}").first.wait_for()
    _wait_idle(page)


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
