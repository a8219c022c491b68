"""The bench and test-station web app: Starlette under uvicorn, the project's jinja2 templates.

Views: the work orders open on the floor; the winder's steps one at a time; the tester's lot table
and one serial's readings (judged at once against the Design's limits); the picker's material lots;
the lot's record as CSV and PDF; a part's measured values against the prediction. Everything is
stored through :class:`specgen.station.store.StationStore`; this module only turns requests into
calls and results into pages.

Served from the app itself only (CSS and a little JavaScript in ``templates/station/``); the
Content-Security-Policy allows nothing else. Writes need a logged-in user whose role allows them and
the session's CSRF token.
"""

from __future__ import annotations

import asyncio
import concurrent.futures
import contextlib
import dataclasses
from collections.abc import AsyncIterator, Awaitable, Callable
from pathlib import Path
from typing import Any

from starlette.applications import Starlette
from starlette.requests import Request
from starlette.responses import HTMLResponse, JSONResponse, RedirectResponse, Response
from starlette.routing import Route

from specgen.errors import SpecError
from specgen.register import Register

from . import plan
from .lots import Lot, PartsLibrary
from .model import DISPOSITIONS, LOT_KINDS, PERMISSIONS
from .security import SESSION_COOKIE, Session, Sessions
from .store import StationStore
from .users import User, load_users, verify_password

LOCAL_HOSTS = ("127.0.0.1", "localhost", "::1")
#: Turns of the event loop a commit waits for other posts to join it (each turn lets every request
#: already received run to its own wait; a few turns cost microseconds, not a timer's milliseconds).
BATCH_YIELDS = 4
HEADERS = {
    "Content-Security-Policy": "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self' data:; "
                               "form-action 'self'; base-uri 'none'; frame-ancestors 'none'; connect-src 'self'",
    "X-Content-Type-Options": "nosniff",
    "Referrer-Policy": "no-referrer",
    "Cache-Control": "no-store",
}
STATUS_WORDS = {"untested": "not tested", "partial": "partly tested", "pass": "pass", "fail": "FAIL",
                "needs-disposition": "FAIL: needs a disposition", "retest": "to retest", "rework": "to rework",
                "scrap": "scrapped"}


@dataclasses.dataclass(frozen=True, slots=True)
class StationConfig:
    register: str                       # file path or postgresql:// URL
    parts_dirs: tuple[Path, ...]
    users_file: Path | None
    catalog: Path | None = None
    host: str = "127.0.0.1"


def check_listening(config: StationConfig, users: dict[str, User]) -> None:
    """Listening beyond this machine needs users: an open station would take anyone's readings."""
    if config.host not in LOCAL_HOSTS and not users:
        raise SpecError(f"listening on {config.host} (beyond this machine) needs a users file with at least one "
                        "user (--users FILE; add one with --add-user)")


class PostQueue:
    """Readings posted at the same moment are written in one transaction (one commit, one fsync),
    each post in its own savepoint (:meth:`StationStore.record_batch`). The writes run on one thread
    of their own with a connection of its own, so the event loop serves pages (and gathers the next
    batch) while a commit waits for the disk."""

    def __init__(self, station: Station):
        self.station = station
        self._queue: asyncio.Queue[tuple[tuple[str, str, Any, str, str | None], asyncio.Future[Any]]] | None = None
        self._task: asyncio.Task[None] | None = None
        self._pool = concurrent.futures.ThreadPoolExecutor(max_workers=1, thread_name_prefix="station-writer")
        self._register: Register | None = None          # opened and used on the writer thread only

    async def submit(self, number: str, serial: str, verdicts: Any, by: str, reason: str | None) -> list[int]:
        if self._queue is None:
            self._queue = asyncio.Queue()
            self._task = asyncio.get_running_loop().create_task(self._run())
        done: asyncio.Future[Any] = asyncio.get_running_loop().create_future()
        await self._queue.put(((number, serial, verdicts, by, reason), done))
        result = await done
        if isinstance(result, BaseException):
            raise result
        return list(result)

    def _write(self, items: list[tuple[str, str, Any, str, str | None]]) -> list[Any]:
        if self._register is None:
            self._register = Register.open(self.station.config.register, create=False)
        try:
            return list(StationStore(self._register).record_batch(items))
        except Exception as err:                # the whole transaction failed: every post hears why
            return [err] * len(items)

    async def _run(self) -> None:
        assert self._queue is not None
        loop = asyncio.get_running_loop()
        while True:
            batch = [await self._queue.get()]
            for _ in range(BATCH_YIELDS):       # let the posts already read off the sockets join this commit
                await asyncio.sleep(0)
            while not self._queue.empty():
                batch.append(self._queue.get_nowait())
            results = await loop.run_in_executor(self._pool, self._write, [item for item, _ in batch])
            for (_, done), result in zip(batch, results):
                if not done.done():
                    done.set_result(result)

    def stop(self) -> None:
        if self._task is not None:
            self._task.cancel()

        def close() -> None:
            if self._register is not None:
                self._register.close()
                self._register = None

        self._pool.submit(close)
        self._pool.shutdown(wait=True)


class Station:
    """The app's state: the register, the parts, the users and the sessions."""

    def __init__(self, config: StationConfig):
        from specgen.catalog.loader import load_catalog
        from specgen.documents.render import jinja_env, templates_dir

        self.config = config
        self.users = load_users(config.users_file) if config.users_file else {}
        check_listening(config, self.users)
        self.cat = load_catalog(config.catalog)
        self.parts = PartsLibrary(list(config.parts_dirs), self.cat)
        self.sessions = Sessions()
        self.env = jinja_env()
        self.static_dir = templates_dir() / "station"
        self._register: Register | None = None
        self._static: dict[str, tuple[bytes, str]] = {}
        self.posts = PostQueue(self)

    @property
    def store(self) -> StationStore:
        if self._register is None:
            self._register = Register.open(self.config.register, create=False)
        return StationStore(self._register)

    def close(self) -> None:
        self.posts.stop()
        if self._register is not None:
            self._register.close()
            self._register = None

    def static_file(self, name: str) -> tuple[bytes, str] | None:
        """(content, type) of one of the app's own files (CSS, JS), or None; only files of that folder."""
        if name not in self._static:
            path = (self.static_dir / name).resolve()
            types = {".css": "text/css", ".js": "text/javascript"}
            if path.parent != self.static_dir.resolve() or not path.is_file() or path.suffix not in types:
                return None
            self._static[name] = (path.read_bytes(), types[path.suffix])
        return self._static[name]

    def lot(self, number: str) -> Lot:
        return self.parts.lot(self.store.register.get(number))

    # --- responses ----------------------------------------------------------------------------

    def page(self, request: Request, template: str, status: int = 200, **context: Any) -> HTMLResponse:
        session = request.state.session
        html = self.env.get_template(f"station/{template}").render(
            user=session.user if session else None, role=session.role if session else None,
            csrf=session.csrf if session else "", read_only=not self.users, **context)
        response = HTMLResponse(html, status_code=status)
        return response

    def error(self, request: Request, message: str, status: int = 400) -> HTMLResponse:
        return self.page(request, "error.html", status=status, message=message)


Handler = Callable[[Request], Awaitable[Response]]


def _client(request: Request) -> str:
    return request.client.host if request.client else "-"


def _wrap(station: Station, handler: Callable[[Station, Request], Awaitable[Response]], *,
          write: str | None = None, public: bool = False) -> Handler:
    """Every route: the session, login (unless public), role and CSRF (for a write), headers, and a
    user's mistake shown as a page instead of a traceback."""

    async def endpoint(request: Request) -> Response:
        session = station.sessions.get(request.cookies.get(SESSION_COOKIE))
        fresh = None
        if session is None:
            session = fresh = station.sessions.new()
        request.state.session = session
        try:
            refused = await _refusal(station, request, session, write, public)
            response = refused or await handler(station, request)
        except SpecError as err:
            response = station.error(request, str(err))
        for name, value in HEADERS.items():
            response.headers.setdefault(name, value)
        if fresh is not None and SESSION_COOKIE not in response.headers.get("set-cookie", ""):
            _set_cookie(response, fresh)
        return response

    return endpoint


async def _refusal(station: Station, request: Request, session: Session, write: str | None,
                   public: bool) -> Response | None:
    logged_in = session.user is not None
    if write is not None:
        if not station.users:
            return station.error(request, "this station has no users configured: it is read-only", 403)
        if not logged_in:
            return station.error(request, "log in first: nothing is recorded without a user", 401)
        if session.role not in PERMISSIONS.get(write, frozenset()):
            return station.error(request, f"a {session.role} cannot do this ({write})", 403)
        sent = request.headers.get("x-csrf-token")
        if sent is None:
            form = await request.form()
            value = form.get("csrf")
            sent = value if isinstance(value, str) else None
        if not Sessions.csrf_ok(session, sent):
            return station.error(request, "the form's security token is missing or stale: reload the page", 403)
    elif not public and station.users and not logged_in:
        return RedirectResponse("/login", status_code=303)
    return None


def _set_cookie(response: Response, session: Session) -> None:
    response.set_cookie(SESSION_COOKIE, session.token, httponly=True, samesite="strict", path="/")


def _redirect(url: str) -> RedirectResponse:
    return RedirectResponse(url, status_code=303)


async def _form(request: Request) -> dict[str, str]:
    form = await request.form()
    return {k: v for k, v in form.items() if isinstance(v, str)}


# ------------------------------------------------------------------------------------------------ login

async def login_page(st: Station, request: Request) -> Response:
    return st.page(request, "login.html", message="")


async def login(st: Station, request: Request) -> Response:
    session: Session = request.state.session
    form = await _form(request)
    if not Sessions.csrf_ok(session, form.get("csrf")):
        return st.error(request, "the form's security token is missing or stale: reload the page", 403)
    name = form.get("user", "").strip().lower()
    password = form.get("password", "")
    user = st.users.get(name)
    ok = False
    if user is not None:
        ok = await asyncio.to_thread(verify_password, password, user.password_hash)
    keys = (f"user:{name}", f"client:{_client(request)}")
    if not ok:
        await asyncio.sleep(st.sessions.failure_delay_s(*keys))
        return st.page(request, "login.html", status=401, message="wrong name or password")
    st.sessions.clear_failures(*keys)
    assert user is not None
    st.sessions.end(session.token)
    fresh = st.sessions.new(user.name, user.role)
    response = _redirect("/")
    _set_cookie(response, fresh)
    return response


async def logout(st: Station, request: Request) -> Response:
    form = await _form(request)
    if not Sessions.csrf_ok(request.state.session, form.get("csrf")):
        return st.error(request, "the form's security token is missing or stale: reload the page", 403)
    st.sessions.end(request.state.session.token)
    response = _redirect("/login")
    response.delete_cookie(SESSION_COOKIE, path="/")
    return response


# ------------------------------------------------------------------------------------------------ orders

async def home(st: Station, request: Request) -> Response:
    orders = [o for o in st.store.register.list() if o.state in ("issued", "in-work")]
    return st.page(request, "home.html", orders=orders, parts=sorted({o.part for o in orders}))


async def lot_page(st: Station, request: Request) -> Response:
    lot = st.lot(request.path_params["number"])
    store = st.store
    signed = store.signoffs(lot.order.number)
    pieces = store.pieces(lot.order.number, lot.serials, lot.keys)
    counts: dict[str, int] = {}
    for p in pieces:
        counts[p.status] = counts.get(p.status, 0) + 1
    return st.page(request, "lot.html", lot=lot, order=lot.order, signed=len(signed), steps=len(lot.steps),
                   counts=[(STATUS_WORDS[k], v) for k, v in counts.items()])


# ------------------------------------------------------------------------------------------------ winder

async def steps_page(st: Station, request: Request) -> Response:
    lot = st.lot(request.path_params["number"])
    signed = st.store.signoffs(lot.order.number)
    wanted = request.query_params.get("n")
    open_steps = [s.n for s in lot.steps if str(s.n) not in signed]
    current = int(wanted) if wanted and wanted.isdigit() else (open_steps[0] if open_steps else lot.steps[-1].n)
    step = next((s for s in lot.steps if s.n == current), lot.steps[0])
    index = lot.steps.index(step)
    prev_n = lot.steps[index - 1].n if index > 0 else None
    next_n = lot.steps[index + 1].n if index + 1 < len(lot.steps) else None
    return st.page(request, "steps.html", lot=lot, order=lot.order, step=step, signed=signed,
                   sign=signed.get(str(step.n)), prev_n=prev_n, next_n=next_n, done=not open_steps)


async def sign_step(st: Station, request: Request) -> Response:
    number, n = request.path_params["number"], int(request.path_params["n"])
    lot = st.lot(number)
    step = next((s for s in lot.steps if s.n == n), None)
    if step is None:
        raise SpecError(f"{number} has no step {n}")
    st.store.sign_off(number, n, step.heading, request.state.session.user)
    following = [s.n for s in lot.steps if s.n > n]
    return _redirect(f"/wo/{number}/steps" + (f"?n={following[0]}" if following else ""))


async def withdraw_step(st: Station, request: Request) -> Response:
    number, n = request.path_params["number"], int(request.path_params["n"])
    form = await _form(request)
    st.store.withdraw_sign_off(number, n, request.state.session.user, form.get("reason", ""))
    return _redirect(f"/wo/{number}/steps?n={n}")


# ------------------------------------------------------------------------------------------------ tester

def _cells(lot: Lot, piece: Any) -> list[dict[str, str]]:
    out = []
    for col in lot.columns:
        e = piece.readings.get(col.key)
        text = plan.show_value(col, e.judged_si) if e else ""
        if e and col.kind != "check":
            text = text.rsplit(" ", 1)[0]            # the unit is in the column's heading
        out.append({"text": text, "verdict": e.verdict if e else ""})
    return out


async def test_table(st: Station, request: Request) -> Response:
    lot = st.lot(request.path_params["number"])
    pieces = st.store.pieces(lot.order.number, lot.serials, lot.keys)
    rows = [{"serial": p.serial, "status": p.status, "status_text": STATUS_WORDS[p.status], "cells": _cells(lot, p)}
            for p in pieces]
    return st.page(request, "test_table.html", lot=lot, order=lot.order, rows=rows,
                   limits=[plan.limits_text(c) for c in lot.columns])


def _serial(lot: Lot, request: Request) -> str:
    serial = request.path_params["serial"]
    if serial not in lot.serials:
        raise SpecError(f"{lot.order.number} has serials 1 to {lot.order.qty}, not {serial!r}")
    return str(serial)


async def serial_page(st: Station, request: Request, *, typed: dict[str, str] | None = None,
                      errors: dict[str, str] | None = None, status: int = 200) -> Response:
    lot = st.lot(request.path_params["number"])
    serial = _serial(lot, request)
    piece = st.store.piece(lot.order.number, serial, lot.keys)
    history = st.store.entries(lot.order.number, serial=serial)
    temps = [e.temp_c for e in piece.readings.values() if e.temp_c is not None]
    fields = []
    for col in lot.columns:
        e = piece.readings.get(col.key)
        fields.append({"col": col, "limits": plan.limits_text(col),
                       "current": plan.show_value(col, e.value_si) if e else "",
                       "judged": plan.show_value(col, e.judged_si) if e else "",
                       "verdict": e.verdict if e else "", "typed": (typed or {}).get(col.key, ""),
                       "error": (errors or {}).get(col.key, "")})
    index = lot.serials.index(serial)
    return st.page(request, "serial.html", status=status, lot=lot, order=lot.order, serial=serial, piece=piece,
                   status_text=STATUS_WORDS[piece.status], fields=fields, history=history[::-1],
                   temp=(typed or {}).get("temp", f"{temps[-1]:g}" if temps else ""),
                   temp_error=(errors or {}).get("temp", ""), dispositions=DISPOSITIONS,
                   next_serial=lot.serials[index + 1] if index + 1 < len(lot.serials) else None,
                   prev_serial=lot.serials[index - 1] if index > 0 else None, form_error=(errors or {}).get("", ""))


async def serial_get(st: Station, request: Request) -> Response:
    return await serial_page(st, request)


def _typed(lot: Lot, form: dict[str, str]) -> dict[str, str]:
    return {c.key: form.get(f"t:{c.key}", "") for c in lot.columns}


async def check_readings(st: Station, request: Request) -> Response:
    """The verdicts of what is typed so far, stored nowhere (the page shows them as the tester types)."""
    lot = st.lot(request.path_params["number"])
    form = await _form(request)
    verdicts, errors = plan.judge_form(lot.columns, _typed(lot, form), form.get("temp"))
    return JSONResponse({"verdicts": {v.column.key: {"verdict": v.verdict, "judged": plan.show_value(v.column, v.judged_si)}
                                      for v in verdicts}, "errors": errors})


async def save_readings(st: Station, request: Request) -> Response:
    lot = st.lot(request.path_params["number"])
    serial = _serial(lot, request)
    form = await _form(request)
    typed = _typed(lot, form)
    verdicts, errors = plan.judge_form(lot.columns, typed, form.get("temp"))
    if not errors and not verdicts:
        errors[""] = "nothing typed: enter at least one reading"
    if not errors:
        try:
            await st.posts.submit(lot.order.number, serial, verdicts, request.state.session.user,
                                  form.get("reason") or None)
        except SpecError as err:
            errors[""] = str(err)
    if errors:
        return await serial_page(st, request, typed={**typed, "temp": form.get("temp", "")}, errors=errors, status=400)
    return _redirect(f"/wo/{lot.order.number}/test/{serial}")


async def dispose(st: Station, request: Request) -> Response:
    lot = st.lot(request.path_params["number"])
    serial = _serial(lot, request)
    form = await _form(request)
    st.store.dispose(lot.order.number, serial, form.get("action", ""), form.get("reason", ""),
                     request.state.session.user)
    return _redirect(f"/wo/{lot.order.number}/test/{serial}")


# ------------------------------------------------------------------------------------------------ picker

async def materials_page(st: Station, request: Request, error: str = "", status: int = 200) -> Response:
    lot = st.lot(request.path_params["number"])
    used: dict[str, list[Any]] = {}
    for e in st.store.materials(lot.order.number):
        used.setdefault(e.item, []).append(e)
    lines = [m for m in lot.design.materials if m.kind in LOT_KINDS]
    return st.page(request, "materials.html", status=status, lot=lot, order=lot.order, lines=lines, used=used,
                   error=error)


async def materials_get(st: Station, request: Request) -> Response:
    return await materials_page(st, request)


async def record_material(st: Station, request: Request) -> Response:
    lot = st.lot(request.path_params["number"])
    form = await _form(request)
    item = form.get("item", "")
    line = next((m for m in lot.design.materials if m.id == item and m.kind in LOT_KINDS), None)
    if line is None:
        return await materials_page(st, request, error=f"{item!r} is not on this lot's pull list", status=400)
    try:
        st.store.record_material(lot.order.number, item, line.kind, form.get("lot", ""), request.state.session.user)
    except SpecError as err:
        return await materials_page(st, request, error=str(err), status=400)
    return _redirect(f"/wo/{lot.order.number}/materials")


# ------------------------------------------------------------------------------------------------ exports

async def export_csv(st: Station, request: Request) -> Response:
    from .records import lot_csv

    lot = st.lot(request.path_params["number"])
    text = lot_csv(st.store, lot)
    return Response(text, media_type="text/csv; charset=utf-8",
                    headers={"Content-Disposition": f'attachment; filename="{lot.order.number}-record.csv"'})


async def export_pdf(st: Station, request: Request) -> Response:
    from .records import lot_pdf

    lot = st.lot(request.path_params["number"])
    data = await asyncio.to_thread(lot_pdf, st.store, lot)
    return Response(data, media_type="application/pdf",
                    headers={"Content-Disposition": f'attachment; filename="{lot.order.number}-test-report.pdf"'})


async def import_csv(st: Station, request: Request) -> Response:
    from .records import import_readings

    lot = st.lot(request.path_params["number"])
    form = await request.form()
    upload = form.get("file")
    if upload is None or isinstance(upload, str):
        raise SpecError("choose a CSV file to import")
    raw = await upload.read()
    count = import_readings(st.store, lot, raw, upload.filename or "upload.csv", request.state.session.user)
    return _redirect(f"/wo/{lot.order.number}/test?imported={count}")


async def compare_page(st: Station, request: Request) -> Response:
    from .compare import compare_part, histogram_svg

    part = request.path_params["part"]
    result = compare_part(st.store, part, st.parts)
    plots = [histogram_svg(q) for q in result.quantities]
    return st.page(request, "compare.html", result=result, rows=list(zip(result.quantities, plots)))


async def static(st: Station, request: Request) -> Response:
    """The app's own CSS and JavaScript, read once and served from memory."""
    found = st.static_file(request.path_params["name"])
    if found is None:
        return Response("not found", status_code=404, media_type="text/plain")
    body, media_type = found
    return Response(body, media_type=media_type, headers={"Cache-Control": "max-age=3600"})


def create_app(config: StationConfig) -> Starlette:
    """The app for one register and parts folder (see :class:`StationConfig`)."""
    st = Station(config)
    w = lambda h, **kw: _wrap(st, h, **kw)
    routes = [
        Route("/static/{name}", w(static, public=True)),
        Route("/login", w(login_page, public=True), methods=["GET"]),
        Route("/login", w(login, public=True), methods=["POST"]),
        Route("/logout", w(logout, public=True), methods=["POST"]),
        Route("/", w(home)),
        Route("/wo/{number}", w(lot_page)),
        Route("/wo/{number}/steps", w(steps_page)),
        Route("/wo/{number}/steps/{n:int}/sign", w(sign_step, write="signoff"), methods=["POST"]),
        Route("/wo/{number}/steps/{n:int}/withdraw", w(withdraw_step, write="signoff"), methods=["POST"]),
        Route("/wo/{number}/test", w(test_table)),
        Route("/wo/{number}/test/{serial}", w(serial_get), methods=["GET"]),
        Route("/wo/{number}/test/{serial}", w(save_readings, write="reading"), methods=["POST"]),
        Route("/wo/{number}/test/{serial}/check", w(check_readings, write="reading"), methods=["POST"]),
        Route("/wo/{number}/test/{serial}/disposition", w(dispose, write="disposition"), methods=["POST"]),
        Route("/wo/{number}/materials", w(materials_get), methods=["GET"]),
        Route("/wo/{number}/materials", w(record_material, write="material"), methods=["POST"]),
        Route("/wo/{number}/record.csv", w(export_csv)),
        Route("/wo/{number}/report.pdf", w(export_pdf)),
        Route("/wo/{number}/import", w(import_csv, write="reading"), methods=["POST"]),
        Route("/part/{part}/compare", w(compare_page)),
    ]
    @contextlib.asynccontextmanager
    async def lifespan(_app: Starlette) -> AsyncIterator[None]:
        st.parts.parts()                       # design every part once, before the first tablet waits for it
        yield
        st.close()

    app = Starlette(routes=routes, lifespan=lifespan)
    app.state.station = st
    return app
