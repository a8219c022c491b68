"""A whole lot through the station in a real browser: the distribution's Chromium driven by Playwright
(its own driver; no browser is downloaded). Log in as the winder and sign every step off, log in as the
tester and enter three serials' readings (one fails, and gets a disposition), reload and find it all
kept, export the CSV; screenshots at tablet size (1024 x 1366 and 1366 x 1024).

Skipped, with a line in the summary, where /usr/bin/chromium or the playwright package is missing
(tools/sysdeps.sh installs the browser)."""

from __future__ import annotations

import csv
import io
import os
import shutil
from pathlib import Path

import pytest
from station_helpers import PASSWORD, make_lot

from specgen.station.app import StationConfig
from specgen.station.plan import station_columns

CHROMIUM = Path(os.environ.get("SPECGEN_CHROMIUM", "/usr/bin/chromium"))
SKIP = "Chromium not installed (tools/sysdeps.sh installs the chromium package): station browser test skipped"
ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update",
        "--disable-sync", "--no-first-run"]
TABLET_SIZES = ((1024, 1366), (1366, 1024))


@pytest.fixture
def browser_context(tmp_path):
    if not CHROMIUM.is_file():
        pytest.skip(SKIP)
    sync_api = pytest.importorskip("playwright.sync_api", reason="playwright not installed: station browser test skipped")
    profile = tmp_path / "profile"
    profile.mkdir()
    with sync_api.sync_playwright() as p:
        context = p.chromium.launch_persistent_context(str(profile), executable_path=str(CHROMIUM), headless=True,
                                                       args=ARGS, viewport={"width": 1024, "height": 1366},
                                                       accept_downloads=True)
        try:
            yield context
        finally:
            context.close()


def _shots_dir(tmp_path: Path) -> Path:
    wanted = os.environ.get("SPECGEN_SCREENSHOTS")
    folder = Path(wanted) if wanted else tmp_path / "screens"
    folder.mkdir(parents=True, exist_ok=True)
    return folder


def _screens(page, folder: Path, name: str) -> None:
    for w, h in TABLET_SIZES:
        page.set_viewport_size({"width": w, "height": h})
        page.screenshot(path=str(folder / f"{name}-{w}x{h}.png"))
    page.set_viewport_size({"width": 1024, "height": 1366})


def _login(page, base: str, user: str) -> None:
    page.goto(f"{base}/login")
    page.fill("input[name=user]", user)
    page.fill("input[name=password]", PASSWORD)
    page.click("button[type=submit]")
    page.wait_for_url(f"{base}/")


def _logout(page) -> None:
    page.click("header form button")


# long: one lot from the first step to the export, checked as the floor would see it
def test_a_whole_lot_in_the_browser(browser_context, tmp_path):
    from tests_station_expect import reading_for

    lot = make_lot(tmp_path, qty=5)
    shots = _shots_dir(tmp_path)
    config = StationConfig(register=lot.register, parts_dirs=(lot.parts,), users_file=lot.users)
    from station_server import serving

    page = browser_context.new_page()
    with serving(config) as base:
        _login(page, base, "wren")
        page.click(f"text={lot.number}")
        page.click("text=Winding steps")
        first = True
        while page.locator("button.sign").count():
            assert page.locator(".bar .wo").inner_text() == lot.number              # the order stays on screen
            if first:
                _screens(page, shots, "winder-step")
                first = False
            page.click("button.sign")
            page.wait_for_load_state()
        assert page.locator(".done").is_visible()
        signed = page.locator(".steplist .tick").count()
        assert signed == page.locator(".steplist li").count() > 3
        _logout(page)

        _login(page, base, "tamsin")
        columns = station_columns(lot.design)
        for serial, fails in (("1", False), ("2", True), ("3", False)):
            page.goto(f"{base}/wo/{lot.number}/test/{serial}")
            page.fill("input[name=temp]", "24.5")
            typed = [reading_for(col, 24.5, fail=fails and col.kind == "dcr") for col in columns]
            if serial == "3":                   # a row pasted from a meter's export fills the inputs in order
                page.evaluate("""([selector, text]) => { const dt = new DataTransfer(); dt.setData('text/plain', text);
                    document.querySelector(selector).dispatchEvent(new ClipboardEvent('paste',
                        {clipboardData: dt, bubbles: true, cancelable: true})); }""",
                              [f"input[name='t:{columns[0].key}']", "\t".join(typed)])
                assert page.input_value(f"input[name='t:{columns[-1].key}']") == typed[-1]
            else:
                for col, text in zip(columns, typed):
                    page.fill(f"input[name='t:{col.key}']", text)
            dcr_row = page.locator(f"tr[data-key='{columns[0].key}']")
            want = "FAIL" if fails else "PASS"
            page.wait_for_function("([key, want]) => document.querySelector(`tr[data-key='${key}'] [data-verdict]`)"
                                   ".textContent.includes(want)", arg=[columns[0].key, want])  # shown before saving
            if serial == "2":
                _screens(page, shots, "tester-serial")
            page.click("form.readings button[type=submit]")
            page.wait_for_load_state()
            assert want in dcr_row.inner_text()
        page.goto(f"{base}/wo/{lot.number}/test/2")
        assert page.locator("[data-status]").get_attribute("data-status") == "needs-disposition"
        page.check("input[name=action][value=rework]")
        page.fill("form.disposition input[name=reason]", "start lead <b>cold</b> joint")
        page.locator("form.disposition").scroll_into_view_if_needed()
        _screens(page, shots, "tester-disposition")
        page.click("form.disposition button[type=submit]")
        page.wait_for_load_state()

        page.reload()
        assert page.locator("[data-status]").get_attribute("data-status") == "rework"
        assert "start lead <b>cold</b> joint" in page.locator(".dispo").inner_text()          # shown as typed text
        page.goto(f"{base}/wo/{lot.number}/test")
        statuses = page.locator("table.lot td.status").all_inner_texts()
        assert statuses[:4] == ["pass", "to rework", "pass", "not tested"]
        _screens(page, shots, "tester-lot")
        page.goto(f"{base}/part/{lot.design.part}/compare")
        assert page.locator("table.compare tr").count() == len(columns) + 1
        assert page.locator(".plots svg").count() == len(columns)
        _screens(page, shots, "compare")
        page.goto(f"{base}/wo/{lot.number}")
        with page.expect_download() as download:
            page.click("text=Record as CSV")
        text = Path(download.value.path()).read_text(encoding="utf-8")
    rows = list(csv.DictReader(io.StringIO(text)))
    readings = [r for r in rows if r["kind"] == "reading"]
    assert {r["serial"] for r in readings} == {"1", "2", "3"} and len(readings) == 3 * len(columns)
    assert [r["action"] for r in rows if r["kind"] == "disposition"] == ["rework"]
    assert sum(1 for r in rows if r["kind"] == "signoff") == signed
    assert {r["by"] for r in readings} == {"tamsin"}
    if os.environ.get("SPECGEN_SCREENSHOTS"):
        shutil.copyfile(download.value.path(), shots / "record.csv")
