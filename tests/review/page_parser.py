"""Reading a review page back with the standard library's HTML parser (no browser, no extra package).

Collects every element's tag and attributes, the level-diagram figures with the text of their
margin cells, and the findings table rows, so the tests can compare the page with the check's
JSON and look for anything that would be fetched from outside.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from html.parser import HTMLParser


@dataclass
class Figure:
    attributes: dict[str, str]
    margin_cells: dict[str, tuple[str, str]] = field(default_factory=dict)  # check -> (data-mv, shown text)
    has_svg: bool = False


@dataclass
class Row:
    attributes: dict[str, str]
    links: list[str] = field(default_factory=list)


class PageReader(HTMLParser):
    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.elements: list[tuple[str, dict[str, str]]] = []
        self.figures: list[Figure] = []
        self.rows: dict[str, list[Row]] = {}
        self.ids: list[str] = []
        self.scripts: list[str] = []
        self.styles: list[str] = []
        self._stack: list[str] = []
        self._figure: Figure | None = None
        self._check: str | None = None
        self._margin: tuple[str, list[str]] | None = None
        self._table: str | None = None
        self._row: Row | None = None
        self._text_sink: list[str] | None = None

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        attributes = {name: value or "" for name, value in attrs}
        self.elements.append((tag, attributes))
        if "id" in attributes:
            self.ids.append(attributes["id"])
        if tag == "figure" and "level-diagram" in attributes.get("class", ""):
            self._figure = Figure(attributes)
            self.figures.append(self._figure)
        if self._figure is not None:
            if tag == "svg":
                self._figure.has_svg = True
            if tag == "tr" and "data-check" in attributes:
                self._check = attributes["data-check"]
            if tag == "td" and "margin" in attributes.get("class", "").split() and self._check:
                self._margin = (attributes["data-mv"], [])
        if tag == "table" and "id" in attributes:
            self._table = attributes["id"]
            self.rows[self._table] = []
        if tag == "tr" and self._table and "data-rule" in attributes:
            self._row = Row(attributes)
            self.rows[self._table].append(self._row)
        if tag == "a" and self._row is not None:
            self._row.links.append(attributes.get("href", ""))
        if tag in ("script", "style"):
            self._text_sink = []

    def handle_endtag(self, tag: str) -> None:
        if tag == "td" and self._margin is not None and self._figure is not None and self._check:
            self._figure.margin_cells[self._check] = (self._margin[0], "".join(self._margin[1]).strip())
            self._margin = None
        if tag == "figure":
            self._figure = None
        if tag == "tr":
            self._check = None
            self._row = None
        if tag == "table":
            self._table = None
        if tag in ("script", "style") and self._text_sink is not None:
            (self.scripts if tag == "script" else self.styles).append("".join(self._text_sink))
            self._text_sink = None

    def handle_data(self, data: str) -> None:
        if self._margin is not None:
            self._margin[1].append(data)
        if self._text_sink is not None:
            self._text_sink.append(data)


def read_page(text: str) -> PageReader:
    reader = PageReader()
    reader.feed(text)
    reader.close()
    return reader
