"""ASGI entry point for uvicorn: ``server.main:app``."""

import gc

from server.app import create_app

app = create_app()

# Garbage collection tuned for a server (measured with the compare page of a 40-surface house
# under 32 connections, 1 worker; see scripts/bench_load.py):
# * Everything built so far (modules, routes, schemas, the app) lives as long as the process:
#   freeze it out of the cyclic collector's view. Before this, one full collection took up to
#   79 ms with the compare page's objects in memory, and every request in flight waited it out.
# * A request allocates thousands of objects, almost all freed by reference counting; with the
#   default first threshold (700) the collector ran several times per request. At 10,000 the
#   page served ~10 % more requests per second with a ~15 % lower p99, about what switching
#   the collector off gave; the memory a larger young generation holds is a few MB at most.
gc.collect()
gc.freeze()
gc.set_threshold(10_000, 10, 10)
