"""The Voila dashboard: widgets wired to one state object.

Layers: :mod:`.state` (inputs, validation, recomputation, pinned results) ->
:mod:`.controls` (widgets, labels, messages) -> :mod:`.app` (layout, charts,
headline figures, exports). :mod:`.download` delivers files to the browser;
:mod:`.serve` starts Voila.
"""

import sys as _sys

# A page's kernel imports only what the page uses. Altair validates chart specs with
# jsonschema, which imports every optional format checker that is installed; Jupyter's
# server installs ``rfc3987_syntax`` (for the "iri" formats), which builds a parser at
# import: measured on a 2-core machine, 0.9 s and 17 MB in every kernel. No chart spec
# here has an IRI to check, so a kernel that has not imported jsonschema yet goes
# without it (jsonschema then leaves "iri" formats unchecked, as when it is not installed).
if "jsonschema" not in _sys.modules:
    _sys.modules.setdefault("rfc3987_syntax", None)
