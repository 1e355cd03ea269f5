"""Low-level parts added to the report PDF: embedded files and the signature slot.

The survey and assessment JSON (and, when signed, the signer's public data) travel as PDF
embedded files in the catalog's /Names /EmbeddedFiles tree, written through reportlab's own
object model so `invariant=1` output stays byte-reproducible. A signed report also carries a
`/TriageSignature` dictionary in the catalog whose `/Slot` is a fixed-length hex string: the
only bytes of the file the signed digest does not cover (see `triage.report.signing`).
"""

from __future__ import annotations

from typing import Any

SLOT_KEY = b"/Slot <"
SIG_HEX_LEN = 128  # an Ed25519 signature is 64 bytes
PLACEHOLDER = b"0" * SIG_HEX_LEN
SIG_TYPE = b"/TriageSignature"

SURVEY_FILE = "survey.json"
ASSESSMENT_FILE = "assessment.json"
SIGNER_FILE = "signer.json"


def add_to_document(doc: Any, files: list[tuple[str, bytes, str]], signed: bool) -> None:
    """Add embedded files and, if `signed`, the signature slot to a reportlab PDFDocument.

    `files` are (name, bytes, description); call before the document is formatted.
    """
    from reportlab.pdfbase.pdfdoc import (
        PDFArray,
        PDFDictionary,
        PDFName,
        PDFStream,
        PDFString,
        PDFZCompress,
    )

    entries: list[Any] = []
    for name, data, desc in sorted(files):  # a name tree lists its keys in order
        stream = PDFStream(PDFDictionary({
            "Type": PDFName("EmbeddedFile"), "Subtype": b"/application#2Fjson",
            "Params": PDFDictionary({"Size": len(data)})}), content=data, filters=[PDFZCompress])
        spec = PDFDictionary({
            "Type": PDFName("Filespec"), "F": PDFString(name), "UF": PDFString(name),
            "Desc": PDFString(desc), "AFRelationship": PDFName("Data"),
            "EF": PDFDictionary({"F": doc.Reference(stream)})})
        entries += [PDFString(name), doc.Reference(spec)]
    cat = doc.Catalog
    cat.Names = PDFDictionary({"EmbeddedFiles": PDFDictionary({"Names": PDFArray(entries)})})
    if signed:
        sig = PDFDictionary({"Type": PDFName("TriageSignature"),
                             "Scheme": PDFString("triage-ed25519/1"),
                             "Slot": b"<" + PLACEHOLDER + b">"})
        # PDFCatalog writes only the keys it lists; extend this one catalog's list.
        cat.__NoDefault__ = [*type(cat).__NoDefault__, "TriageSignature"]
        cat.TriageSignature = doc.Reference(sig)
