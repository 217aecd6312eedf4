"""plantside: what the central plant sees.

Pure, vectorised SI functions for moist air, mixing and economizers, coils,
zone loads, climate and plant sizing, with chart builders and a Voila
dashboard on top. See DEVELOPERS.md for the architecture.
"""

__version__ = "0.1.0"
