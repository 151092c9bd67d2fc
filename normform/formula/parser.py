"""Text -> :class:`~normform.formula.ast.Statement`.

Three steps: (1) a cheap pre-pass enforces the size and nesting limits and
splits off a trailing attribution note; (2) the LALR grammar
``grammars/formula.lark`` builds raw nodes (an embedded transformer, so no
parse tree is materialised; plain ASCII arithmetic takes a shortcut that calls
the same grammar callbacks, :class:`_FastPath`); (3) :class:`_Resolver` decides
what each name means in context — a function, a sequence term, a variable times
a group, a constant — and assembles conditions, initial values and piecewise
branches.
"""

from __future__ import annotations

import re
import threading
from dataclasses import dataclass
from fractions import Fraction
from operator import itemgetter
from typing import Any

from normform.formula import ast as A
from normform.formula.errors import FormulaError
from normform.formula.functions import ALIASES, lookup

MAX_LENGTH = 5000
"""Longest accepted input, in characters other than spaces (canonical ASCII adds spaces
around ``+``/``-``, so counting them would reject the re-parse of a long valid formula)."""
MAX_RAW_LENGTH = 4 * MAX_LENGTH
"""Longest accepted input counting spaces."""
MAX_DEPTH = 120
"""Deepest accepted nesting: brackets in the text and levels of the tree."""

_parser = None
_builder: "Any" = None
_LARK_ERRORS: tuple = ()  # lark's LarkError, VisitError (imported with the parser)
# ids of built nodes that still contain raw placeholders (names to resolve, applications,
# sums...): the resolver rebuilds only those paths and keeps every clean subtree as it is.
_DIRTY: set[int] = set()
# non-empty when the current parse has an ellipsis `...` (else no sum needs checking for one)
_DOTS_SEEN: list = []


def _get_parser():
    """Build the parser once per process (``import normform`` stays cheap)."""
    global _parser, _builder, _LARK_ERRORS
    if _parser is None:
        import lark
        from lark.exceptions import LarkError, VisitError

        _LARK_ERRORS = (LarkError, VisitError)

        from normform.resources import grammar_text

        _builder = _Build()
        opts = dict(parser="lalr", lexer="basic", transformer=_builder, maybe_placeholders=False)
        try:
            larkp = lark.Lark(grammar_text("formula.lark"), cache=True, **opts)
        except Exception:  # cache directory not writable, etc.
            larkp = lark.Lark(grammar_text("formula.lark"), **opts)
        try:
            _parser = _TableDriver(larkp)
        except Exception:  # lark internals moved: use lark's own driver (same tables, slower)
            _parser = larkp
    return _parser


class _Tok(tuple):
    """A lexer token ``(type, value, start_pos, end_pos)`` with the attributes of lark's
    Token that the callbacks use. A tuple subclass, so that making one (once per token)
    runs no Python ``__init__``."""

    __slots__ = ()
    type = property(itemgetter(0))
    value = property(itemgetter(1))
    start_pos = property(itemgetter(2))
    end_pos = property(itemgetter(3))

    def __str__(self) -> str:
        return self[1]

    def __repr__(self) -> str:
        return f"Token({self[0]!r}, {self[1]!r})"


_new_tok = tuple.__new__


class _SyntaxError(Exception):
    """Raised by the table driver; turned into a FormulaError by parse_statement."""

    def __init__(self, offset: int, text: str, expected: set[str], end: bool = False, char: bool = False):
        super().__init__(text)
        self.offset, self.text, self.expected, self.end, self.char = offset, text, expected, end, char


def _passthrough(rule) -> int | None:
    """Index of the only kept child of an inlined (``?``) rule without alias, else None:
    such a reduction needs no callback (lark's would filter tokens and return that child)."""
    opts = rule.options
    if not opts.expand1 or rule.alias is not None or opts.keep_all_tokens:
        return None
    kept = []
    for i, sym in enumerate(rule.expansion):
        if sym.is_term:
            if not sym.filter_out:
                kept.append(i)
        elif sym.name.startswith("_"):
            return None  # its children would be spliced in
        else:
            kept.append(i)
    return kept[0] if len(kept) == 1 else None


def _direct(rule, builder) -> tuple[Any, tuple[int, ...] | None]:
    """(our callback, kept child positions) when a reduction can call the builder
    directly instead of through lark's wrappers; (None, None) otherwise."""
    opts = rule.options
    name = rule.alias or opts.template_source or rule.origin.name
    if not hasattr(type(builder), name) or hasattr(_LarkTransformer, name):
        return None, None
    if opts.expand1 and not rule.alias:
        return None, None
    if any(not sym.is_term and sym.name.startswith("_") for sym in rule.expansion):
        return None, None  # children of helper rules are spliced in by lark's filter
    if opts.keep_all_tokens:
        return getattr(builder, name), None
    keep = tuple(i for i, sym in enumerate(rule.expansion) if not (sym.is_term and sym.filter_out))
    return getattr(builder, name), (None if len(keep) == len(rule.expansion) else keep)


def _first_chars(regex: str, flags: int) -> list | None:
    """What the first character of a match of ``regex`` can be: a list of tests (a
    character, a (low, high) range, or a one-character pattern such as ``\\d``), or
    None for "anything" (whenever the pattern is not simple enough to tell)."""
    import re

    try:
        from re import _constants as C, _parser as sre
    except ImportError:  # pragma: no cover - older layout
        return None
    if flags & (re.IGNORECASE | re.VERBOSE):
        return None
    cats = {C.CATEGORY_DIGIT: r"\d", C.CATEGORY_SPACE: r"\s", C.CATEGORY_WORD: r"\w"}
    tests: list = []

    def seq(items) -> bool:  # add the tests of a sequence; True if it can match empty
        for op, av in items:
            if op is C.LITERAL:
                tests.append(chr(av))
                return False
            if op is C.IN:
                for iop, iav in av:
                    if iop is C.LITERAL:
                        tests.append(chr(iav))
                    elif iop is C.RANGE:
                        tests.append((chr(iav[0]), chr(iav[1])))
                    elif iop is C.CATEGORY and iav in cats:
                        tests.append(cats[iav])
                    else:
                        raise ValueError
                return False
            if op is C.SUBPATTERN:
                if not seq(av[-1]):
                    return False
            elif op is C.BRANCH:
                empty = False
                for branch in av[1]:
                    empty |= seq(branch)
                if not empty:
                    return False
            elif op in (C.MAX_REPEAT, C.MIN_REPEAT):
                if not seq(av[2]) and av[0] > 0:
                    return False
            elif op is C.AT:
                continue
            else:
                raise ValueError
        return True

    try:
        if seq(sre.parse(regex, flags)):
            return None
    except Exception:
        return None
    return tests


def _can_start(tests: list | None, c: str) -> bool:
    if tests is None:
        return True
    import re

    for t in tests:
        if t.__class__ is tuple:
            if t[0] <= c <= t[1]:
                return True
        elif len(t) == 1:
            if t == c:
                return True
        elif re.fullmatch(t, c):
            return True
    return False


# How the driver performs a reduction (first item of its action tuple).
_R_CALL, _R_ONE, _R_PASS, _R_WRAP, _R_APPEND, _R_APPEND_OP = range(6)
# the same two appends when the rule is left-recursive (``chain: chain OP unit``): the
# state after the reduction is then the one already below the list (the goto of a
# rule's own name from the same state), so the driver only truncates its stack
_R_APPEND_LR, _R_APPEND_OP_LR = 6, 7
# in the driver's tables, every one-child reduction is a _R_RUN (see _TableDriver._run);
# its own kind is then the action tuple's last item
_R_RUN = 8
_ACCEPT = object()  # a run's next action when it completes the parse


def _reduction(rule, builder, lark_callback) -> tuple:
    """The action tuple (kind, size, rule name, callback, extra) of one grammar rule
    (extra: the kept child of a pass-through, or which children a callback gets).

    The list-building callbacks of the builder (first item, append, chain operator)
    are done in place by the driver, and callbacks of one child get the child itself,
    sparing a call and a children list per reduction; everything else calls the
    builder (or lark's wrapper) with the children, as lark would."""
    size, origin = len(rule.expansion), rule.origin.name
    through = _passthrough(rule)
    if through is not None:  # `?rule` with one kept child: the child is the value
        return (_R_PASS, size, origin, None, through)
    method, keep = _direct(rule, builder)
    if method is None:
        return (_R_CALL, size, origin, lark_callback, None)
    func = getattr(method, "__func__", None)
    kept = size if keep is None else len(keep)
    if func in (_Build.list_first, _Build.signs_first) and kept == 1 and size == 1:
        return (_R_WRAP, size, origin, None, None)
    if func is _Build.chain_first and size == 1:
        return (_R_WRAP, size, origin, None, None)
    # a left-recursive rule (its first child is its own name): see _R_APPEND_LR
    lr = origin != "start" and not rule.expansion[0].is_term and rule.expansion[0].name == origin
    if func in (_Build.list_more, _Build.signs_more, _Build.chain_juxt) and kept == 2 \
            and (size == 2 or (size == 3 and keep == (0, 2))):
        return (_R_APPEND_LR if lr else _R_APPEND, size, origin, None, None)
    if func is _Build.chain_op and size == 3 and keep is None:
        return (_R_APPEND_OP_LR if lr else _R_APPEND_OP, size, origin, None, None)
    if keep is not None:  # which children the callback gets: a slice, or an itemgetter (a tuple)
        keep = slice(keep[0], keep[0] + 1) if len(keep) == 1 else (slice(0, 0) if not keep else itemgetter(*keep))
    if size == 1 and keep is None:
        one = {_Build.expr: _climb, _Build.body: _climb, _Build.integer: builder.integer_t,
               _Build.name: builder.name_t, _Build.rel: builder.rel_one, _Build.seg: builder.seg_one,
               _Build.start: builder.start_one}.get(func)
        if one is not None:
            return (_R_ONE, size, origin, one, None)
    return (_R_CALL, size, origin, method, keep)


class _TableDriver:
    """A small LALR(1) driver over lark's own parse tables, lexer terminals and rule
    callbacks for this grammar. Same tables and tree as ``lark.Lark.parse``, without
    its per-token bookkeeping (line counters, interactive-parser hooks, Token objects
    with line/column): several times faster on short formulas. Tests compare both.
    ``parse`` first offers the text to :class:`_FastPath`; ``parse_tables`` is the
    table driver alone."""

    def __init__(self, larkp):
        import re

        from lark.parsers.lalr_analysis import Shift

        self.lark = larkp
        table = larkp.parser.parser.parser.parse_table
        callbacks = larkp.parser.parser.parser.callbacks
        n = max(table.states) + 1
        if set(table.states) != set(range(n)):
            raise ValueError("unexpected state numbering")
        # actions[state][terminal]: an int = shift to that state, a tuple = reduce;
        # gotos[state][rule name]: the state after a reduction.
        self.actions: list[dict[str, Any]] = [{} for _ in range(n)]
        self.gotos: list[dict[str, int]] = [{} for _ in range(n)]
        self.expected: list[set[str]] = [set() for _ in range(n)]
        reductions: dict = {}
        for state, row in table.states.items():
            acts, gotos = self.actions[state], self.gotos[state]
            for sym, (action, arg) in row.items():
                terminal = sym.isupper() or sym.startswith("__ANON")
                if terminal:
                    self.expected[state].add(sym)
                if action is Shift:
                    (acts if terminal or sym == "$END" else gotos)[sym] = arg
                else:  # (kind, size, rule name, callback, extra, {state below: run})
                    red = reductions.get(id(arg))  # (one per rule: many actions share a rule)
                    if red is None:
                        red = reductions[id(arg)] = _reduction(arg, larkp.options.transformer, callbacks[arg])
                    # (a one-child reduction: run kind first, its own kind last)
                    acts[sym] = (_R_RUN,) + red[1:] + ({}, red[0]) if red[1] == 1 else red + ({},)
        self.start = table.start_states["start"]
        self.end = table.end_states["start"]
        lexer = larkp.parser.lexer
        scanner = lexer.scanner  # builds the compiled patterns
        mres = list(scanner._mres)
        if len(mres) != 1:
            raise ValueError("unexpected lexer layout")
        self.ignore = frozenset(lexer.ignore_types)
        # keywords lexed as NAME are re-typed (lark does this with a callback and a regex;
        # a dict of the same keyword strings is quicker)
        self.keywords: dict[str, dict[str, str]] = {}
        for typ, callback in lexer.callback.items():
            terms = callback.scanner.terminals
            if not all(t.pattern.type == "str" for t in terms):
                raise ValueError("unexpected lexer callback")
            self.keywords[typ] = {t.pattern.value: t.name for t in terms}
        self.special: dict[str, Any] = dict(self.keywords)
        self.special.update((t, None) for t in self.ignore)
        # The lexer: lark's one alternation of all terminals (in lark's priority order),
        # split by first character. At each position only the terminals that can start
        # with that character are tried, in the same order, so the first match is the
        # one lark's alternation gives; a character no terminal can start is an error.
        self.flags = mres[0].flags
        self.terms = [(t.name, t.pattern.to_regexp(), t.pattern.max_width) for t in scanner.terminals]
        joined = "|".join(f"(?P<{name}>{rx})" for name, rx, _ in self.terms)
        if joined != mres[0].pattern:
            raise ValueError("unexpected lexer pattern")
        self.firsts = [_first_chars(rx, self.flags) for _, rx, _ in self.terms]
        # filled on first sight of each character (parse() calls _bucket): building all
        # of printable ASCII up front compiled ~100 patterns at start-up
        self.dispatch: dict[str, Any] = {}
        self._bucket(" ")
        self.fast: _FastPath | None = None
        try:
            self.fast = _FastPath(self)
        except Exception:  # a grammar whose lexer differs: the tables alone
            self.fast = None

    def _run(self, key: tuple) -> tuple:
        """The run of one-child reductions the table prescribes with state ``key[1]`` on
        top of state ``key[0]`` and lookahead ``key[2]``: (the value functions in order,
        the state after them, the state the lookahead is then shifted to or None, else
        the table's next action there). Such reductions pop one state and expose the same
        ``key[0]``, so the run depends only on the key; it is read off the table once, on
        first use, and kept in the action tuple. The callbacks still run on every parse:
        only the table walk is remembered."""
        below, state, typ = key
        funcs: list = []
        while True:
            act = self.actions[state].get(typ)
            if act is None or act.__class__ is int or act[0] != _R_RUN:
                break
            _, _, origin, callback, keep, _, kind = act
            if kind == _R_ONE:
                funcs.append(callback)
            elif kind == _R_WRAP:
                funcs.append(None)  # None: wrap the value in a list (done in line by the driver)
            elif kind == _R_PASS:
                pass  # the child is the value
            elif keep is None:
                funcs.append(lambda v, f=callback: f([v]))
            else:  # the only child is a filtered token
                funcs.append(lambda v, f=callback: f([]))
            state = self.gotos[below][origin]
            if state == self.end and typ == "$END":
                break
        # a chain of one operand is wrapped in a list, then unwrapped by _climb: skip both
        i = 0
        while i < len(funcs) - 1:
            if funcs[i] is None and funcs[i + 1] is _climb:
                del funcs[i:i + 2]
            else:
                i += 1
        # the commonest runs become one callable (the driver calls it without a loop)
        b = self.lark.options.transformer
        fused = {(b.integer_t, None): b.integer_t_list, (b.name_t, None): b.name_t_list,
                 (None,): _wrap, (b.rel_one, b.seg_one): b.seg_chain,
                 (b.rel_one, b.seg_one, None): b.segs_chain,
                 (b.rel_one, b.seg_one, None, b.start_one): b.start_chain,
                 (_climb, None): _climb_list,
                 (_climb, None, b.rel_one, b.seg_one, None, b.start_one): b.start_expr}
        funcs = tuple(funcs)
        if funcs in fused:
            funcs = fused[funcs]
        elif not funcs:
            funcs = None  # only pass-throughs: the value stays
        elif len(funcs) == 1:
            funcs = funcs[0]
        else:
            funcs = _compose(funcs)
        if state == self.end and typ == "$END":
            return (funcs, state, None, _ACCEPT)
        after = self.actions[state].get(typ)
        if after.__class__ is int:
            return (funcs, state, after, None)
        return (funcs, state, None, after)

    def _bucket(self, c: str) -> Any:
        """What to do at character ``c``: a terminal name (a one-character token that no
        other terminal can start), "" (white space that only the ignored ``\\s+`` can
        start: skipped one character at a time, as ``\\s+`` would skip the run), or the
        ``match`` of a pattern of the terminals that can start so, one named group each
        (one that never matches when no terminal can)."""
        import re

        cands = [t for t, first in zip(self.terms, self.firsts) if _can_start(first, c)]
        ignored = any(t[0] in self.ignore for t in cands)
        if not cands:
            entry: Any = _NO_MATCH
        elif len(cands) == 1 and ignored and cands[0][1] == r"\s+" and c.isspace():
            entry = ""
        elif len(cands) == 1 and not ignored and cands[0][2] == 1 and cands[0][0] not in self.keywords \
                and re.fullmatch(cands[0][1], c, self.flags):
            entry = cands[0][0]
        else:
            entry = re.compile("|".join(f"(?P<{name}>{rx})" for name, rx, _ in cands), self.flags).match
        self.dispatch[c] = entry
        return entry

    # -- the shortcut for plain ASCII arithmetic (see _FastPath)
    def parse(self, text: str):
        fast = self.fast
        if fast is not None and fast.accepts(text):
            try:
                return fast.parse(text)
            except Exception:  # anything it does not expect: the tables decide (and say what is wrong)
                self.lark.options.transformer.reset()
        return self.parse_tables(text)

    def parse_tables(self, text: str):
        actions, gotos = self.actions, self.gotos
        stack: list = [self.start]
        row = actions[self.start]
        accept = self.end
        R_RUN, R_APPEND_OP_LR, R_APPEND_LR, R_APPEND_OP, R_PASS, R_APPEND = \
            _R_RUN, _R_APPEND_OP_LR, _R_APPEND_LR, _R_APPEND_OP, _R_PASS, _R_APPEND
        ACCEPT = _ACCEPT
        dispatch = self.dispatch
        # retyped after a pattern match: keywords lexed as NAME (lark does this with a
        # callback; a dict of the same keyword strings is quicker) and ignored terminals (None)
        special = self.special
        space = " " if dispatch.get(" ") == "" else None  # when the grammar ignores spaces
        new, Tok = _new_tok, _Tok
        pos, n = 0, len(text)
        while True:
            # -- the next token (the lexer, done in line: one loop for both)
            if pos < n:
                c = text[pos]
                if c == space:  # the commonest white space (others go through the table)
                    pos += 1
                    continue
                try:
                    entry = dispatch[c]
                except KeyError:
                    entry = self._bucket(c)
                if entry.__class__ is str:
                    if not entry:  # white space
                        pos += 1
                        continue
                    typ = entry  # a one-character token
                    tok = new(Tok, (typ, c, pos, pos + 1))
                    pos += 1
                else:
                    m = entry(text, pos)
                    if m is None:  # a character no terminal starts with: say what this state accepts
                        raise _SyntaxError(pos, c, self.expected[stack[-1]], char=True)
                    typ = m.lastgroup
                    end = m.end()
                    value = text[pos:end]
                    if typ in special:
                        kw = special[typ]
                        if kw is None:  # ignored
                            pos = end
                            continue
                        typ = kw.get(value, typ)
                    tok = new(Tok, (typ, value, pos, end))
                    pos = end
            else:
                typ = "$END"
                tok = new(Tok, (typ, "", n, n))
            # -- the LALR actions for it. One stack [state, value, state, value, ..., state]:
            # a shift pushes (token, state); a reduction of n children replaces the top 2n
            # items by (value, goto state).
            act = row.get(typ)
            while True:
                if act.__class__ is int:  # shift
                    stack += (tok, act)
                    row = actions[act]
                    break
                if act is None:
                    raise _SyntaxError(tok[2], tok[1], self.expected[stack[-1]], end=typ == "$END")
                kind = act[0]
                if kind == R_RUN:  # a run of one-child reductions, all in one step
                    below = stack[-3]
                    try:
                        funcs, stack[-1], target, act = act[5][below]
                    except KeyError:  # (the action fixes the state and the lookahead)
                        run = act[5][below] = self._run((below, stack[-1], typ))
                        funcs, stack[-1], target, act = run
                    if funcs is not None:
                        stack[-2] = funcs(stack[-2])
                    if target is not None:  # the table then shifts the lookahead
                        stack += (tok, target)
                        row = actions[target]
                        break
                    if act is ACCEPT:
                        return stack[-2]
                    continue  # with the table's next action there
                if kind == R_APPEND_OP_LR:  # chain OP unit: append both to the chain list
                    value = stack[-6]
                    value.append(stack[-4])
                    value.append(stack[-2])
                    del stack[-4:]  # the chain's own state is the goto state
                    act = actions[stack[-1]].get(typ)
                    continue
                if kind == R_APPEND_LR:  # list item (or list SEP item): append in place
                    size = act[1]
                    stack[-2 * size].append(stack[-2])
                    del stack[2 - 2 * size:]
                    act = actions[stack[-1]].get(typ)
                    continue
                _, size, origin, callback, keep, _ = act
                if kind == R_PASS:  # `?rule` with one kept child: the child is the value
                    value = stack[2 * (keep - size)]
                elif kind == R_APPEND_OP:
                    value = stack[-6]
                    value.append(stack[-4])
                    value.append(stack[-2])
                elif kind == R_APPEND:
                    value = stack[-2 * size]
                    value.append(stack[-2])
                elif size:
                    children = stack[-2 * size::2]
                    if keep is not None:  # drop punctuation tokens, as lark's child filter does
                        children = children[keep] if keep.__class__ is slice else keep(children)
                    value = callback(children)
                else:
                    value = callback([])
                if size:
                    del stack[-2 * size:]
                state = gotos[stack[-1]][origin]
                stack += (value, state)
                if state == accept and typ == "$END":
                    return value
                act = actions[state].get(typ)
        raise AssertionError("parser stopped before the end")  # pragma: no cover


def _wrap(value: Any) -> list:
    return [value]


def _compose(funcs: tuple) -> Any:
    """One callable for a run of value functions (None: wrap the value in a list)."""
    def run(value: Any) -> Any:
        for f in funcs:
            value = [value] if f is None else f(value)
        return value
    return run


_NO_MATCH = re.compile("(?!)").match  # the lexer entry of a character no terminal starts with


class _NotPlain(Exception):
    """Raised by _FastPath on input outside its shape."""


class _FastPath:
    """The commonest formulas — plain ASCII arithmetic: numbers, names, ``+ - * / ^ ** mod``,
    signs, implicit products, brackets ``( )``, calls ``f(a, b)``, sums and products in
    call form ``sum(k=0..n, ...)``, ``!`` and ``!!``, ``=`` chains, comma-separated
    clauses — read without the LALR tables: one regex call splits the text, and a small
    recursive reader of that shape calls the SAME grammar callbacks (same nodes, spans,
    side effects, in the same order) as the table driver would. Any other character,
    keyword or token order raises, and the text goes to the table driver: so every error
    still comes from the grammar, and the grammar stays the definition (tests compare
    both readers on random text of this alphabet). About 1.4x quicker than the tables on
    such text, callbacks included.

    Its terminal names are read off the driver's lexer and rules, never assumed."""

    # only these characters (one space as the only white space; no `_`, `[`, `{`, `<`,
    # `>`, `|`, unicode: the terminals that need them — subscripts, lists, other
    # relations, divisor sums, Unicode operators — are left to the tables; `.` only in
    # `..`, so that no decimal, label, `...` or final `.` can occur)
    _ALPHABET = re.compile(r"[A-Za-z0-9 +\-*/^(),!=.]*")
    _TOKENS = re.compile(r"( *)([0-9]+|[A-Za-z][A-Za-z0-9]*|\*\*|!!|\.\.|[-+*/^(),!=])")
    _FIXED = ("**", "!!", "..", "+", "-", "*", "/", "^", "(", ")", ",", "!", "=")

    def __init__(self, driver: "_TableDriver"):
        def lex(s: str) -> list:  # the driver's own lexer on a sample
            out, pos = [], 0
            while pos < len(s):
                entry = driver.dispatch.get(s[pos]) or driver._bucket(s[pos])
                if entry.__class__ is str:
                    out.append((entry, s[pos]))
                    pos += 1
                    continue
                m = entry(s, pos)
                out.append((m.lastgroup, m.group()))
                pos = m.end()
            return out

        self.fixed = {}
        for lexeme in self._FIXED:
            [(typ, value)] = lex(lexeme)
            if value != lexeme:
                raise ValueError("unexpected lexer")
            self.fixed[lexeme] = typ
        ((self.INT, _),) = lex("7")
        ((self.NAME, _),) = lex("x")
        if lex("x7y") != [(self.NAME, "x7y")] or lex("12") != [(self.INT, "12")]:
            raise ValueError("unexpected lexer")
        self.keywords = driver.keywords.get(self.NAME, {})
        self.MOD = self.keywords.get("mod")
        # the words of rule `bigop` (sum, prod...) that this alphabet can spell
        words = {r.expansion[0].name for r in driver.lark.rules if r.origin.name == "bigop"}
        self.bigops = frozenset(t for t in self.keywords.values() if t in words)
        self.allowed = self.bigops | {self.MOD}  # the keywords the reader knows
        f = self.fixed
        self.LPAR, self.RPAR, self.COMMA = f["("], f[")"], f[","]
        self.BANG, self.BANG2, self.EQUAL, self.RANGE = f["!"], f["!!"], f["="], f[".."]
        self.signs = frozenset((f["+"], f["-"]))
        self.ops = frozenset((f["+"], f["-"], f["*"], f["/"], f["^"], f["**"], self.MOD))
        self.starts = frozenset((self.INT, self.NAME, self.LPAR)) | self.bigops
        # the only terminal of higher priority that this alphabet can spell: `(mod`
        modparen = [rx for name, rx, _ in driver.terms if name == "MODPAREN"]
        self.modparen = re.compile(modparen[0], driver.flags).search if modparen else None
        self.builder = driver.lark.options.transformer
        self.read_chain, self.read_args = self._reader()

    def accepts(self, text: str) -> bool:
        if self._ALPHABET.fullmatch(text) is None:
            return False
        if "=" in text and ("==" in text or "!=" in text):  # (congruence, not-equal)
            return False
        if "." in text and (text.count(".") != 2 * text.count("..") or "..." in text):
            return False
        return self.modparen is None or "mod" not in text or self.modparen(text) is None

    def parse(self, text: str):
        """(label, clauses) as the table driver returns them, or raise."""
        fixed, keywords, INT, NAME, allowed = self.fixed, self.keywords, self.INT, self.NAME, self.allowed
        # tokens are plain tuples (type, value, start, end) here; the reader makes a _Tok of
        # those a callback or a chain keeps (integer_t and name_t only index theirs)
        toks: list = []
        append = toks.append
        pos = 0
        for space, lexeme in self._TOKENS.findall(text):
            if space:
                pos += len(space)
            end = pos + len(lexeme)
            typ = fixed.get(lexeme)
            if typ is None:
                if lexeme[0] <= "9":
                    typ = INT
                else:
                    typ = keywords.get(lexeme, NAME)
                    if typ is not NAME and typ not in allowed:
                        raise _NotPlain(lexeme)  # `for`, `if`, `with`...: clause words
            append((typ, lexeme, pos, end))
            pos = end
        append(("$END", "", len(text), len(text)))
        # start: segments; segments: segment ("," segment)*; segment: rel;
        # rel: relchain; relchain: expr ("=" expr)*
        b, read_chain, EQUAL, COMMA = self.builder, self.read_chain, self.EQUAL, self.COMMA
        segs = []
        i = 0
        while True:
            rel: list = []
            while True:
                chain: list = []
                i = read_chain(toks, i, chain)
                rel.append(chain[0] if len(chain) == 1 else _climb(chain))  # (as _climb does)
                if toks[i][0] != EQUAL:
                    break
                rel.append(b.relop([_new_tok(_Tok, toks[i])]))
                i += 1
            typ = toks[i][0]
            if typ == "$END" and not segs:
                return b.start_chain(rel)
            segs.append(b.seg_one(b.rel_one(rel)))
            if typ == "$END":
                return b.start_one(segs)
            if typ != COMMA:
                raise _NotPlain(i)
            i += 1

    def _reader(self):
        """The readers of `chain` (the grammar's flat arithmetic chain, see formula.lark)
        and of `args`: ``read_chain(toks, i, chain)`` appends the chain's items from token
        ``i`` on to ``chain`` and returns the index of the token after it;
        ``read_args(toks, i)`` reads the arguments after a "(" up to its ")" and returns
        (the index after the ")", the argument list)."""
        INT, NAME, LPAR, RPAR, COMMA = self.INT, self.NAME, self.LPAR, self.RPAR, self.COMMA
        BANG, BANG2, EQUAL, RANGE = self.BANG, self.BANG2, self.EQUAL, self.RANGE
        signs, ops, starts, bigops = self.signs, self.ops, self.starts, self.bigops
        b = self.builder
        integer_t, name_t, apply, factorial, double_factorial = \
            b.integer_t, b.name_t, b.apply, b.factorial, b.double_factorial
        bigop, bigop_call, range_sep = b.bigop, b.bigop_call, b.range_sep
        arg_eq, arg_range, arg_range_bare = b.arg_eq, b.arg_range, b.arg_range_bare
        new, Tok = _new_tok, _Tok

        def read_expr(toks: list, i: int) -> tuple[int, Any]:
            chain: list = []
            i = read_chain(toks, i, chain)
            return i, (chain[0] if len(chain) == 1 else _climb(chain))  # (as _climb does)

        def read_args(toks: list, i: int) -> tuple[int, list]:
            # args: arg ("," arg)*; arg: expr | expr "=" expr | expr "=" expr range_sep expr
            #                                | expr range_sep expr
            args = []
            while True:
                i, arg = read_expr(toks, i)
                typ = toks[i][0]
                if typ == EQUAL:
                    i, second = read_expr(toks, i + 1)
                    typ = toks[i][0]
                    if typ == RANGE:
                        sep = range_sep([new(Tok, toks[i])])
                        i, third = read_expr(toks, i + 1)
                        arg = arg_range([arg, second, sep, third])
                        typ = toks[i][0]
                    else:
                        arg = arg_eq([arg, second])
                elif typ == RANGE:
                    sep = range_sep([new(Tok, toks[i])])
                    i, second = read_expr(toks, i + 1)
                    arg = arg_range_bare([arg, sep, second])
                    typ = toks[i][0]
                args.append(arg)
                i += 1
                if typ == RPAR:
                    return i, args
                if typ != COMMA:
                    raise _NotPlain(i)

        def read_chain(toks: list, i: int, chain: list) -> int:
            # chain: [signs] unit, then (OP [signs] unit | unit)*, as the grammar's rules
            tok = toks[i]
            typ = tok[0]
            while typ in signs:
                chain.append(new(Tok, tok))
                i += 1
                tok = toks[i]
                typ = tok[0]
            while True:
                # a unit: INT, NAME, NAME "(" args ")", "(" expr ")", bigop "(" args ")"
                if typ == INT:
                    chain.append(integer_t(tok))
                    i += 1
                elif typ == NAME:
                    if toks[i + 1][0] != LPAR:
                        chain.append(name_t(tok))
                        i += 1
                    else:  # (A1) NAME "(" is always an application
                        i, args = read_args(toks, i + 2)
                        chain.append(apply([new(Tok, tok), args]))
                elif typ == LPAR:
                    inner: list = []
                    i = read_chain(toks, i + 1, inner)
                    if toks[i][0] != RPAR:
                        raise _NotPlain(i)
                    chain.append(inner[0] if len(inner) == 1 else _climb(inner))
                    i += 1
                elif typ in bigops and toks[i + 1][0] == LPAR:
                    op = bigop([new(Tok, tok)])
                    i, args = read_args(toks, i + 2)
                    chain.append(bigop_call([op, args]))
                else:
                    raise _NotPlain(i)
                tok = toks[i]
                typ = tok[0]
                while typ == BANG or typ == BANG2:  # postfix, on the unit
                    chain[-1] = (factorial if typ == BANG else double_factorial)([chain[-1]])
                    i += 1
                    tok = toks[i]
                    typ = tok[0]
                if typ in ops:
                    chain.append(new(Tok, tok))
                    i += 1
                    tok = toks[i]
                    typ = tok[0]
                    while typ in signs:
                        chain.append(new(Tok, tok))
                        i += 1
                        tok = toks[i]
                        typ = tok[0]
                elif typ not in starts:  # (else a unit right after a unit: an implicit product)
                    return i

        return read_chain, read_args


# ------------------------------------------------------------ raw nodes -----
# Intermediate objects produced by the grammar, replaced by the resolver.

class _Raw:
    """Base of the raw nodes: plain slotted objects (built once per parse, never hashed
    or compared, so they skip the cost of a frozen dataclass's __init__)."""

    __slots__ = ()

    def __repr__(self) -> str:
        return f"{type(self).__name__}({', '.join(repr(getattr(self, s)) for s in self.__slots__)})"


class _Name(_Raw):
    __slots__ = ("name", "span")

    def __init__(self, name: str, span: A.Span):
        self.name, self.span = name, span


class _Apply(_Raw):
    __slots__ = ("name", "args", "span")

    def __init__(self, name: str, args: tuple, span: A.Span):
        self.name, self.args, self.span = name, args, span


class _Sub(_Raw):
    __slots__ = ("name", "indices", "span")

    def __init__(self, name: str, indices: tuple, span: A.Span):
        self.name, self.indices, self.span = name, indices, span


class _Arg(_Raw):
    __slots__ = ("kind", "parts", "span")  # kind: "eq", "range", "range_bare", "ge", "div"

    def __init__(self, kind: str, parts: tuple, span: A.Span):
        self.kind, self.parts, self.span = kind, parts, span


class _BraceList(_Raw):
    __slots__ = ("items", "span")

    def __init__(self, items: tuple, span: A.Span):
        self.items, self.span = items, span


class _DotsMark(_Raw):
    __slots__ = ("span",)

    def __init__(self, span: A.Span):
        self.span = span


class _Bound(_Raw):
    __slots__ = ("kind", "var", "parts", "span")  # kind: "eq", "ge", "gt", "div", "chain", "range", "var"

    def __init__(self, kind: str, var: str | None, parts: tuple, span: A.Span):
        self.kind, self.var, self.parts, self.span = kind, var, parts, span


class _BigSub(_Raw):
    __slots__ = ("op", "bound", "sup", "body", "span")

    def __init__(self, op: str, bound: _Bound, sup: Any, body: Any, span: A.Span):
        self.op, self.bound, self.sup, self.body, self.span = op, bound, sup, body, span


class _BigCall(_Raw):
    __slots__ = ("op", "args", "span")

    def __init__(self, op: str, args: tuple, span: A.Span):
        self.op, self.args, self.span = op, args, span


class _Rel(_Raw):
    __slots__ = ("ops", "operands", "modulus", "mod_span", "span")

    def __init__(self, ops: tuple, operands: tuple, modulus: Any, mod_span: A.Span | None, span: A.Span):
        self.ops, self.operands, self.modulus, self.mod_span, self.span = ops, operands, modulus, mod_span, span


class _Seg(_Raw):
    __slots__ = ("kind", "rel", "tails", "span")  # kind: "seg", "with", "for", "if"

    def __init__(self, kind: str, rel: Any, tails: tuple, span: A.Span):
        # tails: (("for"|"if"|"otherwise"|"with", cond or None), ...)
        self.kind, self.rel, self.tails, self.span = kind, rel, tails, span


# what a chain item or a callback child is when it is not a token
_NODES = (A.Node, _Raw)


def _t(tok: Any) -> str:
    """Text of a lark token (plain lark tokens are str; lark-cython tokens are not)."""
    return tok.value


def _sp(x: Any) -> A.Span:
    if isinstance(x, _NODES):  # (a getattr that misses costs a caught AttributeError)
        return x.span
    span = getattr(x, "span", None)
    if span is not None:
        return span
    start = getattr(x, "start_pos", None)
    if start is not None:
        return (start, x.end_pos)
    return A.NO_SPAN


def _join(*items: Any) -> A.Span:
    lo, hi = None, None
    for item in items:
        if item is None:
            continue
        span = _sp(item)
        if span == A.NO_SPAN:
            continue
        if lo is None:
            lo, hi = span
        else:
            if span[0] < lo:
                lo = span[0]
            if span[1] > hi:
                hi = span[1]
    return A.NO_SPAN if lo is None else (lo, hi)


# Fast node constructors for the hot path. A frozen dataclass's __init__ sets each
# field through object.__setattr__; filling the instance dict directly gives the same
# object (same fields, ==, hash and repr) about four times quicker, and building
# nodes is a large share of a parse. Every field is set, in the dataclass's order.
_new = object.__new__


def _symbol(name: str, span: A.Span) -> A.Symbol:
    o = _new(A.Symbol)
    d = o.__dict__
    d["name"] = name
    d["span"] = span
    return o


def _integer(value: int, span: A.Span) -> A.Integer:
    o = _new(A.Integer)
    d = o.__dict__
    d["value"] = value
    d["span"] = span
    return o


def _constant(name: str, written: str, span: A.Span) -> A.Constant:
    o = _new(A.Constant)
    d = o.__dict__
    d["name"] = name
    d["written"] = written
    d["span"] = span
    return o


def _binop(op: str, left: Any, right: Any, implicit: bool, span: A.Span) -> A.BinOp:
    o = _new(A.BinOp)
    d = o.__dict__
    d["op"] = op
    d["left"] = left
    d["right"] = right
    d["implicit"] = implicit
    d["span"] = span
    return o


def _power(base: Any, exponent: Any, span: A.Span) -> A.Power:
    o = _new(A.Power)
    d = o.__dict__
    d["base"] = base
    d["exponent"] = exponent
    d["span"] = span
    return o


def _unary(op: str, operand: Any, span: A.Span) -> A.UnaryOp:
    o = _new(A.UnaryOp)
    d = o.__dict__
    d["op"] = op
    d["operand"] = operand
    d["span"] = span
    return o


def _factorial(operand: Any, double: bool, span: A.Span) -> A.Factorial:
    o = _new(A.Factorial)
    d = o.__dict__
    d["operand"] = operand
    d["double"] = double
    d["span"] = span
    return o


def _call(name: str, args: tuple, written: str, span: A.Span) -> A.Call:
    o = _new(A.Call)
    d = o.__dict__
    d["name"] = name
    d["args"] = args
    d["written"] = written
    d["span"] = span
    return o


def _seqref(name: str, indices: tuple, subscript: bool, span: A.Span) -> A.SeqRef:
    o = _new(A.SeqRef)
    d = o.__dict__
    d["name"] = name
    d["indices"] = indices
    d["subscript"] = subscript
    d["span"] = span
    return o


def _relation(ops: tuple, operands: tuple, modulus: Any, span: A.Span) -> A.Relation:
    o = _new(A.Relation)
    d = o.__dict__
    d["ops"] = ops
    d["operands"] = operands
    d["modulus"] = modulus
    d["span"] = span
    return o


def _statement(body: Any, label: str | None, conditions: tuple, initial: tuple, note: str | None,
               span: A.Span) -> A.Statement:
    o = _new(A.Statement)
    d = o.__dict__
    d["body"] = body
    d["label"] = label
    d["conditions"] = conditions
    d["initial"] = initial
    d["note"] = note
    d["span"] = span
    return o


_SUPERSCRIPTS = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹", "0123456789")
_PROD_WORDS = {"prod", "Prod", "Product", "product", "∏"}


def _import_lark():
    """Import lark on first use of the formula parser (not at ``import normform``).

    We do not hide the optional ``regex`` module from lark to save start-up
    time: that would break ``Lark(regex=True)`` for any other code in the process.
    """
    import lark

    return lark


_LarkTransformer = _import_lark().Transformer  # (lark is imported lazily via this module)


# Precedence table of the flat arithmetic chain (see grammars/formula.lark, rule `expr`).
PRECEDENCE = {"MOD": 1, "PLUS": 2, "MINUS": 2, "MUL": 4, "DIV": 4, "JUXT": 5, "POW": 6}
RIGHT_ASSOC = {"POW"}
# level covered by a sign, by the operator before it (None: start of the chain)
SIGN_LEVEL = {None: 3, "MOD": 3, "PLUS": 3, "MINUS": 3, "MUL": 5, "DIV": 5, "POW": 6}
_OPS = {"PLUS": "+", "MINUS": "-", "MUL": "*", "DIV": "/", "MOD": "mod"}


def _mark(node: Any, *kids: Any) -> Any:
    for kid in kids:
        if not isinstance(kid, A.Node) or id(kid) in _DIRTY:
            _DIRTY.add(id(node))
            break
    return node


def _climb(ch: list) -> Any:
    """Turn a flat chain [signs, operand, op, signs, operand, operand, ...] into a tree.

    Operator-precedence parsing with two stacks over the table above (the same trees
    as recursive precedence climbing, without a call per level): a binary operator
    first reduces the operators on the stack that bind at least as tightly (for a
    right-associative one, strictly more tightly); a sign covers the operators of
    its SIGN_LEVEL and above."""
    n = len(ch)
    if n == 1:
        return ch[0]
    if n == 3:  # `a op b`, the commonest chain: no stacks needed
        left, op, right = ch
        # an operator between two operands (our driver's tokens are _Tok: anything else,
        # such as lark's own tokens, takes the general path below)
        if op.__class__ is _Tok and left.__class__ is not _Tok and right.__class__ is not _Tok:
            # (the operands of a chain stand in text order, each with a real span: the
            # node spans from the left one's start to the right one's end)
            typ = op[0]
            if typ == "POW":
                node = _new(A.Power)
                d = node.__dict__
                d["base"] = left
                d["exponent"] = right
            else:
                node = _new(A.BinOp)
                d = node.__dict__
                d["op"] = _OPS[typ]
                d["left"] = left
                d["right"] = right
                d["implicit"] = False
            d["span"] = (left.span[0], right.span[1])
            if id(left) in _DIRTY or id(right) in _DIRTY or not isinstance(left, A.Node) \
                    or not isinstance(right, A.Node):
                _DIRTY.add(id(node))
            return node
    if n & 1 and n < 2 * MAX_DEPTH and ch[0].__class__ is not _Tok:
        for i in range(1, n, 2):  # (a lark token fails the first test: general path)
            if ch[i].__class__ is not _Tok or ch[i][0] == "DOTS" or ch[i + 1].__class__ is _Tok:
                break
        else:  # `a op b op c ...` without signs, dots or implicit products
            return _climb_plain(ch)
    out: list = []  # operands
    ops: list = []  # pending operators: (level, name) or (level, sign token)
    dirty = _DIRTY
    node_t = A.Node
    last_op: str | None = None  # the binary operator before the current item
    want_operand = True
    nesting = 0

    def reduce(level: int) -> None:
        """Apply the stacked operators that take their right operand before one of ``level``."""
        while ops:
            top_level, top = ops[-1]
            if top.__class__ is str:
                if top_level < level or (top_level == level and top in RIGHT_ASSOC):
                    return
                ops.pop()
                right = out.pop()
                left = out[-1]
                ls, rs = left.span, right.span
                if ls == A.NO_SPAN:
                    span = rs
                elif rs == A.NO_SPAN:
                    span = ls
                else:
                    span = (ls[0] if ls[0] < rs[0] else rs[0], ls[1] if ls[1] > rs[1] else rs[1])
                if top == "POW":
                    node = _power(left, right, span)
                elif top == "JUXT":
                    node = _binop("*", left, right, True, span)
                else:
                    node = _binop(_OPS[top], left, right, False, span)
                if not isinstance(left, node_t) or id(left) in dirty \
                        or not isinstance(right, node_t) or id(right) in dirty:
                    dirty.add(id(node))
                out[-1] = node
            else:  # a sign
                if level >= top_level:
                    return
                ops.pop()
                if top.type == "MINUS":
                    inner = out[-1]
                    node = _unary("-", inner, (top.start_pos, _sp(inner)[1]))
                    if not isinstance(inner, node_t) or id(inner) in dirty:
                        dirty.add(id(node))
                    out[-1] = node

    for c in ch:
        typ = None if isinstance(c, _NODES) else c.type  # a node, or a token
        if typ is None or typ == "DOTS":  # an operand
            if not want_operand:  # directly after another operand: an implicit product
                reduce(PRECEDENCE["JUXT"])
                ops.append((PRECEDENCE["JUXT"], "JUXT"))
                last_op = "JUXT"
            if typ is None:
                out.append(c)
            else:
                _DOTS_SEEN.append(c)
                out.append(_DotsMark(_sp(c)))
            want_operand = False
        elif want_operand:  # a sign
            ops.append((SIGN_LEVEL.get(last_op, 6), c))
            nesting += 1
        else:
            level = PRECEDENCE[typ]
            reduce(level)
            ops.append((level, typ))
            last_op, want_operand = typ, True
            if typ == "POW":
                nesting += 1
        if nesting > MAX_DEPTH:
            raise _PendingError(f"formula nested deeper than {MAX_DEPTH} levels", _sp(c))
    reduce(-1)
    return out[0]


def _climb_list(ch: list) -> list:
    return [_climb(ch)]


def _climb_plain(ch: list) -> Any:
    """:func:`_climb` for the commonest chains, operands and binary operators alternating
    (the same algorithm without signs: fewer checks per operator)."""
    prec, right_assoc, dirty, nodes = PRECEDENCE, RIGHT_ASSOC, _DIRTY, A.Node
    new, Power, BinOp, names = _new, A.Power, A.BinOp, _OPS
    out = [ch[0]]
    ops: list[str] = []
    n = len(ch)
    i = 1
    while True:
        if i < n:
            typ = ch[i][0]  # a _Tok (checked by _climb)
            level = prec[typ]
        else:
            level = -1  # the end: apply everything
        while ops:
            top = ops[-1]
            top_level = prec[top]
            if top_level < level or (top_level == level and top in right_assoc):
                break
            ops.pop()
            right = out.pop()
            left = out[-1]
            if top == "POW":  # (operands in text order, with real spans: see _climb)
                node = new(Power)
                d = node.__dict__
                d["base"] = left
                d["exponent"] = right
            else:
                node = new(BinOp)
                d = node.__dict__
                d["op"] = names[top]
                d["left"] = left
                d["right"] = right
                d["implicit"] = False
            d["span"] = (left.span[0], right.span[1])
            if id(left) in dirty or id(right) in dirty or not isinstance(left, nodes) \
                    or not isinstance(right, nodes):
                dirty.add(id(node))
            out[-1] = node
        if i >= n:
            return out[0]
        ops.append(typ)
        out.append(ch[i + 1])
        i += 2


class _Build(_LarkTransformer):
    """Grammar callbacks: children are lark Tokens and raw/AST nodes.

    While building it also notes which names occur on their own (variables), which are
    applied, and which are bound by sums, so the resolver needs no extra tree walk."""

    def reset(self) -> None:
        if _DIRTY:
            _DIRTY.clear()
        if _DOTS_SEEN:
            _DOTS_SEEN.clear()
        self.standalone: set[str] = set()
        self.applies: list = []
        self.bound_names: set[str] = set()

    # --- statement
    def list_first(self, ch):
        return [ch[0]]

    def list_more(self, ch):
        items = ch[0]
        items.append(ch[1])
        return items

    def list_more2(self, ch):
        items = ch[0]
        items.append(ch[1])
        items.append(ch[2])
        return items

    def start(self, ch):
        if len(ch) >= 2 and getattr(ch[0], "type", None) == "LABEL":
            return (ch[0], ch[1])
        return (None, ch[0])

    def start_one(self, segments):  # `start: segments`, called by the driver with the child
        return (None, segments)

    def seg(self, ch):
        return self.seg_one(ch[0])

    # runs of one-child reductions at the end of a clause (see _TableDriver._run), fused
    def seg_chain(self, chain):  # seg_one(rel_one(chain))
        return self.seg_one(self.rel_one(chain))

    def segs_chain(self, chain):  # [seg_one(rel_one(chain))]
        return [self.seg_one(self.rel_one(chain))]

    def start_expr(self, chain):  # start_chain([_climb(chain)]): a formula that is one expression
        first = _climb(chain)
        span = first.span if isinstance(first, _NODES) else _sp(first)
        return (None, [_Seg("seg", _Rel((), (first,), None, None, span), (), span)])

    def start_chain(self, chain):  # start_one([seg_one(rel_one(chain))]): a one-clause formula
        if len(chain) == 1:  # a plain expression (as rel_one and seg_one, in line)
            first = chain[0]
            return (None, [_Seg("seg", _Rel((), (first,), None, None, _sp(first)), (), _sp(first))])
        return (None, [self.seg_one(self._rel([chain]))])

    def seg_one(self, rel):  # `segment: rel`, called by the driver with the child
        return _Seg("seg", rel, (), _sp(rel))

    def seg_tail(self, ch):
        seg = ch[0]
        return _Seg(seg.kind, seg.rel, seg.tails + (ch[1],), _join(seg, ch[1][1]))

    def seg_with(self, ch):
        return _Seg("with", ch[0], (), _sp(ch[0]))

    def seg_for(self, ch):
        return _Seg("for", ch[0], (), _join(*ch))

    def seg_if(self, ch):
        return _Seg("if", ch[0], (), _join(*ch))

    def tail_for(self, ch):
        return ("for", ch[0])

    def tail_if(self, ch):
        return ("if", ch[0])

    def tail_with(self, ch):
        return ("with", ch[0])

    def tail_otherwise(self, ch):
        return ("otherwise", None)

    def cond(self, ch):
        if len(ch) == 1:
            return ch[0]
        return A.And(tuple(ch), span=_join(*ch))

    def even(self, ch):
        return A.Parity(ch[0], True, span=_join(*ch))

    def odd(self, ch):
        return A.Parity(ch[0], False, span=_join(*ch))

    def rel(self, ch):
        if len(ch) == 1:
            return self.rel_one(ch[0])
        return self._rel(ch)

    def rel_one(self, chain):  # `rel: relchain`, called by the driver with the child itself
        if len(chain) == 1:  # a plain expression, no relation
            return _Rel((), (chain[0],), None, None, _sp(chain[0]))
        return self._rel([chain])

    def _rel(self, ch):
        chain = ch[0]
        operands, ops = tuple(chain[0::2]), tuple(chain[1::2])
        modulus = mod_span = None
        if len(ch) == 3:
            modulus, mod_span = ch[2], _join(ch[1], ch[2])
        return _Rel(ops, operands, modulus, mod_span, _join(operands[0], operands[-1], modulus))

    _REL = {"≠": "!=", "<>": "!=", "≤": "<=", "⩽": "<=", "≥": ">=", "⩾": ">=", "∼": "~", "≡": "=="}

    def relop(self, ch):
        return self._REL.get(_t(ch[0]), _t(ch[0]))

    # --- arithmetic: a flat chain, then precedence climbing over the table below
    def expr(self, ch):
        return _climb(ch[0])

    body = expr

    # the chain is one Python list, appended to as the parser reduces (no tree nodes)
    def chain_first(self, ch):
        if len(ch) == 1:
            return [ch[0]]
        signs = ch[0]
        signs.append(ch[1])
        return signs

    def chain_op(self, ch):
        chain = ch[0]
        chain.append(ch[1])
        if len(ch) == 4:
            chain.extend(ch[2])
        chain.append(ch[-1])
        return chain

    def chain_juxt(self, ch):
        chain = ch[0]
        chain.append(ch[1])
        return chain

    def signs_first(self, ch):
        return [ch[0]]

    def signs_more(self, ch):
        signs = ch[0]
        signs.append(ch[1])
        return signs

    def factorial(self, ch):
        return _mark(_factorial(ch[0], False, _join(*ch)), ch[0])

    def double_factorial(self, ch):
        return _mark(_factorial(ch[0], True, _join(*ch)), ch[0])

    def superscript_power(self, ch):
        tok = _t(ch[1])
        span = _sp(ch[1])
        if tok == "ⁿ":
            self.standalone.add("n")
            exp: Any = A.Symbol("n", span=span)
        elif "ⁿ" in tok:
            raise _raw_error("mixed superscript", ch[1])
        else:
            exp = A.Integer(int(tok.translate(_SUPERSCRIPTS)), span=span)
        return _mark(_power(ch[0], exp, _join(*ch)), ch[0])

    # --- atoms
    def integer(self, ch):
        return self.integer_tok(ch[0])

    # the driver's variants of integer/name: its tokens are (type, value, start, end) tuples
    # (_Tok, or plain tuples from _FastPath: these two only index them)
    def integer_t(self, tok):
        o = _new(A.Integer)
        d = o.__dict__
        d["value"] = int(tok[1])
        d["span"] = tok[2:]
        return o

    # integer_t / name_t and then the wrap of a one-item chain: one call instead of two
    # steps (the commonest runs of one-child reductions, see _TableDriver._run)
    def integer_t_list(self, tok):
        o = _new(A.Integer)
        d = o.__dict__
        d["value"] = int(tok[1])
        d["span"] = tok[2:]
        return [o]

    def name_t_list(self, tok):
        return [self.name_t(tok)]

    def name_t(self, tok):
        name = tok[1]
        self.standalone.add(name)
        if name in _CONSTANTS:  # pi, e, i...: constant or variable depends on context
            return _Name(name, tok[2:])
        o = _new(A.Symbol)
        d = o.__dict__
        d["name"] = name
        d["span"] = tok[2:]
        return o

    def integer_tok(self, tok):
        o = _new(A.Integer)  # as _integer(), inlined: one of the commonest reductions
        d = o.__dict__
        d["value"] = int(tok.value)
        d["span"] = (tok.start_pos, tok.end_pos)
        return o

    def decimal(self, ch):
        return A.Decimal(_t(ch[0]), Fraction(_t(ch[0])), span=_sp(ch[0]))

    def name(self, ch):
        return self.name_tok(ch[0])

    def name_tok(self, tok):
        name = tok.value
        self.standalone.add(name)
        if name in _CONSTANTS:  # pi, e, i...: constant or variable depends on context
            return _Name(name, (tok.start_pos, tok.end_pos))
        o = _new(A.Symbol)  # as _symbol(), inlined
        d = o.__dict__
        d["name"] = name
        d["span"] = (tok.start_pos, tok.end_pos)
        return o

    def apply(self, ch):
        args = tuple(ch[1])
        name = ch[0]
        lo, hi = name.start_pos, name.end_pos  # a name is never empty: its span is real
        for a in args:
            span = a.span if isinstance(a, _NODES) else _sp(a)
            if span != A.NO_SPAN:
                if span[0] < lo:
                    lo = span[0]
                if span[1] > hi:
                    hi = span[1]
        node = _Apply(name.value, args, (lo, hi))
        self.applies.append(node)
        return node

    def args(self, ch):  # pragma: no cover - args are built by list_first/list_more
        return tuple(ch)

    def subscript(self, ch):
        sub = ch[1]
        indices = sub if isinstance(sub, tuple) else (sub,)
        node = _Sub(_t(ch[0]), indices, _join(ch[0], *indices))
        self.applies.append(node)
        return node

    def sub_list(self, ch):
        return tuple(ch)

    def brace_list(self, ch):
        return _BraceList(tuple(ch), _join(*ch))

    def gauss_floor(self, ch):
        return _mark(_call("floor", (ch[0],), "[]", _sp(ch[0])), ch[0])

    def gauss_ceil(self, ch):
        return _mark(_call("ceiling", (ch[0],), "⌈⌉", _sp(ch[0])), ch[0])

    def sqrt_sign(self, ch):
        return _mark(_call("sqrt", (ch[1],), "√", _join(*ch)), ch[1])

    def bigop(self, ch):
        return ("prod" if _t(ch[0]) in _PROD_WORDS else "sum", _sp(ch[0]))

    def bigop_sub(self, ch):
        (op, span), bound = ch[0], ch[1]
        sup = ch[2] if len(ch) == 4 else None
        body = ch[-1]
        return _BigSub(op, bound, sup, body, (span[0], _join(body)[1]))

    def bigop_call(self, ch):
        (op, span), args = ch
        return _BigCall(op, tuple(args), (span[0], _join(*args)[1]))

    def bounds(self, ch):
        b = ch[0]
        if b.var:
            self.bound_names.add(b.var)
            self.standalone.add(b.var)
        return b

    def bound_eq(self, ch):
        parts = (ch[1],) if len(ch) == 2 else (ch[1], ch[3])
        return _Bound("eq", _t(ch[0]), parts, _join(*ch))

    def bound_ge(self, ch):
        return _Bound("ge", _t(ch[0]), (ch[2],), _join(*ch))

    def bound_gt(self, ch):
        return _Bound("gt", _t(ch[0]), (ch[1],), _join(*ch))

    def bound_div(self, ch):
        return _Bound("div", _t(ch[0]), (ch[1],), _join(*ch))

    def bound_chain(self, ch):
        return _Bound("chain", _t(ch[2]), (ch[0], ch[4]), _join(*ch))

    def bound_range(self, ch):
        return _Bound("range", None, (ch[0], ch[2]), _join(*ch))

    def bound_var(self, ch):
        if self.standalone is not None:
            self.bound_names.add(ch[0].value)
            self.standalone.add(ch[0].value)
        return _Bound("var", _t(ch[0]), (), _sp(ch[0]))

    def sup(self, ch):
        return ch[1]

    def range_sep(self, ch):
        return ch[0]

    def _binds(self, first):
        if isinstance(first, (_Name, A.Symbol)):
            self.bound_names.add(first.name)

    def arg_eq(self, ch):
        self._binds(ch[0])
        return _Arg("eq", (ch[0], ch[1]), _join(*ch))

    def arg_range(self, ch):
        self._binds(ch[0])
        return _Arg("range", (ch[0], ch[1], ch[3]), _join(*ch))

    def arg_range_bare(self, ch):
        return _Arg("range_bare", (ch[0], ch[2]), _join(*ch))

    def arg_ge(self, ch):
        self._binds(ch[0])
        return _Arg("ge", (ch[0], ch[2]), _join(*ch))

    def arg_div(self, ch):
        self.bound_names.add(ch[0].value)
        self.standalone.add(ch[0].value)
        return _Arg("div", (_Name(_t(ch[0]), _sp(ch[0])), ch[1]), _join(*ch))


def _raw_error(message: str, token: Any) -> Exception:
    return _PendingError(message, _sp(token))


class _PendingError(Exception):
    def __init__(self, message: str, span: A.Span):
        super().__init__(message)
        self.message = message
        self.span = span


# ------------------------------------------------------------ pre-pass ------

_NOTE_RES = [
    # " - Ada Quill, Mar 03 2019" / " -- A. Quill, 2019"
    re.compile(r"\s+(?:-{1,2}|—|–)\s*(_?[A-Z][\w.'’-]*(?:\s+(?:[a-z]{1,3}\s+)?[A-Z][\w.'’-]*)*_?\s*,.*\d{4}.*?)\s*$"),
    # " - _Ada Quill_ ..." (underscored name, date optional)
    re.compile(r"\s+(?:-{1,2}|—|–)\s*(_[^_]+_.*?)\s*$"),
]


_FOUR_DIGITS = re.compile(r"\d{4}")  # what the first pattern needs besides a dash and a comma; the second needs "_"


def split_note(text: str) -> tuple[str, str | None]:
    """Split trailing attribution text (a contributor's name and a date) from the formula."""
    for rx in _NOTE_RES:
        m = rx.search(text)
        if m:
            return text[: m.start()], m.group(1)
    return text, None


_OPEN, _CLOSE = "([{⌊⌈", ")]}⌋⌉"


def _check_limits(text: str) -> None:
    if len(text) > MAX_LENGTH and (len(text) > MAX_RAW_LENGTH or len(text) - text.count(" ") > MAX_LENGTH):
        if len(text) > MAX_RAW_LENGTH:
            cut, size, what = MAX_RAW_LENGTH, len(text), "characters"
        else:  # where the (MAX_LENGTH+1)-th character other than a space stands
            seen, cut = 0, 0
            for cut, ch in enumerate(text):
                if ch != " ":
                    seen += 1
                    if seen > MAX_LENGTH:
                        break
            size, what = len(text) - text.count(" "), "characters other than spaces"
        limit = MAX_RAW_LENGTH if what == "characters" else MAX_LENGTH
        raise FormulaError(f"formula longer than {limit} {what} ({size})",
                           line=1, column=cut + 1, source=text[: cut + 40],
                           offending=text[cut:cut + 20],
                           expected=(f"at most {limit} {what}",))
    if sum(text.count(c) for c in _OPEN) <= MAX_DEPTH:
        return
    depth = 0
    for i, ch in enumerate(text):
        if ch in _OPEN:
            depth += 1
            if depth > MAX_DEPTH:
                _fail(text, i, f"brackets nested deeper than {MAX_DEPTH}",
                      (f"at most {MAX_DEPTH} nested brackets",), ch)
        elif ch in _CLOSE:
            depth -= 1


def _fail(text: str, offset: int, message: str, expected: tuple[str, ...] = (), offending: str | None = None):
    line, col = A.line_col(text, offset)
    if offending is None:
        offending = text[offset:offset + 1]
    raise FormulaError(message, line=line, column=col, source=text, expected=expected, offending=offending)


# ------------------------------------------------------------ lark errors ---

_TERMINAL_TEXT = {
    "RPAR": "')'", "LPAR": "'('", "RSQB": "']'", "LSQB": "'['", "RBRACE": "'}'", "LBRACE": "'{'",
    "COMMA": "','", "INT": "a number", "DEC": "a number", "NAME": "a name", "PLUS": "'+'",
    "MINUS": "'-'", "MUL": "'*'", "DIV": "'/'", "POW": "'^'", "EQUAL": "'='", "RANGE": "'..'",
    "DOTS": "'...'", "SQRT": "'√'", "END": "'.'", "$END": "end of formula", "LABEL": "a label",
    "LE": "'<='", "GE": "'>='", "NE": "'!='", "TILDE": "'~'", "CONG": "'=='", "LESSTHAN": "'<'",
    "MORETHAN": "'>'", "VBAR": "'|'", "UNDERSCORE": "'_'",
    "MODPAREN": "'(mod'", "SUM": "a sum", "BANG": "'!'",
}
# keywords that may follow any expression: listing them in "expected" only adds noise
_QUIET = {"MOD", "FOR", "IF", "WITH", "WHEN", "OTHERWISE", "ELSE", "AND", "IS", "EVEN", "ODD"}
_OPERAND_STARTS = {"INT", "DEC", "NAME", "LPAR", "LSQB", "LBRACE", "SQRT", "MINUS", "PLUS"}


def _humanize(expected: set[str]) -> tuple[str, ...]:
    if not expected:
        return ()
    if _OPERAND_STARTS & expected and len(expected) > 6:
        out = ["an operand (number, name, '(' ...)"]
        for key in ("RPAR", "RSQB", "RBRACE", "COMMA"):
            if key in expected:
                out.append(_TERMINAL_TEXT[key])
        return tuple(out)
    names = sorted({_TERMINAL_TEXT.get(e, e.lower().replace("_", " ")) for e in expected
                    if not e.startswith("__ANON") and e not in _QUIET})
    return tuple(names[:8])


def _driver_error(text: str, exc: _SyntaxError) -> FormulaError:
    if exc.char:
        ch = exc.text
        hint = " (TeX commands are not part of the plain-text syntax)" if ch == "\\" else ""
        line, col = A.line_col(text, exc.offset)
        return FormulaError(f"unexpected character {ch!r}{hint}", line=line, column=col, source=text,
                            offending=ch, expected=_humanize(exc.expected))
    if exc.end:
        line, col = A.line_col(text, len(text.rstrip()))
        return FormulaError("formula ends too early", line=line, column=col, source=text, offending="",
                            expected=_humanize(exc.expected))
    line, col = A.line_col(text, exc.offset)
    return FormulaError(f"unexpected {exc.text!r}", line=line, column=col, source=text,
                        offending=exc.text, expected=_humanize(exc.expected))


def _lark_error(text: str, exc: Exception) -> FormulaError:
    from lark.exceptions import UnexpectedCharacters, UnexpectedEOF, UnexpectedToken

    if isinstance(exc, UnexpectedCharacters):
        ch = text[exc.pos_in_stream] if exc.pos_in_stream < len(text) else ""
        hint = " (TeX commands are not part of the plain-text syntax)" if ch == "\\" else ""
        line, col = A.line_col(text, exc.pos_in_stream)
        return FormulaError(f"unexpected character {ch!r}{hint}", line=line, column=col, source=text,
                            offending=ch, expected=_humanize(set(exc.allowed or ())))
    if isinstance(exc, UnexpectedToken):
        tok = exc.token
        if tok.type == "$END":
            offset = len(text.rstrip())
            line, col = A.line_col(text, offset)
            return FormulaError("formula ends too early", line=line, column=col, source=text,
                                offending="", expected=_humanize(set(exc.expected)))
        line, col = A.line_col(text, tok.start_pos)
        return FormulaError(f"unexpected {_t(tok)!r}", line=line, column=col, source=text,
                            offending=_t(tok), expected=_humanize(set(exc.expected)))
    if isinstance(exc, UnexpectedEOF):
        line, col = A.line_col(text, len(text))
        return FormulaError("formula ends too early", line=line, column=col, source=text, offending="",
                            expected=_humanize(set(exc.expected)))
    line, col = A.line_col(text, 0)
    return FormulaError(f"cannot read formula: {exc}", line=line, column=col, source=text)


# ------------------------------------------------------------ entry ---------

@A.deep(text=lambda text: text if isinstance(text, str) else "")
def parse_statement(text: str) -> A.Statement:
    """Parse one formula line into a :class:`Statement`; raise :class:`FormulaError`."""
    if not isinstance(text, str):
        raise TypeError("formula text must be a str")
    return _parse_statement(text)


# The parser, its callbacks and the per-parse notes (_builder's sets, _DIRTY,
# _DOTS_SEEN) are one per process, built once for speed: one parse at a time.
# Threads parsing at once (a Dask worker runs chunks in threads) otherwise mixed
# each other's notes ("'_Build' object has no attribute 'bound_names'").
_PARSE_LOCK = threading.RLock()


def _parse_statement(text: str) -> A.Statement:
    """:func:`parse_statement` of a str, without the ``deep`` wrapper (which texts of at most
    ``A.SHALLOW_TEXT`` characters do not need: ``parse_formula`` calls this for them)."""
    with _PARSE_LOCK:
        return _parse_locked(text)


def _parse_locked(text: str) -> A.Statement:
    if len(text) > MAX_DEPTH:  # shorter text cannot break either limit
        _check_limits(text)
    if ("-" in text or "—" in text or "–" in text) and ("_" in text or ("," in text and _FOUR_DIGITS.search(text))):
        # (every attribution starts with a dash, and has an underscored name or a comma and a year)
        math, note = split_note(text)
    else:
        math, note = text, None
    if not math or math.isspace():
        _fail(text, 0, "empty formula", ("a formula",), "")
    parser = _parser if _parser is not None else _get_parser()
    builder = _builder
    builder.reset()
    try:
        label, segs = parser.parse(math)
    except _LARK_ERRORS[1] as exc:  # (VisitError) an error raised inside a callback
        inner = exc.orig_exc
        if isinstance(inner, _PendingError):
            _fail(text, inner.span[0], inner.message)
        raise
    except _PendingError as exc:
        _fail(text, exc.span[0], exc.message)
    except _SyntaxError as exc:
        raise _driver_error(text, exc) from None
    except _LARK_ERRORS[0] as exc:  # (LarkError)
        raise _lark_error(text, exc) from None
    if not _DIRTY and not builder.applies and label is None and note is None and len(segs) == 1:
        # Nothing to resolve (no placeholder anywhere, no application): the resolver would
        # return the built tree as it is, so skip building it (same result, see _Resolver).
        first = segs[0]
        if first.kind == "seg" and not first.tails:
            raw = first.rel
            operands = raw.operands
            if raw.modulus is None and (isinstance(operands[0], A.Node) if len(operands) == 1
                                        else all(isinstance(o, A.Node) for o in operands)):
                if builder.standalone:
                    try:
                        _check_standalone(text, builder.standalone, ())
                    except _PendingError as exc:
                        _fail(text, exc.span[0], exc.message)
                body = _relation(raw.ops, raw.operands, None, raw.span) if raw.ops else raw.operands[0]
                stmt = _statement(body, None, (), (), None, (0, len(text.rstrip())))
                if 2 * len(text) + 3 > MAX_DEPTH:
                    _check_depth(text, stmt)
                return stmt
    try:
        stmt = _Resolver(text, label, segs, note, builder).statement()
    except _PendingError as exc:
        _fail(text, exc.span[0], exc.message)
    if 2 * len(text) + 3 > MAX_DEPTH:  # each level of the tree takes at least half a character
        _check_depth(text, stmt)
    return stmt


def _check_standalone(text: str, standalone: set[str], applies: list) -> None:
    """A function name used on its own (``floor + 1``) is an error, at the name."""
    for n in standalone:
        if len(n) > 2 and n not in _GREEK and n in ALIASES and n not in _CONSTANTS:
            where = next((a for a in applies if a.name == n), None)
            raise _PendingError(f"{n} is a function: it needs its argument, as in {n}(x)",
                                where.span if where is not None else (text.find(n), text.find(n) + len(n)))


_CHAIN_CLASS = {"+": 1, "-": 1, "*": 2, "/": 2}


def _check_depth(text: str, stmt: A.Statement) -> None:
    """Reject real nesting deeper than MAX_DEPTH. The operand of a chain ``a + b + c ...``
    (a left operand under an operator of the same level) stays at its chain's level: a long
    chain is length, not nesting (every pass walks such chains without recursion), and the
    length is bounded by MAX_LENGTH."""
    stack = [(stmt, 1)]
    binop = A.BinOp
    while stack:
        node, d = stack.pop()
        if d > MAX_DEPTH:
            _fail(text, node.span[0], f"formula nested deeper than {MAX_DEPTH} levels",
                  (f"at most {MAX_DEPTH} levels",))
        if node.__class__ is binop and node.op in _CHAIN_CLASS:
            left = node.left
            same = left.__class__ is binop and _CHAIN_CLASS.get(left.op) == _CHAIN_CLASS[node.op]
            stack.append((left, d if same else d + 1))
            stack.append((node.right, d + 1))
            continue
        stack.extend((c, d + 1) for c in node.children())


# ------------------------------------------------------------ resolver ------

_CONSTANTS = {
    "pi": "pi", "Pi": "pi", "PI": "pi", "π": "pi",
    "e": "e",
    "phi": "phi", "φ": "phi", "ϕ": "phi", "Phi": "phi",
    "gamma": "gamma", "γ": "gamma",
    "infinity": "infinity", "Infinity": "infinity", "inf": "infinity", "oo": "infinity", "∞": "infinity",
    "I": "i", "i": "i",
}
# Greek letter names double as plain variables even where a function has the same name
_GREEK = {"sigma", "tau", "zeta", "Gamma", "mu", "phi", "Phi", "gamma", "alpha", "beta", "delta", "lambda",
          "theta", "rho", "omega", "psi", "chi", "eta", "nu", "xi", "epsilon", "kappa", "iota", "upsilon"}
_BOUND_PREFERENCE = ("k", "j", "i", "m", "d", "l", "r", "s", "t")


def _raw_children(x: Any):
    if isinstance(x, (_Name, _DotsMark)):
        return
    if isinstance(x, _Apply):
        yield from x.args
    elif isinstance(x, _Sub):
        yield from x.indices
    elif isinstance(x, (_Arg, _Bound)):
        yield from x.parts
    elif isinstance(x, _BraceList):
        yield from x.items
    elif isinstance(x, _BigSub):
        yield x.bound
        if x.sup is not None:
            yield x.sup
        yield x.body
    elif isinstance(x, _BigCall):
        yield from x.args
    elif isinstance(x, _Rel):
        yield from x.operands
        if x.modulus is not None:
            yield x.modulus
    elif isinstance(x, tuple):
        yield from (i for i in x if i is not None and not isinstance(i, str))
    elif isinstance(x, A.Node):
        from dataclasses import fields
        for f in fields(x):
            v = getattr(x, f.name)
            if f.name == "span":
                continue
            if isinstance(v, tuple):
                for item in v:
                    if isinstance(item, tuple):
                        yield from (i for i in item if i is not None)
                    elif item is not None and not isinstance(item, str):
                        yield item
            elif v is not None and not isinstance(v, (str, int, bool, Fraction)):
                yield v


def _raw_walk(x: Any):
    stack = [x]
    while stack:
        cur = stack.pop()
        yield cur
        stack.extend(_raw_children(cur))


class _Resolver:
    __slots__ = ("text", "label_token", "segs", "note", "bound", "standalone", "applies", "applied",
                 "bound_names", "sequences", "lhs_vars")

    def __init__(self, text: str, label: Any, segs: list[_Seg], note: str | None, info: Any):
        self.text = text
        self.label_token = label
        self.segs = segs
        self.note = note
        self.bound: list[str] = []
        # every name used on its own (not applied) anywhere: those are variables
        self.standalone: set[str] = info.standalone
        self.applies: list = info.applies
        self.applied: set[str] | None = None  # names applied anywhere: made when first asked (rare)
        self.bound_names: set[str] = info.bound_names
        self.sequences: set[str] = set()
        self.lhs_vars: set[str] = set()
        if info.applies:
            self._find_sequences()
        _check_standalone(text, self.standalone, info.applies)

    # -- which applied names are sequences (the defined one, unknown names)
    def _find_sequences(self) -> None:
        main = self.segs[0].rel if self.segs else None
        if not isinstance(main, _Rel) or not main.ops:
            return
        lhs = main.operands[0]
        lhs_end = _sp(lhs)[1]
        main_end = main.span[1]
        rhs_names = {a.name for a in self.applies if lhs_end <= a.span[0] < main_end}
        lhs_start = _sp(lhs)[0]
        for node in self.applies:
            if not (lhs_start <= node.span[0] < lhs_end):
                continue
            args = node.args if isinstance(node, _Apply) else node.indices
            known = lookup(node.name, len(args)) is not None
            # a short known name (F, C, ...) is a sequence only when the left side IS its
            # term and the right side uses it again: `F(n) = F(n-1) + F(n-2)`; full names
            # (binomial, gcd) never are: `binomial(n,k) = binomial(n-1,k-1) + ...` is an identity.
            if not known or (node is lhs and node.name in rhs_names and len(node.name) <= 2):
                if node.name in self.standalone and isinstance(node, _Apply) and len(args) == 1 and not known:
                    continue  # `n(n+1)/2 = ...`: a product, not a definition
                self.sequences.add(node.name)
                for a in args:
                    if isinstance(a, (_Name, A.Symbol)):
                        self.lhs_vars.add(a.name)

    def err(self, message: str, x: Any) -> _PendingError:
        return _PendingError(message, _sp(x))

    # -- statement assembly
    def statement(self) -> A.Statement:
        label = None
        if self.label_token is not None:
            label = "egf" if _t(self.label_token).lstrip()[:1] in "Ee" else "ogf"
        if len(self.segs) == 1:
            first = self.segs[0]
            if first.kind == "seg" and not first.tails:
                # the common case, one clause and nothing after it (same result as below)
                body = self.rel(first.rel, True)
                note = self.note
                span = (0, len(self.text.rstrip()) if note is None else _join(first)[1])
                return _statement(body, label, (), (), note, span)
        segs = []
        for seg in self.segs:  # `X with a(0)=1`: the initial value becomes its own clause
            if not seg.tails:
                segs.append(seg)
                continue
            keep = tuple(t for t in seg.tails if t[0] != "with")
            segs.append(_Seg(seg.kind, seg.rel, keep, seg.span))
            segs.extend(_Seg("with", t[1], (), _sp(t[1])) for t in seg.tails if t[0] == "with")
        first = segs[0]
        if first.kind not in ("seg",):
            raise self.err("a formula must come before its conditions", first)
        body = self.rel(first.rel, main=True)
        conditions: list[A.Node] = []
        initial: list[A.Initial] = []
        branches: list[list] = []  # [value, cond]

        def take_tails(seg: _Seg, value_node: A.Node | None) -> bool:
            """Apply tails; return True if the segment became a piecewise branch."""
            branch = False
            for kind, cond in seg.tails:
                if kind == "for":
                    conditions.append(self.cond(cond))
                elif kind == "if":
                    if value_node is None:
                        raise self.err("'if' without a value", seg)
                    branches.append([value_node, self.cond(cond)])
                    branch = True
                else:
                    if value_node is None:
                        raise self.err("'otherwise' without a value", seg)
                    branches.append([value_node, None])
                    branch = True
            return branch

        main_value = body.operands[-1] if isinstance(body, A.Relation) else body
        piece = take_tails(first, main_value) if first.tails else False
        for seg in segs[1:]:
            if seg.kind == "for":
                conditions.append(self.cond(seg.rel))
                continue
            if seg.kind == "if":
                if not branches:
                    conditions.append(self.cond(seg.rel))
                else:
                    if branches[-1][1] is not None:
                        raise self.err("two conditions for one value", seg)
                    branches[-1][1] = self.cond(seg.rel)
                continue
            raw = seg.rel
            if seg.tails and any(k != "for" for k, _ in seg.tails) and isinstance(raw, _Rel) and not raw.ops:
                value = self.expr(raw.operands[0])
                take_tails(seg, value)
                piece = True
                continue
            init = self.initial(raw) if isinstance(raw, _Rel) else None
            if init is not None:
                initial.append(init)
                take_tails(seg, None)
                continue
            if isinstance(raw, _Rel) and raw.ops:
                conditions.append(self.rel(raw))
                take_tails(seg, None)
                continue
            if piece and not seg.tails:
                # `a(n) = 1 if n even, 2` : a trailing value without a word is the default
                branches.append([self.expr(raw.operands[0]), None])
                continue
            raise self.err("unexpected clause after the formula", seg)
        if piece:
            if any(b[1] is None for b in branches[:-1]):
                raise self.err("'otherwise' must be the last branch", segs[-1])
            pw = A.Piecewise(tuple((v, c) for v, c in branches),
                             span=_join(*(v for v, _ in branches)))
            if isinstance(body, A.Relation):
                body = A.Relation(body.ops, body.operands[:-1] + (pw,), body.modulus, span=body.span)
            else:
                body = pw
        span = (0, len(self.text.rstrip()) if self.note is None else _join(*segs)[1])
        return _statement(body, label, tuple(conditions), tuple(initial), self.note, span)

    def initial(self, raw: _Rel) -> A.Initial | None:
        if not raw.ops or any(op != "=" for op in raw.ops) or raw.modulus is not None:
            return None
        targets = []
        for t in raw.operands[:-1]:
            if not isinstance(t, (_Apply, _Sub)):
                return None
            args = t.args if isinstance(t, _Apply) else t.indices
            if t.name not in self.sequences and lookup(t.name, len(args)) is not None:
                return None
            node = self.expr(t)
            if not isinstance(node, A.SeqRef):
                node = A.SeqRef(t.name, tuple(self.expr(a) for a in args), span=t.span)
            if any(A.free_symbols(i) for i in node.indices):
                return None
            targets.append(node)
        value = self.expr(raw.operands[-1])
        if A.free_symbols(value):
            return None
        return A.Initial(tuple(targets), value, span=raw.span)

    def cond(self, raw: Any) -> A.Node:
        if isinstance(raw, _Rel):
            return self.rel(raw)
        if isinstance(raw, A.And):
            return A.And(tuple(self.cond(i) for i in raw.items), span=raw.span)
        if isinstance(raw, A.Parity):
            return A.Parity(self.expr(raw.operand), raw.even, span=raw.span)
        return self.expr(raw)

    def rel(self, raw: _Rel, main: bool = False) -> A.Node:
        expr = self.expr
        if not raw.ops and raw.modulus is None:  # a plain expression
            return expr(raw.operands[0])
        operands = tuple(map(expr, raw.operands))
        if raw.modulus is not None:
            modulus = self.expr(raw.modulus)
            if raw.ops and all(op == "==" for op in raw.ops):
                return _relation(raw.ops, operands, modulus, raw.span)
            last = operands[-1]
            operands = operands[:-1] + (A.BinOp("mod", last, modulus, span=_join(last, raw.mod_span)),)
        elif raw.ops and "==" in raw.ops:
            pass  # `a == b` without modulus: plain congruence sign kept as written
        if not raw.ops:
            return operands[0]
        return _relation(raw.ops, operands, None, raw.span)

    # -- expressions
    def expr(self, x: Any) -> A.Node:
        if id(x) not in _DIRTY and isinstance(x, A.Node):
            return x  # a clean subtree: nothing to resolve inside
        handler = _EXPR_HANDLERS.get(type(x))
        if handler is None:
            if isinstance(x, tuple):
                raise self.err("unexpected list", x[0] if x else None)
            raise AssertionError(f"unhandled raw node {type(x).__name__}")
        return handler(self, x)

    def _binop(self, x: A.BinOp) -> A.Node:
        if x.op in "+*" and _DOTS_SEEN and self._has_dots(x):
            return self.dots(x)
        left, right = x.left, x.right  # a clean child is kept as it is (as expr() would)
        if id(left) in _DIRTY or not isinstance(left, A.Node):
            left = self.expr(left)
        if id(right) in _DIRTY or not isinstance(right, A.Node):
            right = self.expr(right)
        if x.implicit and isinstance(x.right, _Apply) and isinstance(right, A.BinOp) \
                and right.implicit and isinstance(right.left, A.Symbol) and right.left.name == x.right.name:
            # `3n(n+1)` is (3*n)*(n+1), not 3*(n*(n+1)): keep products left-associative
            left = _binop("*", left, right.left, True, _join(left, right.left))
            right = right.right
        return _binop(x.op, left, right, x.implicit, x.span)

    def _misplaced(self, x: Any) -> A.Node:
        message = {
            _BraceList: "a list in braces is only allowed as the iterator of Sum[...] or Product[...]",
            _Arg: "'=' or '..' is only allowed in the limits of a sum or product",
            _DotsMark: "'...' must stand between terms of a sum or a product",
            _Rel: "a relation cannot stand inside an expression",
        }[type(x)]
        raise self.err(message, x)

    @staticmethod
    def _has_dots(x: A.BinOp) -> bool:
        cur: Any = x
        while isinstance(cur, A.BinOp) and cur.op == x.op:
            if isinstance(cur.right, _DotsMark):
                return True
            cur = cur.left
        return False

    def dots(self, x: A.BinOp) -> A.Node:
        items: list[Any] = []
        cur: Any = x
        while isinstance(cur, A.BinOp) and cur.op == x.op and not (cur is not x and False):
            items.append(cur.right)
            cur = cur.left
        items.append(cur)
        items.reverse()
        marks = [i for i, t in enumerate(items) if isinstance(t, _DotsMark)]
        if len(marks) != 1 or marks[0] == 0 or marks[0] != len(items) - 2:
            raise self.err("'...' must stand once, between the first terms and the last term", x)
        first = tuple(self.expr(t) for t in items[:marks[0]])
        last = self.expr(items[-1])
        return A.Dots("+" if x.op == "+" else "*", first, last, span=x.span)

    def name(self, x: _Name) -> A.Node:
        n = x.name
        if n in self.bound or n in self.lhs_vars:
            return _symbol(n, x.span)
        const = _CONSTANTS.get(n)
        if const is not None:
            if n == "i" and (n in self._applied() or self._bound_anywhere(n)):
                return _symbol(n, x.span)
            if const == "e" and self._bound_anywhere(n):
                return _symbol(n, x.span)
            return _constant(const, n, x.span)
        return _symbol(n, x.span)

    def _applied(self) -> set[str]:
        if self.applied is None:
            self.applied = {a.name for a in self.applies}
        return self.applied

    def _bound_anywhere(self, name: str) -> bool:
        return name in self.bound_names

    def apply(self, x: _Apply) -> A.Node:
        n, args = x.name, x.args
        for a in args:
            if a.__class__ is _Arg:
                break
        else:
            a = None
        if a is not None:
            raise self.err(f"'=' or '..' inside {n}(...)", x)
        if n in self.sequences:
            return self.seqref(n, args, x)
        is_var = n in self.bound or n in self.lhs_vars or n in self.standalone
        if is_var and len(args) == 1:
            # `n(n+1)`, `x(1+x)`: a variable times a group
            sym = self.name(_Name(n, (x.span[0], x.span[0] + len(n))))
            return _binop("*", sym, self.expr(args[0]), True, x.span)
        spec = lookup(n, len(args))
        if spec is not None and not is_var:
            if len(args) == 1:  # (the commonest: one argument, often a clean subtree kept as it is)
                a = args[0]
                return _call(spec.name, (a if id(a) not in _DIRTY and isinstance(a, A.Node) else self.expr(a),),
                             n, x.span)
            return _call(spec.name, tuple(map(self.expr, args)), n, x.span)
        if spec is None:
            other = lookup(n, None)
            if other is not None and len(n) > 2 and n not in self.sequences:
                raise self.err(f"{n} takes {other.arity_text()}, not {len(args)}", x)
        return self.seqref(n, args, x)

    def seqref(self, n: str, args, x, subscript: bool = False) -> A.SeqRef:
        if n in self.standalone:
            raise self.err(f"{n} is used both as a variable and as a sequence", x)
        if len(n) > 2 and n not in _GREEK and lookup(n, None) is not None:
            raise self.err(f"{n} is a function: write {n}(...)", x)
        return _seqref(n, tuple(map(self.expr, args)), subscript, x.span)

    def subscript(self, x: _Sub) -> A.Node:
        n = x.name
        if n not in self.sequences:
            spec = lookup(n, len(x.indices))
            if spec is not None and n not in self.standalone and len(n) <= 2 and n in ("F", "L", "C", "H", "B"):
                return A.Call(spec.name, tuple(self.expr(a) for a in x.indices), written=n + "_", span=x.span)
        return self.seqref(n, x.indices, x, subscript=True)

    # -- sums and products
    def _make_bigop(self, op: str, var: str | None, body_raw: Any, lower: Any, upper: Any,
                    divides: Any, span: A.Span, where: Any) -> A.BigOp:
        if var is None:
            var = self._guess_var(body_raw, where)
        self.bound.append(var)
        try:
            body = self.expr(body_raw)
        finally:
            self.bound.pop()
        return A.BigOp(op, var, body,
                       None if lower is None else self.expr(lower),
                       None if upper is None else self.expr(upper),
                       None if divides is None else self.expr(divides), span=span)

    def _guess_var(self, body_raw: Any, where: Any) -> str:
        inside = {n.name for n in _raw_walk(body_raw) if isinstance(n, (_Name, A.Symbol))}
        cands = inside - self.lhs_vars - set(self.bound)
        for pref in _BOUND_PREFERENCE:
            if pref in cands:
                return pref
        if len(cands) == 1:
            return next(iter(cands))
        raise self.err("cannot tell the summation variable; write it, as in k=0..n", where)

    def _inf(self, span: A.Span) -> A.Constant:
        return A.Constant("infinity", written="inf", span=span)

    def bigsub(self, x: _BigSub) -> A.Node:
        b = x.bound
        lower = upper = divides = None
        var = b.var
        if b.kind == "eq":
            lower = b.parts[0]
            if len(b.parts) == 2:
                upper = b.parts[1]
            elif x.sup is not None:
                upper = x.sup
            else:
                upper = self._inf(b.span)
        elif b.kind == "ge":
            lower, upper = b.parts[0], (x.sup if x.sup is not None else self._inf(b.span))
        elif b.kind == "gt":
            low = b.parts[0]
            lower = A.Integer(low.value + 1, span=low.span) if isinstance(low, A.Integer) \
                else A.BinOp("+", low, A.Integer(1), span=_sp(low))
            upper = x.sup if x.sup is not None else self._inf(b.span)
        elif b.kind == "div":
            divides = b.parts[0]
            if x.sup is not None:
                raise self.err("a divisor sum takes no upper limit", x.sup)
        elif b.kind in ("chain", "range"):
            lower, upper = b.parts
            if x.sup is not None:
                raise self.err("two upper limits", x.sup)
        elif b.kind == "var":
            if x.sup is not None:
                raise self.err("an upper limit needs a lower one (write k=0)", x.sup)
        return self._make_bigop(x.op, var, x.body, lower, upper, divides, x.span, x)

    def bigcall(self, x: _BigCall) -> A.Node:
        args = list(x.args)
        word = "Sum" if x.op == "sum" else "Product"

        def var_of(a: Any) -> str:
            if not isinstance(a, (_Name, A.Symbol)):
                raise self.err(f"the variable of a {word.lower()} must be a name", a)
            return a.name

        # Sum[body, {k, lo, hi}]
        if len(args) == 2 and isinstance(args[1], _BraceList):
            items = args[1].items
            if len(items) != 3:
                raise self.err("iterator must be {variable, lower, upper}", args[1])
            return self._make_bigop(x.op, var_of(items[0]), args[0], items[1], items[2], None, x.span, x)
        if len(args) == 2:
            for rng, body in ((args[0], args[1]), (args[1], args[0])):
                if isinstance(rng, _Arg):
                    if rng.kind == "range":
                        return self._make_bigop(x.op, var_of(rng.parts[0]), body, rng.parts[1], rng.parts[2],
                                                None, x.span, x)
                    if rng.kind == "range_bare":
                        return self._make_bigop(x.op, None, body, rng.parts[0], rng.parts[1], None, x.span, x)
                    if rng.kind == "ge":
                        return self._make_bigop(x.op, var_of(rng.parts[0]), body, rng.parts[1],
                                                self._inf(rng.span), None, x.span, x)
                    if rng.kind == "div":
                        return self._make_bigop(x.op, var_of(rng.parts[0]), body, None, None, rng.parts[1],
                                                x.span, x)
                    if rng.kind == "eq":
                        return self._make_bigop(x.op, var_of(rng.parts[0]), body, rng.parts[1],
                                                self._inf(rng.span), None, x.span, x)
            if isinstance(args[0], (_Name, A.Symbol)) and not isinstance(args[1], _Arg):
                return self._make_bigop(x.op, args[0].name, args[1], None, None, None, x.span, x)
        if len(args) == 3:
            # sum(k=0, n, body)  /  sum(body, k=0, n)
            if isinstance(args[0], _Arg) and args[0].kind == "eq":
                return self._make_bigop(x.op, var_of(args[0].parts[0]), args[2], args[0].parts[1], args[1],
                                        None, x.span, x)
            if isinstance(args[1], _Arg) and args[1].kind == "eq":
                return self._make_bigop(x.op, var_of(args[1].parts[0]), args[0], args[1].parts[1], args[2],
                                        None, x.span, x)
        if len(args) == 4 and isinstance(args[1], (_Name, A.Symbol)):
            # sum(body, k, lo, hi)
            return self._make_bigop(x.op, args[1].name, args[0], args[2], args[3], None, x.span, x)
        raise self.err(f"cannot read the limits of this {word.lower()}; write {x.op}(k=0..n, body)", x)


_EXPR_HANDLERS: dict[type, Any] = {
    _Name: _Resolver.name,
    _Apply: _Resolver.apply,
    _Sub: _Resolver.subscript,
    _BigSub: _Resolver.bigsub,
    _BigCall: _Resolver.bigcall,
    _BraceList: _Resolver._misplaced,
    _Arg: _Resolver._misplaced,
    _DotsMark: _Resolver._misplaced,
    _Rel: _Resolver._misplaced,
    A.BinOp: _Resolver._binop,
    A.UnaryOp: lambda self, x: _unary(x.op, self.expr(x.operand), x.span),
    A.Power: lambda self, x: _power(self.expr(x.base), self.expr(x.exponent), x.span),
    A.Factorial: lambda self, x: _factorial(self.expr(x.operand), x.double, x.span),
    A.Call: lambda self, x: _call(x.name, tuple(map(self.expr, x.args)), x.written, x.span),
    A.Integer: lambda self, x: x,
    A.Decimal: lambda self, x: x,
    A.Rational: lambda self, x: x,
    A.Constant: lambda self, x: x,
    A.Symbol: lambda self, x: x,
}
