"""The report: a PDF for the engineer of record, signed when a key is given.

    from triage.report import write_report, read_embedded
    info = write_report(survey, assessment, Path("out.pdf"), key=None, revision=None)
    survey_text, assessment_text = read_embedded(Path("out.pdf"))

This package is the only one that imports reportlab; it is imported inside functions, so
importing `triage.report` itself stays cheap. The report model (`triage.report.model`) is pure.
"""

from __future__ import annotations

import json
import logging
from dataclasses import dataclass
from datetime import UTC, datetime
from pathlib import Path
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from triage.assess import Assessment
    from triage.assess.compare import Comparison as Comparison_
    from triage.model import Survey
    from triage.photos import PhotoLoader

    from .keys import SigningKey
    from .model import Comparison

__all__ = ["ReportInfo", "read_embedded", "read_embedded_files", "render_comparison",
           "write_report"]


@dataclass(frozen=True)
class ReportInfo:
    """What was written: the path, whether it is signed, and the signer's key fingerprint."""

    path: Path
    signed: bool
    fingerprint: str | None
    pages: int
    size: int


def survey_text(survey: Survey) -> str:
    """The survey JSON text embedded in a report."""
    return json.dumps(survey.to_json_dict(), ensure_ascii=False, indent=2) + "\n"


def render_report(survey: Survey, assessment: Assessment, *, key: SigningKey | None = None,
                  revision: int | None = None, comparison: Comparison | None = None,
                  photo_dir: Path | None = None, photos: PhotoLoader | None = None,
                  signed_at: datetime | None = None) -> bytes:
    """The report PDF as bytes (signed when `key` is given); see `write_report`."""
    from .draw import render
    from .keys import ED25519
    from .model import Signer, build_report_model
    from .pdfparts import ASSESSMENT_FILE, SIGNER_FILE, SURVEY_FILE
    from .signing import content_digests, file_digest, fill_slot, find_slot, payload
    from .words import when_text

    if assessment.survey != str(survey.survey_id):
        raise ValueError(f"the assessment is of survey {assessment.survey}, "
                         f"not of {survey.survey_id}")
    stext = survey_text(survey)
    atext = assessment.to_json()
    files = [(SURVEY_FILE, stext.encode("utf-8"), "the survey (triage-survey/1)"),
             (ASSESSMENT_FILE, atext.encode("utf-8"), "the assessment (triage-assessment/1)")]
    signer = None
    first_way = key is not None and key.algorithm == ED25519
    when = (signed_at or datetime.now(UTC)).astimezone(UTC).replace(microsecond=0)
    if key is not None:
        signer_data: dict[str, Any] = {**key.public.to_json_dict(), "signed_at": when.isoformat()}
        if first_way:
            signer_data["format"] = "triage-signer/1"
            covers = ("every byte of this file but the signature slot, with the embedded "
                      "survey and assessment (Ed25519, the first-round scheme, checked by "
                      "triage verify)")
        else:
            signer_data.update({"format": "triage-signer/2", "scheme": "PAdES B-B",
                                "canonical": "RFC 8785"})
            signer_data.pop("certificate")  # the signature itself carries the certificate
            signer_data.update(content_digests(json.loads(stext), json.loads(atext)))
            covers = ("every byte of this file but the signature value: the pages and the "
                      "embedded survey, assessment and signer files (a standard PDF signature, "
                      "PAdES B-B with ECDSA P-256, which PDF readers list)")
        files.append((SIGNER_FILE, (json.dumps(signer_data, ensure_ascii=False, indent=2)
                                    + "\n").encode("utf-8"), "who signed this report"))
        ins = survey.inspection.inspector
        other = ins.name.strip() != key.name or bool(ins.id and ins.id.strip() != key.id)
        signer = Signer(key.name, key.id, key.fingerprint,
                        signed_at=when_text(when, seconds=True), covers=covers,
                        not_inspector=(ins.name + (f" (id {ins.id})" if ins.id else "")
                                       if other else ""))
    model = build_report_model(survey, assessment, revision=revision, signer=signer,
                               comparison=comparison, photo_dir=photo_dir, photos=photos)
    data = render(model, files, signed=first_way)
    if key is not None and first_way:
        start, end = find_slot(data)
        digest = file_digest(data, start, end)
        msg = payload(json.loads(stext), json.loads(atext), digest)
        data = fill_slot(data, key.sign(msg))
    elif key is not None:
        from .pades import sign

        data = sign(data, key, when)
    return data


def render_comparison(comparison: Comparison_, old: Survey, new: Survey) -> bytes:
    """The aftershock comparison PDF (an unsigned working document) as bytes."""
    from .compare_draw import render_comparison as draw
    from .compare_model import build_compare_model

    return draw(build_compare_model(comparison, old, new))


def write_report(survey: Survey, assessment: Assessment, out: Path, *,
                 key: SigningKey | None = None, revision: int | None = None,
                 comparison: Comparison | None = None,
                 photo_dir: Path | None = None,
                 photos: PhotoLoader | None = None) -> ReportInfo:
    """Write the report PDF to `out` (`triage.output.write_output`: a complete file or none).

    `revision` is the store's revision when the survey comes from the database; `comparison`
    (anything with `.lines()`) adds a "since the previous inspection" section; the photos'
    bytes come from `photos` (the store's blobs: `triage.photos.blob_loader`), else from
    inside `photo_dir`, the survey file's folder (`folder_loader`): the report never opens a
    path of the survey's beyond that folder. Unsigned output is byte-for-byte reproducible
    for the same input.
    """
    data = render_report(survey, assessment, key=key, revision=revision, comparison=comparison,
                         photo_dir=photo_dir, photos=photos)
    from triage.output import write_output

    out = Path(out)
    write_output(out, data)   # a device or FIFO in place; a file atomically, fsynced
    return ReportInfo(path=out, signed=key is not None,
                      fingerprint=key.fingerprint if key is not None else None,
                      pages=data[:data.find(b"%%EOF")].count(b"/Type /Page\n"),
                      size=len(data))  # pages of the first revision: signing adds one


def read_embedded_files(pdf: Path | bytes) -> dict[str, bytes]:
    """Every file embedded in a PDF, by name; ValueError (one line) when it cannot be read."""
    import io

    from pypdf import PdfReader
    from pypdf.errors import PyPdfError

    where = "the PDF" if isinstance(pdf, bytes) else str(pdf)
    logging.getLogger("pypdf").setLevel(logging.CRITICAL)
    try:
        reader = PdfReader(io.BytesIO(pdf) if isinstance(pdf, bytes) else pdf)
        found: dict[str, Any] = dict(reader.attachments)
    except FileNotFoundError:
        raise ValueError(f"{where}: no such file") from None
    except (PyPdfError, OSError, ValueError, KeyError, TypeError, AttributeError,
            IndexError, AssertionError, NotImplementedError) as err:
        raise ValueError(f"{where}: not a readable PDF ({type(err).__name__})") from None
    out: dict[str, bytes] = {}
    for name, contents in found.items():
        if len(contents) != 1:
            raise ValueError(f"{where}: the embedded file {name!r} appears more than once")
        out[name] = contents[0]
    return out


def read_embedded(pdf: Path) -> tuple[str, str]:
    """(survey JSON text, assessment JSON text) carried by a triage report PDF.

    Raises ValueError with one line naming the file when there are none.
    """
    from .pdfparts import ASSESSMENT_FILE, SURVEY_FILE

    files = read_embedded_files(pdf)
    if SURVEY_FILE not in files or ASSESSMENT_FILE not in files:
        raise ValueError(f"{pdf}: carries no embedded triage survey (not a triage report)")
    try:
        return files[SURVEY_FILE].decode("utf-8"), files[ASSESSMENT_FILE].decode("utf-8")
    except UnicodeDecodeError:
        raise ValueError(f"{pdf}: the embedded survey is not UTF-8 text") from None
