#!/usr/bin/env python3
"""Write ``corpus_demo/legacy-references.txt``: the invented legacy reference
list of the Quillfeather Society for Enumerative Mathematics (QSEM).

Everything is invented (people, titles, DOIs, MR/Zbl numbers); journal and
publisher names are real ones.  The lines imitate decades of hand typing:
several citation styles, bold volumes, ``Vol.``/``pp.``, MR and Zbl
numbers, DOIs and arXiv ids, books with publisher, place and edition,
theses, "to appear", "personal communication", typos, stray spaces, old
8-bit bytes, junk lines, and one work cited several different ways.

Fixed seed: running it again gives the same file byte for byte.

    python scripts/make_demo_corpus.py [--lines 2400] [--out corpus_demo/legacy-references.txt]
"""

from __future__ import annotations

import argparse
import random
from pathlib import Path

SEED = 1823   # the Society's (invented) founding year

SURNAMES = """Quillby Marrowfeld Penhallow Thistlewood Ormsby Farrowdale Kettleridge Ashgrove Wendlow
Brackenbury Castellane Dunmarrow Elswick Fenwright Gallowmere Hartsell Inglethorpe Jessamy Korvath
Lindqvist-Amber Mournell Nettlefold Oakhurst Pellingrove Quarrington Rushworth Saltmarsh Tennyfield
Umbersley Vantongeren Wickersham Yarrowby Zellinger Abernathy-Cole Birchwhistle Coldharbour Darnley-Vos
Eberhardine Foxwell Greymantle Holloway-Reyes Ivensen Jorvik Kilbride Lamarche Moravcik Nakashima-Dell
Osterhaut Pruszynski Renwick-Hale Szabados Tillinghast Ulbricht Verhaegen Winterbourne Xanthopoulos
Ystradgynlais Zoltanovich Belcourt Cheverell Dufresne-Park Esterhazy-Lund Fairweather Glennister""".split()
PARTICLES = {"Vantongeren": "van", "Verhaegen": "de", "Osterhaut": "von"}
GIVEN = "Adelheid Bartholomew Cordelia Desmond Evander Florimel Gideon Hesper Isolde Jasper Kestrel \
Leopold Marisol Niall Oriel Perpetua Quentin Rosalind Silvan Tamsin Ulric Verity Wystan Ximena Yorick \
Zinnia Anselm Briony Caspian Delphine".split()

# (abbreviation, full name) of real journals
JOURNALS = [
    ("J. Combin. Theory Ser. A", "Journal of Combinatorial Theory, Series A"),
    ("Discrete Math.", "Discrete Mathematics"),
    ("European J. Combin.", "European Journal of Combinatorics"),
    ("Electron. J. Combin.", "Electronic Journal of Combinatorics"),
    ("Amer. Math. Monthly", "American Mathematical Monthly"),
    ("Fibonacci Quart.", "Fibonacci Quarterly"),
    ("J. Integer Seq.", "Journal of Integer Sequences"),
    ("Adv. in Appl. Math.", "Advances in Applied Mathematics"),
    ("Ann. Comb.", "Annals of Combinatorics"),
    ("Proc. Amer. Math. Soc.", "Proceedings of the American Mathematical Society"),
    ("Trans. Amer. Math. Soc.", "Transactions of the American Mathematical Society"),
    ("Math. Comp.", "Mathematics of Computation"),
    ("Duke Math. J.", "Duke Mathematical Journal"),
    ("Acta Arith.", "Acta Arithmetica"),
    ("Math. Mag.", "Mathematics Magazine"),
]
PUBLISHERS = [("Cambridge University Press", "Cambridge"), ("Springer-Verlag", "Berlin"),
              ("Springer-Verlag", "New York"), ("Academic Press", "New York"),
              ("North-Holland", "Amsterdam"), ("Dover Publications", "New York"),
              ("Addison-Wesley", "Reading, MA"), ("Oxford University Press", "Oxford"),
              ("Birkhäuser", "Basel"), ("Wiley", "New York")]
UNIVERSITIES = ["University of Edinburgh", "Universität Göttingen", "University of Waterloo",
                "Université de Bordeaux", "MIT", "University of Melbourne", "Uppsala Universitet"]
SUBJECTS = ["lattice paths", "plane partitions", "Motzkin paths", "restricted compositions",
            "pattern-avoiding permutations", "Dyck words", "domino tilings", "set partitions",
            "Stirling numbers", "binary trees", "necklaces", "Fibonacci words", "parking functions",
            "Young tableaux", "integer partitions", "Catalan structures", "polyominoes",
            "Bell numbers", "derangements", "Lucas sequences"]
OPENERS = ["On the enumeration of", "A bijective proof for", "Asymptotics of", "Generating functions for",
           "Congruences for", "A note on", "Refined counting of", "Some identities for",
           "The distribution of descents in", "Symmetric functions and", "Recurrences for",
           "A combinatorial interpretation of", "Further results on", "Log-concavity of"]
TAILS = ["", "", "", " with bounded height", " and their generating trees", " II", " of small height",
         " via continued fractions", " modulo primes", " in the plane", ", revisited"]
BOOK_TITLES = ["Enumerative Methods for Tilings", "Combinatorial Identities and Their Proofs",
               "An Introduction to Generating Functions", "Lattice Paths and Their Applications",
               "Partitions, Tableaux and Symmetric Functions", "Analytic Combinatorics of Words",
               "Recurrence Sequences: A Primer", "Tables of Combinatorial Numbers",
               "Counting Trees and Forests", "Finite Sums and Finite Differences"]
JUNK = ["----", "see above", "ibid.", "[12]", "xxx", "REFS CONT'D ON NEXT PAGE", "QSEM Bulletin   p. 14",
        "(reference lost in 1987 flood)", "??", "====== section B ======", "do.", "cf. previous entry",
        "TODO check this one", "*"]


class Maker:
    def __init__(self, rng: random.Random):
        self.rng = rng
        self.mr = 700000
        self.used_titles: set[str] = set()

    # -- invented people and works ------------------------------------------
    def person(self) -> tuple[str, str]:
        r = self.rng
        family = r.choice(SURNAMES)
        given = r.choice(GIVEN)
        if r.random() < 0.35:
            given += " " + r.choice(GIVEN)
        return given, family

    def work(self) -> dict:
        r = self.rng
        kind = r.choices(["article", "book", "thesis", "chapter", "preprint", "unpublished"],
                         [70, 10, 6, 5, 6, 3])[0]
        authors = [self.person() for _ in range(r.choices([1, 2, 3, 4], [45, 35, 15, 5])[0])]
        year = r.randint(1948, 2023)
        for attempt in range(6):   # prefer fresh titles; big corpora must reuse some
            if kind == "book":
                title = r.choice(BOOK_TITLES) + ("" if r.random() < .6 else f", Vol. {r.randint(1, 3)}")
            else:
                title = f"{r.choice(OPENERS)} {r.choice(SUBJECTS)}{r.choice(TAILS)}"
            if (title, year) not in self.used_titles or attempt == 5:
                self.used_titles.add((title, year))
                break
        journal = r.choice(JOURNALS)
        volume = max(1, (year - 1940) // 2 + r.randint(0, 40))
        first = r.randint(1, 900)
        work = {"kind": kind, "authors": authors, "year": year, "title": title, "journal": journal,
                "volume": volume, "issue": r.randint(1, 6), "pages": (first, first + r.randint(3, 40)),
                "publisher": r.choice(PUBLISHERS), "edition": r.choice([None, None, "2nd", "3rd"]),
                "school": r.choice(UNIVERSITIES)}
        if r.random() < 0.45:
            self.mr += r.randint(1, 4000)
            work["mr"] = f"{self.mr:07d}"
            work["mrclass"] = f"{(year + 1) % 100:02d}{r.choice('abcdefghijkm')}:{r.choice(['05', '11'])}0{r.randint(10, 99)}"
        if year >= 1995 and r.random() < 0.5:
            work["doi"] = f"10.{r.choice(['1016', '1007', '1090', '37236', '1137'])}/qsem.{year}.{r.randint(1000, 99999)}"
        if year >= 2008 and r.random() < 0.4:
            yy = year % 100
            work["arxiv"] = (f"{yy:02d}{r.randint(1, 12):02d}.{r.randint(1000, 9999)}" if year < 2015
                             else f"{yy:02d}{r.randint(1, 12):02d}.{r.randint(10000, 29999)}")
        elif 1995 <= year < 2008 and r.random() < 0.2:
            work["arxiv"] = f"math/{year % 100:02d}{r.randint(1, 12):02d}{r.randint(1, 399):03d}"
        if r.random() < 0.15:
            work["zbl"] = f"{r.randint(100, 999)}.{r.randint(10000, 99999)}"
        return work

    # -- name styles ------------------------------------------------------------
    def initials(self, given: str, spaced: bool = True) -> str:
        sep = " " if spaced else ""
        return sep.join(g[0] + "." for g in given.split())

    def fam(self, family: str) -> str:
        p = PARTICLES.get(family)
        return f"{p} {family}" if p else family

    def names(self, work: dict, style: str) -> str:
        r = self.rng
        people = work["authors"]
        if style == "ams":
            out = [f"{self.initials(g, r.random() < .8)} {self.fam(f)}" for g, f in people]
        elif style == "inverted":
            out = [f"{self.fam(f)}, {self.initials(g, r.random() < .5)}" for g, f in people]
        elif style == "full":
            out = [f"{g} {self.fam(f)}" for g, f in people]
        elif style == "caps":
            out = [f"{self.fam(f).upper()}, {self.initials(g)}" for g, f in people]
        else:
            out = [f"{self.fam(f)} {self.initials(g, False).replace('.', '')}" for g, f in people]
        if len(out) > 3 and r.random() < .6:
            return out[0] + " et al."
        if len(out) == 1:
            return out[0]
        joiner = r.choice([" and ", " & ", ", and ", " and "])
        return ", ".join(out[:-1]) + joiner + out[-1]

    # -- one citation of a work, in a random house style ------------------------
    def cite(self, w: dict) -> str:
        r = self.rng
        first, last = w["pages"]
        dash = r.choice(["-", "--", "–", "-", " - "])
        pp = f"{first}{dash}{last}"
        abbrev, full = w["journal"]
        title = w["title"]
        if r.random() < 0.1:
            title = title.lower()
        kind = w["kind"]
        if kind == "article" or kind == "preprint" and "arxiv" not in w:
            style = r.choice(["ams", "bold", "vol", "terse", "quoted"])
            if style == "ams":
                line = (f"{self.names(w, 'ams')}, {title}, {abbrev} {w['volume']} ({w['year']}), "
                        f"{'no. ' + str(w['issue']) + ', ' if r.random() < .4 else ''}{pp}.")
            elif style == "bold":
                line = (f"{self.names(w, 'inverted')} {title}. {abbrev} **{w['volume']}** "
                        f"({w['year']}) {pp}.")
            elif style == "vol":
                line = (f"{self.names(w, 'inverted')}, \"{title}\", {full}, Vol. {w['volume']}, "
                        f"No. {w['issue']}, pp. {pp}, {w['year']}.")
            elif style == "terse":
                line = f"{self.names(w, 'terse')} ({w['year']}) {title}. {abbrev} {w['volume']}:{pp}"
            else:
                line = (f"{self.names(w, r.choice(['full', 'caps']))}: \u201c{title}\u201d, "
                        f"{full} {w['volume']} ({w['year']}) {pp}")
            if kind == "preprint" or r.random() < 0.04:
                line = (f"{self.names(w, 'ams')}, {title}, {abbrev}, "
                        f"{r.choice(['to appear', 'to appear.', 'in press', '(to appear)'])}")
        elif kind == "preprint":
            line = (f"{self.names(w, 'ams')}, {title}, preprint"
                    f"{r.choice([', ', ' ', ', '])}{r.choice(['arXiv:', 'arXiv ', 'arxiv:'])}{w['arxiv']}"
                    f"{' [math.CO]' if r.random() < .4 else ''}, {w['year']}.")
        elif kind == "book":
            pub, place = w["publisher"]
            ed = f", {w['edition']} ed." if w["edition"] else ""
            style = r.choice(["ams", "colon", "paren"])
            if style == "ams":
                line = f"{self.names(w, 'ams')}, {w['title']}{ed}, {pub}, {place}, {w['year']}."
            elif style == "colon":
                line = f"{self.names(w, 'inverted')}: {w['title']}{ed} ({pub}, {place}, {w['year']})"
            else:
                line = f"{self.names(w, 'full')}. {w['title']}. {place}: {pub}{ed}, {w['year']}."
        elif kind == "thesis":
            genre = r.choice(["Ph.D. thesis", "PhD thesis", "Doctoral dissertation", "M.Sc. thesis",
                              "Ph. D. Thesis"])
            line = f"{self.names(w, r.choice(['ams', 'inverted']))}, {title}, {genre}, {w['school']}, {w['year']}."
        elif kind == "chapter":
            pub, place = w["publisher"]
            ed_g, ed_f = self.person()
            line = (f"{self.names(w, 'ams')}, {title}, in: {r.choice(BOOK_TITLES)} "
                    f"({self.initials(ed_g)} {ed_f}, ed.), {pub}, {place}, {w['year']}, pp. {pp}.")
        else:
            g, f = w["authors"][0]
            line = r.choice([f"{self.initials(g)} {self.fam(f)}, personal communication, {w['year']}.",
                             f"{self.fam(f)}, {self.initials(g)}, private communication ({w['year']})",
                             f"{self.initials(g)} {self.fam(f)}, letter to the QSEM editors, {w['year']}."])
        extras = []
        if "mr" in w and r.random() < .7:
            extras.append(r.choice([f"MR{w['mr']}", f"MR {w['mr']} ({w['mrclass']})", f"MR{int(w['mr'])}"]))
        if "zbl" in w and r.random() < .6:
            extras.append(f"Zbl {w['zbl']}")
        if "doi" in w and r.random() < .75:
            extras.append(r.choice([f"doi:{w['doi']}", f"DOI {w['doi']}", f"https://doi.org/{w['doi']}"]))
        if "arxiv" in w and kind != "preprint" and r.random() < .5:
            extras.append(f"arXiv:{w['arxiv']}")
        if extras:
            line = line.rstrip() + " " + " ".join(extras)
        return self.mess(line)

    def mess(self, line: str) -> str:
        """The damage of hand typing: typos, spacing, stray punctuation."""
        r = self.rng
        if r.random() < .08:   # swap two letters inside a word
            i = r.randrange(5, max(6, len(line) - 5))
            if line[i].isalpha() and line[i + 1].isalpha():
                line = line[:i] + line[i + 1] + line[i] + line[i + 2:]
        if r.random() < .08:
            line = line.replace(", ", ",  ", 1)
        if r.random() < .05:
            line = line.replace(". ", ".", 1)
        if r.random() < .05:
            line = line.rstrip(".") + ";"
        if r.random() < .06:
            line = f"[{r.randint(1, 120)}] " + line
        if r.random() < .03:
            line = "  " + line + "   "
        if r.random() < .04:  # an invalid DOI typed with a comma
            line = line.replace("doi:10.", "doi:10,", 1)
        return line


def build_with_truth(lines: int) -> list[tuple[bytes, int | None]]:
    """``(line bytes, invented work number or None for junk/blank)`` in file order."""
    rng = random.Random(SEED)
    maker = Maker(rng)
    out: list[tuple[str, int | None]] = []
    number = 0
    while len(out) < lines * 0.97:
        work = maker.work()
        number += 1
        copies = rng.choices([1, 2, 3, 4], [70, 18, 8, 4])[0]
        out.extend((maker.cite(work), number) for _ in range(copies))
    while len(out) < lines:
        out.append((rng.choice(JUNK), None))
    rng.shuffle(out)
    data = [(line.encode("utf-8"), work) for line, work in out]
    # A few lines saved decades ago in Latin-1: invalid UTF-8, must survive.
    accented = [i for i, (line, _) in enumerate(out) if any(c in line for c in "äöüé")]
    for i in rng.sample(accented, 3):
        data[i] = (out[i][0].encode("latin-1", errors="replace"), out[i][1])
    # and a handful of blank lines between "pages"
    for i in sorted(rng.sample(range(len(data)), 6), reverse=True):
        data.insert(i, (b"", None))
    return data


def build(lines: int) -> list[bytes]:
    return [line for line, _ in build_with_truth(lines)]


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--lines", type=int, default=2400)
    parser.add_argument("--out", default="corpus_demo/legacy-references.txt")
    args = parser.parse_args()
    data = build(args.lines)
    path = Path(args.out)
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_bytes(b"\n".join(data) + b"\n")
    print(f"wrote {len(data)} lines to {path}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
