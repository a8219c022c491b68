"""The station's users: a YAML file the shop keeps, names with a role and a salted scrypt hash.

::

    users:
      ada:
        role: winder              # winder | tester | engineer
        password: scrypt$16384$8$1$<salt, base64>$<hash, base64>

Hashes come from :func:`hash_password` (``specgen serve --add-user NAME --role ROLE`` writes them):
scrypt from the standard library (RFC 7914) with a 16-byte random salt, N = 2^14, r = 8, p = 1 (the
parameters RFC 7914 section 2 gives for interactive logins) and a 32-byte key, compared in constant
time. A password is never stored or logged.
"""

from __future__ import annotations

import base64
import dataclasses
import hashlib
import hmac
import os
import re
from pathlib import Path
from typing import Any

from specgen.errors import SpecError

from .model import ROLES

SCRYPT_N, SCRYPT_R, SCRYPT_P, KEY_BYTES, SALT_BYTES = 1 << 14, 8, 1, 32, 16
MIN_PASSWORD_CHARS = 10
_NAME = re.compile(r"[a-z][a-z0-9._-]{0,31}")


@dataclasses.dataclass(frozen=True, slots=True)
class User:
    name: str
    role: str
    password_hash: str


def _scrypt(password: str, salt: bytes, n: int, r: int, p: int) -> bytes:
    return hashlib.scrypt(password.encode("utf-8"), salt=salt, n=n, r=r, p=p, dklen=KEY_BYTES,
                          maxmem=256 * n * r + (1 << 20))


def hash_password(password: str) -> str:
    if len(password) < MIN_PASSWORD_CHARS:
        raise SpecError(f"a password needs at least {MIN_PASSWORD_CHARS} characters")
    salt = os.urandom(SALT_BYTES)
    key = _scrypt(password, salt, SCRYPT_N, SCRYPT_R, SCRYPT_P)
    b64 = lambda b: base64.b64encode(b).decode("ascii")
    return f"scrypt${SCRYPT_N}${SCRYPT_R}${SCRYPT_P}${b64(salt)}${b64(key)}"


def verify_password(password: str, stored: str) -> bool:
    """True when ``password`` gives ``stored`` (a hash from :func:`hash_password`)."""
    try:
        scheme, n, r, p, salt, key = stored.split("$")
        if scheme != "scrypt":
            return False
        expected = base64.b64decode(key, validate=True)
        got = _scrypt(password, base64.b64decode(salt, validate=True), int(n), int(r), int(p))
    except (ValueError, TypeError):
        return False
    return hmac.compare_digest(got, expected)


def load_users(path: Path) -> dict[str, User]:
    """The users file; a mistake is a one-line error with the file and the key."""
    from specgen.loading import load_yaml

    data = load_yaml(path, "users file")
    where = str(path)
    if not isinstance(data, dict) or not isinstance(data.get("users"), dict):
        raise SpecError("expected a mapping 'users:' of names", file=where, path="users")
    out = {}
    for name, entry in data["users"].items():
        key = f"users.{name}"
        if not isinstance(name, str) or not _NAME.fullmatch(name):
            raise SpecError(f"user name {name!r}: lower-case letters, digits, '.', '_' or '-'", file=where, path=key)
        if not isinstance(entry, dict):
            raise SpecError("expected role: and password:", file=where, path=key)
        role, pw = entry.get("role"), entry.get("password")
        if role not in ROLES:
            raise SpecError(f"role must be one of {', '.join(ROLES)}, got {role!r}", file=where, path=f"{key}.role")
        if not isinstance(pw, str) or not pw.startswith("scrypt$") or pw.count("$") != 5:
            raise SpecError("password: expected a scrypt hash (specgen serve --add-user writes one)", file=where,
                            path=f"{key}.password")
        out[name] = User(name, role, pw)
    return out


def add_user(path: Path, name: str, role: str, password: str) -> None:
    """Add or replace one user in the file (written atomically; other users kept)."""
    import yaml

    from specgen.atomic import write_atomic

    if not _NAME.fullmatch(name):
        raise SpecError(f"user name {name!r}: lower-case letters, digits, '.', '_' or '-'")
    if role not in ROLES:
        raise SpecError(f"role must be one of {', '.join(ROLES)}, got {role!r}")
    users: dict[str, Any] = {}
    if path.exists():
        users = {u.name: {"role": u.role, "password": u.password_hash} for u in load_users(path).values()}
    users[name] = {"role": role, "password": hash_password(password)}
    write_atomic(path, "# the station's users (specgen serve); passwords are salted scrypt hashes\n"
                 + yaml.safe_dump({"users": users}, sort_keys=True))
