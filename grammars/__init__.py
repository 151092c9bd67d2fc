"""The lark grammars, shipped as package data (``normform.grammars``)."""
