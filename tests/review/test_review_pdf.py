"""PDF reader regressions found in review: data lines must never be taken for running footers."""

from __future__ import annotations

import pytest

pytest.importorskip("pdfplumber")
pytest.importorskip("reportlab")

from peakproof import parse  # noqa: E402
from peakproof.readers import read_document  # noqa: E402
from tests.readers.test_pdf import dejavu, draw_lines  # noqa: E402

# Three pages, each ending with the short tail of a 13C list. With digits masked the tails are
# alike ("#.#, #.#, #.#."), which a footer detector comparing masked short lines mistakes for
# a running footer; the compounds are invented.
PAGES = [
    [
        "Compound 4: 1H NMR (400 MHz, CDCl3) δ 7.31 (d, J = 8.2 Hz, 2H),",
        "7.12 (d, J = 8.2 Hz, 2H), 2.33 (s, 3H). 13C NMR (101 MHz, CDCl3) δ 137.1,",
        "135.2, 129.1, 21.0.",
    ],
    [
        "Compound 5: 1H NMR (400 MHz, CDCl3) δ 7.45 (d, J = 8.5 Hz, 2H),",
        "7.02 (d, J = 8.5 Hz, 2H), 2.41 (s, 3H). 13C NMR (101 MHz, CDCl3) δ 138.4,",
        "136.6, 128.7, 20.8.",
    ],
    [
        "Compound 6: 1H NMR (400 MHz, CDCl3) δ 7.52 (d, J = 8.7 Hz, 2H),",
        "6.94 (d, J = 8.7 Hz, 2H), 2.29 (s, 3H). 13C NMR (101 MHz, CDCl3) δ 139.0,",
        "134.9, 127.5, 21.3.",
    ],
]


def test_short_data_lines_at_page_bottoms_are_kept(tmp_path):
    path = tmp_path / "si.pdf"
    draw_lines(path, PAGES, dejavu(), header="Halvorsen group · Supporting Information",
               footer="S{}")  # fmt: skip
    text = read_document(path).text
    for tail in ("135.2, 129.1, 21.0.", "136.6, 128.7, 20.8.", "134.9, 127.5, 21.3."):
        assert tail in text
    assert "Supporting Information" not in text  # the real running header still goes
    doc = parse(text)
    carbons = [len(sp.signals) for b in doc.blocks for sp in b.spectra if sp.nucleus == "13C"]
    assert carbons == [4, 4, 4]


def test_identical_data_lines_on_every_page_are_kept(tmp_path):
    # two pages holding the same compound (a reprinted table) keep all their data lines
    page = PAGES[0]
    path = tmp_path / "twice.pdf"
    draw_lines(path, [page, page], dejavu(), footer="S{}")
    text = read_document(path).text
    assert text.count("7.12 (d, J = 8.2 Hz, 2H)") == 2
    assert text.count("135.2, 129.1, 21.0.") == 2


def test_reading_costs_well_under_pdfplumbers_char_objects(tmp_path):
    """A reviewer's 300-page SI took half a minute: the reader must not pay for pdfplumber's
    per-glyph attribute resolution. Measured against pdfplumber's ``page.chars`` in the same run."""
    import time

    import pdfplumber

    line = "1H NMR (400 MHz, CDCl3) δ 7.31 (d, J = 8.2 Hz, 2H), 7.12 (d, J = 8.2 Hz, 2H), 2.33 (s, 3H)."
    path = tmp_path / "long.pdf"
    draw_lines(path, [[line[:60], line[60:]] * 20] * 12, dejavu(), footer="S{}")

    def best_of(fn, repeats=3):
        times = []
        for _ in range(repeats):
            start = time.perf_counter()
            fn()
            times.append(time.perf_counter() - start)
        return min(times)

    def plumber_chars():
        with pdfplumber.open(path) as pdf:
            for page in pdf.pages:
                page.chars  # noqa: B018 (the cost measured)

    ours = best_of(lambda: read_document(path))
    theirs = best_of(plumber_chars)
    assert ours < 0.7 * theirs, (ours, theirs)
