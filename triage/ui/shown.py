r"""Text from a survey, as a screen shows it: never raw, never markup.

A survey is written by whoever wrote the file, so a name may carry `ESC [ 2 J`, a window-title
sequence or a right-to-left override. Every text from a survey that a screen shows goes
through `triage.safetext.visible` (here: `line` for a one-line cell, `block` for text that
may wrap), so those characters read as `\u001b`, `\u202e` ...; and it is handed to Textual as
plain `rich.text.Text`, so a `[` in a name is shown, never taken for markup.

A field's input shows the same escaped text: saving an unchanged field saves nothing, and a
field edited by hand saves what is shown (the escape written out) — the control character is
not put back.
"""

from __future__ import annotations

from rich.text import Text

from triage.safetext import visible, visible_line


def line(text: object) -> Text:
    """One line of survey text (a table cell, a pick, a title), escaped and plain."""
    return Text(visible_line(str(text)), no_wrap=True)


def block(text: object) -> Text:
    """Survey text that may wrap (newlines and tabs kept), escaped and plain."""
    return Text(visible(str(text)))
