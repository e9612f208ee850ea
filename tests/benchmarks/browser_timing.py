"""Speed a dashboard user feels, in Chromium, against a baseline measured in the same run (not a test).

    python3 -m tests.benchmarks.browser_timing [--baseline GIT_REF] [--rounds N]

Starts the dashboard of this checkout and, with ``--baseline``, the dashboard of ``GIT_REF`` (extracted
with ``git archive`` into a temporary folder), each on its own port, and measures in turn for each:
the first load of a fresh server, the first load of a second browser, the first visit to each view
and a setpoint change.  Rounds alternate between the two so that both see the same machine load;
the ratios (this / baseline) are what to read on a shared machine.

Before the measured rounds each dashboard is started and loaded once, unmeasured, and the order of
the two alternates from round to round: the first dashboard loaded in a run otherwise pays for the
browser's and the disk cache's cold start and for compiling its checkout's bytecode (measured: the
same commit against itself gave ratios of 1.3 on the first load and the Inputs visit without this).
"""

from __future__ import annotations

import argparse
import os
import signal
import socket
import statistics
import subprocess
import sys
import tarfile
import tempfile
import time
import urllib.request
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
CHROMIUM = "/usr/bin/chromium"
LAUNCH_ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update",
               "--disable-sync", "--no-first-run"]
MARKERS = {"Inputs": "text=Product name", "Along the line": ".js-plotly-plot .main-svg",
           "Over time": "text=Push-cold start-up", "Setpoint comparison": "role=button[name='Compare']",
           "Product": "text=Lab points", "Plan": "text=Start-up and stops"}


# When the first key figure is on screen, seen from inside the page: the first animation frame after its
# element was added (a frame the main thread paints; if Plotly holds the thread, the frame waits too), in
# seconds from the navigation's start.  The driver's own wait polls the page now and then, and a poll that
# lands while Plotly holds the thread returns only after it: that one measures the poll as much as the page.
PAINTED_JS = """new MutationObserver((_, watcher) => {
    if (document.querySelector('[data-testid="stMetricValue"]')) {
        watcher.disconnect();
        requestAnimationFrame(() => { window.__keyFiguresPainted = performance.now() / 1000; });
    }
}).observe(document, {subtree: true, childList: true});"""


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def _start(folder: Path, db: Path) -> tuple[subprocess.Popen, str]:
    port = _free_port()
    proc = subprocess.Popen([sys.executable, "-m", "streamlit", "run", "dashboard/app.py", "--server.headless", "true",
                             "--server.port", str(port), "--server.address", "127.0.0.1",
                             "--browser.gatherUsageStats", "false"],
                            cwd=folder, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, start_new_session=True,
                            env=dict(os.environ, PLANNER_DB_PATH=str(db)))
    url = f"http://127.0.0.1:{port}"
    for _ in range(600):
        try:
            with urllib.request.urlopen(url + "/_stcore/health", timeout=2) as r:
                if r.read().strip() == b"ok":
                    return proc, url
        except OSError:
            time.sleep(0.3)
    raise RuntimeError(f"the server in {folder} did not start")


def _stop(proc: subprocess.Popen) -> None:
    try:
        os.killpg(proc.pid, signal.SIGTERM)
        proc.wait(timeout=20)
    except (ProcessLookupError, subprocess.TimeoutExpired):
        pass


def _session(browser, url: str, tabs: bool) -> dict[str, float]:
    context = browser.new_context(viewport={"width": 1280, "height": 2000})
    context.add_init_script(PAINTED_JS)
    page = context.new_page()
    page.set_default_timeout(300_000)
    out = {}
    try:
        started = time.perf_counter()
        page.goto(url)
        page.get_by_test_id("stMetricValue").first.wait_for()
        page.locator(MARKERS["Plan"]).first.wait_for()
        out["load"] = time.perf_counter() - started
        page.wait_for_function("() => window.__keyFiguresPainted !== undefined")
        out["painted"] = page.evaluate("window.__keyFiguresPainted")
        page.locator(".js-plotly-plot .main-svg").first.wait_for()      # the Plan view's pump chart
        out["pump chart"] = time.perf_counter() - started
        if tabs:
            for name, marker in MARKERS.items():
                page.wait_for_timeout(1500)
                started = time.perf_counter()
                page.get_by_role("tab", name=name, exact=True).first.click()
                page.locator(marker).first.wait_for()
                out[name] = time.perf_counter() - started
    finally:
        context.close()
    return out


def main(argv: list[str] | None = None) -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--baseline", help="git ref of the baseline dashboard")
    parser.add_argument("--rounds", type=int, default=2)
    parser.add_argument("--no-warmup", action="store_true", help="leave out the unmeasured first load of each")
    args = parser.parse_args(argv)
    from playwright.sync_api import sync_playwright

    with tempfile.TemporaryDirectory() as tmp:
        folders = {"this": ROOT}
        if args.baseline:
            base = Path(tmp) / "baseline"
            base.mkdir()
            archive = subprocess.run(["git", "archive", args.baseline], cwd=ROOT, capture_output=True, check=True).stdout
            archive_path = Path(tmp) / "baseline.tar"
            archive_path.write_bytes(archive)
            with tarfile.open(archive_path) as tar:
                tar.extractall(base, filter="data")
            folders["baseline"] = base
        results: dict[str, dict[str, list[float]]] = {name: {} for name in folders}
        with sync_playwright() as pw:
            browser = pw.chromium.launch(executable_path=CHROMIUM, args=LAUNCH_ARGS)
            if not args.no_warmup:
                for name, folder in folders.items():
                    proc, url = _start(folder, Path(tmp) / f"{name}-warmup.sqlite")
                    try:
                        _session(browser, url, tabs=False)
                    finally:
                        _stop(proc)
            for round_ in range(args.rounds):
                order = list(folders.items())
                for name, folder in (order if round_ % 2 == 0 else order[::-1]):
                    proc, url = _start(folder, Path(tmp) / f"{name}-{round_}.sqlite")
                    try:
                        cold = _session(browser, url, tabs=False)
                        warm = _session(browser, url, tabs=True)
                    finally:
                        _stop(proc)
                    results[name].setdefault("first load, fresh server", []).append(cold["load"])
                    results[name].setdefault("  fresh: key figures painted", []).append(cold["painted"])
                    for key, value in warm.items():
                        label = {"load": "first load, second browser",
                                 "painted": "  second: key figures painted",
                                 "pump chart": "  second: pump chart drawn"}.get(key, f"first visit: {key}")
                        results[name].setdefault(label, []).append(value)
            browser.close()
    load = os.getloadavg()[0]
    print(f"median of {args.rounds} round(s), seconds (load average {load:.1f} on {os.cpu_count()} cores)")
    for label in results["this"]:
        this = statistics.median(results["this"][label])
        line = f"  {label:32s} this {this:7.2f}"
        if "baseline" in results and label in results["baseline"]:
            base = statistics.median(results["baseline"][label])
            line += f"   baseline {base:7.2f}   ratio {this / base:5.2f}"
        print(line)


if __name__ == "__main__":
    main()
