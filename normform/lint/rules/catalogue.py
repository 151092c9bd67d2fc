"""Rules across the entries of one run: ids, see-also targets, consistent citations."""

from __future__ import annotations

from collections import Counter, defaultdict

from normform.lint.refs_facts import items, parsed, work_key
from normform.lint.registry import rule


@rule("duplicate-id", "catalogue", "error", "two entry files have the same id", scope="catalogue")
def duplicate_id(entries, ctx):
    import os

    first: dict[str, object] = {}
    linted = {os.path.abspath(e.path) for e in entries}
    for entry in entries:
        if entry.id is None:
            continue
        named = ctx.known_ids.get(entry.id)   # a file beside it, not in this run, named after the id
        if named and os.path.abspath(named) not in linted:
            yield entry.finding(duplicate_id.rule, f"id {entry.id} is already used by {named}; "
                                "ask the editors for a new id", ("id",))
            continue
        if entry.id in first:
            other = first[entry.id]
            found = entry.finding(duplicate_id.rule, f"id {entry.id} is already used by {other.path}; "
                                  "ask the editors for a new id", ("id",))
            line, col = other.where.line_col(other.where.span(("id",))[0])
            found.related.append((other.path, line, col))
            yield found
        else:
            first[entry.id] = entry


@rule("see-also-missing", "catalogue", "warning", "see_also names an id that no entry has", scope="catalogue")
def see_also_missing(entries, ctx):
    known = {e.id for e in entries if e.id} | set(ctx.known_ids)
    for entry in entries:
        see = entry.data.get("see_also")
        for i, target in enumerate(see if isinstance(see, list) else []):
            if isinstance(target, str) and target not in known:
                yield entry.finding(see_also_missing.rule, f"no entry has the id {target}; "
                                    "correct it or remove it", ("see_also", i))


@rule("reference-cited-differently", "catalogue", "note",
      "entries cite the same work with differently written lines", scope="catalogue")
def reference_cited_differently(entries, ctx):
    groups: dict[tuple, list] = defaultdict(list)
    for entry in entries:
        for item in items(entry):
            if item.text is None:
                continue
            ref = parsed(entry, item)
            if (ref.confidence or 0) < ctx.settings.min_confidence:
                continue
            key = work_key(entry, item)
            if key[0] != "text":
                groups[key].append((entry, item, " ".join(item.text.split())))
    for members in groups.values():
        forms = Counter(text for _, _, text in members)
        if len(forms) < 2:
            continue
        # the most used form wins; ties go to the first in path order
        order = {text: i for i, (_, _, text) in reversed(list(enumerate(members)))}
        main = max(forms, key=lambda t: (forms[t], -order[t]))
        holder = next(e for e, _, t in members if t == main)
        for entry, item, text in members:
            if text != main:
                found = entry.finding(reference_cited_differently.rule,
                                      f"{holder.id or holder.path} cites this work as: {main} -- "
                                      "use one spelling across the catalogue", item.path)
                span = holder.where.span(next(i.path for e, i, t in members if e is holder and t == main))
                line, col = holder.where.line_col(span[0])
                found.related.append((holder.path, line, col))
                yield found
