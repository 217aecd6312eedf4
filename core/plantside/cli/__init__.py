"""The ``plantside`` command line (``python -m plantside.cli``)."""

from plantside.cli.main import main

__all__ = ["main"]
