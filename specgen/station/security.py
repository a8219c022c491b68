"""Sessions, CSRF tokens and slowed logins for the station's web app.

- A session is a random token (``secrets.token_urlsafe``, 256 bits) in an HttpOnly, SameSite=Strict
  cookie; the server keeps what it stands for (no data in the cookie). A login issues a new token.
- Every session carries a CSRF token; every form posts it back (``csrf`` field, or the
  ``X-CSRF-Token`` header for the page's own fetch calls) and a write without the right one is refused
  (the "synchronizer token" pattern of the OWASP CSRF Prevention Cheat Sheet).
- A failed login is answered only after a delay that doubles with each failure for that name and for
  that client (0.25 s, 0.5 s, 1 s ... up to 8 s), so guessing is slow; a success clears the count.
"""

from __future__ import annotations

import dataclasses
import hmac
import secrets
import time

SESSION_COOKIE = "station_session"
IDLE_S = 12 * 3600.0
FIRST_DELAY_S, MAX_DELAY_S = 0.25, 8.0
MAX_SESSIONS = 10_000
MAX_FAILURE_KEYS = 10_000


@dataclasses.dataclass(slots=True)
class Session:
    token: str
    csrf: str
    user: str | None = None
    role: str | None = None
    seen: float = 0.0


class Sessions:
    def __init__(self) -> None:
        self._by_token: dict[str, Session] = {}
        self._failures: dict[str, tuple[int, float]] = {}

    def get(self, token: str | None) -> Session | None:
        if not token:
            return None
        found = self._by_token.get(token)
        now = time.monotonic()
        if found is None or now - found.seen > IDLE_S:
            self._by_token.pop(token or "", None)
            return None
        found.seen = now
        return found

    def new(self, user: str | None = None, role: str | None = None) -> Session:
        if len(self._by_token) >= MAX_SESSIONS:
            oldest = sorted(self._by_token.values(), key=lambda s: s.seen)[: MAX_SESSIONS // 10]
            for s in oldest:
                self._by_token.pop(s.token, None)
        s = Session(secrets.token_urlsafe(32), secrets.token_urlsafe(32), user, role, time.monotonic())
        self._by_token[s.token] = s
        return s

    def end(self, token: str | None) -> None:
        self._by_token.pop(token or "", None)

    @staticmethod
    def csrf_ok(session: Session | None, sent: str | None) -> bool:
        return session is not None and bool(sent) and hmac.compare_digest(session.csrf, str(sent))

    # --- slowed failures --------------------------------------------------------------------------

    def failure_delay_s(self, *keys: str) -> float:
        """Record one more failure for each key; the delay its answer waits (the largest count wins)."""
        count = 0
        now = time.monotonic()
        if len(self._failures) >= MAX_FAILURE_KEYS:      # names made up by the thousand must not fill memory
            for key in sorted(self._failures, key=lambda k: self._failures[k][1])[: MAX_FAILURE_KEYS // 10]:
                del self._failures[key]
        for key in keys:
            n, _ = self._failures.get(key, (0, now))
            self._failures[key] = (n + 1, now)
            count = max(count, n + 1)
        return min(FIRST_DELAY_S * 2 ** (count - 1), MAX_DELAY_S)

    def clear_failures(self, *keys: str) -> None:
        for key in keys:
            self._failures.pop(key, None)
