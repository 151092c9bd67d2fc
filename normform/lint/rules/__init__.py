"""Lint rules, one module per category; see ``normform.lint.registry``."""
