"""Venue names (ISO 4 abbreviation and expansion) and matching against a curated library.

Modules: ``table`` (venue tables), ``iso4`` (abbreviation engine), ``style``
(house style: abbreviate / expand), ``match`` (AuthorityMatcher), ``command``
and ``match_command`` (the ``normform venues`` / ``normform match`` commands).
Nothing is imported here, to keep start-up fast.
"""
