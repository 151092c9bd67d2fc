"""CPU-time wrappers shared by the bench scripts' stage splits."""

from __future__ import annotations

import time


def timed(spent: dict[str, float], name: str, fn):
    """``fn`` wrapped so that each call adds its CPU seconds to ``spent[name]``."""
    def wrapper(*args, **kwargs):
        start = time.process_time()
        try:
            return fn(*args, **kwargs)
        finally:
            spent[name] = spent.get(name, 0.0) + time.process_time() - start
    return wrapper
