"""Small HTML building blocks for the calculation sheet: escaping, tables, bars, the page.

Everything returns plain strings; nothing here touches files or matplotlib. The page
is self-contained: inline CSS, inline SVG, no scripts and no external references.

Examples
--------
>>> esc("a < b & c")
'a &lt; b &amp; c'
>>> table(["x", "y"], [["1", "2"]])
'<table class="keep"><thead><tr><th>x</th><th>y</th></tr></thead><tbody><tr><td>1</td><td>2</td></tr></tbody></table>'
>>> util_bar(0.5).count("<rect")
3
"""

from __future__ import annotations

import html
import re

__all__ = ["esc", "Cell", "num", "table", "util_bar", "section", "page", "CSS", "inline_svg"]


def esc(text) -> str:
    """HTML-escape ``text`` (any object, via ``str``)."""
    return html.escape(str(text), quote=True)


class Cell(str):
    """A table cell that is already HTML (not escaped again), with optional ``td`` attributes."""

    def __new__(cls, content: str, attrs: str = ""):
        obj = super().__new__(cls, content)
        obj.attrs = attrs
        return obj


def num(text: str, key: str | None = None) -> Cell:
    """A right-aligned number cell; ``key`` lands in ``data-key`` so tests can find it.

    >>> num("12.5", "M_max")
    '12.5'
    >>> num("12.5", "M_max").attrs
    ' class="num" data-key="M_max"'
    """
    attrs = ' class="num"' + (f' data-key="{esc(key)}"' if key else "")
    return Cell(esc(text), attrs)


def _cell(tag: str, value) -> str:
    if isinstance(value, Cell):
        return f"<{tag}{value.attrs}>{value}</{tag}>"
    return f"<{tag}>{esc(value)}</{tag}>"


KEEP_ROWS = 30  # about a printed page of rows


def table(header, rows, cls: str = "", row_classes=None, caption: str = "") -> str:
    """An HTML table; plain strings are escaped, :class:`Cell` values are used as they are."""
    if len(rows) <= KEEP_ROWS:  # a short table is printed whole, never split over two pages
        cls = f"{cls} keep".strip()
    open_ = f'<table class="{esc(cls)}">' if cls else "<table>"
    out = [open_]
    if caption:
        out.append(f"<caption>{esc(caption)}</caption>")
    out.append("<thead><tr>" + "".join(_cell("th", h) for h in header) + "</tr></thead><tbody>")
    for i, r in enumerate(rows):
        rc = row_classes[i] if row_classes else ""
        out.append((f'<tr class="{esc(rc)}">' if rc else "<tr>") + "".join(_cell("td", c) for c in r) + "</tr>")
    out.append("</tbody></table>")
    return "".join(out)


def util_bar(u, width: int = 110, height: int = 11) -> str:
    """A small inline-SVG bar for a utilisation ``u`` (1.0 = at the limit; capped at 1.5 in length).

    Green up to 0.9, amber up to 1.0, red beyond; the 1.0 mark is a thin black line.
    """
    if u is None:
        return ""
    full = 1.5
    frac = max(0.0, min(float(u), full)) / full
    colour = "#2e8b57" if u <= 0.9 else ("#d4a017" if u <= 1.0 else "#c0392b")
    one = width / full
    return (f'<svg class="bar" width="{width}" height="{height}" viewBox="0 0 {width} {height}" '
            f'role="img" aria-label="utilisation {u:.3f}">'
            f'<rect x="0" y="0" width="{width}" height="{height}" fill="#eeeeee"/>'
            f'<rect x="0" y="1" width="{frac * width:.1f}" height="{height - 2}" fill="{colour}"/>'
            f'<rect x="{one - 0.75:.1f}" y="0" width="1.5" height="{height}" fill="#000000"/></svg>')


def section(title: str, body: str, cls: str = "part", anchor: str = "") -> str:
    """One part of the sheet; every part after the first starts on a new printed page."""
    ident = f' id="{esc(anchor)}"' if anchor else ""
    return f'<section class="{esc(cls)}"{ident}><h2>{esc(title)}</h2>\n{body}\n</section>'


_ID = re.compile(r'\bid="([^"]+)"')


def inline_svg(svg: str, prefix: str) -> str:
    """Make an SVG document fit for inlining: drop the XML prolog, doctype and metadata,
    and prefix every id (and its references) so several figures can share one page."""
    svg = re.sub(r"<\?xml[^>]*\?>", "", svg)
    svg = re.sub(r"<!DOCTYPE[^>]*>", "", svg, flags=re.S)
    svg = re.sub(r"<metadata>.*?</metadata>", "", svg, flags=re.S)
    ids = set(_ID.findall(svg))
    for i in sorted(ids, key=len, reverse=True):
        svg = svg.replace(f'id="{i}"', f'id="{prefix}-{i}"').replace(f"#{i})", f"#{prefix}-{i})")
        svg = svg.replace(f'href="#{i}"', f'href="#{prefix}-{i}"')
    # width/height in pt make the figure too wide for a printed page; let CSS size it
    svg = re.sub(r'(<svg[^>]*?)\swidth="[^"]*"', r"\1", svg, count=1)
    svg = re.sub(r'(<svg[^>]*?)\sheight="[^"]*"', r"\1", svg, count=1)
    return svg.strip()


CSS = """
@page { size: auto; margin: 12mm; }
* { box-sizing: border-box; }
body { font-family: "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; font-size: 10pt; color: #111;
       margin: 0; background: #fff; }
main { max-width: 180mm; margin: 0 auto; padding: 8mm 0; }
h1 { font-size: 17pt; margin: 0 0 2mm 0; }
h2 { font-size: 13pt; border-bottom: 1.5px solid #333; padding-bottom: 1mm; margin: 0 0 3mm 0; }
h3 { font-size: 11pt; margin: 4mm 0 2mm 0; }
p { margin: 1.5mm 0; }
.meta { color: #333; margin-bottom: 3mm; }
.meta td { padding: 0.5mm 3mm 0.5mm 0; border: none; }
.caution { border: 2.5px solid #b03a2e; background: #fdecea; padding: 3mm 4mm; margin: 3mm 0 4mm 0;
           font-weight: bold; -webkit-print-color-adjust: exact; print-color-adjust: exact; }
.invented { border: 1.5px dashed #7d6608; background: #fef9e7; padding: 2mm 4mm; margin: 2mm 0;
            -webkit-print-color-adjust: exact; print-color-adjust: exact; }
.verdict { font-size: 11.5pt; padding: 2mm 4mm; margin: 2mm 0 3mm 0; border-left: 5px solid #2e8b57;
           background: #eef7f1; -webkit-print-color-adjust: exact; print-color-adjust: exact; }
.verdict.fail { border-left-color: #c0392b; background: #fdecea; }
section.part { margin-top: 6mm; }
section.part + section.part { break-before: page; page-break-before: always; }
table { border-collapse: collapse; margin: 1mm 0 3mm 0; font-size: 9pt; width: 100%; }
caption { text-align: left; font-weight: bold; padding-bottom: 1mm; }
th, td { border: 0.6px solid #999; padding: 0.8mm 1.6mm; text-align: left; vertical-align: middle; }
th { background: #eceff1; -webkit-print-color-adjust: exact; print-color-adjust: exact; }
table.ranked td:nth-child(2) { white-space: nowrap; }
table.ranked th, table.ranked td { padding: 0.6mm 1.2mm; }
table.ranked { font-size: 8pt; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr { break-inside: avoid; page-break-inside: avoid; }
table.keep { break-inside: avoid; page-break-inside: avoid; }
h2, h3, caption { break-after: avoid; page-break-after: avoid; }
tr.chosen td { font-weight: bold; background: #eef7f1; -webkit-print-color-adjust: exact; print-color-adjust: exact; }
tr.fails td { color: #8a1f11; }
td.pass { color: #1e6b3a; font-weight: bold; }
td.fail { color: #b03a2e; font-weight: bold; }
figure { margin: 2mm 0 4mm 0; break-inside: avoid; page-break-inside: avoid; }
figure svg { width: 100%; height: auto; display: block; }
figure.section-drawing svg { width: auto; height: 100mm; max-width: 100%; margin: 0 auto; }
figcaption { font-size: 8.5pt; color: #333; margin-top: 1mm; }
svg.bar { vertical-align: middle; }
ul { margin: 1mm 0 2mm 0; padding-left: 6mm; }
li { margin: 0.6mm 0; }
.small { font-size: 8.5pt; color: #333; }
footer { margin-top: 6mm; font-size: 8pt; color: #555; border-top: 0.6px solid #999; padding-top: 2mm; }
@media print { main { padding: 0; } a { color: inherit; text-decoration: none; } }
"""


def page(title: str, body: str) -> str:
    """The whole HTML document around ``body`` (inline CSS, no scripts, no external links)."""
    return ("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
            "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
            f"<title>{esc(title)}</title>\n<style>{CSS}</style>\n</head>\n<body>\n<main>\n"
            f"{body}\n</main>\n</body>\n</html>\n")
