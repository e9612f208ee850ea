"""The dashboard in a real browser: Debian's Chromium driven by Playwright against a headless server.

The key figures on the page must equal the command line's (``python -m planner plan DEMO --json``,
the documented JSON).  Screenshots of each view go to ``test-artifacts/`` (gitignored), with the
measured time from a setpoint change to the updated plan in ``test-artifacts/timing.txt``.
Outside CI a missing /usr/bin/chromium skips these tests; in CI (CI=true) it fails them.
"""

from __future__ import annotations

import json
import os
import re
import statistics
import subprocess
import sys
import time
from pathlib import Path

import pytest

from conftest import DEMO_FILES, PASSWORDS, ROOT, make_people
from dashboard_server import chromium_browser, free_port, running_dashboard
from planner.records.store import PlanStore
from planner.transfer.plan import make_plan, with_changes
from planner.scenario.schema import load_scenario

pytestmark = pytest.mark.slow  # Chromium: left out of the fast loop (-m "not slow")

CHROMIUM = Path("/usr/bin/chromium")
ARTIFACTS = ROOT / "test-artifacts"
IN_CI = os.environ.get("CI", "").strip().lower() in ("1", "true", "yes")
LAUNCH_ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update",
               "--disable-sync", "--no-first-run"]
VIEWS = ["Plan", "Inputs", "Along the line", "Over time", "Setpoint comparison", "Product", "Calibration",
         "Review"]


def _require_chromium() -> None:
    if CHROMIUM.exists() and os.access(CHROMIUM, os.X_OK):
        return
    if IN_CI:
        pytest.fail(f"{CHROMIUM} is missing in CI: .ci/run installs Debian's chromium before the tests")
    pytest.skip(f"{CHROMIUM} is not installed (apt-get install chromium); the browser test needs it")


_free_port = free_port   # the name other browser tests import


@pytest.fixture(scope="module")
def server_db(tmp_path_factory):
    """The embedded SQLite file the browser tests' server uses (accounts are made in it by the tests)."""
    return tmp_path_factory.mktemp("streamlit") / "plans.sqlite"


@pytest.fixture(scope="module")
def server(server_db):
    _require_chromium()
    # the project's .streamlit/config.toml applies (statistics off, no developer toolbar): not overridden here
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
        yield page
    finally:
        context.close()


# ------------------------------------------------------------------------------------- speed a user feels

TAB_MARKERS = {     # something each view draws: the view has been drawn when it is there
    "Plan": "text=Start-up and stops", "Inputs": "role=tab[name='Costs & schedule']",
    "Along the line": ".js-plotly-plot .main-svg", "Over time": "text=Push-cold start-up",
    "Setpoint comparison": "role=button[name='Compare']", "Product": "text=Lab points",
    "Calibration": "text=Calibrate the plan to a past transfer", "Review": "text=Saved plans",
}


def _timed_load(browser, server) -> tuple[float, object]:
    context = browser.new_context(viewport={"width": 1280, "height": 2000})
    page = context.new_page()
    page.set_default_timeout(180_000)
    started = time.perf_counter()
    page.goto(server)
    page.get_by_test_id("stMetricValue").first.wait_for()
    page.locator(TAB_MARKERS["Plan"]).first.wait_for()
    elapsed = time.perf_counter() - started
    page.locator(".js-plotly-plot .main-svg").first.wait_for()   # the pump chart, drawn after the key figures
    return elapsed, (context, page)


def test_first_load_and_tab_switch_times(browser, server):
    """Issue 12.7 (measured, not asserted): the first load of a fresh server, the first load of a second
    browser, and the first visit to each view in it; written to test-artifacts/timing.txt."""
    ARTIFACTS.mkdir(exist_ok=True)
    cold, (context, _) = _timed_load(browser, server)
    context.close()
    warm, (context, page) = _timed_load(browser, server)
    tabs = {}
    try:
        for name, marker in TAB_MARKERS.items():
            if name == "Plan":
                continue
            started = time.perf_counter()
            page.get_by_role("tab", name=name, exact=True).first.click()
            page.locator(marker).first.wait_for()
            tabs[name] = time.perf_counter() - started
            _wait_idle(page)
        started = time.perf_counter()
        page.get_by_role("tab", name="Plan", exact=True).first.click()
        page.locator(TAB_MARKERS["Plan"]).first.wait_for()
        tabs["Plan (again)"] = time.perf_counter() - started
    finally:
        context.close()
    load = os.getloadavg()
    report = (f"first load, fresh server: {cold:.2f} s; first load, second browser: {warm:.2f} s\n"
              "first visit to each view: " + ", ".join(f"{k} {v:.2f} s" for k, v in tabs.items()) + "\n"
              f"(machine load average while measured: {load[0]:.1f} on {os.cpu_count()} cores)\n")
    (ARTIFACTS / "timing.txt").write_text(report)
    print("\n" + report)
    assert cold > 0 and all(v > 0 for v in tabs.values())


def metrics(page) -> dict[str, str]:
    out = {}
    for box in page.get_by_test_id("stMetric").all():
        label = box.get_by_test_id("stMetricLabel").inner_text().strip()
        out[label] = box.get_by_test_id("stMetricValue").inner_text().strip()
    return out


def settled_metrics(page, unlike: dict | None = None, timeout_s: float = 120.0) -> dict[str, str]:
    """The key figures once they have settled (and differ from ``unlike`` when given): no element left
    stale by a rerun and the same figures on two reads 0.75 s apart. A loaded machine can show the last
    plan, or a mix of old and new figures, for a while after a rerun began; fails if they never settle."""
    deadline = time.monotonic() + timeout_s
    last: dict[str, str] = {}
    while time.monotonic() < deadline:
        _wait_idle(page)
        stale = page.locator('[data-stale="true"]').count()    # a rerun still replacing the old plan
        now = metrics(page)
        if not stale and now and now != unlike and now == last:
            return now
        last = now if not stale else {}
        page.wait_for_timeout(750)
    raise AssertionError(f"the key figures did not settle (last read {last}, unlike {unlike})")


def _number(text: str) -> float:
    match = re.search(r"[-+]?\d[\d,]*\.?\d*", text)
    assert match, f"no number in {text!r}"
    return float(match.group(0).replace(",", ""))


def cli_plan(path: Path) -> dict:
    done = subprocess.run([sys.executable, "-m", "planner", "plan", str(path), "--json"], cwd=ROOT,
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout)


def expected_key_figures(doc: dict) -> dict[str, tuple[float, float, str]]:
    """label -> (value in SI display units, half the last shown digit, unit) from the CLI's JSON, with
    the definitions of the README's Dashboard section."""
    startup = doc["startup"]
    push = startup.get("push_cold") if startup["mode"] == "push_cold" else startup.get("after_prewarm")
    pressures = list(doc["timeline"]["arrays"]["discharge_pressure_pa"]) + [doc["start"]["discharge_pressure_pa"]]
    if push and push.get("possible"):
        pressures.append(push["peak_discharge_pressure_pa"])
    e = doc["energy"]
    return {
        "Transfer time": (doc["timeline"]["total_time_s"] / 3600.0, 0.005, "h"),
        "Start-up + transfer": (doc["total_time_s"] / 3600.0, 0.005, "h"),
        "Starting flow": (doc["start"]["flow_m3_s"] * 3600.0, 0.005, "m³/h"),
        "Peak discharge pressure": (max(pressures) / 1e5, 0.005, "bar"),
        "NPSH margin": (doc["start"]["npsh_margin_m"], 0.005, "m"),
        "Electrical energy": (e["tracing_kwh"] + e["pump_kwh"] + e["vessel_heating_kwh"], 0.05, "kWh"),
        "Steam": (e["tracing_steam_kg"] + e["vessel_heating_steam_kg"], 0.5, "kg"),
        "Total cost": (doc["costs"]["total"], 0.005, doc["costs"]["currency"]),
    }


def test_key_figures_on_the_page_equal_the_cli(page):
    ARTIFACTS.mkdir(exist_ok=True)
    doc = cli_plan(DEMO_FILES[0])                      # the page opens on the first demo file
    page.get_by_text(doc["scenario"]).first.wait_for()
    shown = metrics(page)
    page.screenshot(path=str(ARTIFACTS / "browser-key-figures.png"))
    for label, (value, half_digit, unit) in expected_key_figures(doc).items():
        assert label in shown, f"{label!r} not on the page: {shown}"
        assert shown[label].endswith(unit), (label, shown[label])
        assert _number(shown[label]) == pytest.approx(value, abs=half_digit * 1.001), (label, shown[label])


def _open_tab(page, name: str) -> None:
    page.get_by_role("tab", name=name, exact=True).first.click()
    page.wait_for_timeout(300)
    _wait_idle(page)


def _wait_idle(page, timeout_s: float = 90.0) -> None:
    """Until the app has finished its rerun (no running indicator) and charts have drawn."""
    page.wait_for_timeout(250)          # let a rerun the last action asked for begin
    deadline = time.monotonic() + timeout_s
    while time.monotonic() < deadline:
        running = page.locator('[data-testid="stStatusWidget"]').count()
        skeletons = page.locator('[data-testid="stSkeleton"]').count()
        if not running and not skeletons:
            return
        page.wait_for_timeout(100)


CLIPPED_JS = """() => [...document.querySelectorAll(
    '[data-testid="stMetricValue"], [data-testid="stMetricLabel"], [data-testid="stMetricDelta"]')]
    .flatMap(box => [...box.querySelectorAll('[data-testid="stMarkdownContainer"]')].map(el => {
        const card = box.closest('[data-testid="stMetric"]').getBoundingClientRect();
        const r = el.getBoundingClientRect();
        return (el.scrollWidth > el.clientWidth + 1 || r.right > card.right + 1) ? el.innerText : null; }))
    .filter(Boolean)"""

OVERLAP_JS = """() => [...document.querySelectorAll('.js-plotly-plot')].flatMap(plot => {
    const legend = plot.querySelector('g.legend');
    if (!legend) return [];
    const L = legend.getBoundingClientRect();
    return [...plot.querySelectorAll('text')].filter(t => /^([xy]\\d*|g)title$/.test(t.getAttribute('class') || ''))
        .map(t => [t, t.getBoundingClientRect()])
        .filter(([t, r]) => r.width > 0 && r.left < L.right && L.left < r.right && r.top < L.bottom && L.top < r.bottom)
        .map(([t]) => (plot.querySelector('.gtitle') || {}).textContent + ': ' + t.textContent); })"""


def _layout_problems(page) -> list[str]:
    """Key-figure text cut off, and legends drawn over an axis title or the figure's title."""
    return [f"cut off: {t}" for t in page.evaluate(CLIPPED_JS)] + [f"legend on {t}" for t in page.evaluate(OVERLAP_JS)]


@pytest.mark.parametrize("width", [1280, 1920])
def test_each_view_at_both_widths(browser, server, width):
    """Issue 12.4: at 1280 and 1920 px every view draws, no key figure is cut off and no legend covers
    an axis title; the screenshots (whole page) go to test-artifacts/ for a reviewer."""
    ARTIFACTS.mkdir(exist_ok=True)
    context = browser.new_context(viewport={"width": width, "height": 2400})   # the page scrolls inside: tall
    page = context.new_page()
    page.set_default_timeout(180_000)
    problems = []
    try:
        page.goto(server)
        page.get_by_test_id("stMetricValue").first.wait_for()
        for name in VIEWS:
            _open_tab(page, name)
            if name == "Setpoint comparison":
                page.get_by_text("With sensitivity", exact=True).click()
                _wait_idle(page)
                page.get_by_role("button", name="Compare", exact=True).click()
                page.get_by_text("Recommended:").first.wait_for(timeout=300_000)
                _wait_idle(page)
            if name in ("Plan", "Along the line", "Over time", "Product", "Setpoint comparison"):
                page.locator(".js-plotly-plot .main-svg").first.wait_for()   # Plan: its pump chart comes by itself
            page.wait_for_timeout(800)
            slug = re.sub(r"[^a-z]+", "-", name.lower()).strip("-")
            page.screenshot(path=str(ARTIFACTS / f"view-{slug}-{width}.png"))
            assert page.get_by_text("could not be drawn").count() == 0, name
            problems += [f"{name}: {p}" for p in _layout_problems(page)]
    finally:
        context.close()
    assert not problems, problems


def test_setpoint_round_trip(page):
    # a setpoint change on the polyol demo, timed from Enter to the updated Transfer time
    path = ROOT / "demo_scenarios" / "polyol_tank_transfer.toml"
    scenario = load_scenario(path)
    page.get_by_test_id("stSidebar").get_by_test_id("stSelectbox").first.click()
    page.get_by_role("option", name=path.name).click()
    page.get_by_text(f"demo file {path.name}").first.wait_for()
    _open_tab(page, "Inputs")
    _open_tab(page, "Tracing")
    timings = []
    for setpoint_c in (30.0, 35.0, 25.0):
        plan = make_plan(with_changes(scenario, setpoint=setpoint_c + 273.15))
        expected = f"{plan.timeline.total_time_s / 3600.0:.2f} h"
        field = page.get_by_role("spinbutton", name="Setpoint [°C]", exact=True)
        field.fill(f"{setpoint_c:g}")
        started = time.perf_counter()
        field.press("Enter")
        page.wait_for_function(
            """expected => [...document.querySelectorAll('[data-testid="stMetric"]')].some(m =>
                   m.innerText.includes('Transfer time') && m.innerText.includes(expected))""", arg=expected)
        timings.append(time.perf_counter() - started)
        shown = settled_metrics(page)
        assert shown["Transfer time"] == expected
        assert _number(shown["Start-up + transfer"]) == pytest.approx(plan.total_time_s / 3600.0, abs=0.00501)
        _wait_idle(page)
    page.screenshot(path=str(ARTIFACTS / "browser-after-setpoint.png"))
    report = (f"setpoint change -> updated Transfer time in Chromium (new setpoints, uncached plans): "
              f"{', '.join(f'{t:.3f}' for t in timings)} s; median {statistics.median(timings):.3f} s\n")
    with open(ARTIFACTS / "timing.txt", "a", encoding="utf-8") as out:
        out.write(report)
    print("\n" + report)


def test_report_download_opens_offline(page, browser):
    ARTIFACTS.mkdir(exist_ok=True)
    with page.expect_download(timeout=120_000) as download_info:
        page.get_by_role("button", name="Plan report (HTML, opens offline)").click()
    target = ARTIFACTS / "plan-report.html"
    download_info.value.save_as(str(target))
    text = target.read_text(encoding="utf-8")
    doc = cli_plan(DEMO_FILES[0])
    assert doc["scenario"].replace("'", "&#x27;") in text
    assert f"{doc['timeline']['total_time_s'] / 3600.0:.2f} h" in text
    # no network at all: the charts must still draw from the inlined plotly.js
    offline = browser.new_context(offline=True, viewport={"width": 1280, "height": 1800})
    try:
        report = offline.new_page()
        report.goto(target.resolve().as_uri())
        report.locator(".js-plotly-plot .main-svg").first.wait_for(timeout=60_000)
        assert report.locator(".js-plotly-plot").count() >= 3
        report.screenshot(path=str(ARTIFACTS / "report-offline.png"))
    finally:
        offline.close()


def test_share_link_opens_the_same_plan(browser, server):
    """A packed-scenario link of a demo other than the first (the page's default) opens that scenario and view;
    its key figures equal ``python -m planner plan <demo> --json``."""
    from planner.records.links import link_url, query_for

    ARTIFACTS.mkdir(exist_ok=True)
    path = DEMO_FILES[1]
    doc = cli_plan(path)
    assert doc["scenario"] != load_scenario(DEMO_FILES[0]).name      # else the link would prove nothing
    url = link_url(server, query_for("line", scenario=load_scenario(path)))
    assert len(url) <= 2000
    context = browser.new_context(viewport={"width": 1440, "height": 2200})
    page = context.new_page()
    page.set_default_timeout(180_000)
    try:
        page.goto(url)
        page.get_by_text(doc["scenario"]).first.wait_for()
        page.get_by_test_id("stMetricLabel").first.wait_for()
        page.get_by_role("tab", name="Along the line", exact=True, selected=True).wait_for()
        _wait_idle(page)
        assert page.get_by_text("This link cannot be opened").count() == 0
        shown = metrics(page)
        page.screenshot(path=str(ARTIFACTS / "browser-share-link.png"))
        for label, (value, half_digit, unit) in expected_key_figures(doc).items():
            assert label in shown, f"{label!r} not on the page: {shown}"
            assert shown[label].endswith(unit), (label, shown[label])
            assert _number(shown[label]) == pytest.approx(value, abs=half_digit * 1.001), (label, shown[label])
    finally:
        context.close()


# ------------------------------------------------------------------------------------- nothing leaves the server

OUTSIDE = "198.51.100.7"            # TEST-NET-2 (RFC 5737): never a real server
PAYLOAD = f"![p](http://{OUTSIDE}/p) **b** <img src=http://{OUTSIDE}/h>"   # fits every name field


def _payload_scenario():
    """The first demo with the payload in every name a scenario carries."""
    from planner.scenario.schema import scenario_from_dict, scenario_to_dict

    data = scenario_to_dict(load_scenario(DEMO_FILES[0]))
    data["name"] = "Quay " + PAYLOAD
    data["route"]["segments"][0]["name"] = "S " + PAYLOAD
    data["product"]["name"] = "P " + PAYLOAD
    for part in ("source", "destination", "pump"):
        if data.get(part):
            data[part]["name"] = part[0] + " " + PAYLOAD
    return scenario_from_dict(data)


def _outside(requests: list[str], server: str) -> list[str]:
    return [u for u in requests if not (u.startswith(server) or u.startswith(("data:", "blob:", "file:")))]


def _shown_text(page) -> str:
    """The page's text as a reader sees it (the invisible word joiners that keep user text from
    becoming links removed)."""
    return page.evaluate("() => document.body.innerText").replace("\u2060", "")


def _no_rendered_payload(page, where: str) -> None:
    assert page.locator(f"img[src*='{OUTSIDE}']").count() == 0, where
    assert page.locator(f"a[href*='{OUTSIDE}']").count() == 0, where


def _visit_every_view(page) -> None:
    for name in VIEWS:
        _open_tab(page, name)
        if name == "Inputs":
            for section in ("Product", "Route", "Tracing", "Pump", "Source & destination", "Site & limits",
                            "Costs & schedule"):
                page.get_by_role("tab", name=section).last.click()      # the sub-tab, after the views
                page.wait_for_timeout(200)
                _wait_idle(page)
                _no_rendered_payload(page, section)
        if name == "Setpoint comparison":
            page.get_by_role("button", name="Compare", exact=True).click()
            page.get_by_text("Recommended:").first.wait_for(timeout=180_000)
            _wait_idle(page)
        assert page.get_by_text("could not be drawn").count() == 0, name
        _no_rendered_payload(page, name)


def _fill(page, label: str, value: str, within=None) -> None:
    """Type into a labelled field (of ``within``, a part of the page, if given) and wait for the rerun."""
    field = (within or page).get_by_label(label, exact=True)
    field.fill(value)
    field.press("Enter")
    _wait_idle(page)


def _sign_in(page, name: str) -> None:
    sidebar = page.get_by_test_id("stSidebar")
    _fill(page, "Account name", name, within=sidebar)
    _fill(page, "Password", PASSWORDS[name], within=sidebar)
    sidebar.get_by_role("button", name="Sign in", exact=True).click()
    sidebar.get_by_text(f"Signed in as {name}").first.wait_for()
    _wait_idle(page)


def _sign_out(page) -> None:
    page.get_by_test_id("stSidebar").get_by_role("button", name="Sign out", exact=True).click()
    page.get_by_test_id("stSidebar").get_by_role("button", name="Sign in", exact=True).wait_for()
    _wait_idle(page)


def _save_and_review_with_payload(page, server_db: Path) -> None:
    """A planner (signed in) saves with the payload as plan name, site and note, and submits with it as
    the comment; a supervisor (signed in) returns the revision with it as the comment."""
    side = page.get_by_test_id("stSidebar")
    _sign_in(page, "ana")
    for label in ("Plan name", "Site / area"):
        _fill(page, label, PAYLOAD, within=side)
    side.get_by_label("Note", exact=True).fill(PAYLOAD)
    side.get_by_label("Note", exact=True).press("Control+Enter")
    _wait_idle(page)
    side.get_by_role("button", name="Save plan", exact=True).click()
    page.get_by_text("Saved as revision 1").first.wait_for()
    _wait_idle(page)
    _open_tab(page, "Review")
    _fill(page, "Comment for the reviewer", PAYLOAD)
    page.get_by_role("button", name="Submit for review", exact=True).click()
    page.get_by_text("submitted for review by ana").first.wait_for()
    _wait_idle(page)
    _sign_out(page)
    _sign_in(page, "sam")
    _open_tab(page, "Review")
    _fill(page, "Comment", PAYLOAD)
    page.get_by_role("button", name="Return for changes", exact=True).click()
    page.get_by_text("returned for changes").first.wait_for()
    _wait_idle(page)
    _no_rendered_payload(page, "review")
    assert _shown_text(page).count(PAYLOAD) >= 2, "the review comments are not shown as typed"
    [row] = PlanStore(path=server_db).plans()
    assert (row.name, row.author) == (PAYLOAD, "ana")


def test_no_request_leaves_the_server_and_user_text_stays_plain(browser, server, server_db, tmp_path):
    """Issue 12.6: with markdown/HTML image and link payloads in every user-text field (scenario, segment,
    product, vessel and pump names from a link; plan name, site, author, note and review comments typed;
    an unknown key in an imported file), no request goes to any origin but the server's, the payload is
    shown literally, and the framework's Deploy button and statistics are off."""
    from planner.records.links import link_url, query_for

    make_people(PlanStore(path=server_db), names=("root", "ana", "sam"))      # before the page opens
    context = browser.new_context(viewport={"width": 1280, "height": 2000}, accept_downloads=True)
    requests: list[str] = []
    context.on("request", lambda r: requests.append(r.url))
    page = context.new_page()
    page.set_default_timeout(180_000)
    try:
        page.goto(link_url(server, query_for("line", scenario=_payload_scenario())))
        page.get_by_test_id("stMetricLabel").first.wait_for()
        _wait_idle(page)
        assert page.get_by_text("This link cannot be opened").count() == 0
        assert f"Quay {PAYLOAD}" in _shown_text(page)                               # shown as typed
        assert page.get_by_role("button", name="Deploy").count() == 0
        _visit_every_view(page)
        _save_and_review_with_payload(page, server_db)
        with page.expect_download(timeout=120_000) as download_info:
            page.get_by_role("button", name="Plan report (HTML, opens offline)").click()
        report = tmp_path / "report.html"
        download_info.value.save_as(str(report))
        # an imported file with the payload as an unknown key (and a name that is markdown)
        toml_text = DEMO_FILES[0].read_text(encoding="utf-8").replace(
            "[site]", f'[site]\n"{PAYLOAD}" = 1', 1)
        page.get_by_test_id("stSidebar").locator("input[type=file]").set_input_files(
            files=[{"name": "**bold** plan.toml", "mimeType": "application/toml", "buffer": toml_text.encode()}])
        page.get_by_text("problem(s)").first.wait_for()
        _wait_idle(page)
        _open_tab(page, "Inputs")
        _no_rendered_payload(page, "import")
        assert "**bold** plan.toml" in _shown_text(page)
        assert "they are from another scenario" in _shown_text(page)       # the greyed figures say whose
        page.screenshot(path=str(ARTIFACTS / "browser-plain-text-import.png"), full_page=True)
        shown = context.new_page()
        shown.goto(report.resolve().as_uri())
        shown.locator(".js-plotly-plot .main-svg").first.wait_for(timeout=60_000)
        _no_rendered_payload(shown, "report")
        assert f"Quay {PAYLOAD}" in _shown_text(shown)
    finally:
        context.close()
    assert requests, "no request was recorded"
    assert not _outside(requests, server), sorted(set(_outside(requests, server)))
