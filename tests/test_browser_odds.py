"""The Odds view in Chromium: an address naming the view opens it, and working out the odds (16 samples, the
real worker pool of a real server) draws the charts -- the fan over time, the total time with the planned
window, the shares -- and the P10/P50/P90 table (a screenshot goes to test-artifacts/odds-view-us.png)."""

from __future__ import annotations


import pytest

from dashboard_server import chromium_browser, running_dashboard
from test_browser import ARTIFACTS, CHROMIUM, LAUNCH_ARGS, _fill, _require_chromium, _wait_idle

pytestmark = pytest.mark.slow  # Chromium: left out of the fast loop (-m "not slow")


@pytest.fixture(scope="module")
def server(tmp_path_factory):
    _require_chromium()
    with running_dashboard(tmp_path_factory.mktemp("odds") / "plans.sqlite") as url:
        yield url


def test_the_address_opens_the_odds_view_and_the_odds_draw_their_charts(server):
    with chromium_browser(CHROMIUM, LAUNCH_ARGS) as browser:
        context = browser.new_context(viewport={"width": 1440, "height": 2400})
        page = context.new_page()
        page.set_default_timeout(180_000)
        try:
            page.goto(server + "/?view=odds&units=US")
            page.get_by_test_id("stMetricLabel").first.wait_for()
            _wait_idle(page)
            selected = page.evaluate("""() => [...document.querySelectorAll('[role=tab][aria-selected=true]')]
                                          .map(t => t.innerText.trim())""")
            assert "Odds" in selected, selected
            assert page.locator('[data-testid="stPlotlyChart"]').count() == 0      # nothing worked out yet
            _fill(page, "Samples", "16")
            page.get_by_role("button", name="Work out the odds", exact=True).click()
            page.get_by_text("The odds over time", exact=False).first.wait_for(timeout=300_000)
            _wait_idle(page)
            charts = page.locator('[data-testid="stPlotlyChart"]')
            assert charts.count() == 3
            for title in ("The odds over time", "Total time of", "What drives the spread of the total time"):
                assert page.locator(".js-plotly-plot .gtitle", has_text=title).count() == 1, title
            # the band and the P50 lines are drawn (plotly's SVG paths of the traces), in US units
            assert page.locator(".js-plotly-plot .scatterlayer .trace").count() >= 6
            assert page.locator(".js-plotly-plot text.y2title", has_text="°F").count() == 1      # the fan's temperature
            page.get_by_text("P10 / P50 / P90").first.wait_for()
            assert page.get_by_text("Traceback").count() == 0
            ARTIFACTS.mkdir(exist_ok=True)
            page.screenshot(path=str(ARTIFACTS / "odds-view-us.png"), full_page=True)     # for a reviewer
        finally:
            context.close()
