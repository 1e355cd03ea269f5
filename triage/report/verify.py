"""Check a report: intact, signed by an accepted key, and still what this engine computes.

`verify_report(pdf, expect=None)` returns a `VerifyResult` whose `code` is the exit status of
DESIGN.md: 0 intact, accepted and re-assessed to the same tier and level (probabilities within
0.01); 1 changed (or not readable); 3 unsigned; 4 intact but the signer is not accepted (not
the key `expect` names, or, without it, not among this laptop's trusted keys); 5 intact and
accepted, but this engine re-assesses the survey to another tier or level (both named).
The file's bytes are checked before anything in it is parsed.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from .keys import PublicKey, normalise_fingerprint, trusted_keys
from .pdfparts import ASSESSMENT_FILE, SIGNER_FILE, SURVEY_FILE
from .signing import SlotError, file_digest, find_slot, looks_signed, payload

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


def _verify(pdf: Path, expect: str | None, trusted: list[PublicKey] | None) -> VerifyResult:
    from cryptography.exceptions import InvalidSignature

    from . import read_embedded_files

    expected = normalise_fingerprint(expect) if expect is not None else None
    try:
        data = Path(pdf).read_bytes()
    except FileNotFoundError:
        return VerifyResult(1, "no such file")
    except OSError as err:
        return VerifyResult(1, f"cannot be read ({err.strerror})")
    if not looks_signed(data):
        if not data.startswith(b"%PDF-"):
            return VerifyResult(1, "not a PDF")
        return VerifyResult(3, "unsigned: the report carries no signature")
    try:
        start, end = find_slot(data)
    except SlotError as err:
        return _changed(str(err))
    digest = file_digest(data, start, end)
    try:
        files = read_embedded_files(data)
    except ValueError:
        return _changed("the PDF cannot be read")
    missing = [n for n in (SURVEY_FILE, ASSESSMENT_FILE, SIGNER_FILE) if n not in files]
    if missing:
        return _changed(f"embedded {', '.join(missing)} missing")
    try:
        survey_data = json.loads(files[SURVEY_FILE].decode("utf-8"))
        assess_data = json.loads(files[ASSESSMENT_FILE].decode("utf-8"))
        signer_data = json.loads(files[SIGNER_FILE].decode("utf-8"))
        signer = PublicKey.from_json_dict({**signer_data, "format": "triage-public-key/1"},
                                          SIGNER_FILE)
    except (UnicodeDecodeError, json.JSONDecodeError, ValueError, TypeError):
        return _changed("the embedded data cannot be read")
    signature = bytes.fromhex(data[start:end].decode("ascii"))
    try:
        signer.verifier().verify(signature, payload(survey_data, assess_data, digest))
    except InvalidSignature:
        return _changed("the signature does not match the file")
    at = str(signer_data.get("signed_at", "")) or None
    line = (f"signed by {signer.name} (id {signer.id}), key {signer.fingerprint}, "
            f"at {at or 'an unrecorded time'}")

    def result(code: int, message: str, notes: tuple[str, ...] = ()) -> VerifyResult:
        return VerifyResult(code, message, signer.name, signer.id, signer.fingerprint, at,
                            notes)

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
            line += f" (a key trusted here as {known.name}, id {known.id})"

    code, detail, notes = _reassess(survey_data, assess_data)
    return result(code, f"intact, {line}; {detail}", tuple(notes))


def _trusted_or_none() -> list[PublicKey] | None:
    try:
        return trusted_keys()
    except ValueError:
        return None


def _reassess(survey_data: Any, assess_data: Any) -> tuple[int, str, list[str]]:
    """Re-assess the embedded survey with this engine and compare with the embedded result."""
    from triage import __version__
    from triage.assess import assess, parse_assessment
    from triage.model import SurveyError, parse_survey
    from triage.standards import load

    try:
        survey = parse_survey(survey_data)
    except SurveyError as err:
        return 5, f"but this engine refuses the embedded survey ({err})", []
    try:
        old = parse_assessment(assess_data)
    except ValueError as err:
        return 5, ("but this engine cannot read the embedded assessment "
                   f"({str(err).splitlines()[0]})"), []
    new = assess(survey)
    notes = []
    if old.engine.version != __version__:
        notes.append(f"the report was made by engine {old.engine.version}, this is "
                     f"{__version__}")
    now = load().assumptions.model_dump(mode="json")
    changed = sorted(k for k in set(now) | set(old.engine.assumptions)
                     if now.get(k) != old.engine.assumptions.get(k))
    if changed:
        notes.append("assumptions differ: " + ", ".join(
            f"{k} {old.engine.assumptions.get(k)!r} then, {now.get(k)!r} now" for k in changed))
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
