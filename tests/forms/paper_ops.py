"""The paper form's drawing operations, recorded call by call, and the reviewed copy of them.

`record()` runs `write_paper_form` with a canvas that draws nothing and writes down every call
the form makes on it (text and where, rectangles, lines, line widths, greys, fonts, page
breaks), numbers to 0.01 point. `paper_ops_mixed.txt` beside this file is that record for a
building of two systems (concrete frame in x, braced steel frame in y), one storey band: the
layout as reviewed. A change to the form's look (a line width, a font size, a grey, a
coordinate) changes the record. Every other case the form tests print (each system's form, two
storey bands) is kept as the SHA-256 of its record in `paper_ops_digests.txt`. When a change is
meant, write both again and read the record's diff before committing it:

    python -m tests.forms.paper_ops --write

The record is made without a PDF, so it does not depend on reportlab's PDF writer, only on the
form's own code and the shipped font's widths (`stringWidth`).
"""

from __future__ import annotations

import hashlib
import sys
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any, ClassVar

from reportlab.pdfbase import pdfmetrics

GOLDEN = Path(__file__).with_name("paper_ops_mixed.txt")
DIGESTS = Path(__file__).with_name("paper_ops_digests.txt")
SYSTEMS = ("rc_frame", "steel_braced_frame")
STOREYS = 1
EVERY_STOREYS = 2   # the digests: every case of tests/forms/conftest.py, two storey bands


def _arg(v: Any) -> str:
    if isinstance(v, float):
        return f"{v:.2f}"
    if isinstance(v, tuple | list):
        return "(" + ", ".join(_arg(x) for x in v) + ")"
    return repr(v)


class Recorder:
    """A stand-in for reportlab's Canvas: every call written down as one line, nothing drawn."""

    made: ClassVar[list[Recorder]] = []

    def __init__(self, _out: Any = None, pagesize: Any = None, **_: Any) -> None:
        # pagesize is the PDF's page size; the other arguments (invariant) decide only how the
        # file is written, which the byte-for-byte tests check.
        self.calls: list[tuple[str, tuple[Any, ...], dict[str, Any]]] = []
        self.pagesize = pagesize
        Recorder.made.append(self)

    def stringWidth(self, s: str, font: str, size: float) -> float:
        return float(pdfmetrics.stringWidth(s, font, size))

    def __getattr__(self, name: str) -> Any:
        def call(*args: Any, **kw: Any) -> None:
            self.calls.append((name, args, kw))
        return call

    def lines(self) -> list[str]:
        out = [f"pagesize {_arg(self.pagesize)}"]
        for name, args, kw in self.calls:
            shown = [_arg(a) for a in args] + [f"{k}={_arg(v)}" for k, v in sorted(kw.items())]
            out.append(f"{name}({', '.join(shown)})")
        return out


@contextmanager
def recording() -> Iterator[list[Recorder]]:
    """While inside, `write_paper_form` draws on Recorders (listed in order made)."""
    from reportlab.pdfgen import canvas

    real = canvas.Canvas
    Recorder.made = []
    canvas.Canvas = Recorder  # type: ignore[misc,assignment]
    try:
        yield Recorder.made
    finally:
        canvas.Canvas = real  # type: ignore[misc]


def record(tmp: Path, systems: tuple[str, ...] = SYSTEMS, storeys: int = STOREYS
           ) -> tuple[int, list[Recorder]]:
    """The pages `write_paper_form` reports and the canvases it drew on (first pass first)."""
    from triage.forms import load_form
    from triage.report.paper_form import write_paper_form

    with recording() as made:
        pages = write_paper_form([load_form(s) for s in systems], tmp / "ops.pdf", storeys)
    return pages, list(made)


def digest(lines: list[str]) -> str:
    """A record's SHA-256, for the cases kept as a digest only."""
    return hashlib.sha256("\n".join(lines).encode("utf-8")).hexdigest()


def digests(tmp: Path) -> dict[str, str]:
    """Every case's record (the last pass), as a digest."""
    from tests.forms.conftest import CASES

    return {name: digest(record(tmp, systems, EVERY_STOREYS)[1][-1].lines())
            for name, systems in CASES.items()}


def read_digests() -> dict[str, str]:
    rows = (line.split() for line in DIGESTS.read_text(encoding="utf-8").splitlines())
    return {name: value for name, value in rows}


def main(argv: list[str]) -> int:
    import tempfile

    with tempfile.TemporaryDirectory() as tmp:
        _, made = record(Path(tmp))
        sums = digests(Path(tmp))
    text = "\n".join(made[-1].lines()) + "\n"
    if argv[1:] == ["--write"]:
        GOLDEN.write_text(text, encoding="utf-8")
        DIGESTS.write_text("".join(f"{k} {v}\n" for k, v in sums.items()), encoding="utf-8")
        print(f"wrote {GOLDEN} ({text.count(chr(10))} calls) and {DIGESTS} ({len(sums)} cases)")
        return 0
    print(text, end="")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
