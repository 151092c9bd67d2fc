"""The repairs of ``normform/refs/repairs.py``, one invented line per class of
input, fed hand-made (deliberately wrong) labels so the checks do not depend
on the trained model.  People and titles are invented (QSEM scenario);
journal, series, publisher and place names are real facts."""

from refs_support import assemble_labelled


def _run(text, spec, conf=0.99):
    return assemble_labelled(text, spec, conf)


# --- imprints -------------------------------------------------------------------

def test_joint_imprint_keeps_its_last_place():
    text = ("A. B. Featherstone. Inkblot enumeration. Academic Press, London; Wiley & Sons, Inc., "
            "Chichester, 1971.")
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Inkblot enumeration", "title"),
                      ("Academic Press, London; Wiley & Sons, Inc.", "publisher"), ("Chichester", "place"),
                      ("1971", "date")])
    assert ref.publisher == "Academic Press, London; Wiley & Sons, Inc., Chichester"
    assert ref.year == 1971


def test_joint_imprint_stops_at_a_sentence_note():
    text = ("K. Quöllmann. Plume sums. Hermann, Paris; North-Holland Publishing Co., Amsterdam. "
            "Reprinted with corrections.")
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plume sums", "title"),
                      ("Hermann, Paris; North-Holland Publishing Co.", "publisher"), ("Amsterdam", "place")])
    assert ref.publisher == "Hermann, Paris; North-Holland Publishing Co., Amsterdam"


def test_place_after_the_publisher_is_split_off():
    text = "A. B. Featherstone. Inkblot enumeration. Springer Berlin, Heidelberg, 1987."
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Inkblot enumeration", "title"),
                      ("Springer Berlin, Heidelberg", "publisher"), ("1987", "date")])
    assert ref.publisher == "Springer Berlin"
    assert ref.place == "Heidelberg"


def test_place_after_a_company_suffix_is_split_off():
    text = "K. Quöllmann. Plume sums. Prentice Hall, Inc., Upper Saddle River, NJ, 2000."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plume sums", "title"),
                      ("Prentice Hall, Inc., Upper Saddle River, NJ", "publisher"), ("2000", "date")])
    assert ref.publisher == "Prentice Hall, Inc."
    assert ref.place == "Upper Saddle River, NJ"


def test_region_code_of_an_imprint_place_stays():
    # "Springer New York, NY" names the imprint with its own place
    text = "A. B. Featherstone. Inkblot enumeration. Springer New York, NY, 2008."
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Inkblot enumeration", "title"),
                      ("Springer New York, NY", "publisher"), ("2008", "date")])
    assert ref.publisher == "Springer New York, NY"


# --- titles and journals ---------------------------------------------------------

def test_unlabeled_first_sentence_is_the_title():
    text = "A. B. Featherstone and K. Quöllmann. Sums from THE LEDGER. Berlin: Springer, 1998."
    ref = _run(text, [("A. B. Featherstone and K. Quöllmann", "authors"), ("Berlin", "place"),
                      ("Springer", "publisher"), ("1998", "date")])
    assert ref.title == "Sums from THE LEDGER"


def test_title_before_an_abbreviated_journal_after_a_comma():
    text = "Featherstone, Ada, Counting inkblots in finite terms, Bull. Lond. Math. Soc. 79 (1972) 963–972."
    ref = _run(text, [("Featherstone, Ada", "authors"),
                      ("Counting inkblots in finite terms, Bull. Lond. Math. Soc.", "container_title"),
                      ("79", "volume"), ("1972", "date"), ("963–972", "pages")])
    assert ref.title == "Counting inkblots in finite terms"
    assert ref.container_title == "Bull. Lond. Math. Soc."


def test_journal_with_a_comma_is_not_split():
    text = "A. B. Featherstone, Publ. Math., Inst. Hautes Études Sci. 20 (1964) 101–355."
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Publ. Math., Inst. Hautes Études Sci.", "container_title"),
                      ("20", "volume"), ("1964", "date"), ("101–355", "pages")])
    assert ref.container_title == "Publ. Math., Inst. Hautes Études Sci."


def test_unlabeled_journal_before_volume_and_pages():
    text = "K. Quöllmann. Plumes du cercle. Astérisque, 330:13–59, 2010."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plumes du cercle", "title"), ("330", "series_number"),
                      ("13–59", "pages"), ("2010", "date")])
    assert ref.container_title == "Astérisque"
    assert ref.volume == "330"


def test_title_that_ran_into_an_abbreviated_journal():
    text = "K. Quöllmann. Les plumes ont-elles le meme cardinal? Pub. Sem. Math. Rennes, 4:1–12, 1973."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Les plumes ont-elles le meme cardinal? Pub", "title"),
                      ("Sem. Math. Rennes", "container_title"), ("4", "volume"), ("1–12", "pages"),
                      ("1973", "date")])
    assert ref.title == "Les plumes ont-elles le meme cardinal?"
    assert ref.container_title == "Pub. Sem. Math. Rennes"


def test_part_number_stays_with_the_title():
    text = "A. B. Featherstone. Metrical inkblots. II. Proc. Cambridge Philos. Soc., 46:209–218, 1950."
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Metrical inkblots", "title"),
                      ("II. Proc. Cambridge Philos. Soc", "container_title"), ("46", "volume"),
                      ("209–218", "pages"), ("1950", "date")])
    assert ref.title == "Metrical inkblots. II"
    assert ref.container_title == "Proc. Cambridge Philos. Soc."


# --- editions and volumes inside titles ----------------------------------------------

def test_bracketed_edition_and_volume_leave_the_title():
    text = "Featherstone, A. B. (1989). Plume topology (Second, Vol. 6). Heldermann Verlag."
    ref = _run(text, [("Featherstone, A. B.", "authors"), ("1989", "date"), ("Plume topology (Second", "title"),
                      ("6", "volume"), ("Heldermann Verlag", "publisher")])
    assert ref.title == "Plume topology"
    assert ref.edition == "Second"


def test_bracketed_numeric_edition_leaves_the_title():
    text = "Quöllmann, K. (2008). Inkwells (1st ed.). Springer."
    ref = _run(text, [("Quöllmann, K.", "authors"), ("2008", "date"), ("Inkwells (1st ed", "title"),
                      ("Springer", "publisher")])
    assert ref.title == "Inkwells"
    assert ref.edition == "1st"


def test_bare_ordinal_after_the_title_is_the_edition():
    text = "A. B. Featherstone, Plume topology, Second. Berlin: Heldermann Verlag, 1989."
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Plume topology, Second", "title"), ("Berlin", "place"),
                      ("Heldermann Verlag", "publisher"), ("1989", "date")])
    assert ref.title == "Plume topology"
    assert ref.edition == "Second"


def test_bracketed_volume_after_a_subtitle_keeps_the_subtitle():
    text = "Quöllmann, K. (2017). Random Plumes, Theory and Practice (Vol. 77). Springer."
    ref = _run(text, [("Quöllmann, K.", "authors"), ("2017", "date"), ("Random Plumes", "title"),
                      ("Theory and Practice", "container_title"), ("77", "series_number"), ("Springer", "publisher")])
    assert ref.title == "Random Plumes, Theory and Practice"
    assert ref.container_title is None


# --- names and lists ------------------------------------------------------------------

def test_author_run_past_its_period_gives_the_title_back():
    text = "Ada B Featherstone. Knots, Folds, Plumes: an eternal ink braid. Basic Books, 1979."
    ref = _run(text, [("Ada B Featherstone. Knots, Folds", "authors"), ("Plumes: an eternal ink braid", "title"),
                      ("Basic Books", "publisher"), ("1979", "date")])
    assert [n.family for n in ref.authors] == ["Featherstone"]
    assert ref.title == "Knots, Folds, Plumes: an eternal ink braid"


def test_period_inside_a_name_list_is_kept():
    text = "Ada Featherstone, Nicolas, Plumes. Tome IX, Springer, 2007."
    ref = _run(text, [("Ada Featherstone, Nicolas, Plumes. Tome IX", "authors"), ("Springer", "publisher"),
                      ("2007", "date")])
    assert ref.authors   # the lone word before the period is not taken for a whole name
    assert ref.title != "Tome IX"


def test_serial_comma_list_stays_in_the_title():
    text = "K. Quöllmann. Plumes: Knots, Folds, Families of Inks, and Blots. Cambridge University Press, 1986."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plumes: Knots, Folds", "title"),
                      ("Families of Inks, and Blots", "container_title"),
                      ("Cambridge University Press", "publisher"), ("1986", "date")])
    assert ref.title == "Plumes: Knots, Folds, Families of Inks, and Blots"
    assert ref.container_title is None


def test_publisher_and_is_not_a_serial_comma():
    text = "K. Quöllmann. Plume tables, Chapman and Hall. London, 1986."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plume tables", "title"), ("Chapman and Hall", "publisher"),
                      ("London", "place"), ("1986", "date")])
    assert ref.title == "Plume tables"
    assert ref.publisher.rstrip(".") == "Chapman and Hall"


# --- containers ------------------------------------------------------------------------

def test_book_after_in_and_editors_is_the_container():
    text = ("A. B. Featherstone. Folding inks. In K. Quöllmann, editors, Ink Theory and Its Uses, "
            "pages 144–157, Berlin, 1994. Springer.")
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Folding inks", "title"), ("K. Quöllmann", "editors"),
                      ("Ink Theory and Its Uses", "series"), ("144–157", "pages"), ("Berlin", "place"),
                      ("1994", "date"), ("Springer", "publisher")])
    assert ref.container_title == "Ink Theory and Its Uses"
    assert ref.series is None


def test_numbered_series_after_in_stays_a_series():
    text = "K. Quöllmann. Plume spectra. Number 1 in Éléments de mathématique. Springer, 2023."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plume spectra", "title"), ("1", "series_number"),
                      ("Éléments de mathématique", "series"), ("Springer", "publisher"), ("2023", "date")])
    assert ref.container_title is None
    assert ref.series == "Éléments de mathématique"


def test_second_title_before_the_pages_is_the_book():
    text = "A. B. Featherstone. Witt inks. part 1. Handbook of Plumes, page 319–472, 2009."
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Witt inks. part 1", "title"),
                      ("Handbook of Plumes", "title"), ("319–472", "pages"), ("2009", "date")])
    assert ref.title == "Witt inks. part 1"
    assert ref.container_title == "Handbook of Plumes"


def test_article_number_after_the_volume_colon_is_the_page():
    text = "K. Quöllmann. Markov inks. Advances in Mathematics, 370:107239, 2020."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Markov inks", "title"),
                      ("Advances in Mathematics", "container_title"), ("370", "volume"), ("2020", "date")])
    assert ref.pages is not None and ref.pages.first == "107239"
    assert ref.volume == "370"


def test_meeting_short_name_leaves_the_proceedings_title():
    text = ("A. B. Featherstone. Ring inks. In Proceedings of the 10th Quill Conference on Inks, QCI 2021, "
            "pages 264–277, 2021.")
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Ring inks", "title"),
                      ("Proceedings of the 10th Quill Conference on Inks, QCI 2021", "container_title"),
                      ("264–277", "pages"), ("2021", "date")])
    assert ref.container_title == "Proceedings of the 10th Quill Conference on Inks"
    assert ref.series == "QCI 2021"


def test_short_name_inside_a_long_proceedings_title_stays():
    text = ("K. Quöllmann. Plumes. In 10th Quill Meeting, QM 2019, June 3-7, 2019, Ghent, Belgium, QM 2019, "
            "pages 1–9, 2019.")
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plumes", "title"),
                      ("10th Quill Meeting, QM 2019, June 3-7, 2019, Ghent, Belgium, QM 2019", "container_title"),
                      ("1–9", "pages"), ("2019", "date")])
    assert ref.container_title.endswith("QM 2019")


def test_unknown_publisher_read_into_the_title():
    text = "A. B. Featherstone. Ink theory. Vol. 2. Quill House, Colchester, 2010."
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Ink theory. Vol. 2. Quill House", "title"),
                      ("2010", "date")])
    assert ref.publisher == "Quill House"
    assert ref.place == "Colchester"
    assert ref.title.startswith("Ink theory")


def test_title_list_before_a_place_is_not_a_publisher():
    text = "K. Quöllmann, Groups, Rings and Fields, Berlin, 1990."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Groups, Rings and Fields", "title"), ("Berlin", "place"),
                      ("1990", "date")])
    assert ref.title == "Groups, Rings and Fields"
    assert ref.publisher is None


def test_number_in_series_after_a_part_numbered_title():
    text = "K. Quöllmann. Plumes. Chapitre IX. Number 2 in Éléments de mathématique. Springer, 2007."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plumes. Chapitre", "title"),
                      ("Number 2 in Éléments de mathématique", "title"), ("Springer", "publisher"), ("2007", "date")])
    assert ref.title == "Plumes. Chapitre IX"
    assert ref.series == "Éléments de mathématique"
    assert ref.series_number == "2"


def test_title_run_after_the_imprint_is_a_note():
    text = ("A. B. Featherstone. Local inks, volume 136 of Cambridge Studies in Advanced Mathematics. "
            "Cambridge University Press, Cambridge, 2013. An algebraic introduction with inky applications.")
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Local inks", "title"), ("136", "series_number"),
                      ("Cambridge Studies in Advanced Mathematics", "series"),
                      ("Cambridge University Press", "publisher"), ("Cambridge", "place"), ("2013", "date"),
                      ("An algebraic introduction with inky applications", "title")])
    assert ref.title == "Local inks"
    assert "An algebraic introduction" in (ref.note or "")


def test_family_name_read_as_the_titles_first_word():
    text = "Ada B. Featherstone. Zero inkblots in power series rings. Proc. Quill Soc., 29:30–40, 1971."
    ref = _run(text, [("Ada B.", "authors"), ("Featherstone. Zero inkblots in power series rings", "title"),
                      ("Proc. Quill Soc.", "container_title"), ("29", "volume"), ("30–40", "pages"),
                      ("1971", "date")])
    assert [n.family for n in ref.authors] == ["Featherstone"]
    assert ref.title == "Zero inkblots in power series rings"


def test_inverted_name_before_a_two_sentence_title_is_kept():
    text = "Quillby, R. Inkwells. An Introduction. Cambridge University Press, 2004."
    ref = _run(text, [("Quillby, R.", "authors"), ("Inkwells. An Introduction", "title"),
                      ("Cambridge University Press", "publisher"), ("2004", "date")])
    assert [n.family for n in ref.authors] == ["Quillby"]
    assert ref.title == "Inkwells. An Introduction"


# --- imprints without dictionary help --------------------------------------------------------

def test_unknown_publisher_with_a_glue_word():
    text = "A. B. Featherstone. A term of inky algebra. Worldwide Centre of Quills, 2021."
    ref = _run(text, [("A. B. Featherstone", "authors"), ("A term of inky algebra", "title"), ("2021", "date")])
    assert ref.publisher == "Worldwide Centre of Quills"


def test_unknown_publisher_after_a_chapters_pages():
    text = "K. Quöllmann. Local inks. In Inky Number Theory, pages 128–161. Quillson, Washington, D.C., 1967."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Local inks", "title"),
                      ("Inky Number Theory", "container_title"), ("128–161", "pages"), ("Washington", "place"),
                      ("1967", "date")])
    assert ref.publisher == "Quillson"
    assert ref.container_title == "Inky Number Theory"


def test_bracketed_series_after_the_publisher():
    text = "Featherstone, A. B. (1994) Handbook of inks. Cambridge University Press (Encyclopedia of Mathematics)."
    ref = _run(text, [("Featherstone, A. B.", "authors"), ("1994", "date"), ("Handbook of inks", "title"),
                      ("Cambridge University Press (Encyclopedia of Mathematics", "publisher")])
    assert ref.publisher == "Cambridge University Press"
    assert ref.series == "Encyclopedia of Mathematics"


def test_bracketed_acronym_stays_in_the_publisher():
    text = "Quöllmann, K. (1987) Inky algebras. American Mathematical Society (AMS)."
    ref = _run(text, [("Quöllmann, K.", "authors"), ("1987", "date"), ("Inky algebras", "title"),
                      ("American Mathematical Society (AMS", "publisher")])
    assert ref.publisher == "American Mathematical Society (AMS)"
    assert ref.series is None


def test_series_head_before_the_publisher():
    text = "A. B. Featherstone, Finite plume groups, Quill Paperbacks, Academic Press, New York, 1964."
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Finite plume groups", "title"),
                      ("Quill Paperbacks, Academic Press", "publisher"), ("New York", "place"), ("1964", "date")])
    assert ref.publisher == "Academic Press"
    assert ref.series == "Quill Paperbacks"


def test_dash_remark_after_the_title_is_a_note():
    text = "Ada Featherstone. Plumes. A Long-Form Ink Textbook — formato: libro, Quill House, 2021."
    ref = _run(text, [("Ada Featherstone", "authors"), ("Plumes. A Long-Form", "title"),
                      ("Quill House", "publisher"), ("2021", "date")])
    assert ref.title == "Plumes. A Long-Form Ink Textbook"
    assert "formato: libro" in (ref.note or "")


def test_dash_inside_a_title_without_a_remark_stays():
    text = "K. Quöllmann. Plumes — a survey of folding, Quill House, 2021."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plumes — a survey of folding", "title"),
                      ("Quill House", "publisher"), ("2021", "date")])
    assert ref.title == "Plumes — a survey of folding"


def test_quoted_title_then_journal_with_vol_keyword():
    text = "Quöllmann, K. (2010) “Plumes d'une variable”, Astérisque, vol. 330, pp. 13–59."
    ref = _run(text, [("Quöllmann, K.", "authors"), ("2010", "date"), ("Plumes d'une variable", "title"),
                      ("Astérisque", "series"), ("330", "series_number"), ("13–59", "pages")])
    assert ref.container_title == "Astérisque"
    assert ref.volume == "330"


def test_series_name_with_a_glue_word_after_volume_of():
    text = "A. B. Featherstone. Plume topology, volume 6 of Sigma Series in Pure Mathematics. Heldermann, 1989."
    ref = _run(text, [("A. B. Featherstone", "authors"), ("Plume topology", "title"), ("6", "series_number"),
                      ("Sigma Series", "series"), ("Pure Mathematics", "container_title"),
                      ("Heldermann", "publisher"), ("1989", "date")])
    assert ref.series == "Sigma Series in Pure Mathematics"
    assert ref.container_title is None


def test_title_pieces_in_one_sentence_are_joined():
    text = "K. Quöllmann. Le théorème de Plume, d'adjonction des encres, revisité. C. R. Quill, 34:49–52, 2007."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Le théorème de Plume", "title"),
                      ("d'adjonction des encres", "title"), ("C. R. Quill", "container_title"), ("34", "volume"),
                      ("49–52", "pages"), ("2007", "date")])
    assert ref.title.startswith("Le théorème de Plume, d'adjonction des encres")


def test_title_colon_pieces_around_a_stray_journal_are_joined():
    text = "A. Featherstone. A Drop of Ink, I: Real Inks: Pages from Year Three of a Blog. Quill House, 2010."
    ref = _run(text, [("A. Featherstone", "authors"), ("A Drop of Ink, I", "title"), ("Real Inks", "container_title"),
                      ("Year Three of a Blog", "title"), ("Quill House", "publisher"), ("2010", "date")])
    assert ref.title == "A Drop of Ink, I: Real Inks: Pages from Year Three of a Blog"
    assert ref.container_title is None


def test_series_after_a_title_comma_is_not_joined():
    text = "Featherstone, A., Plume spectra. Chapitres 3 à 5, Éléments de plumes, Quill House, 2023."
    ref = _run(text, [("Featherstone, A.", "authors"), ("Plume spectra. Chapitres 3 à 5", "title"),
                      ("Éléments de plumes", "title"), ("Quill House", "publisher"), ("2023", "date")])
    assert ref.title == "Plume spectra. Chapitres 3 à 5"


def test_lower_case_name_run_after_the_title_is_the_title():
    text = "K. Quöllmann. The generalized plume-ink-quill lemma. Quill House, 2023."
    ref = _run(text, [("K. Quöllmann", "authors"), ("The generalized plume", "title"), ("-ink-quill lemma", "authors"),
                      ("Quill House", "publisher"), ("2023", "date")])
    assert ref.title == "The generalized plume-ink-quill lemma"
    assert [n.family for n in ref.authors] == ["Quöllmann"]


def test_series_head_read_into_the_title():
    text = "A. Featherstone. Analysis in inkwells. A Series of Modern Surveys in Quills. Springer, 2016."
    ref = _run(text, [("A. Featherstone", "authors"), ("Analysis in inkwells. A Series", "title"),
                      ("Modern Surveys in Quills", "series"), ("Springer", "publisher"), ("2016", "date")])
    assert ref.title == "Analysis in inkwells"
    assert ref.series == "A Series of Modern Surveys in Quills"


# --- proceedings imprints ------------------------------------------------------------------

def test_imprint_after_the_proceedings_title_sentence():
    text = ("Quöllmann K (2019) Plumes. In: Featherstone A (eds) 10th Quill Meeting (QM 2019). "
            "Quill House – Centre for Inks, Dagstuhl, Germany, pp 19:1–19:9")
    ref = _run(text, [("Quöllmann K", "authors"), ("2019", "date"), ("Plumes", "title"),
                      ("Featherstone A", "editors"),
                      ("10th Quill Meeting (QM 2019). Quill House – Centre for Inks, Dagstuhl, Germany",
                       "container_title"), ("19:1–19:9", "pages")])
    assert ref.container_title == "10th Quill Meeting (QM 2019)"
    assert ref.publisher.rstrip(".") == "Quill House – Centre for Inks"
    assert ref.place == "Dagstuhl, Germany"


def test_place_then_publisher_as_a_second_container():
    text = ("K. Quöllmann, “Plumes”, in 10th Quill Meeting (QM 2019), vol. 141 of Quill Series. "
            "Dagstuhl, Germany: Quill House, 2019.")
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plumes", "title"), ("10th Quill Meeting (QM 2019", "container_title"),
                      ("141", "series_number"), ("Quill Series", "series"),
                      ("Dagstuhl, Germany: Quill House", "container_title"), ("2019", "date")])
    assert ref.container_title == "10th Quill Meeting (QM 2019)"
    assert ref.publisher == "Quill House"


def test_city_and_country_alone_are_the_place():
    text = ("A. Featherstone. Plumes. In 10th Quill Meeting, volume 14 of Quill Series, pages 1–9, "
            "Dagstuhl, Germany, 2019. Quill House.")
    ref = _run(text, [("A. Featherstone", "authors"), ("Plumes", "title"), ("10th Quill Meeting", "container_title"),
                      ("14", "series_number"), ("Quill Series", "series"), ("1–9", "pages"),
                      ("Dagstuhl, Germany", "container_title"), ("2019", "date")])
    assert ref.container_title == "10th Quill Meeting"
    assert ref.publisher != "Dagstuhl"


def test_publisher_sentence_after_the_year():
    text = ("A. Featherstone. Plumes. In 10th Quill Meeting, pages 9:1–9:19, Ghent, 2022. "
            "Quill House – Centre for Inks.")
    ref = _run(text, [("A. Featherstone", "authors"), ("Plumes", "title"), ("10th Quill Meeting", "container_title"),
                      ("9:1–9:19", "pages"), ("Ghent", "place"), ("2022", "date")])
    assert ref.publisher.rstrip(".") == "Quill House – Centre for Inks"


def test_publisher_after_the_pages_as_a_second_container():
    text = ("A. Featherstone. Plumes. In B. Quill, editors, 10th Quill Meeting, volume 141 of QS, "
            "pages 12:1–12:17. Quill House - Centre for Inks, 2019.")
    ref = _run(text, [("A. Featherstone", "authors"), ("Plumes", "title"), ("B. Quill", "editors"),
                      ("10th Quill Meeting", "container_title"), ("141", "series_number"), ("QS", "series"),
                      ("12:1–12:17", "pages"), ("Quill House - Centre for Inks", "container_title"), ("2019", "date")])
    assert ref.container_title == "10th Quill Meeting"
    assert ref.publisher == "Quill House - Centre for Inks"


# --- journal clusters, subtitles, publisher names ----------------------------------------------

def test_bracketed_journal_series_before_the_volume():
    text = "K. Quöllmann. Plumes in real spaces. Ann. Quill Math. (2), 96:98–173, 1972."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plumes in real spaces", "title"),
                      ("Ann. Quill Math.", "container_title"), ("2", "issue"), ("96", "volume"),
                      ("98–173", "pages"), ("1972", "date")])
    assert ref.container_title == "Ann. Quill Math. (2)"
    assert ref.issue is None and ref.volume == "96"


def test_bracketed_roman_issue_after_the_volume():
    text = "A. Featherstone. Plumes du cercle. Contemporary Mathematics, 58(III):81–106, 1987."
    ref = _run(text, [("A. Featherstone", "authors"), ("Plumes du cercle", "title"),
                      ("Contemporary Mathematics", "container_title"), ("58", "volume"), ("81–106", "pages"),
                      ("1987", "date")])
    assert ref.issue == "III"


def test_year_in_brackets_after_the_volume_is_no_issue():
    text = "A. Featherstone. Plumes. Quill J., 301 (2005), 1–20."
    ref = _run(text, [("A. Featherstone", "authors"), ("Plumes", "title"), ("Quill J.", "container_title"),
                      ("301", "volume"), ("2005", "date"), ("1–20", "pages")])
    assert ref.issue is None and ref.year == 2005


def test_article_number_read_as_an_issue():
    text = "K. Quöllmann. Self-dual plumes. Proc. Quill Soc., 144:1, 10 2015."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Self-dual plumes", "title"),
                      ("Proc. Quill Soc.", "container_title"), ("144", "volume"), ("1", "issue"),
                      ("10 2015", "date")])
    assert ref.pages is not None and ref.pages.first == "1"
    assert ref.issue is None


def test_unlabeled_subtitle_after_the_colon():
    text = "A. Featherstone. Letters of two quills: Briefwechsel 1729–1764. Quill House, 2022."
    ref = _run(text, [("A. Featherstone", "authors"), ("Letters of two quills", "title"), ("1729–1764", "pages"),
                      ("Quill House", "publisher"), ("2022", "date")])
    assert ref.title == "Letters of two quills: Briefwechsel 1729–1764"
    assert ref.pages is None


def test_unlabeled_head_of_the_publisher_name():
    text = "K. Quöllmann. Plumes. Walter de Gruyter GmbH, 2022."
    ref = _run(text, [("K. Quöllmann", "authors"), ("Plumes", "title"), ("Gruyter GmbH", "publisher"),
                      ("2022", "date")])
    assert ref.publisher == "Walter de Gruyter GmbH"


def test_bracketed_volume_read_into_the_title():
    text = "Featherstone, A. (2005). Inky algebras of affine type (Vol. 96). Cambridge University Press."
    ref = _run(text, [("Featherstone, A.", "authors"), ("2005", "date"), ("Inky algebras of affine type (Vol", "title"),
                      ("96", "series_number"), ("Cambridge University Press", "publisher")])
    assert ref.title == "Inky algebras of affine type"


def test_typed_bracketed_edition_stays_in_the_title():
    text = "A. Featherstone. Ideals and inks (2. ed.). Springer, 1997."
    ref = _run(text, [("A. Featherstone", "authors"), ("Ideals and inks (2. ed.)", "title"), ("Springer", "publisher"),
                      ("1997", "date")])
    assert ref.title.startswith("Ideals and inks (2. ed")


def test_numeric_edition_sentence_after_the_title():
    text = "Quöllmann, K. (2008) Inkwells. 1st ed. New York: Springer."
    ref = _run(text, [("Quöllmann, K.", "authors"), ("2008", "date"), ("Inkwells. 1st ed", "title"),
                      ("New York", "place"), ("Springer", "publisher")])
    assert ref.title == "Inkwells"
    assert ref.edition == "1st"


def test_series_head_after_a_comma():
    text = "A. Featherstone, Analysis in inkwells, A Series of Modern Surveys in Quills, Springer, 2016."
    ref = _run(text, [("A. Featherstone", "authors"), ("Analysis in inkwells, A Series", "title"),
                      ("Modern Surveys in Quills", "series"), ("Springer", "publisher"), ("2016", "date")])
    assert ref.title == "Analysis in inkwells"


def test_numbered_series_printed_like_a_journal_without_pages():
    text = "A. Featherstone and K. Quöllmann, Topology of ink groups I and II, Translations of Quill Monographs 91 (1991)."
    ref = _run(text, [("A. Featherstone and K. Quöllmann", "authors"), ("Topology of ink groups I and II", "title"),
                      ("Translations of Quill Monographs", "container_title"), ("91", "volume"), ("1991", "date")])
    assert ref.container_title is None
    assert ref.series == "Translations of Quill Monographs"
    assert ref.series_number == "91" and ref.volume is None


def test_journal_with_pages_is_not_a_series():
    text = "A. Featherstone, Inky notes, Lecture Notes in Quills 12 (1991), 1–20."
    ref = _run(text, [("A. Featherstone", "authors"), ("Inky notes", "title"),
                      ("Lecture Notes in Quills", "container_title"), ("12", "volume"), ("1991", "date"),
                      ("1–20", "pages")])
    assert ref.container_title == "Lecture Notes in Quills"
    assert ref.volume == "12"
