"""Batch cleaning of whole legacy collections (``normform clean``).

``from normform.batch import clean`` -- see :mod:`normform.batch.runner`.
Loaded lazily: importing the package costs nothing until ``clean`` is used.
"""

from __future__ import annotations


def __getattr__(name: str):
    if name in ("clean", "CleanResult", "CleanError"):
        from normform.batch import runner

        return getattr(runner, name)
    raise AttributeError(f"module 'normform.batch' has no attribute {name!r}")
