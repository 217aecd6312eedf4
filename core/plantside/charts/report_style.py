"""The design report's style sheet: for the screen, and for printing to PDF from a browser.

Inline in the report (no file, no font or script fetched). On paper: A4 or Letter (the
page size is the printer's; the content fits the narrower A4 width of 186 mm inside
12 mm margins), black text, no background colours needed, no chart or table row cut
across a page (``break-inside: avoid``), a table's header repeated on each page, the
table of contents and the screen-only notes left out.
"""

from __future__ import annotations

from plantside.charts.palette import COIL, FONT, GRID, INK, INK_SOFT, REFERENCE

__all__ = ["REPORT_CSS"]

REPORT_CSS = f"""
:root {{ color-scheme: light; }}
html {{ background: #ffffff; }}
body {{
  font-family: {FONT}; color: {INK}; background: #ffffff;
  max-width: 1040px; margin: 0 auto; padding: 24px 28px 48px; line-height: 1.4;
  font-size: 15px;
}}
h1 {{ font-size: 26px; margin: 0 0 4px; }}
h2 {{ font-size: 21px; margin: 32px 0 8px; border-bottom: 2px solid {INK}; padding-bottom: 2px; }}
h3 {{ font-size: 17px; margin: 22px 0 6px; }}
p {{ margin: 6px 0; }}
.ps-sub {{ color: {INK_SOFT}; }}
.ps-meta {{ border-collapse: collapse; margin: 8px 0; }}
.ps-meta th {{ text-align: left; padding: 1px 14px 1px 0; font-weight: 600; }}
.ps-meta td {{ padding: 1px 0; }}
.ps-caution {{
  border: 2px solid {REFERENCE}; border-left-width: 8px; padding: 8px 12px; margin: 14px 0;
}}
.ps-caution p {{ margin: 3px 0; }}
.ps-toc ol {{ columns: 2; margin: 4px 0; }}
.ps-toc a {{ color: {COIL}; }}
table.ps-table {{ border-collapse: collapse; margin: 10px 0 14px; font-size: 13px; }}
table.ps-table caption {{ text-align: left; font-weight: 600; padding: 2px 0 4px; }}
table.ps-table th, table.ps-table td {{
  border: 1px solid {GRID}; padding: 3px 6px; vertical-align: top;
}}
table.ps-table thead th {{ background: #eef1f4; text-align: left; }}
table.ps-table td {{ text-align: right; font-variant-numeric: tabular-nums; }}
table.ps-table tbody th {{ text-align: left; font-weight: 600; }}
table.ps-inputs td, table.ps-table td:first-child, .ps-schedule td:nth-child(-n+3) {{
  text-align: left;
}}
table.ps-figures td.ps-note {{ text-align: left; color: {INK_SOFT}; }}
.ps-wide {{ overflow-x: auto; }}
.ps-a {{ color: {INK_SOFT}; white-space: nowrap; }}
ul.ps-cautions li {{ margin: 2px 0; }}
figure.ps-chart {{ margin: 16px 0 22px; }}
figure.ps-chart svg {{ display: block; width: 100%; height: auto; max-height: 218mm; }}
figure.ps-chart figcaption {{ color: {INK_SOFT}; font-size: 13px; }}
details {{ margin: 4px 0 10px; }}
details summary {{ font-weight: 600; cursor: pointer; }}
footer {{ margin-top: 30px; color: {INK_SOFT}; font-size: 13px; }}
@page {{ margin: 12mm; }}
@media print {{
  html, body {{ background: #ffffff; }}
  body {{
    max-width: none; margin: 0; padding: 0; font-size: 10pt; color: #000000;
    -webkit-print-color-adjust: exact; print-color-adjust: exact;
  }}
  h1 {{ font-size: 18pt; }}
  h2 {{ font-size: 14pt; break-after: avoid; page-break-after: avoid; }}
  h3 {{ font-size: 11.5pt; break-after: avoid; page-break-after: avoid; }}
  .ps-sub, figure.ps-chart figcaption, footer, .ps-a, table.ps-figures td.ps-note {{
    color: #222222;
  }}
  .ps-toc, .ps-screen {{ display: none; }}
  .ps-wide {{ overflow: visible; }}
  table.ps-table {{ font-size: 7.5pt; width: 100%; }}
  table.ps-table th, table.ps-table td {{ padding: 1px 3px; border-color: #999999; }}
  table.ps-table thead {{ display: table-header-group; }}
  table.ps-table tr, .ps-caution, details, .ps-keep {{
    break-inside: avoid; page-break-inside: avoid;
  }}
  figure.ps-chart {{ break-inside: avoid; page-break-inside: avoid; margin: 6mm 0; }}
  .ps-section {{ break-before: page; page-break-before: always; }}
  a {{ color: #000000; text-decoration: none; }}
}}
"""
