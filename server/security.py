"""Passwords, signed session cookies, CSRF tokens and security headers. No routes, no database.

Decisions (see also DEVELOPERS.md):

- Passwords: argon2id through argon2-cffi's ``PasswordHasher`` defaults (RFC 9106 "second
  recommended option": t=3, m=64 MiB, p=4). Old hashes are upgraded on the next sign-in.
- Session: one cookie, signed (not encrypted) with itsdangerous, salt ``warmstead-session``,
  key ``settings.secret_key``. Payload: user id, ``users.session_version``, a random per-sign-in
  nonce and the sign-in time. Idle limit 12 h (the signature's timestamp; the cookie is re-signed
  at most every 5 min while in use), absolute limit 7 days from sign-in. A password reset,
  deactivation or "sign out everywhere" bumps ``session_version``, which kills every old cookie.
  Signing out ends that one session on the server: its nonce goes into ``revoked_sessions``
  (kept until the 7 days are up), which the per-request user lookup joins, so a kept copy of
  the cookie is refused while the user's other devices stay signed in.
- Key: ``WARMSTEAD_SECRET_KEY``, or a random one made once per install (server/config.py);
  never a string shipped with the source.
- CSRF: token = HMAC-SHA256(secret, session identity); no server storage; it changes at every
  sign-in. Visitors without a session get a random nonce in a separate signed cookie, and the
  token is the HMAC of that nonce (so the login form is protected too).
- Cookies: HttpOnly, SameSite=Lax, Path=/, Secure when the request came over https or when
  ``settings.cookie_secure`` is set (for a TLS-terminating proxy).
"""

from __future__ import annotations

import hashlib
import hmac
import secrets
import time
from dataclasses import dataclass
from datetime import UTC, datetime
from functools import lru_cache

from argon2 import PasswordHasher
from argon2.exceptions import InvalidHashError, VerificationError, VerifyMismatchError
from itsdangerous import BadData, TimestampSigner, URLSafeTimedSerializer

SESSION_COOKIE = "warmstead_session"
ANON_CSRF_COOKIE = "warmstead_csrf"
SESSION_SALT = "warmstead-session"
ANON_SALT = "warmstead-anon-csrf"
SESSION_IDLE_SECONDS = 12 * 3600  #: a day on site with a long lunch; then sign in again
SESSION_ABSOLUTE_SECONDS = 7 * 86400  #: at most a week between sign-ins on one tablet
SESSION_REFRESH_SECONDS = 300  #: re-sign the cookie at most this often (sliding idle limit)
ANON_MAX_AGE_SECONDS = 7 * 86400
CSRF_FIELD = "csrf_token"
CSRF_HEADER = "X-CSRF-Token"

CONTENT_SECURITY_POLICY = (
    "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; "
    "object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'"
)


def clock() -> float:
    """Seconds since the epoch. The one clock of this module (tests move it)."""
    return time.time()


def utc_now() -> datetime:
    """:func:`clock` as an aware UTC datetime."""
    return datetime.fromtimestamp(clock(), UTC)


# --- passwords -----------------------------------------------------------------------------

_HASHER = PasswordHasher()  # argon2id, RFC 9106 low-memory defaults


def hash_password(password: str) -> str:
    """An argon2id hash (``$argon2id$v=19$m=65536,t=3,p=4$...``) of ``password``."""
    return _HASHER.hash(password)


def verify_password(password_hash: str, password: str) -> bool:
    """True when ``password`` matches ``password_hash``; False for a mismatch or a bad hash."""
    try:
        return _HASHER.verify(password_hash, password)
    except (VerifyMismatchError, VerificationError, InvalidHashError):
        return False


def password_needs_rehash(password_hash: str) -> bool:
    """True when the hash was made with weaker parameters than today's defaults."""
    try:
        return _HASHER.check_needs_rehash(password_hash)
    except InvalidHashError:
        return True


@lru_cache(maxsize=1)
def _dummy_hash() -> str:
    return _HASHER.hash(secrets.token_urlsafe(16))


def dummy_verify(password: str) -> None:
    """Spend the time of one real verification (for an unknown e-mail: no timing oracle)."""
    verify_password(_dummy_hash(), password)


# --- session cookie -------------------------------------------------------------------------


class _ClockSigner(TimestampSigner):
    """itsdangerous' timestamp signer on this module's :func:`clock`."""

    def get_timestamp(self) -> int:
        return int(clock())


def _serializer(secret_key: str, salt: str) -> URLSafeTimedSerializer:
    return URLSafeTimedSerializer(secret_key, salt=salt, signer=_ClockSigner)


@dataclass(frozen=True, slots=True)
class SessionData:
    """What a valid session cookie says. ``issued_at`` is when this copy was signed."""

    user_id: int
    session_version: int
    nonce: str
    signed_in_at: float
    issued_at: float


def issue_session(
    secret_key: str,
    *,
    user_id: int,
    session_version: int,
    nonce: str | None = None,
    signed_in_at: float | None = None,
) -> str:
    """A signed session cookie value. A new sign-in gets a fresh nonce (and CSRF token)."""
    payload = {
        "u": int(user_id),
        "v": int(session_version),
        "n": nonce or secrets.token_urlsafe(16),
        "t": int(clock() if signed_in_at is None else signed_in_at),
    }
    return _serializer(secret_key, SESSION_SALT).dumps(payload)


def refresh_session(secret_key: str, data: SessionData) -> str:
    """The same session signed again now (moves the idle limit, never the absolute one)."""
    return issue_session(
        secret_key,
        user_id=data.user_id,
        session_version=data.session_version,
        nonce=data.nonce,
        signed_in_at=data.signed_in_at,
    )


class _NotASession(Exception):
    """A cookie value that is not a session this key signed (never kept by the cache)."""


@lru_cache(maxsize=4096)
def _signed_session(secret_key: str, value: str) -> SessionData:
    """The signature checked and the payload read, once per cookie value (a signed-in user
    sends the same value on every request until it is refreshed). Only valid values are kept:
    a failure raises, and lru_cache keeps no exceptions. Time limits are not checked here."""
    try:
        payload, issued = _serializer(secret_key, SESSION_SALT).loads(value, return_timestamp=True)
        return SessionData(
            user_id=int(payload["u"]),
            session_version=int(payload["v"]),
            nonce=str(payload["n"]),
            signed_in_at=float(payload["t"]),
            issued_at=issued.timestamp(),
        )
    except (BadData, KeyError, TypeError, ValueError):
        raise _NotASession from None


def read_session(secret_key: str, value: str | None) -> SessionData | None:
    """The session in a cookie value, or None when absent, tampered, idle too long or too old."""
    if not value:
        return None
    try:
        data = _signed_session(secret_key, value)
    except _NotASession:
        return None
    now = clock()
    age = int(now) - int(data.issued_at)  # as itsdangerous' max_age check counts it
    if age > SESSION_IDLE_SECONDS or age < 0:
        return None
    if now - data.signed_in_at > SESSION_ABSOLUTE_SECONDS:
        return None
    return data


# --- CSRF -------------------------------------------------------------------------------


def _mac(secret_key: str, message: str) -> str:
    key = hashlib.sha256(b"warmstead-csrf\x00" + secret_key.encode()).digest()
    return hmac.new(key, message.encode(), hashlib.sha256).hexdigest()


def csrf_for_session(secret_key: str, data: SessionData) -> str:
    """The CSRF token of a signed-in session (same for every page of that sign-in)."""
    return _mac(secret_key, f"session|{data.user_id}|{data.session_version}|{data.nonce}")


def new_anon_cookie(secret_key: str) -> tuple[str, str]:
    """(cookie value, nonce) for a visitor without a session."""
    nonce = secrets.token_urlsafe(16)
    return _serializer(secret_key, ANON_SALT).dumps(nonce), nonce


def read_anon_cookie(secret_key: str, value: str | None) -> str | None:
    """The nonce in an anonymous CSRF cookie, or None when absent, tampered or too old."""
    if not value:
        return None
    try:
        nonce = _serializer(secret_key, ANON_SALT).loads(value, max_age=ANON_MAX_AGE_SECONDS)
    except BadData:
        return None
    return nonce if isinstance(nonce, str) and nonce else None


def csrf_for_anon(secret_key: str, nonce: str) -> str:
    """The CSRF token of an anonymous visitor (login form, shared view)."""
    return _mac(secret_key, f"anon|{nonce}")


def tokens_match(expected: str | None, given: object) -> bool:
    """Constant-time comparison; anything but a non-empty string is a mismatch."""
    if not expected or not isinstance(given, str) or not given:
        return False
    return hmac.compare_digest(expected.encode(), given.encode())


# --- cookies and headers ----------------------------------------------------------------


def cookie_header(name: str, value: str, *, max_age: int, secure: bool) -> str:
    """A ``Set-Cookie`` value: HttpOnly, SameSite=Lax, Path=/, Secure when asked."""
    parts = [f"{name}={value}", f"Max-Age={max(0, int(max_age))}", "Path=/", "HttpOnly"]
    parts.append("SameSite=Lax")
    if secure:
        parts.append("Secure")
    return "; ".join(parts)


def session_cookie_header(value: str, *, signed_in_at: float, secure: bool) -> str:
    """The session cookie, kept by the browser until the absolute limit."""
    remaining = SESSION_ABSOLUTE_SECONDS - (clock() - signed_in_at)
    return cookie_header(SESSION_COOKIE, value, max_age=int(remaining), secure=secure)


def expired_cookie_header(name: str, *, secure: bool) -> str:
    """A ``Set-Cookie`` that deletes ``name``."""
    return (
        cookie_header(name, "", max_age=0, secure=secure)
        + "; Expires=Thu, 01 Jan 1970 00:00:00 GMT"
    )


def is_shared_view(path: str) -> bool:
    """The homeowner's read-only pages (``/s/<token>``)."""
    return path == "/s" or path.startswith("/s/")


def security_headers(path: str) -> list[tuple[str, str]]:
    """Headers for every response of ``path`` (Cache-Control is decided by the caller)."""
    return [
        ("Content-Security-Policy", CONTENT_SECURITY_POLICY),
        ("X-Content-Type-Options", "nosniff"),
        ("X-Frame-Options", "DENY"),
        ("Referrer-Policy", "no-referrer" if is_shared_view(path) else "same-origin"),
    ]


def safe_next(target: str | None, default: str = "/houses") -> str:
    """``target`` when it is a path on this site (``/...``), else ``default``.

    Refuses absolute and protocol-relative URLs (``https://x``, ``//x``, ``/\\x``), control
    characters, and the sign-in/out pages themselves.
    """
    if not target or len(target) > 2000:
        return default
    if not target.startswith("/") or target.startswith(("//", "/\\")):
        return default
    if any(ord(ch) < 0x20 or ch == "\\" for ch in target):
        return default
    path = target.split("?", 1)[0]
    if path in ("/login", "/logout"):
        return default
    return target
