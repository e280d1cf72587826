"""Photos follow their house: ``warmstead backup`` / ``restore`` carry the photo directory
(``DEST`` and ``DEST-photos/``), and the house export carries each photo (base64) back in."""

from __future__ import annotations

import base64
import io
from pathlib import Path

import pytest
from fastapi.testclient import TestClient
from PIL import Image

from server.app import create_app
from server.cli import CommandError, backup, migrate, photos_beside, restore
from server.config import Settings
from server.models import Photo, Surface
from server.services import photos as svc
from server.services.photo_store import PhotoStore
from tests.conftest import make_account, sign_in
from tests.web.test_photos import jpeg_with_gps


def _png(width: int, height: int) -> bytes:
    image = Image.new("RGB", (width, height), (250, 250, 250))
    image.paste((200, 30, 30), (10, 10, width // 2, height // 2))
    out = io.BytesIO()
    image.save(out, format="PNG")
    return out.getvalue()


def _client(app) -> TestClient:  # type: ignore[no-untyped-def]
    client = TestClient(app)
    account = make_account(app, firm="Photo firm", email=f"p{id(app)}@photos.invalid")
    sign_in(client, app, account)
    return client


def _house_with_photos(client: TestClient) -> tuple[int, int]:
    made = client.post("/houses", data={"label": "Photo house"}, follow_redirects=False)
    house_id = int(made.headers["location"].rsplit("/", 1)[-1])
    added = client.post(f"/houses/{house_id}/surfaces", follow_redirects=False,
                        data={"typical": "rim-2x10-empty", "kind": "", "area": "100"})  # fmt: skip
    assert added.status_code == 303, added.text[:300]
    surface_id = int(added.headers["location"].split("#")[0].rsplit("/", 1)[-1])
    for data, name, fields in (
        (jpeg_with_gps(2400, 1600), "a.jpg", {"caption": "Rim joist: no insulation",
                                               "surface_id": str(surface_id)}),
        (_png(300, 200), "b.png", {"caption": "Sketch of the crawlspace"}),
    ):  # fmt: skip
        sent = client.post(f"/houses/{house_id}/photos", data=fields, follow_redirects=False,
                           files={"photo": (name, data, "application/octet-stream")})  # fmt: skip
        assert sent.status_code == 303, sent.text[:300]
    return house_id, surface_id


def _files(root: Path) -> dict[str, bytes]:
    return {p.relative_to(root).as_posix(): p.read_bytes() for p in root.rglob("*") if p.is_file()}


def test_backup_and_restore_carry_the_photo_files(tmp_path: Path) -> None:
    url = f"sqlite:///{tmp_path / 'live' / 'warmstead.db'}"
    (tmp_path / "live").mkdir()
    migrate(url)
    app = create_app(Settings(environment="test", database_url=url))
    live_photos = app.state.settings.photo_path()
    assert live_photos == tmp_path / "live" / "photos"  # the default: beside the database file
    with _client(app) as client:
        house_id, _surface = _house_with_photos(client)
        kept = _files(live_photos)
        assert len(kept) == 2
        # a stray file (a photo whose row is gone) is not carried into the backup
        stray = live_photos / "999" / "1" / ("0" * 32 + ".jpg")
        stray.parent.mkdir(parents=True)
        stray.write_bytes(b"left over")
        dest = tmp_path / "backups" / "monday.db"
        summary = backup(dest, database_url=url)
        assert "integrity ok" in summary and "2 photos" in summary
        assert photos_beside(dest) == tmp_path / "backups" / "monday.db-photos"
        assert _files(photos_beside(dest)) == kept
        with pytest.raises(CommandError, match="exists already"):
            backup(dest, database_url=url)
    app.state.engine.dispose()

    # a new place, as after a lost disk: the database and the photos come back together
    new_url = f"sqlite:///{tmp_path / 'new' / 'warmstead.db'}"
    message = restore(dest, database_url=new_url)
    assert "integrity ok" in message and "2 photos" in message
    assert _files(tmp_path / "new" / "photos") == kept
    restored = create_app(Settings(environment="test", database_url=new_url))
    with _client(restored) as other, restored.state.session_factory() as s:
        photos = list(s.query(Photo).order_by(Photo.id))
        assert [p.caption for p in photos] == [
            "Rim joist: no insulation",
            "Sketch of the crawlspace",
        ]
        store = PhotoStore(restored.state.settings.photo_path())
        assert (
            svc.file_of(store, photos[0]).read_bytes()
            == kept[svc.file_of(store, photos[0]).relative_to(store.root).as_posix()]
        )
        # the restored photos belong to their own firm: a new firm's user gets 404
        assert other.get(f"/houses/{house_id}/photos/{photos[0].id}").status_code == 404
    restored.state.engine.dispose()

    # restoring over a photo directory replaces it whole (nothing of the newer state stays)
    (tmp_path / "new" / "photos" / "late.jpg").write_bytes(b"x")
    restore(dest, database_url=new_url, force=True)
    assert _files(tmp_path / "new" / "photos") == kept


def test_a_backup_without_photos_leaves_the_photo_directory_alone(tmp_path: Path) -> None:
    url = f"sqlite:///{tmp_path / 'a.db'}"
    migrate(url)
    dest = tmp_path / "b.db"
    assert "0 photos" in backup(dest, database_url=url)
    photos_beside(dest).rmdir()  # as a backup made before photos existed
    target = tmp_path / "t"
    (target / "photos").mkdir(parents=True)
    (target / "photos" / "keep.jpg").write_bytes(b"kept")
    message = restore(dest, database_url=f"sqlite:///{target / 't.db'}")
    assert "photo directory was left as it is" in message
    assert (target / "photos" / "keep.jpg").read_bytes() == b"kept"


@pytest.fixture
def app(db_url: str, tmp_path: Path):  # type: ignore[no-untyped-def]
    application = create_app(Settings(environment="test", database_url=db_url,
                                      photo_dir=tmp_path / "photos"))  # fmt: skip
    yield application
    application.state.engine.dispose()


def test_export_and_import_carry_the_photos(
    app, client: TestClient, other_client: TestClient
) -> None:  # type: ignore[no-untyped-def]
    house_id, _surface = _house_with_photos(client)
    with app.state.session_factory() as s:
        jpeg, png = s.query(Photo).filter_by(house_id=house_id).order_by(Photo.id).all()
    client.post(f"/houses/{house_id}/photos/{png.id}",
                data={"caption": png.caption, "show_on_share": "1", "include_in_quote": "1"})  # fmt: skip
    exported = client.get(f"/api/v1/houses/{house_id}/document")
    assert exported.status_code == 200
    doc = exported.json()
    entries = doc["photos"]
    assert [(e["caption"], e["surface"], e["show_on_share"], e["include_in_quote"], e["content_type"])
            for e in entries] == [
        ("Rim joist: no insulation", doc["surfaces"][0]["id"], False, False, "image/jpeg"),
        ("Sketch of the crawlspace", None, True, True, "image/png"),
    ]  # fmt: skip
    store = PhotoStore(app.state.settings.photo_path())
    assert base64.b64decode(entries[1]["data"]) == svc.file_of(store, png).read_bytes()
    # without photos: exactly the document calc/house takes
    bare = client.get(f"/api/v1/houses/{house_id}/document?photos=false").json()
    assert "photos" not in bare
    assert client.post("/api/v1/calc/house", json=bare).status_code == 200

    imported = other_client.post("/api/v1/houses", json=doc)
    assert imported.status_code == 201, imported.text
    new_id = imported.json()["id"]
    with app.state.session_factory() as s:
        copies = s.query(Photo).filter_by(house_id=new_id).order_by(Photo.id).all()
        assert [(c.caption, c.show_on_share, c.include_in_quote, c.content_type, c.width, c.height)
                for c in copies] == [
            ("Rim joist: no insulation", False, False, "image/jpeg", 2000, 1333),
            ("Sketch of the crawlspace", True, True, "image/png", 300, 200),
        ]  # fmt: skip
        rim = s.get(Surface, copies[0].surface_id)
        assert rim is not None and rim.house_id == new_id and rim.slug == doc["surfaces"][0]["id"]
        assert copies[1].surface_id is None
        assert copies[0].organization_id != jpeg.organization_id
    png_copy = Image.open(svc.file_of(store, copies[1]))
    assert png_copy.tobytes() == Image.open(svc.file_of(store, png)).tobytes()  # lossless
    assert dict(Image.open(svc.file_of(store, copies[0])).getexif()) == {}
    # the other firm sees its copy and still not the original
    assert other_client.get(f"/houses/{new_id}/photos/{copies[0].id}").status_code == 200
    assert other_client.get(f"/houses/{house_id}/photos/{jpeg.id}").status_code == 404

    broken = {**doc, "photos": [{**entries[0], "data": "not base64!"}]}
    refused = other_client.post("/api/v1/houses", json=broken)
    assert refused.status_code == 422
    assert refused.json()["errors"][0]["field"] == "photos[0].data"
    text = {**doc, "photos": [{**entries[0], "data": base64.b64encode(b"plain text").decode()}]}
    refused = other_client.post("/api/v1/houses", json=text)
    assert refused.status_code == 422 and svc.NOT_AN_IMAGE in refused.json()["detail"]
