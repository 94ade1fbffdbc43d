"""Layout checks of a rendered report, shared by the report tests.

Two independent views of the same PDF:

* WeasyPrint's own layout (the boxes it paints): every piece of text inside a
  table cell must lie within that cell's border box, so that no number runs
  into its neighbour ("1.1302e+05liquid") and no heading breaks out of its
  column.
* The PDF as written, read back with pdfplumber: no two glyphs on one line
  overlap (text that ran out of its cell into the next one), and no word reads
  "nan" or "inf" (a number that was never a number).
"""

from __future__ import annotations

import io
import re
from dataclasses import dataclass

#: tolerance of the box comparisons [CSS px]: sub-pixel rounding of glyph advances
EPS_PX = 0.75
_NOT_A_NUMBER = re.compile(r"(?<![A-Za-z])[+-]?(nan|inf|infinity)(?![A-Za-z])", re.IGNORECASE)


@dataclass(frozen=True)
class Overflow:
    page: int
    text: str
    cell_text: str
    how_far_px: float


def _walk(box):
    yield box
    for child in getattr(box, "children", ()) or ():
        yield from _walk(child)


def _text_of(box) -> str:
    return " ".join(b.text for b in _walk(box) if hasattr(b, "text") and isinstance(b.text, str)).strip()


def cell_overflows(html: str) -> list[Overflow]:
    """Text boxes lying outside their table cell, in the paged (print) layout of ``html``."""
    from weasyprint import HTML
    from weasyprint.formatting_structure import boxes

    from audit.report.pdf import RefusingURLFetcher

    document = HTML(string=html, base_url=None, url_fetcher=RefusingURLFetcher.create(),
                    media_type="print").render()
    out = []
    for number, page in enumerate(document.pages, start=1):
        for box in _walk(page._page_box):
            if not isinstance(box, boxes.TableCellBox):
                continue
            left = box.border_box_x()
            right = left + box.border_width()
            for text in _walk(box):
                if not isinstance(text, boxes.TextBox) or not text.text.strip():
                    continue
                beyond = max(left - text.position_x, text.position_x + text.width - right)
                if beyond > EPS_PX:
                    out.append(Overflow(number, text.text, _text_of(box)[:60], round(beyond, 1)))
    return out


def overlapping_glyphs(pdf: bytes) -> list[tuple[int, str]]:
    """(page, text) where two glyphs on one line of the PDF overlap."""
    import pdfplumber

    found = []
    with pdfplumber.open(io.BytesIO(pdf)) as doc:
        for number, page in enumerate(doc.pages, start=1):
            chars = sorted((c for c in page.chars if c["text"].strip()),
                           key=lambda c: (round(c["top"]), c["x0"]))
            for a, b in zip(chars, chars[1:]):
                same_line = abs(a["top"] - b["top"]) < 0.5 * min(a["size"], b["size"])
                # two glyphs of one line sharing more than half the narrower one's width and
                # more than a fifth of an em: kerned pairs ("Tr", "y.") overlap by less
                overlap = min(a["x1"], b["x1"]) - max(a["x0"], b["x0"])
                narrow = min(a["x1"] - a["x0"], b["x1"] - b["x0"])
                if same_line and narrow > 0 and overlap > max(narrow / 2, 0.2 * a["size"]):
                    found.append((number, a["text"] + b["text"]))
    return found


def non_numbers(pdf: bytes) -> list[tuple[int, str]]:
    """(page, word) for every word of the PDF that reads nan or inf."""
    import pdfplumber

    found = []
    with pdfplumber.open(io.BytesIO(pdf)) as doc:
        for number, page in enumerate(doc.pages, start=1):
            text = page.extract_text() or ""
            found.extend((number, m.group(0)) for m in _NOT_A_NUMBER.finditer(text))
    return found


def page_count(pdf: bytes) -> int:
    import pypdf

    return len(pypdf.PdfReader(io.BytesIO(pdf)).pages)
