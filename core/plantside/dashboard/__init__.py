"""The Voila dashboard: widgets wired to one state object.

Layers: :mod:`.state` (inputs, validation, recomputation, pinned results) ->
:mod:`.controls` (widgets, labels, messages) -> :mod:`.app` (layout, charts,
headline figures, exports). :mod:`.download` delivers files to the browser;
:mod:`.serve` starts Voila.
"""
