"""Publishing: the static site, its charts, and the one module that writes the output folder.

Renderers here read only the compiled plan's ``data`` dict (what ``plan.json``
holds) and never recompute physics:

- :mod:`planpack.publish.site` turns compiled plans into ``{relative path: bytes}``;
- :mod:`planpack.publish.charts` draws the SVG charts for it;
- :mod:`planpack.publish.output` swaps a finished tree into the output folder whole;
- :mod:`planpack.publish.pipeline` compiles plans for publishing and renders only what changed.
"""
