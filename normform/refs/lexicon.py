"""Word lists the labeler uses as dictionary features (and the synthetic
generator draws from).

Journal, publisher, series and place names are public facts, listed from
memory; the word sets below are what the features look at, so a journal
missing from the list still lights up through its words ("Math.", "J.").
"""

from __future__ import annotations

# (full title, common abbreviation) -- from memory
JOURNALS: tuple[tuple[str, str], ...] = (
    ("Journal of Combinatorial Theory, Series A", "J. Combin. Theory Ser. A"),
    ("Journal of Combinatorial Theory, Series B", "J. Combin. Theory Ser. B"),
    ("Transactions of the American Mathematical Society", "Trans. Amer. Math. Soc."),
    ("Proceedings of the American Mathematical Society", "Proc. Amer. Math. Soc."),
    ("Bulletin of the American Mathematical Society", "Bull. Amer. Math. Soc."),
    ("Journal of the American Mathematical Society", "J. Amer. Math. Soc."),
    ("Memoirs of the American Mathematical Society", "Mem. Amer. Math. Soc."),
    ("Annals of Mathematics", "Ann. of Math."),
    ("Annals of Mathematics. Second Series", "Ann. of Math. (2)"),
    ("Proceedings of the London Mathematical Society. Third Series", "Proc. London Math. Soc. (3)"),
    ("Journal of the London Mathematical Society. Second Series", "J. London Math. Soc. (2)"),
    ("The Quarterly Journal of Mathematics. Oxford. Second Series", "Quart. J. Math. Oxford Ser. (2)"),
    ("Tohoku Mathematical Journal. Second Series", "Tohoku Math. J. (2)"),
    ("Bulletin des Sciences Mathématiques. Deuxième Série", "Bull. Sci. Math. (2)"),
    ("International Mathematics Research Notices", "Int. Math. Res. Not. IMRN"),
    ("Publications Mathématiques. Institut de Hautes Études Scientifiques", "Publ. Math. Inst. Hautes Études Sci."),
    ("Zeitschrift für Wahrscheinlichkeitstheorie und Verwandte Gebiete", "Z. Wahrsch. Verw. Gebiete"),
    ("Kyungpook Mathematical Journal", "Kyungpook Math. J."),
    ("Logical Methods in Computer Science", "Log. Methods Comput. Sci."),
    ("Mathematical Structures in Computer Science", "Math. Structures Comput. Sci."),
    ("Inventiones Mathematicae", "Invent. Math."),
    ("Duke Mathematical Journal", "Duke Math. J."),
    ("Acta Mathematica", "Acta Math."),
    ("Mathematische Annalen", "Math. Ann."),
    ("Mathematische Zeitschrift", "Math. Z."),
    ("Advances in Mathematics", "Adv. Math."),
    ("Compositio Mathematica", "Compos. Math."),
    ("Journal of Algebra", "J. Algebra"),
    ("Journal of Number Theory", "J. Number Theory"),
    ("Discrete Mathematics", "Discrete Math."),
    ("European Journal of Combinatorics", "European J. Combin."),
    ("Electronic Journal of Combinatorics", "Electron. J. Combin."),
    ("The Electronic Journal of Combinatorics", "Electron. J. Combin."),
    ("Journal of Integer Sequences", "J. Integer Seq."),
    ("The Fibonacci Quarterly", "Fibonacci Quart."),
    ("American Mathematical Monthly", "Amer. Math. Monthly"),
    ("The American Mathematical Monthly", "Amer. Math. Monthly"),
    ("Mathematics of Computation", "Math. Comp."),
    ("SIAM Journal on Discrete Mathematics", "SIAM J. Discrete Math."),
    ("SIAM Journal on Computing", "SIAM J. Comput."),
    ("SIAM Review", "SIAM Rev."),
    ("SIAM Journal on Numerical Analysis", "SIAM J. Numer. Anal."),
    ("Combinatorica", "Combinatorica"),
    ("Journal of Graph Theory", "J. Graph Theory"),
    ("Graphs and Combinatorics", "Graphs Combin."),
    ("Annals of Combinatorics", "Ann. Comb."),
    ("Discrete Applied Mathematics", "Discrete Appl. Math."),
    ("Theoretical Computer Science", "Theoret. Comput. Sci."),
    ("Journal of Symbolic Computation", "J. Symbolic Comput."),
    ("Communications in Mathematical Physics", "Comm. Math. Phys."),
    ("Journal of Mathematical Physics", "J. Math. Phys."),
    ("Letters in Mathematical Physics", "Lett. Math. Phys."),
    ("Physical Review Letters", "Phys. Rev. Lett."),
    ("Physical Review E", "Phys. Rev. E"),
    ("Journal of Physics A: Mathematical and General", "J. Phys. A"),
    ("Nuclear Physics B", "Nuclear Phys. B"),
    ("Journal of Statistical Physics", "J. Stat. Phys."),
    ("Israel Journal of Mathematics", "Israel J. Math."),
    ("Pacific Journal of Mathematics", "Pacific J. Math."),
    ("Illinois Journal of Mathematics", "Illinois J. Math."),
    ("Michigan Mathematical Journal", "Michigan Math. J."),
    ("Canadian Journal of Mathematics", "Canad. J. Math."),
    ("Journal of the London Mathematical Society", "J. London Math. Soc."),
    ("Proceedings of the London Mathematical Society", "Proc. London Math. Soc."),
    ("Bulletin of the London Mathematical Society", "Bull. London Math. Soc."),
    ("Journal für die reine und angewandte Mathematik", "J. Reine Angew. Math."),
    ("Commentarii Mathematici Helvetici", "Comment. Math. Helv."),
    ("Publications Mathématiques de l'IHÉS", "Publ. Math. IHÉS"),
    ("Annales Scientifiques de l'École Normale Supérieure", "Ann. Sci. École Norm. Sup."),
    ("Annales de l'Institut Fourier", "Ann. Inst. Fourier"),
    ("Bulletin de la Société Mathématique de France", "Bull. Soc. Math. France"),
    ("Comptes Rendus Mathématique", "C. R. Math. Acad. Sci. Paris"),
    ("Topology", "Topology"),
    ("Topology and its Applications", "Topology Appl."),
    ("Journal of Pure and Applied Algebra", "J. Pure Appl. Algebra"),
    ("Algebraic & Geometric Topology", "Algebr. Geom. Topol."),
    ("Geometry & Topology", "Geom. Topol."),
    ("Journal of Differential Geometry", "J. Differential Geom."),
    ("Journal of Functional Analysis", "J. Funct. Anal."),
    ("Journal of Approximation Theory", "J. Approx. Theory"),
    ("Journal of Mathematical Analysis and Applications", "J. Math. Anal. Appl."),
    ("Ramanujan Journal", "Ramanujan J."),
    ("Acta Arithmetica", "Acta Arith."),
    ("Journal de Théorie des Nombres de Bordeaux", "J. Théor. Nombres Bordeaux"),
    ("Annales de l'Institut Henri Poincaré", "Ann. Inst. H. Poincaré"),
    ("Séminaire Lotharingien de Combinatoire", "Sém. Lothar. Combin."),
    ("Advances in Applied Mathematics", "Adv. in Appl. Math."),
    ("Studies in Applied Mathematics", "Stud. Appl. Math."),
    ("Journal of Algebraic Combinatorics", "J. Algebraic Combin."),
    ("Order", "Order"),
    ("Integers", "Integers"),
    ("Mathematical Intelligencer", "Math. Intelligencer"),
    ("Mathematics Magazine", "Math. Mag."),
    ("College Mathematics Journal", "College Math. J."),
    ("Journal of Computational and Applied Mathematics", "J. Comput. Appl. Math."),
    ("Numerische Mathematik", "Numer. Math."),
    ("Linear Algebra and its Applications", "Linear Algebra Appl."),
    ("Random Structures & Algorithms", "Random Structures Algorithms"),
    ("Combinatorics, Probability and Computing", "Combin. Probab. Comput."),
    ("Probability Theory and Related Fields", "Probab. Theory Related Fields"),
    ("Annals of Probability", "Ann. Probab."),
    ("Journal of Logic and Computation", "J. Logic Comput."),
    ("Journal of Symbolic Logic", "J. Symbolic Logic"),
    ("Mathematical Proceedings of the Cambridge Philosophical Society", "Math. Proc. Cambridge Philos. Soc."),
    ("Quarterly Journal of Mathematics", "Q. J. Math."),
    ("Proceedings of the National Academy of Sciences", "Proc. Natl. Acad. Sci. USA"),
    ("Russian Mathematical Surveys", "Russian Math. Surveys"),
    ("Uspekhi Matematicheskikh Nauk", "Uspekhi Mat. Nauk"),
    ("Functional Analysis and Its Applications", "Funct. Anal. Appl."),
    ("Tohoku Mathematical Journal", "Tohoku Math. J."),
    ("Journal of the Mathematical Society of Japan", "J. Math. Soc. Japan"),
    ("Nagoya Mathematical Journal", "Nagoya Math. J."),
    ("Kyoto Journal of Mathematics", "Kyoto J. Math."),
    ("Journal of Knot Theory and Its Ramifications", "J. Knot Theory Ramifications"),
    ("Forum of Mathematics, Sigma", "Forum Math. Sigma"),
    ("Algebra & Number Theory", "Algebra Number Theory"),
    ("Journal of Homotopy and Related Structures", "J. Homotopy Relat. Struct."),
    ("Theory and Applications of Categories", "Theory Appl. Categ."),
    ("Applied Categorical Structures", "Appl. Categ. Structures"),
    ("Journal of Automated Reasoning", "J. Automat. Reason."),
    ("Information and Computation", "Inform. and Comput."),
    ("Communications of the ACM", "Commun. ACM"),
    ("Journal of the ACM", "J. ACM"),
    ("Nature", "Nature"),
    ("Science", "Science"),
    ("Experimental Mathematics", "Experiment. Math."),
    ("Aequationes Mathematicae", "Aequationes Math."),
    ("Monatshefte für Mathematik", "Monatsh. Math."),
    ("Archiv der Mathematik", "Arch. Math."),
    ("Manuscripta Mathematica", "Manuscripta Math."),
    ("Mathematica Scandinavica", "Math. Scand."),
    ("Studia Mathematica", "Studia Math."),
    ("Fundamenta Mathematicae", "Fund. Math."),
    ("Colloquium Mathematicum", "Colloq. Math."),
    ("Indagationes Mathematicae", "Indag. Math."),
    ("Rocky Mountain Journal of Mathematics", "Rocky Mountain J. Math."),
    ("Houston Journal of Mathematics", "Houston J. Math."),
    ("Journal of Combinatorics", "J. Comb."),
    ("Australasian Journal of Combinatorics", "Australas. J. Combin."),
    ("Ars Combinatoria", "Ars Combin."),
    ("Utilitas Mathematica", "Util. Math."),
    ("Congressus Numerantium", "Congr. Numer."),
    ("Bulletin of the Institute of Combinatorics and its Applications", "Bull. Inst. Combin. Appl."),
    ("Discrete Mathematics & Theoretical Computer Science", "Discrete Math. Theor. Comput. Sci."),
    ("Journal of Statistical Mechanics: Theory and Experiment", "J. Stat. Mech. Theory Exp."),
)

# (publisher, usual place) -- from memory
PUBLISHERS: tuple[tuple[str, str], ...] = (
    ("Springer-Verlag", "New York"), ("Springer-Verlag", "Berlin"), ("Springer", "Cham"),
    ("Springer Berlin Heidelberg", "Berlin, Heidelberg"), ("Springer New York", "New York, NY"),
    ("Springer-Verlag New York, Inc.", "New York"), ("Springer International Publishing", "Cham"),
    ("John Wiley & Sons, Inc.", "New York"), ("Marcel Dekker, Inc.", "New York"),
    ("Harper & Row", "New York"), ("Basic Books", "New York"), ("Heldermann Verlag", "Lemgo"),
    ("Springer", "Heidelberg"), ("Birkhäuser", "Basel"), ("Birkhäuser Boston", "Boston, MA"),
    ("Cambridge University Press", "Cambridge"), ("Cambridge Univ. Press", "Cambridge"),
    ("Oxford University Press", "Oxford"), ("Clarendon Press", "Oxford"),
    ("Princeton University Press", "Princeton, NJ"), ("Princeton Univ. Press", "Princeton"),
    ("American Mathematical Society", "Providence, RI"), ("Amer. Math. Soc.", "Providence, RI"),
    ("Mathematical Association of America", "Washington, DC"), ("Math. Assoc. America", "Washington, DC"),
    ("Society for Industrial and Applied Mathematics", "Philadelphia, PA"), ("SIAM", "Philadelphia"),
    ("Academic Press", "New York"), ("Academic Press", "London"), ("Elsevier", "Amsterdam"),
    ("North-Holland", "Amsterdam"), ("North-Holland Publishing Co.", "Amsterdam"),
    ("John Wiley & Sons", "New York"), ("Wiley", "Hoboken, NJ"), ("Wiley-Interscience", "New York"),
    ("Addison-Wesley", "Reading, MA"), ("Addison-Wesley Publishing Co.", "Reading, Mass."),
    ("Dover Publications", "New York"), ("Dover", "Mineola, NY"), ("McGraw-Hill", "New York"),
    ("Prentice Hall", "Englewood Cliffs, NJ"), ("CRC Press", "Boca Raton, FL"),
    ("Chapman & Hall", "London"), ("Chapman and Hall/CRC", "Boca Raton"),
    ("World Scientific", "Singapore"), ("World Scientific Publishing Co.", "River Edge, NJ"),
    ("Gauthier-Villars", "Paris"), ("Hermann", "Paris"), ("Masson", "Paris"),
    ("Société Mathématique de France", "Paris"), ("European Mathematical Society", "Zürich"),
    ("EMS Press", "Berlin"), ("De Gruyter", "Berlin"), ("Walter de Gruyter & Co.", "Berlin"),
    ("Teubner", "Leipzig"), ("B. G. Teubner", "Stuttgart"), ("Vieweg", "Braunschweig"),
    ("Nauka", "Moscow"), ("Mir", "Moscow"), ("Iwanami Shoten", "Tokyo"),
    ("Kluwer Academic Publishers", "Dordrecht"), ("D. Reidel Publishing Co.", "Dordrecht"),
    ("Marcel Dekker", "New York"), ("Chelsea Publishing Co.", "New York"),
    ("Benjamin/Cummings", "Menlo Park, CA"), ("W. A. Benjamin", "New York"),
    ("MIT Press", "Cambridge, MA"), ("Harvard University Press", "Cambridge, MA"),
    ("Yale University Press", "New Haven, CT"), ("University of Chicago Press", "Chicago"),
    ("Pergamon Press", "Oxford"), ("Interscience Publishers", "New York"),
    ("W. H. Freeman", "San Francisco"), ("Freeman", "New York"), ("Pearson", "Boston"),
    ("A K Peters", "Wellesley, MA"), ("Tata Institute of Fundamental Research", "Bombay"),
    ("Hindustan Book Agency", "New Delhi"), ("Narosa", "New Delhi"),
    ("Longman", "Harlow"), ("Blackwell", "Oxford"), ("Ellis Horwood", "Chichester"),
    ("Wadsworth & Brooks/Cole", "Monterey, CA"), ("Brooks/Cole", "Pacific Grove, CA"),
    ("Jones and Bartlett", "Boston"), ("Johns Hopkins University Press", "Baltimore, MD"),
    ("Courier Corporation", "Mineola"), ("Cengage Learning", "Boston"),
    ("Van Nostrand", "Princeton, NJ"), ("Holden-Day", "San Francisco"),
    ("Holt, Rinehart and Winston", "New York"), ("Macmillan", "London"),
    ("Mathematical Sciences Publishers", "Berkeley, CA"), ("Zanichelli", "Bologna"),
    ("Editorial Reverté", "Barcelona"), ("Alianza Editorial", "Madrid"),
    ("ACM", "New York"), ("Association for Computing Machinery", "New York, NY"), ("IEEE", "Piscataway, NJ"),
    ("IEEE Computer Society", "Los Alamitos, CA"), ("ACM Press", "New York"), ("EMS", "Zürich"),
)

SERIES: tuple[str, ...] = (
    "Lecture Notes in Mathematics", "Lecture Notes in Math.", "Graduate Texts in Mathematics",
    "Grad. Texts in Math.", "Grundlehren der Mathematischen Wissenschaften",
    "Grundlehren Math. Wiss.", "Cambridge Studies in Advanced Mathematics",
    "Cambridge Stud. Adv. Math.", "Annals of Mathematics Studies", "Ann. of Math. Stud.",
    "Encyclopedia of Mathematics and its Applications", "Encyclopedia Math. Appl.",
    "London Mathematical Society Lecture Note Series", "London Math. Soc. Lecture Note Ser.",
    "Progress in Mathematics", "Progr. Math.", "Contemporary Mathematics", "Contemp. Math.",
    "Proceedings of Symposia in Pure Mathematics", "Proc. Sympos. Pure Math.",
    "Graduate Studies in Mathematics", "Grad. Stud. Math.", "Undergraduate Texts in Mathematics",
    "Universitext", "Springer Monographs in Mathematics", "Oxford Graduate Texts in Mathematics",
    "Ergebnisse der Mathematik und ihrer Grenzgebiete", "Mathematical Surveys and Monographs",
    "Math. Surveys Monogr.", "Colloquium Publications", "Amer. Math. Soc. Colloq. Publ.",
    "Lecture Notes in Computer Science", "Lecture Notes in Comput. Sci.",
    "CMS Books in Mathematics", "Texts in Applied Mathematics", "Applied Mathematical Sciences",
    "Pure and Applied Mathematics", "Fields Institute Communications", "Oberwolfach Seminars",
    "Springer Series in Computational Mathematics", "Probability Theory and Stochastic Modelling",
    "Studies in Logic and the Foundations of Mathematics", "Cambridge Tracts in Mathematics",
    "Mathematical Sciences Research Institute Publications", "Advanced Studies in Pure Mathematics",
    "Séminaires et Congrès", "Astérisque", "Translations of Mathematical Monographs",
)

PLACES: frozenset[str] = frozenset("""
new york berlin heidelberg providence ri london cambridge oxford paris basel boston princeton nj
tokyo moscow amsterdam dordrecht philadelphia pa washington dc singapore leipzig stuttgart zurich
zürich cham braunschweig chicago baltimore md reading ma mass mass. englewood cliffs boca raton fl
mineola ny hoboken menlo park ca san francisco bombay new delhi harlow chichester monterey
pacific grove wellesley berkeley bologna barcelona madrid haven ct river edge wiesbaden göttingen
bonn vienna wien roma rome milano warsaw praha prague budapest kyoto montreal toronto
""".split())

PARTICLES: frozenset[str] = frozenset(
    "van der den de la le du des di da dos do von zu ten ter del della dello degli al el bin ibn".split())

SUFFIXES: frozenset[str] = frozenset({"Jr.", "Jr", "Sr.", "Sr", "II", "III", "IV", "Jun.", "jr.", "jr"})

GIVEN_NAMES: frozenset[str] = frozenset("""
john james robert michael william david richard joseph thomas charles daniel matthew paul mark
peter george andrew steven kenneth edward brian ronald anthony kevin jason jeffrey gary timothy
jose larry frank scott eric stephen jacob raymond patrick alexander jack dennis jerry tyler aaron
henry douglas adam nathan zachary walter kyle harold carl jeremy keith roger gerald ethan arthur
terry christian sean lawrence austin joe noah jesse albert bryan billy bruce willie jordan dylan
alan ralph gabriel roy juan wayne eugene logan randy louis russell vincent philip bobby johnny
mary patricia jennifer linda elizabeth barbara susan jessica sarah karen nancy lisa betty margaret
sandra ashley kimberly emily donna michelle dorothy carol amanda melissa deborah stephanie rebecca
sharon laura cynthia kathleen amy shirley angela helen anna brenda pamela nicole emma samantha
katherine christine debra rachel catherine carolyn janet ruth maria heather diane virginia julie
joyce victoria olivia kelly christina lauren joan evelyn judith megan cheryl andrea hannah martha
jacqueline frances gloria ann teresa kathryn sara janice jean alice madison doris abigail julia
judy grace denise amber marilyn beverly danielle theresa sophia marie diana brittany natalie isabella
charlotte rose alexis kayla jean pierre jacques michel claude andre françois fran\u00e7ois louis
hans karl friedrich heinrich wolfgang jurgen jürgen klaus dieter gerhard helmut ernst emil otto
ivan sergei sergey vladimir alexei alexey dmitri dmitry nikolai mikhail andrei yuri boris igor
giovanni giuseppe marco luca paolo francesco antonio carlo enrico luigi mario sergio
hiroshi takashi kenji satoshi yuki akira taro wei li ming jun hui xiao yan lei jian feng
carlos miguel luis jorge manuel pedro pablo javier rafael fernando ricardo alberto diego
lars nils anders erik olaf sven bjorn björn jan piotr tomasz marek andrzej pal pál laszlo lászló
gábor gabor istvan istván endre paul ronald donald herbert issai ferdinand felix leonhard
bernhard kurt emmy sophie ada srinivasa godfrey harold norbert claude alonzo alan kurt stefan
""".split())

MONTHS: dict[str, int] = {
    "jan": 1, "january": 1, "feb": 2, "february": 2, "mar": 3, "march": 3, "apr": 4, "april": 4,
    "may": 5, "jun": 6, "june": 6, "jul": 7, "july": 7, "aug": 8, "august": 8, "sep": 9, "sept": 9,
    "september": 9, "oct": 10, "october": 10, "nov": 11, "november": 11, "dec": 12, "december": 12,
}

JOURNAL_WORDS: frozenset[str] = frozenset("""
j. journal math. mathematical mathematics mathematica mathematicae mathematische ann. annals annales
proc. proceedings trans. transactions bull. bulletin soc. society amer. american acad. academy sci.
sciences comm. commun. communications comput. comp. computation theory combin. combinatorics
combinatorial algebra algebraic anal. analysis geom. geometry topology topol. invent. inventiones
adv. advances appl. applied phys. physics physical rev. review lett. letters quart. quarterly
monthly discrete electron. electronic int. internat. international nat. natl. national london
amer. pure stud. studies publ. publications rend. c. r. acad. mém. mem. memoirs sém. séminaire
zeitschrift z. arch. archiv acta arith. arithmetica univ. intelligencer mag. magazine seq.
sequences number numer. numerische canad. canadian israel pacific illinois michigan duke compos.
funct. differential diff. equations eqs. stat. statist. probab. probability logic symbolic
reine angew. helv. comment. sup. norm. école inst. fourier fund. fundamenta studia colloq.
indag. monatsh. nachr. forum sigma pi expo. experiment. siam acm ieee j.reine
""".split())

PUBLISHER_WORDS: frozenset[str] = frozenset("""
press springer springer-verlag verlag birkhäuser univ. university wiley elsevier academic dover
mcgraw-hill prentice hall crc chapman world scientific publishing publishers publications publ.
co. inc. inc ltd. ltd gmbh & company addison-wesley north-holland teubner nauka kluwer reidel
dekker chelsea cambridge oxford clarendon princeton mit harvard yale pergamon freeman pearson
peters gauthier-villars hermann masson gruyter vieweg interscience benjamin longman blackwell
horwood brooks/cole cengage nostrand holden-day macmillan zanichelli editorial reverté siam
ams soc. society association institute assoc. math. mathematical sciences ems
""".split())

SERIES_WORDS: frozenset[str] = frozenset("""
lecture notes texts graduate studies series ser. grundlehren encyclopedia tracts monographs
surveys universitext progress progr. contemporary contemp. colloquium ergebnisse lect. notes
""".split())

# Book series cited by their acronym alone ("LNM 1234, Springer"): common
# practice in mathematics and computer science.  Not a labeler feature (the
# model's features never read this table, so extending it needs no
# retraining); the repairs use it to file the acronym as the series.  The
# record keeps the acronym as typed -- the parser never expands or rewrites
# a name it read -- and the full title here is for the reader of this table
# (and for a later authority match, if one wants it).
SERIES_ACRONYMS: dict[str, str] = {
    "LNM": "Lecture Notes in Mathematics",
    "LNCS": "Lecture Notes in Computer Science",
    "LNAI": "Lecture Notes in Artificial Intelligence",
    "LNP": "Lecture Notes in Physics",
    "GTM": "Graduate Texts in Mathematics",
    "UTM": "Undergraduate Texts in Mathematics",
    "LIPIcs": "Leibniz International Proceedings in Informatics",
    "EPTCS": "Electronic Proceedings in Theoretical Computer Science",
}

GENRE_WORDS: frozenset[str] = frozenset("""
thesis dissertation phd ph.d. ph. d. doctoral master's masters habilitation diploma report
technical tech. preprint manuscript lecture notes unpublished communication personal
""".split())

CONNECTORS: frozenset[str] = frozenset("""
in and & et al. al eds. eds ed. ed editor editors edited by pp. pp p. vol. vol volume no. no
number issue art. article paper chapter ch. chap. pages available at retrieved from accessed
doi arxiv preprint to appear submitted in press forthcoming translated trans. band bd. heft nr.
""".split())

# A frozen copy of the venue table's names (``normform/data/refs-venues.tsv``,
# taken from ``venues.tsv`` by ``scripts/synth_refs.py --venues-snapshot``):
# the labeler's phrase feature and the generator read this copy, so a later
# edit of the venue table cannot change a trained model's features.
VENUES_SNAPSHOT = "refs-venues.tsv"


def venue_rows() -> tuple[tuple[str, str, tuple[str, ...]], ...]:
    """(kind, full title, other spellings) for every row of the snapshot;
    kind is "journal" or "series"."""
    global _VENUE_ROWS
    if _VENUE_ROWS is None:
        from normform.resources import data_path
        rows = []
        path = data_path(VENUES_SNAPSHOT)
        if path.exists():
            for line in path.read_text("utf-8").splitlines():
                if not line or line.startswith("#"):
                    continue
                kind, full, *other = line.split("\t")
                rows.append((kind, full, tuple(o for o in other if o)))
        _VENUE_ROWS = tuple(rows)
    return _VENUE_ROWS


_VENUE_ROWS: tuple[tuple[str, str, tuple[str, ...]], ...] | None = None
