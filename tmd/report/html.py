"""The self-contained HTML report: inline CSS, figures as base64 PNG data URIs.

Nothing in the document refers outside it (no links, scripts, fonts or
style sheets), so it reads offline and prints as it is. Table cells that
carry a results value have ``data-key`` (its key path in results.json),
``data-value`` (the full value) and, when the printed number is converted,
``data-scale``.
"""

from __future__ import annotations

import base64
import math
from dataclasses import dataclass, field
from html import escape

from tmd.report.tables import Cell, Table

STYLE = """
:root { --ink: #1b1f24; --muted: #5b6570; --rule: #c9ced4; --accent: #1d4e89; }
body { font: 10.5pt/1.45 "Segoe UI", "Helvetica Neue", Arial, sans-serif; color: var(--ink);
       max-width: 52rem; margin: 2rem auto; padding: 0 1.2rem; }
h1 { font-size: 1.55rem; margin: 0 0 .2rem; color: var(--accent); }
h2 { font-size: 1.15rem; border-bottom: 2px solid var(--accent); padding-bottom: .15rem;
     margin-top: 2rem; }
h3 { font-size: 1rem; margin: 1.2rem 0 .4rem; }
p.lead { color: var(--muted); margin-top: 0; }
table { border-collapse: collapse; margin: .4rem 0 1rem; font-size: 9.5pt; }
th, td { border-bottom: 1px solid var(--rule); padding: .18rem .6rem; text-align: left;
         vertical-align: top; }
th { background: #eef1f5; font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
p.note, figcaption { color: var(--muted); font-size: 9pt; }
figure { margin: 1rem 0; page-break-inside: avoid; break-inside: avoid; }
figure img { width: 100%; max-width: 44rem; height: auto; }
ul.cautions li { margin-bottom: .3rem; }
.box { border-left: 4px solid #b8572a; background: #fbf4ef; padding: .5rem .9rem; }
@media print {
  body { max-width: none; margin: 0; font-size: 9.5pt; }
  h2 { page-break-after: avoid; break-after: avoid; }
  table, figure { page-break-inside: avoid; break-inside: avoid; }
  @page { size: A4; margin: 16mm 14mm; }
}
"""


@dataclass(frozen=True)
class Figure:
    """A figure for the document: its PNG bytes and caption.

    Parameters
    ----------
    name : str
        Short identifier, used in the figure's HTML id.
    png : bytes
        The rendered PNG image.
    caption : str
        What the figure shows, with the units of its axes.
    """

    name: str
    png: bytes
    caption: str


@dataclass(frozen=True)
class Callout:
    """A highlighted paragraph (an outcome the reader must not miss).

    Parameters
    ----------
    text : str
        The paragraph.
    """

    text: str


@dataclass
class Section:
    """A numbered section: a title and blocks (str paragraph, Callout, Table, Figure, list).

    Parameters
    ----------
    title : str
        The section's heading (numbered by :func:`document`).
    blocks : list
        Its content in order: str (a paragraph), Callout, Table, Figure, or a
        list of str (a bulleted list).
    """

    title: str
    blocks: list = field(default_factory=list)


def _cell(tag: str, cell: Cell) -> str:
    if cell.key is None:
        return f"<{tag}>{escape(cell.text)}</{tag}>"
    attrs = f' data-key="{escape(cell.key)}" data-value="{escape(_value_attr(cell.value))}"'
    if cell.scale != 1.0:
        attrs += f' data-scale="{cell.scale!r}"'
    numeric = isinstance(cell.value, int | float) and not isinstance(cell.value, bool)
    css = ' class="num"' if numeric else ""
    return f"<{tag}{css}{attrs}>{escape(cell.text)}</{tag}>"


def _value_attr(value) -> str:
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        # results.json writes non-finite floats as null
        return "null"
    if isinstance(value, bool):
        return "true" if value else "false"
    return repr(value) if isinstance(value, float) else str(value)


def table_html(table: Table) -> str:
    """Return one <table> with its title and note.

    Parameters
    ----------
    table : Table
        The table; cells carrying a results value get ``data-key``,
        ``data-value`` and, when converted, ``data-scale``.

    Returns
    -------
    str
        The HTML fragment (heading, table, note).
    """
    head = "".join(_cell("th", c) for c in table.header)
    body = "\n".join("<tr>" + "".join(_cell("td", c) for c in row) + "</tr>"
                     for row in table.rows)
    note = f'<p class="note">{escape(table.note)}</p>' if table.note else ""
    return (f'<h3>{escape(table.title)}</h3>\n<table id="table-{escape(table.name)}">'
            f"<thead><tr>{head}</tr></thead>\n<tbody>\n{body}\n</tbody></table>{note}")


def figure_html(figure: Figure, number: int) -> str:
    """Return one <figure> with the PNG inlined as a base64 data URI.

    Parameters
    ----------
    figure : Figure
        The figure.
    number : int
        Its number in the document, printed before the caption.

    Returns
    -------
    str
        The HTML fragment.
    """
    data = base64.b64encode(figure.png).decode("ascii")
    return (f'<figure id="figure-{escape(figure.name)}"><img alt="{escape(figure.caption)}" '
            f'src="data:image/png;base64,{data}"><figcaption>Figure {number}. '
            f"{escape(figure.caption)}</figcaption></figure>")


def document(title: str, lead: str, sections: list[Section]) -> str:
    """Return the complete, self-contained HTML text.

    Parameters
    ----------
    title : str
        The document's title (also its <h1>).
    lead : str
        The paragraph under the title.
    sections : list of Section
        The numbered sections in order.

    Returns
    -------
    str
        The document: inline CSS, figures as data URIs, no external reference.
    """
    parts, figures = [], 0
    for number, section in enumerate(sections, start=1):
        parts.append(f"<h2>{number}. {escape(section.title)}</h2>")
        for block in section.blocks:
            if isinstance(block, Table):
                parts.append(table_html(block))
            elif isinstance(block, Figure):
                figures += 1
                parts.append(figure_html(block, figures))
            elif isinstance(block, list):
                items = "".join(f"<li>{escape(item)}</li>" for item in block)
                parts.append(f'<ul class="cautions">{items}</ul>')
            elif isinstance(block, Callout):
                parts.append(f'<p class="box">{escape(block.text)}</p>')
            else:
                parts.append(f"<p>{escape(block)}</p>")
    body = "\n".join(parts)
    return (f'<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n'
            f"<title>{escape(title)}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n"
            f'<h1>{escape(title)}</h1>\n<p class="lead">{escape(lead)}</p>\n{body}\n'
            "</body>\n</html>\n")
