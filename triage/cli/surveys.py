"""Commands: import, export, list, backup: surveys in and out of the database."""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import TYPE_CHECKING, Any

from triage.errors import TriageError

from .common import (
    CODE_LEN,
    add_command,
    add_format,
    open_reader,
    open_store,
    read_survey,
    resolve_id,
    survey_codes,
    yes_no,
)
from .errors import UserError, refusal_lines
from .streams import input_path, is_std, output_path, shown, status, write_json, write_text

if TYPE_CHECKING:
    from triage.store.reader import SurveyReader
    from triage.store.rows import SurveyRow


def add_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register `import`, `export`, `list` and `backup`."""
    p = add_command(sub, "import", "survey files (JSON, or a report PDF carrying its survey) "
                    "into the database", description=(
                        "Validate each survey file and store it in the database, each in its "
                        "own transaction, with the photos it names (read from inside its "
                        "file's folder). A report PDF is verified first and its embedded "
                        "survey imported. A refused file is named on standard error with "
                        "every rule it breaks, one a line; the others are still imported "
                        "(exit status 1 when any was refused)."))
    p.add_argument("files", nargs="+", metavar="FILE", help="triage-survey JSON or report PDF; "
                   "- reads one from standard input (photo paths are refused there: standard "
                   "input has no folder)")
    add_format(p, "triage-import/1", "one status line per file on standard error")
    p.set_defaults(func=run_import)
    p = add_command(sub, "export", "a survey out of the database as triage-survey JSON",
                    description=("Write one stored survey as JSON that imports back to the "
                                 "same survey, or a folder with survey.json and its photos."))
    p.add_argument("id", metavar="ID", help="the survey id (or an unambiguous start of it)")
    p.add_argument("-o", "--output", required=True, metavar="FILE|DIR/|-",
                   help="the JSON file to write (replaced atomically if it exists); a folder "
                   "(ending in /): survey.json and its photos in img/; - writes the survey "
                   "JSON alone to standard output")
    p.set_defaults(func=run_export)
    p = add_command(sub, "list", "the surveys in the database", description=(
        "One row per survey: its code (the start of its id that export, report and compare "
        "take), building, time of inspection, indicative tier, whether it is provisional, "
        "edited since its last report, or in conflict with another copy."))
    add_format(p, "triage-list/1", "a table for people", also=", a row per survey")
    p.add_argument("--hidden", action="store_true", help="include hidden surveys")
    p.set_defaults(func=run_list)
    p = add_command(sub, "backup", "a consistent copy of the database, safe while it is in use",
                    description=("Copy the database to one self-contained file (its WAL "
                                 "content included), checked before it is kept; the "
                                 "database is only read. A file that exists is never "
                                 "replaced."))
    p.add_argument("-o", "--output", required=True, metavar="FILE|-",
                   help="the new file to write (must not exist); - writes the copy to "
                   "standard output (not to a terminal)")
    add_format(p, "triage-backup/1", "a status line on standard error", also="; not with -o -")
    p.set_defaults(func=run_backup)


def run_import(args: argparse.Namespace) -> int:
    """Validate each file, commit it in its own transaction, then say so (one line each).

    The photos a survey names are read from inside its file's folder, checked and stored with
    it (`triage.photos.gather`): one that breaks a rule refuses that survey whole; a missing
    one is a warning line and stays listed as missing. `-` reads a survey from standard
    input, which has no folder: a survey from there naming photos is refused.
    """
    from triage.photos import gather

    if sum(1 for f in args.files if is_std(f)) > 1:
        raise UserError("FILE: - (standard input) given more than once; it can be read once")
    as_json = args.format == "json"
    st = open_store(args)
    done: list[dict[str, Any]] = []
    try:
        for path in args.files:
            entry: dict[str, Any] = {"file": path}
            real: Path | None = None
            done.append(entry)
            try:
                with input_path(path, sniff=True) as real:
                    warning = _check_report(str(real))
                    survey = read_survey(str(real))
                folder = None if is_std(path) else real.resolve().parent
                source = None if is_std(path) else str(real.resolve())
                got = gather(survey, folder, have=st.has_photo)
                added = st.add_survey(got.survey, source=source, photos=got.photos)
            except TriageError as err:
                lines = [_named(m, path, real) for m in refusal_lines(err)]
                entry.update(status="refused", errors=lines)
                for line in lines:
                    sys.stderr.write(f"triage import: {line}\n")
                continue
            if warning:
                warning = _named(warning, path, real)
            name = got.survey.building.name
            warnings = [_named(m, path, real) for m in got.warnings] + (
                [warning] if warning else [])
            outcome = {"added": "imported", "photos": "photos added"}.get(added, "unchanged")
            entry.update(status=outcome,
                         survey=str(survey.survey_id), building=name,
                         photos_stored=len(got.photos), warnings=warnings)
            kept = f", {len(got.photos)} photo{'s' if len(got.photos) != 1 else ''} stored" \
                if got.photos else ""
            if as_json:
                pass
            elif added == "added":
                status(f"imported {survey.survey_id}  {name}  ({path}{kept})")
            elif added == "photos":
                status(f"photos added {survey.survey_id}  {name}  ({path}: the stored survey, "
                       f"with its photos missing at import now found{kept})")
            else:
                status(f"unchanged {survey.survey_id}  {name}  ({path}: the identical survey "
                       "is stored already)")
            for line in warnings:
                sys.stderr.write(f"triage import: warning: {line}\n")
    finally:
        st.close()
    refused = sum(1 for e in done if e["status"] == "refused")
    if as_json:
        counts = {k: sum(1 for e in done if e["status"] == k)
                  for k in ("imported", "photos added", "unchanged", "refused")}
        write_json({"format": "triage-import/1", "database": str(st.path), **counts,
                    "files": done})
    return 1 if refused else 0


def _named(message: str, path: str, real: Path | None) -> str:
    """A message about the file `path` (read from `real`, a copy of standard input for `-`)."""
    if real is not None and str(real) != path:
        message = message.replace(str(real), path)
    return message if message.startswith(path + ":") else f"{path}: {message}"


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


def run_export(args: argparse.Namespace) -> int:
    """Write one survey as JSON that imports back to the same survey (`-o FILE.json`).

    `-o DIR/` (a folder, or a path ending in `/`) writes `DIR/survey.json` with the photos
    the store holds beside it in `DIR/img/`.
    """
    folder = not is_std(args.output) and (args.output.endswith(("/", "\\"))
                                          or Path(args.output).is_dir())
    st: SurveyReader = open_reader(args, refresh=False)
    try:
        sid = resolve_id(st, args.id)
        data = st.load_survey(sid).to_json_dict()
        if folder:
            return _export_folder(st, sid, data, Path(args.output))
    finally:
        st.close()
    write_text(args.output, json.dumps(data, indent=2, ensure_ascii=False) + "\n")
    status(f"exported {sid} to {shown(args.output)}")
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
    status(f"exported {sid} to {folder / 'survey.json'} with {len(written)} "
           f"photo{'s' if len(written) != 1 else ''} in {folder / 'img'}")
    if missing:
        sys.stderr.write(f"triage export: {len(missing)} photo"
                         f"{'s' if len(missing) != 1 else ''} not in the database, named in "
                         f"survey.json without a file: {'; '.join(missing)}\n")
    return 0


# Columns of `triage list`, in terminal cells: code (8, wider only where two ids share their
# first 8 characters), building, inspected, tier, provisional, since report (the conflict
# column last, as wide as it is).
LIST_WIDTHS = (28, 25, 10, 11, 12)
LIST_FORMAT = "triage-list/1"


def run_list(args: argparse.Namespace) -> int:
    """One row per survey: code, building, time, tier, provisional, edited since report, conflict.

    The code is the survey id's start that `export`, `report` and `compare` take (hidden
    surveys count in making it unique, as they do in resolving it).
    """
    st: SurveyReader = open_reader(args)
    try:
        every = st.list_surveys(include_hidden=True)
    finally:
        st.close()
    codes = survey_codes([r.id for r in every])
    rows = every if args.hidden else [r for r in every if not r.hidden]
    if args.format == "json":
        from triage.assess import CAUTION

        write_json({"format": LIST_FORMAT, "caution": CAUTION, "surveys": [
            {"id": r.id, "code": codes[r.id], "building": r.building,
             "building_id": r.building_id, "address": r.address, "at": r.at,
             "inspector": r.inspector, "tier": r.tier, "performance_level": r.level,
             "provisional": r.provisional, "revision": r.revision,
             "reported_revision": r.reported_revision,
             "edited_since_report": r.edited_since_report, "conflict": r.conflict,
             "conflict_of": r.conflict_of, "hidden": r.hidden, "source": r.source}
            for r in rows], "count": len(rows)})
        return 0
    sys.stdout.write("\n".join(list_lines(rows, codes)) + "\n")
    return 0


def list_lines(rows: list[SurveyRow], codes: dict[str, str] | None = None) -> list[str]:
    """The text table of `triage list`: the caution, a header, one row per survey, a count.

    `codes` maps each id to its code (`survey_codes`); by default, codes among `rows`.
    """
    from triage.assess import CAUTION, tier_words

    from .table import row, width

    codes = codes if codes is not None else survey_codes([r.id for r in rows])
    shown_codes = [codes[r.id] for r in rows]
    widths = (max([CODE_LEN, *(width(c) for c in shown_codes)]), *LIST_WIDTHS)
    lines = [f"CAUTION: {CAUTION}", "",
             row(("code", "building", "inspected", "tier", "provisional", "since report",
                  "conflict"), widths)]
    for r, code in zip(rows, shown_codes, strict=True):
        since = {None: "no report", True: "edited", False: "unchanged"}[r.edited_since_report]
        tier = tier_words(r.tier) if r.tier else "—"
        hidden = "  (hidden)" if r.hidden else ""
        lines.append(row((code, r.building, r.at, tier, yes_no(r.provisional), since,
                          f"{'CONFLICT' if r.conflict else '—'}{hidden}"), widths))
    lines.append(f"{len(rows)} survey{'s' if len(rows) != 1 else ''}; a code is the start of "
                 "the survey's id, which export, report and compare take")
    return lines


def run_backup(args: argparse.Namespace) -> int:
    """A consistent single-file copy of the database, WAL content included."""
    from triage.store import StoreError

    if is_std(args.output) and args.format == "json":
        raise UserError("--format json: standard output carries the copy with -o -; give a "
                        "file to -o")
    st = open_store(args, create=False, refresh=False, read_only=True)
    try:
        with output_path(args.output, "a database copy", ".db") as dest:
            st.backup_to(dest)
            size = dest.stat().st_size
    except StoreError as err:
        raise UserError(str(err).replace(str(dest), "-") if is_std(args.output)
                        else str(err)) from None
    finally:
        st.close()
    if args.format == "json":
        write_json({"format": "triage-backup/1", "database": str(st.path),
                    "backup": args.output, "bytes": size, "checked": True})
    else:
        status(f"backed up {st.path} to {shown(args.output)} ({size:,} bytes, checked)")
    return 0
