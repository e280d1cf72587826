"""Share links: token strength, only the hash stored, expiry, revoke, views, the read-only view."""

from __future__ import annotations

import base64
import hashlib
import re
from datetime import timedelta

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import select, text

from server.errors import InputError
from server.models import House, Organization, ShareLink, utcnow
from server.services import sharing
from server.services.comparison import compute_house
from server.services.demo import load_demo_house
from server.services.house_document import house_document, import_house
from server.services.houses import create_house
from server.services.library import catalog_for

# --- helpers shared with test_price_book.py and test_quote.py ------------------------------------


def signed_in_org(app, client: TestClient) -> int:  # type: ignore[no-untyped-def]
    """The firm of the signed-in test client (found by letting it make a house)."""
    probe = client.post("/houses", data={"label": "probe house"}, follow_redirects=False)
    assert probe.status_code == 303, probe.text[:300]
    house_id = int(probe.headers["location"].rstrip("/").rsplit("/", 1)[-1])
    with app.state.session_factory() as s:
        return s.get(House, house_id).organization_id  # type: ignore[union-attr]


def demo_house_for(app, organization_id: int) -> int:  # type: ignore[no-untyped-def]
    """The demo house (surfaces, upgrades, two packages) in the given firm."""
    with app.state.session_factory() as s:
        demo_id = load_demo_house(session=s)
        demo = s.get(House, demo_id)
        assert demo is not None
        if demo.organization_id == organization_id:
            s.commit()
            return demo_id
        copy = import_house(session=s, organization_id=organization_id,
                            document=house_document(demo))  # fmt: skip
        copy.label = "Demo copy"
        s.commit()
        return copy.id


def make_link(app, house_id: int, **kwargs) -> str:  # type: ignore[no-untyped-def]
    with app.state.session_factory() as s:
        house = s.get(House, house_id)
        _link, token = sharing.create_link(session=s, organization_id=house.organization_id,  # type: ignore[union-attr]
                                           house_id=house_id, **kwargs)  # fmt: skip
        s.commit()
    return token


def _link_row(app, token: str) -> ShareLink:  # type: ignore[no-untyped-def]
    with app.state.session_factory() as s:
        row = s.scalars(
            select(ShareLink).where(ShareLink.token_hash == sharing.hash_token(token))
        ).one()
        s.expunge(row)
        return row


# --- tests ------------------------------------------------------------------------------------


def test_token_has_256_bits_and_only_its_hash_is_stored(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    org_id = signed_in_org(app, client)
    house_id = demo_house_for(app, org_id)
    page = client.post(
        f"/houses/{house_id}/share-links", data={"label": "Owner", "days_valid": "30"}
    )
    assert page.status_code == 200
    url = re.search(r'id="share-url"[^>]*value="([^"]+)"', page.text).group(1)  # type: ignore[union-attr]
    token = url.rsplit("/s/", 1)[1]
    # base64url without padding: 43 characters carry 32 bytes = 256 bits (>= 128 required)
    raw = base64.urlsafe_b64decode(token + "=" * (-len(token) % 4))
    assert len(raw) * 8 == 256
    with app.state.session_factory() as s:
        rows = s.execute(text("SELECT * FROM share_links")).all()
    assert len(rows) == 1
    stored = " ".join(str(value) for value in rows[0])
    assert token not in stored  # the token itself is written nowhere
    # hashlib (Python's standard library) gives the digest we expect to find
    assert hashlib.sha256(token.encode()).hexdigest() in stored
    assert client.get(url).status_code == 200
    # shown once: the list on a later visit does not carry the token again
    later = client.get(f"/houses/{house_id}/share-links", headers={"HX-Request": "true"}).text
    assert token not in later and "Owner" in later


def test_created_link_shows_a_qr_code_without_inline_styles(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    page = client.post(f"/houses/{house_id}/share-links", data={"days_valid": "7"},
                       headers={"HX-Request": "true"}).text  # fmt: skip
    qr = re.search(r'<svg[^>]*class="qr".*?</svg>', page, re.S)
    assert qr and "style=" not in qr.group(0)  # the CSP is style-src 'self'
    assert "shown only this once" in page


def test_days_valid_outside_1_to_90_is_refused_with_a_message(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    for days in ("0", "91", "ten"):
        r = client.post(f"/houses/{house_id}/share-links", data={"days_valid": days})
        assert r.status_code == 422
        assert "1 to 90" in r.text and f'value="{days}"' in r.text  # input kept
    with app.state.session_factory() as s:
        assert s.scalars(select(ShareLink)).all() == []


def test_expired_revoked_and_unknown_tokens_get_the_same_404(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    expired, revoked = make_link(app, house_id), make_link(app, house_id)
    with app.state.session_factory() as s:
        s.execute(text("UPDATE share_links SET expires_at = :t WHERE token_hash = :h"),
                  {"t": utcnow() - timedelta(seconds=1), "h": sharing.hash_token(expired)})  # fmt: skip
        s.commit()
    row = _link_row(app, revoked)
    r = client.post(f"/houses/{house_id}/share-links/{row.id}/revoke", follow_redirects=False)
    assert r.status_code == 303
    anonymous = TestClient(app)
    bodies = []
    for token in (expired, revoked, "x" * 43, "not a token"):
        r = anonymous.get(f"/s/{token}")
        assert r.status_code == 404
        assert r.headers["referrer-policy"] == "no-referrer"
        bodies.append(r.text)
    assert len(set(bodies)) == 1 and "This link does not work" in bodies[0]


def test_view_count_counts_page_loads_not_toggles(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    token = make_link(app, house_id)
    anonymous = TestClient(app)
    assert anonymous.get(f"/s/{token}").status_code == 200
    assert anonymous.get(f"/s/{token}").status_code == 200
    toggle = anonymous.get(
        f"/s/{token}", params={"pick": "air-seal"}, headers={"HX-Request": "true"}
    )
    assert toggle.status_code == 200
    row = _link_row(app, token)
    assert row.view_count == 2 and row.last_viewed_at is not None
    listing = client.get(f"/houses/{house_id}/share-links", headers={"HX-Request": "true"}).text
    assert '<td class="num">2</td>' in listing


def test_toggles_recompute_without_saving(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    org_id = signed_in_org(app, client)
    house_id = demo_house_for(app, org_id)
    token = make_link(app, house_id)
    with app.state.session_factory() as s:
        house = s.get(House, house_id)
        version, packages = house.version, len(house.packages)  # type: ignore[union-attr]
        doc = house_document(house, extra_package=["attic-r49", "walls-dense-pack"])  # type: ignore[arg-type]
        expected = compute_house(doc, catalog=catalog_for(session=s, organization_id=org_id))
    mine = next(p for p in expected.packages if p.id == "your-selection")
    fragment = TestClient(app).get(f"/s/{token}", params={"pick": ["attic-r49", "walls-dense-pack"]},
                                   headers={"HX-Request": "true"}).text  # fmt: skip
    assert fragment.lstrip().startswith('<div id="shared-body">')  # the fragment alone
    selection = fragment.split('id="selection"', 1)[1]
    # the demo house has bills: the homeowner reads the calibrated savings, the model's beside
    assert mine.calibrated is not None
    assert f"Saves about ${mine.calibrated.annual_savings:,.0f} a year" in selection
    assert f"the model alone says ${mine.annual_savings:,.0f} a year" in selection
    assert f"${mine.net_cost:,.0f}" in selection
    with app.state.session_factory() as s:
        house = s.get(House, house_id)
        assert house.version == version and len(house.packages) == packages  # type: ignore[union-attr]


def test_shared_view_is_read_only_and_says_the_cautions(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    token = make_link(app, house_id)
    page = TestClient(app).get(f"/s/{token}").text
    for firm_path in ('href="/houses', 'href="/library', 'href="/price-book', 'href="/tools',
                      'href="/admin', 'action="/houses', 'href="/login'):  # fmt: skip
        assert firm_path not in page, firm_path
    assert 'method="post"' not in page.lower() and "csrf_token" not in page
    assert page.count("<svg") >= 3  # heat-loss share, annual cost, cash flow
    assert "combustion safety" in page and "vermiculite" in page
    assert (
        "estimates" in page and "locally adopted code" in page and "licensed professionals" in page
    )


def test_another_firm_cannot_list_or_revoke(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    signed_in_org(app, client)
    with app.state.session_factory() as s:
        other = Organization(name="Someone else's firm")
        s.add(other)
        s.flush()
        house = create_house(session=s, organization_id=other.id, label="Not yours")
        link, token = sharing.create_link(session=s, organization_id=other.id, house_id=house.id)
        s.commit()
        other_house, link_id = house.id, link.id
    assert client.get(f"/houses/{other_house}/share-links").status_code == 404
    assert (
        client.post(f"/houses/{other_house}/share-links", data={"days_valid": "5"}).status_code
        == 404
    )
    r = client.post(f"/houses/{other_house}/share-links/{link_id}/revoke", follow_redirects=False)
    assert r.status_code == 404
    with app.state.session_factory() as s:
        assert sharing.resolve_token(session=s, token=token) is not None  # still works
        assert len(s.scalars(select(ShareLink)).all()) == 1


def test_service_refuses_bad_days_and_resolves_only_active_links(session) -> None:  # type: ignore[no-untyped-def]
    org = Organization(name="Service firm")
    session.add(org)
    session.flush()
    house = create_house(session=session, organization_id=org.id, label="A house")
    link, token = sharing.create_link(session=session, organization_id=org.id, house_id=house.id,
                                      days_valid=90)  # fmt: skip
    # limiting case: 90 days is the longest allowed; expiry = now + 90 days (1 minute slack)
    left = sharing._aware(link.expires_at) - utcnow()  # type: ignore[operator]
    assert abs(left.total_seconds() - 90 * 86400) < 60
    assert sharing.resolve_token(session=session, token=token) is link
    tampered = token[:-1] + ("A" if token[-1] != "A" else "B")
    assert sharing.resolve_token(session=session, token=tampered) is None
    for days in (0, 91, -1):
        with pytest.raises(InputError) as caught:
            sharing.create_link(session=session, organization_id=org.id, house_id=house.id,
                                days_valid=days)  # fmt: skip
        assert caught.value.field == "days_valid"
    sharing.revoke(session=session, organization_id=org.id, link_id=link.id)
    assert sharing.resolve_token(session=session, token=token) is None
