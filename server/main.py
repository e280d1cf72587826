"""ASGI entry point for uvicorn: ``server.main:app``."""

import gc

from server.app import create_app

app = create_app()

# Everything built so far (modules, routes, schemas, the app) lives as long as the process:
# move it out of the cyclic collector's view. Full collections then scan only what requests
# made; before this, one took up to 79 ms with the compare page's objects in memory, which
# every request in flight waited out (measured with gc.callbacks under load).
gc.collect()
gc.freeze()
