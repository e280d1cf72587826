"""Browser tests: the fixtures ``live_server`` (uvicorn subprocess, own SQLite, migrated, demo
house and demo sign-ins loaded), ``browser`` (Debian's chromium via Playwright), ``signed_in``
(storage state of the demo auditor, signed in once through /login) and ``shot_dir`` are defined
in tests/conftest.py, so that tests/security's browser checks share the same server.

A page of a signed-in user: ``browser.new_page(storage_state=signed_in, viewport=...)``;
without ``storage_state`` the page is anonymous and gets the login page (or the shared view).
``tests.conftest.log_in(page, live_server)`` signs a page in through the form.
"""

import pytest  # noqa: E402


@pytest.fixture(scope="session")
def live_db_url(live_server: str, tmp_path_factory: pytest.TempPathFactory) -> str:
    """The live server's SQLite URL (its file is ``live<n>/live.db`` under this run's basetemp)."""
    (db,) = tmp_path_factory.getbasetemp().glob("live[0-9]*/live.db")
    return f"sqlite:///{db}"
