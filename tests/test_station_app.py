"""The station's web app through its HTTP face (the in-process client): login, roles, the CSRF token on
every write, slowed failed logins, escaped output, and the listening rule."""

from __future__ import annotations

import re
import time

import pytest
from starlette.testclient import TestClient
from station_helpers import PASSWORD, make_lot

from specgen.errors import SpecError
from specgen.register import Register
from specgen.station.app import StationConfig, create_app
from specgen.station.store import StationStore


@pytest.fixture
def lot(tmp_path):
    return make_lot(tmp_path)


def _client(lot, **kw) -> TestClient:
    config = StationConfig(register=lot.register, parts_dirs=(lot.parts,), users_file=lot.users, **kw)
    return TestClient(create_app(config), follow_redirects=False)


def _csrf(html: str) -> str:
    return re.search(r'name="csrf" value="([^"]+)"', html).group(1)


def _login(client: TestClient, user: str, password: str = PASSWORD):
    page = client.get("/login")
    return client.post("/login", data={"csrf": _csrf(page.text), "user": user, "password": password})


def _entries(lot):
    with Register.open(lot.register) as reg:
        return StationStore(reg).entries(lot.number)


def test_pages_need_a_login(lot):
    with _client(lot) as c:
        r = c.get(f"/wo/{lot.number}/steps")
        assert r.status_code == 303 and r.headers["location"] == "/login"


def test_write_without_login_is_refused(lot):
    with _client(lot) as c:
        page = c.get("/login")
        r = c.post(f"/wo/{lot.number}/steps/1/sign", data={"csrf": _csrf(page.text)})
        assert r.status_code == 401
    assert _entries(lot) == []


def test_form_without_the_csrf_token_is_refused(lot):
    with _client(lot) as c:
        assert _login(c, "wren").status_code == 303
        for data in ({}, {"csrf": "forged"}):
            r = c.post(f"/wo/{lot.number}/steps/1/sign", data=data)
            assert r.status_code == 403 and "security token" in r.text
        assert _entries(lot) == []
        steps = c.get(f"/wo/{lot.number}/steps")
        r = c.post(f"/wo/{lot.number}/steps/1/sign", data={"csrf": _csrf(steps.text)})
        assert r.status_code == 303
    assert [e.by for e in _entries(lot)] == ["wren"]


def test_a_role_does_only_its_own_writes(lot):
    with _client(lot) as c:
        _login(c, "tamsin")
        steps = c.get(f"/wo/{lot.number}/steps")
        r = c.post(f"/wo/{lot.number}/steps/1/sign", data={"csrf": _csrf(steps.text)})
        assert r.status_code == 403 and "tester cannot" in r.text
    assert _entries(lot) == []


def test_wrong_password_is_refused_and_repeated_failures_are_slowed(lot):
    with _client(lot) as c:
        times = []
        for _ in range(4):
            start = time.monotonic()
            r = _login(c, "wren", "not the password")
            times.append(time.monotonic() - start)
            assert r.status_code == 401 and "wrong name or password" in r.text
        # each failure waits twice as long as the one before (0.25, 0.5, 1, 2 s)
        assert times[3] > 1.9 and times[3] > times[0] + 1.5
        r = _login(c, "nobody", "whatever")
        assert r.status_code == 401
        assert c.get("/").status_code == 303                      # still not logged in


def test_session_cookie_is_httponly_and_strict(lot):
    with _client(lot) as c:
        r = _login(c, "wren")
        cookie = r.headers["set-cookie"].lower()
        assert "httponly" in cookie and "samesite=strict" in cookie
        assert "default-src 'none'" in c.get("/").headers["content-security-policy"]


def test_html_in_any_field_is_shown_escaped(lot):
    attack = '<script>alert("x")</script><img src=x onerror=alert(1)>'
    with _client(lot) as c:
        _login(c, "ellis")
        mats = c.get(f"/wo/{lot.number}/materials")
        wire = next(m for m in lot.design.materials if m.kind == "wire")
        r = c.post(f"/wo/{lot.number}/materials", data={"csrf": _csrf(mats.text), "item": wire.id, "lot": attack})
        assert r.status_code == 303
        page = c.get(f"/wo/{lot.number}/materials").text
        assert attack not in page and "&lt;script&gt;alert(" in page
        form = c.get(f"/wo/{lot.number}/test/1")
        dcr_key = next(k for k in re.findall(r'name="t:([^"]+)"', form.text) if k.startswith("dcr/"))
        r = c.post(f"/wo/{lot.number}/test/1", data={"csrf": _csrf(form.text), "temp": "20", f"t:{dcr_key}": attack})
        assert r.status_code == 400 and attack not in r.text and "&lt;script&gt;" in r.text


def test_csv_export_neutralises_formulas(lot):
    with _client(lot) as c:
        _login(c, "ellis")
        mats = c.get(f"/wo/{lot.number}/materials")
        wire = next(m for m in lot.design.materials if m.kind == "wire")
        c.post(f"/wo/{lot.number}/materials", data={"csrf": _csrf(mats.text), "item": wire.id,
                                                     "lot": '=HYPERLINK("http://x")'})
        csv = c.get(f"/wo/{lot.number}/record.csv").text
        assert "'=HYPERLINK" in csv and ',=HYPERLINK' not in csv


def test_no_users_means_read_only(lot):
    config = StationConfig(register=lot.register, parts_dirs=(lot.parts,), users_file=None)
    with TestClient(create_app(config), follow_redirects=False) as c:
        page = c.get(f"/wo/{lot.number}/steps")
        assert page.status_code == 200 and "read-only" in page.text
        r = c.post(f"/wo/{lot.number}/steps/1/sign", data={"csrf": "x"})
        assert r.status_code == 403
    assert _entries(lot) == []


def test_listening_beyond_this_machine_needs_users(lot):
    with pytest.raises(SpecError, match="needs a users file"):
        create_app(StationConfig(register=lot.register, parts_dirs=(lot.parts,), users_file=None, host="0.0.0.0"))
    create_app(StationConfig(register=lot.register, parts_dirs=(lot.parts,), users_file=lot.users, host="0.0.0.0"))


def test_readings_are_judged_at_once_and_stored(lot):
    dcr = next(c for c in __import__("specgen.station.plan", fromlist=["x"]).station_columns(lot.design)
               if c.kind == "dcr")
    with _client(lot) as c:
        _login(c, "tamsin")
        form = c.get(f"/wo/{lot.number}/test/2")
        typed = f"{dcr.nominal * 1.5 * dcr.shown_factor:.4g}"
        check = c.post(f"/wo/{lot.number}/test/2/check", data={"temp": "20", f"t:{dcr.key}": typed},
                       headers={"X-CSRF-Token": _csrf(form.text)})
        assert check.json()["verdicts"][dcr.key]["verdict"] == "fail"
        assert _entries(lot) == []                                   # checking stores nothing
        r = c.post(f"/wo/{lot.number}/test/2", data={"csrf": _csrf(form.text), "temp": "20", f"t:{dcr.key}": typed})
        assert r.status_code == 303
    [e] = _entries(lot)
    assert (e.serial, e.verdict, e.by, e.temp_c) == ("2", "fail", "tamsin", 20.0)


def test_csv_import_is_all_or_nothing(lot):
    from specgen.station.plan import station_columns

    dcr = [c for c in station_columns(lot.design) if c.kind == "dcr"]
    head = "serial,temp_c," + ",".join(c.label for c in dcr)
    good = ",".join(f"{c.nominal * c.shown_factor:.4g}" for c in dcr)
    with _client(lot) as c:
        _login(c, "tamsin")
        form = c.get(f"/wo/{lot.number}/test")
        bad = f"{head}\n1,22,{good}\n2,22,oops{good[1:]}\n"
        r = c.post(f"/wo/{lot.number}/import", data={"csrf": _csrf(form.text)},
                   files={"file": ("readings.csv", bad.encode(), "text/csv")})
        assert r.status_code == 400 and "readings.csv:3: serial 2: DCR" in r.text, r.text[-600:]
        assert _entries(lot) == []
        ok = f"{head}\n1,22,{good}\n2,23.5,{good}\n"
        r = c.post(f"/wo/{lot.number}/import", data={"csrf": _csrf(form.text)},
                   files={"file": ("readings.csv", ok.encode(), "text/csv")})
        assert r.status_code == 303
    entries = _entries(lot)
    assert len(entries) == 2 * len(dcr) and {e.source for e in entries} == {"csv:readings.csv"}
