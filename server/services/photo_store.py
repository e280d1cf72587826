"""The photo directory: one file per photo, outside the database.

Layout: ``<root>/<organization id>/<house id>/<storage key>.<jpg|png>``; the storage key is
random (128 bits), never the uploaded file's name. A file is written to a temporary name in the
same directory, flushed and renamed into place, so a reader never sees half a photo. Directories
are made on first use.

Files follow the database: a photo's new file is removed again when its transaction rolls back,
and a deleted photo's (or house's) files are removed only once the deletion is committed
(:func:`PhotoStore.remove_after_commit`), so a failed commit never leaves a row without a file.
"""

from __future__ import annotations

import os
import secrets
import shutil
from dataclasses import dataclass
from pathlib import Path

from sqlalchemy import event
from sqlalchemy.orm import Session

KEY_BYTES = 16  #: random bytes of a storage key (32 hex characters)
EXTENSIONS = {"image/jpeg": "jpg", "image/png": "png"}
_GONE = "warmstead_photo_paths_gone"  #: session.info: paths to remove after the commit
_NEW = "warmstead_photo_paths_new"  #: session.info: paths to remove after a rollback


def new_storage_key() -> str:
    return secrets.token_hex(KEY_BYTES)


@dataclass(frozen=True)
class PhotoStore:
    """The photo directory at ``root`` (settings: :meth:`server.config.Settings.photo_path`)."""

    root: Path

    def house_dir(self, organization_id: int, house_id: int) -> Path:
        return self.root / str(int(organization_id)) / str(int(house_id))

    def path(self, organization_id: int, house_id: int, key: str, content_type: str) -> Path:
        if not key.isalnum():  # a key is hex: never a path of its own
            raise ValueError("a storage key is letters and digits only")
        name = f"{key}.{EXTENSIONS[content_type]}"
        return self.house_dir(organization_id, house_id) / name

    def write(self, target: Path, data: bytes, *, session: Session | None = None) -> None:
        """Write ``data`` to ``target`` atomically (temporary file, fsync, rename); with a
        ``session`` the file is removed again if that session rolls back."""
        target.parent.mkdir(parents=True, exist_ok=True)
        temporary = target.with_name(f".{target.name}.{os.getpid()}.{secrets.token_hex(4)}")
        try:
            with open(temporary, "xb") as handle:
                handle.write(data)
                handle.flush()
                os.fsync(handle.fileno())
            os.replace(temporary, target)
        finally:
            temporary.unlink(missing_ok=True)
        if session is not None:
            _watch(session)
            session.info.setdefault(_NEW, []).append(target)

    def remove_after_commit(self, session: Session, path: Path) -> None:
        """Remove ``path`` (a file or a house's directory) once ``session`` commits."""
        _watch(session)
        session.info.setdefault(_GONE, []).append(path)


def remove_path(path: Path) -> None:
    if path.is_dir():
        shutil.rmtree(path, ignore_errors=True)
    else:
        path.unlink(missing_ok=True)


def _watch(session: Session) -> None:
    if session.info.get("warmstead_photo_watch"):
        return
    session.info["warmstead_photo_watch"] = True
    event.listen(session, "after_commit", _after_commit)
    event.listen(session, "after_rollback", _after_rollback)


def _after_commit(session: Session) -> None:
    session.info.pop(_NEW, None)  # committed: the new files stay
    for path in session.info.pop(_GONE, []):
        remove_path(path)


def _after_rollback(session: Session) -> None:
    session.info.pop(_GONE, None)  # the rows are back: so are their files
    for path in session.info.pop(_NEW, []):
        remove_path(path)
