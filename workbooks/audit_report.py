"""The audit's HTML report: summary first, then every NW_ cell, then every constant that feeds them.

Every text from the workbook is escaped. The page fits a 1,280-pixel window
and prints on A4 landscape. It is written to a temporary file beside its
target, created with the permissions of any file the user writes (the
umask applies), and moved into place.
"""

from __future__ import annotations

import contextlib
import html
import os
import secrets
from pathlib import Path

from notchwise.addin import CAUTION

from .audit_compare import ABS_TOL, REL_TOL, show

__all__ = ["render_html", "write_atomically", "VERDICTS"]

#: verdict -> (heading in the summary, CSS class of its rows)
VERDICTS = {
    "differs": ("differ from the recomputation", "differs"),
    "typed over": ("were typed over (a value where the workbook was built with a formula)", "differs"),
    "not verified": ("could not be verified", "not"),
    "agrees": ("agree with the recomputation", "agrees"),
}

STYLE = """
@page { size: A4 landscape; margin: 12mm; }
body { font-family: system-ui, sans-serif; margin: 1em auto; max-width: 1240px; padding: 0 1em; color: #1d3b53; }
.caution { border-left: 6px solid #8a2d1e; padding: .5em 1em; background: #fbf1d4; }
table { border-collapse: collapse; width: 100%; font-size: 85%; table-layout: fixed; }
th, td { border: 1px solid #c7d3db; padding: .3em .4em; text-align: left; vertical-align: top; overflow-wrap: anywhere; }
th { background: #1d3b53; color: white; }
table.facts th { width: 11em; }
tr.differs > td { background: #f6d8d2; }
tr.not > td { background: #eeeeee; }
code { white-space: pre-wrap; overflow-wrap: anywhere; }
.range { max-height: 24em; overflow: auto; }
table.inner { width: auto; table-layout: auto; font-size: 90%; }
table.inner td { border-color: #e3ecf1; padding: .1em .3em; overflow-wrap: normal; }
table.inner td.off { background: #e8a396; font-weight: bold; }
ul.summary li { margin: .3em 0; }
@media print { .range { max-height: none; overflow: visible; } tr { break-inside: avoid; } }
"""

TABLE_CELLS_SHOWN = 400  # a saved or recomputed range up to this size is shown whole in the report


def _html_value(value, marked=()) -> str:
    """A value, or a range as a small table of all its cells with the ``marked`` (row, col) highlighted."""
    several = isinstance(value, list) and value and (len(value) > 1 or len(value[0]) > 1)
    if several and sum(len(r) for r in value) <= TABLE_CELLS_SHOWN:
        rows = "".join(
            "<tr>" + "".join(
                f'<td{" class=off" if (r, c) in marked else ""}>{html.escape(show(v))}</td>' for c, v in enumerate(row)
            ) + "</tr>"
            for r, row in enumerate(value)
        )
        return f'<div class="range"><table class="inner">{rows}</table></div>'
    return html.escape(show(value))


def _anchor(k: int) -> str:
    return f"cell-{k + 1}"


def _summary(audit) -> str:
    e = html.escape
    if not audit.cells:
        return "<p><strong>This workbook has no cells that call NW_ functions: nothing was checked.</strong></p>"
    items = []
    for verdict, (heading, _) in VERDICTS.items():
        found = [(k, c) for k, c in enumerate(audit.cells) if c.verdict == verdict]
        if found:
            links = ", ".join(f'<a href="#{_anchor(k)}">{e(c.sheet)}!{e(c.address)}</a>' for k, c in found)
            items.append(f"<li><strong>{len(found)} {e(heading)}</strong>: {links}</li>")
    checked = (f"{len(audit.cells)} cells checked ({audit.count('agrees') + audit.count('differs')} recomputed; "
               f"{audit.calls} NW_ calls, {audit.distinct_calls} distinct, each computed once)")
    return f'<p>{e(checked)}</p><ul class="summary">{"".join(items)}</ul>'


def _cell_rows(audit) -> str:
    e = html.escape
    rows = []
    for k, c in enumerate(audit.cells):
        inputs = "<br>".join(f"{e(p)} = <code>{e(s)}</code> &rarr; {e(show(v))}" for p, s, v in c.inputs)
        klass = VERDICTS[c.verdict][1]
        difference = "" if c.difference is None else f"{c.difference:.3g}"
        verdict = e(c.verdict) + (f"<br><small>{e(c.reason)}</small>" if c.reason else "")
        recomputed = _html_value(c.recomputed, set(c.entries)) if c.verdict in ("agrees", "differs") else ""
        rows.append(
            f'<tr id="{_anchor(k)}" class="{klass}"><td>{e(c.sheet)}!{e(c.address)}</td><td><code>{e(c.formula)}</code></td>'
            f"<td>{inputs}</td><td>{_html_value(c.saved, set(c.entries))}</td><td>{recomputed}</td>"
            f"<td>{difference}</td><td>{verdict}</td></tr>"
        )
    return "".join(rows)


def _constants(audit) -> str:
    e = html.escape
    if not audit.constants:
        return "<p>No constant feeds an NW_ call.</p>"
    rows = "".join(
        f"<tr><td>{e(sheet)}!{e(cell)}</td><td>{e(name)}</td><td>{e(show(value))}</td></tr>"
        for sheet, cell, name, value in audit.constants
    )
    return ('<table><colgroup><col style="width:25%"><col style="width:25%"><col></colgroup>'
            f"<tr><th>sheet!cell</th><th>defined name</th><th>value</th></tr>{rows}</table>")


def render_html(audit) -> str:
    """The audit as a self-contained HTML page; every text from the workbook is escaped."""
    e = html.escape
    notes = "".join(f"<li>{e(n)}</li>" for n in audit.notes)
    return f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>Notchwise audit of {e(audit.source)}</title>
<style>{STYLE}</style></head><body>
<h1>Notchwise audit</h1>
<p class="caution">{e(CAUTION)} Series motors must never be run unloaded.</p>
<h2>Summary</h2>
{_summary(audit)}
{f'<h2>Notes</h2><ul>{notes}</ul>' if notes else ''}
<table class="facts">
<tr><th>workbook</th><td>{e(audit.source)}</td></tr>
<tr><th>SHA-256</th><td><code>{e(audit.sha256)}</code></td></tr>
<tr><th>audited at (UTC)</th><td>{e(audit.started)}</td></tr>
<tr><th>tool</th><td>notchwise {e(audit.version)}</td></tr>
<tr><th>tolerance</th><td>|saved &minus; recomputed| &le; {ABS_TOL:g} + {REL_TOL:g} &times; max(|saved|, |recomputed|); text must match exactly</td></tr>
</table>
<h2>Cells that call NW_ functions</h2>
<table><colgroup><col style="width:9%"><col style="width:19%"><col style="width:22%"><col style="width:17%">
<col style="width:17%"><col style="width:6%"><col style="width:10%"></colgroup>
<tr><th>sheet!cell</th><th>formula</th><th>inputs (saved values)</th><th>saved result</th><th>recomputed</th><th>largest difference</th><th>verdict</th></tr>
{_cell_rows(audit)}
</table>
<p>Each cell was recomputed from the values saved in the workbook, not from a live spreadsheet; inputs that are
themselves formulas were taken at their saved values. Differing entries of a table are marked.</p>
<h2>Constants that feed NW_ calls</h2>
<p>Every typed value that an NW_ call reads, directly or through other formulas: the inputs a checker must confirm.</p>
{_constants(audit)}
</body></html>
"""


def write_atomically(path: Path, text: str) -> None:
    """Write ``text`` to a temporary file beside ``path`` and move it into place; the umask sets its permissions."""
    directory = path.parent if str(path.parent) else Path(".")
    temporary = directory / f".{path.name}.{secrets.token_hex(6)}.tmp"
    handle = os.open(temporary, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
    try:
        with os.fdopen(handle, "w", encoding="utf-8") as out:
            out.write(text)
            out.flush()
            os.fsync(out.fileno())
        os.replace(temporary, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(temporary)
        raise
