"""Choosing the fewest frequencies to ask the spectrum manager for, by integer programming.

One module per job:

- :mod:`~planpack.requests.candidates` — the grid of frequencies that may be asked for
- :mod:`~planpack.requests.physics` — the link budget on candidate frequencies (the one swap point)
- :mod:`~planpack.requests.coverage` — which candidate serves which (link, hour) pair
- :mod:`~planpack.requests.optimise` — the integer programmes (scipy.optimize.milp, HiGHS)
- :mod:`~planpack.requests.windows` — the window around each proposal, and merges
- :mod:`~planpack.requests.reasons` — why a pair no frequency can serve is out of reach
- :mod:`~planpack.requests.engine` — :func:`plan_requests`, the JSON-ready request
- :mod:`~planpack.requests.report` — text and Markdown
- :mod:`~planpack.requests.contract` — the JSON Schema of the request

This file imports nothing, so that the plan reader can use the pure grid
arithmetic of :mod:`~planpack.requests.candidates` without loading the rest.
"""
