"""Lint catalogue entries before they are accepted (``normform lint``).

Python callers: :mod:`normform.lint.api` (``lint_text``, ``lint_paths``).
Nothing is imported here, so ``normform lint`` starts fast.
"""
