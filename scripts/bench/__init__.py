"""The parts of the loopback load test ``scripts/bench_load.py``: the bare comparison page
(:mod:`bench.bare_app`), the servers and their set-up (:mod:`bench.servers`), the load
clients (:mod:`bench.client`) and the printed report (:mod:`bench.report`)."""
