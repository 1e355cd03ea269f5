"""Check a report: intact, signed by an accepted signer, and still what this engine computes.

`verify_report(pdf, expect=None)` returns a `VerifyResult` whose `code` is the exit status of
docs/index.md ("Exit status"): 0 intact, accepted and re-assessed to the same tier and level
(probabilities within 0.01); 1 changed or damaged (or not readable); 3 unsigned; 4 intact but
the signer is not accepted; 5 intact and accepted, but this engine re-assesses the survey to
another tier or level (both named). The file's bytes are checked before anything in it is parsed.

Two kinds of signature are checked (`triage.report.signing`): the standard PDF signature of
P-256 keys (PAdES B-B, `triage.report.pades`) and the first way of Ed25519 keys. A signer is
accepted when its key is the one `expect` names or, without it, a key trusted on this laptop,
and when the name and id the report prints are those recorded with that key (and, for a
standard signature, those of its certificate); otherwise 4, naming both.

`import_verdict(pdf)` is the same check as `triage import` applies it to a report PDF.
"""

from __future__ import annotations

import json
import unicodedata
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from .keys import P256, PublicKey, normalise_fingerprint, trusted_keys
from .pdfparts import ASSESSMENT_FILE, SIGNER_FILE, SURVEY_FILE
from .signing import (
    SIGNER_MARK,
    SlotError,
    content_digests,
    file_digest,
    find_slot,
    looks_signed,
    payload,
)

PROBABILITY_TOLERANCE = 0.01


@dataclass(frozen=True)
class VerifyResult:
    """The outcome of `verify_report`: exit code, a one-line message, and who signed."""

    code: int
    message: str
    signer_name: str | None = None
    signer_id: str | None = None
    fingerprint: str | None = None
    signed_at: str | None = None
    notes: tuple[str, ...] = field(default=())
    scheme: str | None = None  # "PAdES B-B" or "Ed25519 (first way)" when signed


def _changed(why: str) -> VerifyResult:
    return VerifyResult(1, f"changed or damaged: {why}")


def verify_report(pdf: Path, expect: str | None = None,
                  trusted: list[PublicKey] | None = None) -> VerifyResult:
    """Verify a report PDF; never raises for a bad file (code 1 with the reason).

    `expect` is a fingerprint (ValueError if malformed); `trusted` replaces this laptop's
    trusted keys. The message is one line starting with the file's name.
    """
    from dataclasses import replace

    r = _verify(Path(pdf), expect, trusted)
    prefix = f"{pdf}: "
    return r if r.message.startswith(prefix) else replace(r, message=prefix + r.message)


@dataclass(frozen=True)
class _Signed:
    """A report whose signature holds: the signer as the signature proves it, and the content."""

    key: PublicKey  # name and id: as the report prints them (signer.json)
    at: str | None
    scheme: str
    survey: Any
    assessment: Any
    conflict: str | None = None  # the report's name and id disagree with its certificate's


def _verify(pdf: Path, expect: str | None, trusted: list[PublicKey] | None) -> VerifyResult:
    from .pades import has_standard_signature

    expected = normalise_fingerprint(expect) if expect is not None else None
    try:
        data = Path(pdf).read_bytes()
    except FileNotFoundError:
        return VerifyResult(1, "no such file")
    except IsADirectoryError:
        return VerifyResult(1, "is a folder, not a report")
    except OSError as err:
        return VerifyResult(1, f"cannot be read ({err.strerror})")
    if not data.startswith(b"%PDF-"):
        return VerifyResult(1, "not a PDF")
    standard, first = has_standard_signature(data), looks_signed(data)
    if standard and first:
        return _changed("the report carries both kinds of signature")
    if not standard and not first:
        if SIGNER_MARK in data:
            return _changed("the report names a signer but carries no signature")
        return VerifyResult(3, "unsigned: the report carries no signature")
    got = _check_standard(data) if standard else _check_first_way(data)
    if isinstance(got, VerifyResult):
        return got
    return _accept(got, data, expected, trusted)


def _embedded(data: bytes) -> tuple[Any, Any, dict[str, Any]] | VerifyResult:
    from . import read_embedded_files

    try:
        files = read_embedded_files(data)
    except ValueError:
        return _changed("the PDF cannot be read")
    missing = [n for n in (SURVEY_FILE, ASSESSMENT_FILE, SIGNER_FILE) if n not in files]
    if missing:
        return _changed(f"embedded {', '.join(missing)} missing")
    try:
        survey = json.loads(files[SURVEY_FILE].decode("utf-8"))
        assessment = json.loads(files[ASSESSMENT_FILE].decode("utf-8"))
        signer = json.loads(files[SIGNER_FILE].decode("utf-8"))
    except (ValueError, RecursionError):   # bad UTF-8 or JSON, or a number over 4,300 digits
        return _changed("the embedded data cannot be read")
    if not isinstance(signer, dict):
        return _changed("the embedded signer.json is damaged")
    return survey, assessment, signer


def _check_first_way(data: bytes) -> _Signed | VerifyResult:
    """The first way (Ed25519): the slot, the digest around it, the signed payload."""
    from cryptography.exceptions import InvalidSignature

    try:
        start, end = find_slot(data)
    except SlotError as err:
        return _changed(str(err))
    digest = file_digest(data, start, end)
    got = _embedded(data)
    if isinstance(got, VerifyResult):
        return got
    survey, assessment, signer_data = got
    try:
        signer = PublicKey.from_json_dict({**signer_data, "format": "triage-public-key/1"},
                                          SIGNER_FILE)
    except (ValueError, TypeError):
        return _changed("the embedded signer.json cannot be read")
    signature = bytes.fromhex(data[start:end].decode("ascii"))
    try:
        signer.verifier().verify(signature, payload(survey, assessment, digest))
    except InvalidSignature:
        return _changed("the signature does not match the file")
    at = str(signer_data.get("signed_at", "")) or None
    return _Signed(signer, at, "Ed25519 (first way)", survey, assessment)


def _check_standard(data: bytes) -> _Signed | VerifyResult:
    """The standard PDF signature, then the signed digests of the embedded content."""
    from . import certs
    from .pades import BrokenSignature, check

    try:
        checked = check(data)
    except BrokenSignature as err:
        return _changed(str(err))
    got = _embedded(data)
    if isinstance(got, VerifyResult):
        return got
    survey, assessment, signer_data = got
    try:
        digests = content_digests(survey, assessment)
    except ValueError as err:
        return _changed(f"the embedded data has {err}")
    for label, what in (("survey_sha256", SURVEY_FILE), ("assessment_sha256", ASSESSMENT_FILE)):
        if signer_data.get(label) != digests[label]:
            return _changed(f"the embedded {what} is not the one signed ({label})")
    cert = certs.load_certificate(checked.certificate)
    cn, sn = certs.certificate_subject(cert)
    try:
        point = certs.certificate_point(cert)
    except ValueError:
        return VerifyResult(4, f"intact, but signed with a key of another kind than this tool "
                            f"makes (certificate of {cn}, id {sn})")
    name, ident = signer_data.get("name"), signer_data.get("id")
    if not isinstance(name, str) or not isinstance(ident, str):
        return _changed("the embedded signer.json names no signer")
    key = PublicKey(name, ident, point, P256, checked.certificate)
    conflict = None
    if (cn, sn) != (name, ident):
        conflict = (f"the report names the signer {name} (id {ident}), but the signature's "
                    f"certificate was made for {cn} (id {sn})")
    elif signer_data.get("public_key") != point.hex():
        conflict = (f"the report names key {signer_data.get('fingerprint')}, but is signed by "
                    f"key {key.fingerprint}")
    at = checked.signed_at.isoformat() if checked.signed_at else (
        str(signer_data.get("signed_at", "")) or None)
    return _Signed(key, at, "PAdES B-B", survey, assessment, conflict)


def _accept(s: _Signed, data: bytes, expected: str | None,
            trusted: list[PublicKey] | None) -> VerifyResult:
    """Accept the signer (or exit 4 naming why), then re-assess the embedded survey."""
    signer = s.key
    line = (f"signed by {signer.name} (id {signer.id}), key {signer.fingerprint}, "
            f"at {s.at or 'an unrecorded time'}")

    def result(code: int, message: str, notes: tuple[str, ...] = ()) -> VerifyResult:
        return VerifyResult(code, message, signer.name, signer.id, signer.fingerprint, s.at,
                            notes, s.scheme)

    if s.conflict:
        return result(4, f"intact, but {s.conflict}")
    printed = _page_one_names(data, signer)
    if printed is not None:
        return result(4, f"intact, {line}, but {printed}")
    if expected is not None:
        if signer.fingerprint != expected:
            return result(4, f"intact, but {line}, not by the expected key {expected}")
    else:
        keys = trusted if trusted is not None else _trusted_or_none()
        if keys is None:
            return result(4, f"intact, {line}; the trusted-key list cannot be read")
        known = next((k for k in keys if k.fingerprint == signer.fingerprint), None)
        if known is None:
            return result(4, f"intact, {line}, but that key is not trusted on this laptop "
                          "(triage key trust PUBFILE, or --expect FINGERPRINT)")
        if (known.name, known.id) != (signer.name, signer.id):
            return result(4, f"intact, but the report names the signer {signer.name} (id "
                          f"{signer.id}), while key {signer.fingerprint} is trusted here as "
                          f"{known.name} (id {known.id})")

    code, detail, notes = _reassess(s.survey, s.assessment)
    return result(code, f"intact, {line}; {detail}", tuple(notes))


def _norm(text: str) -> str:
    return " ".join(unicodedata.normalize("NFC", text).split())


def _page_one_names(data: bytes, signer: PublicKey) -> str | None:
    """None when page one prints "signed by NAME (id ID)" of the signer; else why not."""
    import io
    import logging

    from pypdf import PdfReader

    logging.getLogger("pypdf").setLevel(logging.CRITICAL)
    want = _norm(f"signed by {signer.name} (id {signer.id})")
    try:
        text = PdfReader(io.BytesIO(data)).pages[0].extract_text()
    except Exception as err:  # a hostile page may break text extraction anywhere: one line
        return f"its page one cannot be read ({type(err).__name__})"
    if want not in _norm(text):
        return f"page one does not print {want!r}"
    return None


def _trusted_or_none() -> list[PublicKey] | None:
    try:
        return trusted_keys()
    except ValueError:
        return None


def _error_lines(err: ValueError) -> list[str]:
    """`key.path: what is wrong` for each error of a pydantic `ValidationError` (else one)."""
    errors = getattr(err, "errors", None)
    if not callable(errors):
        return [str(err).splitlines()[0] if str(err) else type(err).__name__]
    out = []
    for e in errors(include_url=False):
        path = "".join(f"[{p}]" if isinstance(p, int) else f".{p}" for p in e.get("loc", ()))
        msg = str(e.get("msg", ""))
        out.append(f"{path.lstrip('.') or '(assessment)'}: {msg[:1].lower()}{msg[1:]}")
    return out or [str(err).splitlines()[0]]


def _reassess(survey_data: Any, assess_data: Any) -> tuple[int, str, list[str]]:
    """Re-assess the embedded survey with this engine and compare with the embedded result."""
    from triage import __version__
    from triage.assess import assess, parse_assessment
    from triage.model import SurveyError, parse_survey
    from triage.standards import load

    try:
        survey = parse_survey(survey_data)
    except SurveyError as err:   # every rule broken in the notes, one each; the first here
        rules = list(err.all_messages)
        more = f"; {len(rules)} rules broken, each in the notes" if len(rules) > 1 else ""
        return 5, f"but this engine refuses the embedded survey ({rules[0]}{more})", [
            f"embedded survey: {r}" for r in rules]
    try:
        old = parse_assessment(assess_data)
    except ValueError as err:   # a pydantic ValidationError: each error in the notes
        rules = _error_lines(err)
        more = f"; {len(rules)} keys refused, each in the notes" if len(rules) > 1 else ""
        return 5, f"but this engine cannot read the embedded assessment ({rules[0]}{more})", [
            f"embedded assessment: {r}" for r in rules]
    new = assess(survey)
    notes = []
    if old.engine.version != __version__:
        notes.append(f"the report was made by engine {old.engine.version}, this is "
                     f"{__version__}")
    now = load().assumptions.model_dump(mode="json")
    changed = sorted(k for k in set(now) | set(old.engine.assumptions)
                     if now.get(k) != old.engine.assumptions.get(k))
    if changed:
        from triage.standards.vocabulary import words

        notes.append("assumptions differ: " + ", ".join(
            f"{words('assumptions', k)} {old.engine.assumptions.get(k)!r} then, "
            f"{now.get(k)!r} now" for k in changed))
    was = f"{old.tier}/{old.performance_level or 'no level'}"
    now_txt = f"{new.tier}/{new.performance_level or 'no level'}"
    if (old.tier, old.performance_level) != (new.tier, new.performance_level):
        return 5, (f"but this engine re-assesses the survey to {now_txt}; the report says "
                   f"{was}"), notes
    worst = max(abs(old.tier_probability.get(t, 0.0) - new.tier_probability.get(t, 0.0))
                for t in ("occupy", "hold", "evacuate"))
    if worst > PROBABILITY_TOLERANCE:
        return 5, (f"same tier and level ({was}), but the tier probabilities differ by "
                   f"{worst:.3f} (more than {PROBABILITY_TOLERANCE})"), notes
    tail = f" ({'; '.join(notes)})" if notes else ""
    return 0, f"re-assessed to the same tier and level, {was}{tail}", notes


@dataclass(frozen=True)
class ImportVerdict:
    """How `triage import` takes a report PDF: refused (one line), or taken with a warning."""

    refused: str | None
    warning: str | None
    result: VerifyResult


def import_verdict(pdf: Path, trusted: list[PublicKey] | None = None) -> ImportVerdict:
    """Verify a report before its survey is imported (docs/formats.md: `triage import REPORT.pdf`).

    Changed or damaged (1): refused. Unsigned (3), signer not accepted (4), or intact but
    re-assessed to another tier or level (5): imported, with a warning line naming why.
    """
    r = verify_report(Path(pdf), trusted=trusted)
    prefix = f"{pdf}: "
    why = r.message[len(prefix):] if r.message.startswith(prefix) else r.message
    if r.code == 0:
        return ImportVerdict(None, None, r)
    if r.code == 1:
        return ImportVerdict(f"{pdf}: refused, the report is {why}", None, r)
    if r.code == 3:
        why = ("unsigned: nothing shows who made this report or that it is unchanged; its "
               "survey is imported as it reads")
    return ImportVerdict(None, f"{pdf}: imported with a warning: {why}", r)
