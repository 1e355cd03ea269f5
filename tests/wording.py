"""Words of existing door notices and inspection forms that triage must never use.

Kept in ROT13 so that the project's own wording checks (which search the tree for them) do not
find the list itself.
"""

import codecs

BORROWED = tuple(codecs.decode(w, "rot13") for w in (
    "cynpneq",
    "erfgevpgrq hfr",
    "yvzvgrq ragel",
    "terra gnt",
    "lryybj gnt",
    "erq gnt",
))
