"""Commands: import, export, list, backup: surveys in and out of the database."""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import TYPE_CHECKING, Any

from triage.errors import TriageError

from .common import open_reader, open_store, read_survey, resolve_id, yes_no
from .errors import UserError

if TYPE_CHECKING:
    from triage.model import Survey
    from triage.store.reader import SurveyReader


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register `import`, `export`, `list` and `backup`."""
    p = sub.add_parser("import", help="survey files (JSON, or a report PDF carrying its survey) "
                       "into the database")
    p.add_argument("files", nargs="+", metavar="FILE", help="triage-survey JSON or report PDF "
                   "(- reads JSON from standard input)")
    p.set_defaults(func=run_import)
    p = sub.add_parser("export", help="a survey out of the database as triage-survey/1 JSON")
    p.add_argument("id", metavar="ID", help="the survey id (or an unambiguous start of it)")
    p.add_argument("-o", "--output", required=True, metavar="FILE|DIR/",
                   help="the JSON file to write; or a folder (ending in /): survey.json and "
                   "its photos in img/")
    p.set_defaults(func=run_export)
    p = sub.add_parser("list", help="the surveys in the database")
    p.add_argument("--format", choices=("text", "json"), default="text")
    p.add_argument("--hidden", action="store_true", help="include hidden surveys")
    p.set_defaults(func=run_list)
    p = sub.add_parser("backup", help="a consistent copy of the database, safe while it is in use")
    p.add_argument("-o", "--output", required=True, metavar="FILE", help="the copy to write")
    p.set_defaults(func=run_backup)


def run_import(args: argparse.Namespace) -> int:
    """Validate each file, commit it in its own transaction, then say so (one line each).

    The photos a survey names are read from inside its file's folder, checked and stored with
    it (`triage.photos.gather`): one that breaks a rule refuses that survey whole; a missing
    one is a warning line and stays listed as missing. `-` reads a survey from standard
    input, which has no folder: a survey from there naming photos is refused.
    """
    from triage.photos import gather
    from triage.store import StoreError

    st = open_store(args)
    failed = 0
    try:
        for path in args.files:
            try:
                warning = None
                if path == "-":
                    survey = _read_stdin()
                    folder = None
                    source = None
                else:
                    warning = _check_report(path)
                    survey = read_survey(path)
                    folder = Path(path).resolve().parent
                    source = str(Path(path).resolve())
                got = gather(survey, folder, have=st.has_photo)
                status = st.add_survey(got.survey, source=source, photos=got.photos)
            except StoreError as err:
                sys.stderr.write(f"triage import: {path}: {err}\n")
                failed += 1
                continue
            except TriageError as err:
                msg = str(err)
                said = msg if msg.startswith(path) else f"{path}: {msg}"
                sys.stderr.write(f"triage import: {said}\n")
                failed += 1
                continue
            name = got.survey.building.name
            for missing in got.warnings:
                sys.stderr.write(f"triage import: warning: {path}: {missing}\n")
            kept = f", {len(got.photos)} photo{'s' if len(got.photos) != 1 else ''} stored" \
                if got.photos else ""
            if status == "added":
                sys.stdout.write(f"imported {survey.survey_id}  {name}  ({path}{kept})\n")
            else:
                sys.stdout.write(f"unchanged {survey.survey_id}  {name}  ({path}: the identical "
                                 "survey is stored already)\n")
            sys.stdout.flush()
            if warning:
                sys.stderr.write(f"triage import: warning: {warning}\n")
    finally:
        st.close()
    return 1 if failed else 0


def _check_report(path: str) -> str | None:
    """The warning for a report PDF verified before import; UserError when it was changed.

    Unsigned, signed by a key not accepted here, or re-assessed to another tier: a warning.
    """
    if not path.lower().endswith(".pdf"):
        return None
    from triage.report.verify import import_verdict

    verdict = import_verdict(Path(path))
    if verdict.refused:
        raise UserError(verdict.refused)
    return verdict.warning


def _read_stdin() -> Survey:
    """A survey JSON read from standard input."""
    from triage.model import SurveyError, parse_survey_text

    try:
        text = sys.stdin.read()
    except UnicodeDecodeError:
        raise UserError("-: not UTF-8 text (a survey file is JSON)") from None
    try:
        return parse_survey_text(text)
    except SurveyError as err:
        raise UserError(f"-: {err}") from None


def run_export(args: argparse.Namespace) -> int:
    """Write one survey as JSON that imports back to the same survey (`-o FILE.json`).

    `-o DIR/` (a folder, or a path ending in `/`) writes `DIR/survey.json` with the photos
    the store holds beside it in `DIR/img/`.
    """
    from triage.output import write_output

    folder = args.output.endswith(("/", "\\")) or Path(args.output).is_dir()
    st: SurveyReader = open_reader(args, refresh=False)
    try:
        sid = resolve_id(st, args.id)
        data = st.load_survey(sid).to_json_dict()
        if folder:
            return _export_folder(st, sid, data, Path(args.output))
    finally:
        st.close()
    out = Path(args.output)
    write_output(out, json.dumps(data, indent=2, ensure_ascii=False) + "\n")
    sys.stdout.write(f"exported {sid} to {out}\n")
    return 0


def _export_folder(st: SurveyReader, sid: str, data: dict[str, Any], folder: Path) -> int:
    """`survey.json` and `img/` in `folder`: each photo the store holds, named by its path.

    A photo keeps its path when it is a plain `img/NAME` of its format; otherwise it is
    written as `img/<first 16 hex digits of its SHA-256>.jpg|.png` and the path in
    `survey.json` says so. A photo the store lacks keeps its path and is named as missing.
    """
    from triage.output import write_output
    from triage.photos import check_photo, photo_fields

    try:
        (folder / "img").mkdir(parents=True, exist_ok=True)
    except OSError as err:
        from triage.errors import io_failure

        raise io_failure(folder / "img", err, "made") from None
    written: dict[str, str] = {}
    missing = []
    for field, ph in photo_fields(data):
        sha = str(ph.get("sha256") or "")
        blob = st.photo_bytes(sha) if sha else None
        if blob is None:
            missing.append(f"{field} ({ph.get('path')})")
            continue
        if sha not in written:
            checked = check_photo(blob, field, decode=False)
            path = str(ph["path"])
            plain = (path.startswith("img/") and path.count("/") == 1
                     and path[4:] not in ("", ".", "..")
                     and path.lower().endswith((".jpg", ".jpeg") if checked.format == "JPEG"
                                               else (".png",))
                     and path not in written.values())
            name = path if plain else f"img/{sha[:16]}{checked.suffix}"
            write_output(folder / name, blob)
            written[sha] = name
        ph["path"] = written[sha]
    write_output(folder / "survey.json", json.dumps(data, indent=2, ensure_ascii=False) + "\n")
    sys.stdout.write(f"exported {sid} to {folder / 'survey.json'} with {len(written)} "
                     f"photo{'s' if len(written) != 1 else ''} in {folder / 'img'}\n")
    if missing:
        sys.stderr.write(f"triage export: {len(missing)} photo"
                         f"{'s' if len(missing) != 1 else ''} not in the database, named in "
                         f"survey.json without a file: {'; '.join(missing)}\n")
    return 0


def run_list(args: argparse.Namespace) -> int:
    """One row per survey: id, building, time, tier, provisional, edited since report, conflict."""
    from triage.assess import CAUTION, tier_words

    st: SurveyReader = open_reader(args)
    try:
        rows = st.list_surveys(include_hidden=args.hidden)
    finally:
        st.close()
    if args.format == "json":
        out = [{"id": r.id, "building": r.building, "building_id": r.building_id,
                "address": r.address, "at": r.at, "inspector": r.inspector, "tier": r.tier,
                "performance_level": r.level, "provisional": r.provisional,
                "revision": r.revision, "reported_revision": r.reported_revision,
                "edited_since_report": r.edited_since_report, "conflict": r.conflict,
                "conflict_of": r.conflict_of, "hidden": r.hidden, "source": r.source}
               for r in rows]
        sys.stdout.write(json.dumps(out, ensure_ascii=False, indent=1) + "\n")
        return 0
    lines = [f"CAUTION: {CAUTION}", "",
             f"{'survey':<36}  {'building':<28}  {'inspected':<25}  {'tier':<10}  "
             f"{'provisional':<11}  {'since report':<12}  conflict"]
    for r in rows:
        since = {None: "no report", True: "edited", False: "unchanged"}[r.edited_since_report]
        name = r.building if len(r.building) <= 28 else r.building[:27] + "…"
        tier = tier_words(r.tier) if r.tier else "—"
        hidden = "  (hidden)" if r.hidden else ""
        lines.append(f"{r.id:<36}  {name:<28}  {r.at:<25}  {tier:<10}  "
                     f"{yes_no(r.provisional):<11}  {since:<12}  "
                     f"{'CONFLICT' if r.conflict else '—'}{hidden}")
    lines.append(f"{len(rows)} survey{'s' if len(rows) != 1 else ''}")
    sys.stdout.write("\n".join(lines) + "\n")
    return 0


def run_backup(args: argparse.Namespace) -> int:
    """A consistent single-file copy of the database, WAL content included."""
    from triage.store import StoreError

    st = open_store(args, create=False, refresh=False, read_only=True)
    try:
        out = st.backup_to(args.output)
    except StoreError as err:
        raise UserError(str(err)) from None
    finally:
        st.close()
    sys.stdout.write(f"backed up {st.path} to {out}\n")
    return 0
