"""Helpers shared by the report tests: parse the HTML page with the standard
library, so the tests do not trust the renderer's own idea of its output."""

from __future__ import annotations

from html.parser import HTMLParser


class PageScan(HTMLParser):
    """Collects tags, URL-bearing attributes and the rows of the flagged table."""

    URL_ATTRS = ("href", "src", "xlink:href", "srcset", "action", "poster", "data")

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags: list[str] = []
        self.url_attrs: list[tuple[str, str, str]] = []
        self.flagged_rows: list[list[str]] = []
        self._in_flagged = False
        self._row: list[str] | None = None
        self._note = False
        self._cell: list[str] | None = None
        self.text: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        for name, value in attrs:
            if name in self.URL_ATTRS:
                self.url_attrs.append((tag, name, value or ""))
        if tag == "table" and ("class", "flagged") in attrs:
            self._in_flagged = True
        elif self._in_flagged and tag == "tr":
            # a row's note line (class "note") belongs to the row above it: its cells are appended
            self._note = ("class", "note") in attrs
            self._row = []
        elif self._row is not None and tag == "td":
            self._cell = []

    def handle_endtag(self, tag):
        if tag == "table":
            self._in_flagged = False
        elif tag == "td" and self._cell is not None and self._row is not None:
            self._row.append(" ".join("".join(self._cell).split()))
            self._cell = None
        elif tag == "tr" and self._row is not None:
            if self._row and self._note and self.flagged_rows:
                self.flagged_rows[-1].extend(c for c in self._row if c)
            elif self._row:
                self.flagged_rows.append(self._row)
            self._row = None

    def handle_data(self, data):
        self.text.append(data)
        if self._cell is not None:
            self._cell.append(data)


def scan(page: str) -> PageScan:
    s = PageScan()
    s.feed(page)
    s.close()
    return s
