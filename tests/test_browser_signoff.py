"""The sign-off sheet through a real server and real Chromium (Playwright): a share link opens a saved,
approved revision in the Review view, the button downloads the sheet, and the sheet prints on one A4 page
with the chain head the store's own ``verify`` gives.  Outside CI a missing /usr/bin/chromium skips it."""

from __future__ import annotations

import re

import pytest

from dashboard_server import chromium_browser, running_dashboard
from planner.reports.uncertainty_text import figure_rows
from test_browser import CHROMIUM, LAUNCH_ARGS, _require_chromium
from test_signoff_sheet import saved_with_odds

pytestmark = pytest.mark.slow

@pytest.fixture(scope="module")
def saved(tmp_path_factory):
    """A reviewed revision with its odds in a fresh SQLite file."""
    _require_chromium()
    path = tmp_path_factory.mktemp("signoff-browser") / "plans.sqlite"
    store, people, scenario, results = saved_with_odds(path)
    revision = store.save("T-31 to T-07", scenario, people["ana"], results=results)
    store.submit(revision.plan_id, 1, people["ana"])
    store.approve(revision.plan_id, 1, people["sam"], "fine")
    return path, store, store.revision(revision.plan_id, 1)


@pytest.fixture(scope="module")
def server(saved):
    with running_dashboard(saved[0]) as url:
        yield url


def test_download_the_sheet_and_print_it_on_one_page(saved, server, tmp_path):
    _, store, revision = saved
    with chromium_browser(CHROMIUM, LAUNCH_ARGS) as chromium:
        context = chromium.new_context(viewport={"width": 1440, "height": 2000}, accept_downloads=True)
        page = context.new_page()
        page.set_default_timeout(180_000)
        page.goto(f"{server}/?plan={revision.plan_id}&rev=1&view=review")
        button = page.get_by_role("button", name=re.compile("Sign-off sheet"))
        button.wait_for()
        with page.expect_download() as info:
            button.click()
        sheet = tmp_path / info.value.suggested_filename
        info.value.save_as(sheet)
        assert sheet.name.endswith("-rev1.html")
        text = sheet.read_text(encoding="utf-8")
        assert store.verify().head in text
        p10 = figure_rows(revision.results["uncertainty"], "SI")[0]["p10"]
        assert f"<td>{p10}</td>" in text
        printed = context.new_page()
        printed.goto(sheet.as_uri())
        pdf = printed.pdf(format="A4", prefer_css_page_size=True)
        assert len(re.findall(rb"/Type\s*/Page(?!s)", pdf)) == 1
        context.close()
