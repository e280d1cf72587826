"""server/security.py on its own: hashes, session cookies, CSRF tokens, next-URL, headers."""

from __future__ import annotations

import base64
import json

import pytest
from argon2 import PasswordHasher

from server import security

SECRET = "unit-test-secret-" + "x" * 24


def test_passwords_are_argon2id_with_the_rfc_9106_defaults() -> None:
    hashed = security.hash_password("a long enough password")
    # argon2-cffi's defaults: RFC 9106 §4 "second recommended option" (64 MiB, 3 passes, 4 lanes)
    assert hashed.startswith("$argon2id$v=19$m=65536,t=3,p=4$")
    assert security.verify_password(hashed, "a long enough password")
    assert not security.verify_password(hashed, "a long enough passworD")
    assert not security.password_needs_rehash(hashed)


def test_weak_or_broken_hashes() -> None:
    weak = PasswordHasher(time_cost=1, memory_cost=1024, parallelism=1).hash("pw-0123456789")
    assert security.verify_password(weak, "pw-0123456789")  # still accepted...
    assert security.password_needs_rehash(weak)  # ...and upgraded at the next sign-in
    assert not security.verify_password("not a hash", "pw")
    assert security.password_needs_rehash("not a hash")


def test_session_round_trip_and_fresh_nonce_per_sign_in() -> None:
    value = security.issue_session(SECRET, user_id=7, session_version=3)
    data = security.read_session(SECRET, value)
    assert data is not None and (data.user_id, data.session_version) == (7, 3)
    again = security.read_session(
        SECRET, security.issue_session(SECRET, user_id=7, session_version=3)
    )
    assert again is not None and again.nonce != data.nonce
    # the CSRF token changes with each sign-in and with the session version...
    token = security.csrf_for_session(SECRET, data)
    assert token != security.csrf_for_session(SECRET, again)
    bumped = security.read_session(
        SECRET, security.issue_session(SECRET, user_id=7, session_version=4, nonce=data.nonce)
    )
    assert bumped is not None and security.csrf_for_session(SECRET, bumped) != token
    # ...but not when the cookie is re-signed (open pages keep working)
    refreshed = security.read_session(SECRET, security.refresh_session(SECRET, data))
    assert refreshed is not None and security.csrf_for_session(SECRET, refreshed) == token
    assert len(token) == 64 and int(token, 16) >= 0  # hex SHA-256


def test_tampered_sessions_are_refused() -> None:
    value = security.issue_session(SECRET, user_id=7, session_version=3)
    payload, stamp, signature = value.split(".")
    # a forged payload naming another user, with the old signature
    forged = base64.urlsafe_b64encode(json.dumps({"u": 1, "v": 3, "n": "x", "t": 0}).encode())
    cases = [
        forged.decode().rstrip("=") + f".{stamp}.{signature}",
        f"{payload}.{stamp}.{signature[:10]}{'A' if signature[10] != 'A' else 'B'}{signature[11:]}",
        f"{payload}.{stamp}.",
        security.issue_session("another key", user_id=7, session_version=3),
        "",
        "....",
        None,
    ]
    for case in cases:
        assert security.read_session(SECRET, case) is None, case
    # the anonymous CSRF cookie is not a session cookie (different salt), and vice versa
    anon_value, nonce = security.new_anon_cookie(SECRET)
    assert security.read_session(SECRET, anon_value) is None
    assert security.read_anon_cookie(SECRET, anon_value) == nonce
    assert security.read_anon_cookie(SECRET, value) is None


def test_idle_and_absolute_limits(monkeypatch: pytest.MonkeyPatch) -> None:
    now = 1_900_000_000.0
    monkeypatch.setattr(security, "clock", lambda: now)
    value = security.issue_session(SECRET, user_id=7, session_version=1)
    # 12 h idle limit: 43 200 s after signing it is still good, one second more it is not
    monkeypatch.setattr(security, "clock", lambda: now + 43_200)
    data = security.read_session(SECRET, value)
    assert data is not None
    monkeypatch.setattr(security, "clock", lambda: now + 43_201)
    assert security.read_session(SECRET, value) is None
    # re-signed at least every 40 000 s (under the idle limit), the session still ends 7 days
    # (604 800 s) after sign-in
    steps = [now + k * 40_000 for k in range(1, 16)] + [now + 604_790]
    for t in steps:
        monkeypatch.setattr(security, "clock", lambda t=t: t)
        current = security.read_session(SECRET, value)
        assert current is not None, t - now
        value = security.refresh_session(SECRET, current)
    monkeypatch.setattr(security, "clock", lambda: now + 604_800)
    assert security.read_session(SECRET, value) is not None  # 10 s idle, exactly 7 days old
    monkeypatch.setattr(security, "clock", lambda: now + 604_801)
    assert security.read_session(SECRET, value) is None  # 11 s idle, but past 7 days


def test_csrf_comparison() -> None:
    nonce = "n" * 22
    token = security.csrf_for_anon(SECRET, nonce)
    assert security.tokens_match(token, token)
    for given in (None, "", token[:-1], token.upper(), 12, ["x"]):
        assert not security.tokens_match(token, given)
    assert not security.tokens_match(None, token) and not security.tokens_match("", "")
    assert security.csrf_for_anon("other secret", nonce) != token


@pytest.mark.parametrize(
    ("target", "expected"),
    [
        ("/houses/3?q=a b", "/houses/3?q=a b"),
        ("/", "/"),
        ("", "/houses"),
        (None, "/houses"),
        ("houses", "/houses"),
        ("//evil.example", "/houses"),
        ("/\\evil.example", "/houses"),
        ("/x\\y", "/houses"),
        ("https://evil.example/", "/houses"),
        ("javascript:alert(1)", "/houses"),
        ("/houses\nSet-Cookie: a=b", "/houses"),
        ("/login?next=/x", "/houses"),
        ("/logout", "/houses"),
        ("/" + "a" * 3000, "/houses"),
    ],
)
def test_safe_next(target: str | None, expected: str) -> None:
    assert security.safe_next(target) == expected


def test_cookie_headers() -> None:
    header = security.cookie_header("n", "v", max_age=60, secure=False)
    assert header == "n=v; Max-Age=60; Path=/; HttpOnly; SameSite=Lax"
    assert security.cookie_header("n", "v", max_age=60, secure=True).endswith("; Secure")
    gone = security.expired_cookie_header("n", secure=False)
    assert gone.startswith("n=; Max-Age=0;") and "Expires=Thu, 01 Jan 1970" in gone


def test_headers_for_shared_and_other_pages() -> None:
    shared = dict(security.security_headers("/s/abc"))
    other = dict(security.security_headers("/houses"))
    assert shared["Referrer-Policy"] == "no-referrer" and other["Referrer-Policy"] == "same-origin"
    for headers in (shared, other):
        assert headers["X-Content-Type-Options"] == "nosniff"
        assert headers["X-Frame-Options"] == "DENY"
        csp = headers["Content-Security-Policy"]
        assert "unsafe-inline" not in csp and "unsafe-eval" not in csp
        assert "frame-ancestors 'none'" in csp
    assert not security.is_shared_view("/settings/x") and not security.is_shared_view("/sx")


def test_the_kept_signature_check_still_applies_every_time_limit(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    # read_session keeps the checked signature per cookie value (security._signed_session);
    # the idle and age limits are still applied on every read, and only valid values are kept.
    now = 1_900_000_000.0
    monkeypatch.setattr(security, "clock", lambda: now)
    value = security.issue_session(SECRET, user_id=8, session_version=2)
    assert security.read_session(SECRET, value) is not None  # checked and kept
    monkeypatch.setattr(security, "clock", lambda: now - 1)  # signed "in the future"
    assert security.read_session(SECRET, value) is None
    monkeypatch.setattr(security, "clock", lambda: now + 43_201)
    assert security.read_session(SECRET, value) is None
    before = security._signed_session.cache_info().currsize
    for forged in (value[:-2] + "xx", value + "a", "not-a-cookie"):
        assert security.read_session(SECRET, forged) is None
    assert security._signed_session.cache_info().currsize == before  # failures never kept
    assert security.read_session("another key", value) is None
