"""The Plan view's pump chart in a real browser: drawn by itself once the key figures are on screen, with one
extra script run and no loop (``dashboard/views/deferred.py``, its hand-written component).

Script runs are counted from the server's messages: each run starts with a ``new_session`` message
(Streamlit's ``ForwardMsg``, read with Streamlit's own protobuf classes).  When elements first appear is
recorded in the page by a ``MutationObserver`` (``performance.now()``), not by polling from the test.
"""

from __future__ import annotations


import pytest
from streamlit.proto.ForwardMsg_pb2 import ForwardMsg

from test_browser import CHROMIUM, LAUNCH_ARGS, _require_chromium, _wait_idle
from dashboard_server import chromium_browser, running_dashboard

pytestmark = pytest.mark.slow

PUMP_TITLE = "Pump and system at the start"
PLACEHOLDER = "Pump chart loading…"
SEEN_JS = """() => { window.__seen = {}; new MutationObserver(() => {
    const seen = window.__seen, now = performance.now();
    if (!seen.metric && document.querySelector('[data-testid="stMetricValue"]')) seen.metric = now;
    if (!seen.placeholder && document.body && document.body.innerText.includes('PLACEHOLDER')) seen.placeholder = now;
    if (!seen.chart && [...document.querySelectorAll('.js-plotly-plot .gtitle')]
            .some(t => t.textContent.startsWith('PUMP_TITLE'))) seen.chart = now;
}).observe(document, {subtree: true, childList: true, characterData: true}); }""".replace(
    "PLACEHOLDER", PLACEHOLDER).replace("PUMP_TITLE", PUMP_TITLE)
QUIET_S = 2.5       # how long nothing may happen once the chart is drawn


@pytest.fixture(scope="module")
def server(tmp_path_factory):
    _require_chromium()
    with running_dashboard(tmp_path_factory.mktemp("deferred") / "plans.sqlite") as url:
        yield url


@pytest.fixture(scope="module")
def browser(server):
    with chromium_browser(CHROMIUM, LAUNCH_ARGS) as chromium:
        yield chromium


class Runs:
    """The script runs the server starts for one page (all its websockets: a refresh opens a new one)."""

    def __init__(self, page):
        self.count = 0
        page.on("websocket", lambda ws: ws.on("framereceived", self._frame))

    def _frame(self, payload) -> None:
        if isinstance(payload, (bytes, bytearray)):
            message = ForwardMsg()
            message.ParseFromString(bytes(payload))
            if message.WhichOneof("type") == "new_session":
                self.count += 1


def _open(browser, url: str):
    context = browser.new_context(viewport={"width": 1280, "height": 2000})
    context.add_init_script(f"({SEEN_JS})()")
    page = context.new_page()
    page.set_default_timeout(180_000)
    runs = Runs(page)
    page.goto(url)
    return context, page, runs


def _pump_charts(page) -> int:
    return page.locator(".js-plotly-plot .gtitle", has_text=PUMP_TITLE).count()


def _chart_then_quiet(page, runs: Runs) -> int:
    """Wait (no click) for the pump chart, then check that nothing more happens for ``QUIET_S``: no new
    script run, the chart still there, once, and the placeholder gone.  Returns the number of runs."""
    page.locator(".js-plotly-plot .gtitle", has_text=PUMP_TITLE).first.wait_for()
    _wait_idle(page)
    before = runs.count
    page.wait_for_timeout(QUIET_S * 1000)
    assert runs.count == before, f"{runs.count - before} script run(s) after the pump chart was drawn: a loop"
    assert _pump_charts(page) == 1 and page.get_by_text(PLACEHOLDER).count() == 0
    return runs.count


def test_key_figures_first_then_the_pump_chart_by_itself(browser, server):
    """The first page (Plan): the key figures and the placeholder line are in the page before the pump chart,
    which then comes without any click after exactly one extra run; a refresh (a new session) does it again."""
    context, page, runs = _open(browser, server)
    try:
        assert _chart_then_quiet(page, runs) == 2            # the first run and the signal's one rerun
        seen = page.evaluate("window.__seen")
        assert seen["metric"] < seen["chart"] and seen["placeholder"] < seen["chart"], seen
        page.reload()
        page.get_by_test_id("stMetricValue").first.wait_for()
        assert _chart_then_quiet(page, runs) == 4            # two more: the new session's run and its rerun
        seen = page.evaluate("window.__seen")
        assert seen["metric"] < seen["chart"], seen
    finally:
        context.close()


def test_plan_opened_after_another_view_with_the_address_units(browser, server):
    """Opened on ``view=line&units=US``: no signal until the Plan tab is opened; then the chart (in the
    address's US units) comes by itself after one more run, and back on Plan later it is drawn at once,
    with the tab's run only."""
    context, page, runs = _open(browser, server + "/?view=line&units=US")
    try:
        page.get_by_role("tab", name="Along the line", exact=True, selected=True).wait_for()
        page.get_by_test_id("stMetricValue").first.wait_for()
        _wait_idle(page)
        page.wait_for_timeout(1000)
        opened = runs.count
        assert _pump_charts(page) == 0 and page.get_by_text(PLACEHOLDER).count() == 0
        page.get_by_role("tab", name="Plan", exact=True).first.click()
        assert _chart_then_quiet(page, runs) == opened + 2   # the tab's run and the signal's rerun
        axis = page.locator(".js-plotly-plot", has_text=PUMP_TITLE).locator(".xtitle").first.text_content()
        assert axis == "Flow [gpm]", axis                    # US units from the address
        assert "units=US" in page.url and "view=plan" in page.url
        page.get_by_role("tab", name="Over time", exact=True).first.click()
        _wait_idle(page)
        back = runs.count
        page.get_by_role("tab", name="Plan", exact=True).first.click()
        assert _chart_then_quiet(page, runs) == back + 1     # drawn straight away: no signal, no rerun
    finally:
        context.close()
