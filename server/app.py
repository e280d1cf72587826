"""Application factory: ``create_app(settings)`` builds the FastAPI app."""

from __future__ import annotations

from fastapi import FastAPI, Request
from fastapi.responses import HTMLResponse, JSONResponse
from fastapi.staticfiles import StaticFiles
from starlette.middleware.gzip import GZipMiddleware

from server.api import api_router
from server.api.errors import install_error_handlers
from server.config import ROOT, Settings, get_settings
from server.db import make_engine, make_session_factory
from server.services.houses import NotFound
from server.web import web_router
from server.web.deps import make_templates


def create_app(settings: Settings | None = None) -> FastAPI:
    """Build the app for ``settings``. Creates the engine lazily-connecting; never migrates."""
    settings = settings or get_settings()
    app = FastAPI(
        title="Warmstead", version="0.1.0", summary="Compare insulation upgrades on a house."
    )
    app.state.settings = settings
    app.state.engine = make_engine(settings.database_url, echo=settings.sql_echo)
    app.state.session_factory = make_session_factory(app.state.engine)
    app.state.templates = make_templates()
    install_error_handlers(app)
    app.add_middleware(GZipMiddleware, minimum_size=800)
    app.mount("/static", StaticFiles(directory=str(ROOT / "static")), name="static")
    app.include_router(api_router)
    app.include_router(web_router)

    @app.exception_handler(NotFound)
    async def _not_found(request: Request, _exc: NotFound):  # type: ignore[no-untyped-def]
        if request.url.path.startswith("/api/"):
            return JSONResponse({"detail": "not found", "errors": []}, status_code=404)
        html = app.state.templates.get_template("pages/not_found.html").render(request=request)
        return HTMLResponse(html, status_code=404)

    @app.get("/healthz", include_in_schema=False)
    def healthz() -> dict[str, str]:
        return {"status": "ok"}

    return app
