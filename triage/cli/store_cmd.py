"""Commands: import, export, list, backup: surveys in and out of the database."""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import TYPE_CHECKING, Any

from .errors import UserError

if TYPE_CHECKING:
    from triage.model import Survey
    from triage.store import Store


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register `import`, `export`, `list` and `backup`."""
    p = sub.add_parser("import", help="survey files (JSON, or a report PDF carrying its survey) "
                       "into the database")
    p.add_argument("files", nargs="+", metavar="FILE", help="triage-survey/1 JSON or report PDF")
    p.set_defaults(func=run)
    p = sub.add_parser("export", help="a survey out of the database as triage-survey/1 JSON")
    p.add_argument("id", metavar="ID", help="the survey id (or an unambiguous start of it)")
    p.add_argument("-o", "--output", required=True, metavar="FILE", help="the JSON file to write")
    p.set_defaults(func=run)
    p = sub.add_parser("list", help="the surveys in the database")
    p.add_argument("--format", choices=("text", "json"), default="text")
    p.add_argument("--hidden", action="store_true", help="include hidden surveys")
    p.set_defaults(func=run)
    p = sub.add_parser("backup", help="a consistent copy of the database, safe while it is in use")
    p.add_argument("-o", "--output", required=True, metavar="FILE", help="the copy to write")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Run the command of this module that `args.command` names."""
    commands = {"import": run_import, "export": run_export, "list": run_list, "backup": run_backup}
    return commands[args.command](args)


def open_store(args: argparse.Namespace, *, create: bool = True,
               refresh: bool = True) -> Store:
    """The database of `--db` (default: under the user's data folder), or a one-line refusal."""
    from triage.store import Store, StoreError

    try:
        return Store.open(args.db, create=create, refresh=refresh)
    except StoreError as err:
        raise UserError(str(err)) from None


def _read_pdf(path: str) -> Survey:
    from triage.model import SurveyError, parse_survey_text

    try:
        from triage.report import read_embedded
    except (ImportError, AttributeError):
        raise UserError(f"{path}: this build cannot read surveys from report PDFs; import the "
                        "survey's JSON file") from None
    try:
        got: Any = read_embedded(Path(path))
    except (ValueError, OSError) as err:
        msg = str(err) or type(err).__name__
        raise UserError(msg if msg.startswith(path) else f"{path}: {msg}") from None
    text = got[0] if isinstance(got, tuple) else got
    if not text:
        raise UserError(f"{path}: carries no embedded triage survey (not a triage report)")
    try:
        return parse_survey_text(text if isinstance(text, str) else text.decode("utf-8"))
    except (SurveyError, UnicodeDecodeError) as err:
        raise UserError(f"{path}: embedded survey: {err}") from None


def _read(path: str) -> Survey:
    from .common import read_survey_file

    if path.lower().endswith(".pdf"):
        return _read_pdf(path)
    return read_survey_file(path)


def run_import(args: argparse.Namespace) -> int:
    """Validate each file, commit it in its own transaction, then say so (one line each)."""
    from triage.store import StoreError

    st = open_store(args)
    failed = 0
    try:
        for path in args.files:
            try:
                survey = _read(path)
                status = st.add_survey(survey, source=str(Path(path).resolve()))
            except UserError as err:
                sys.stderr.write(f"triage import: {err}\n")
                failed += 1
                continue
            except StoreError as err:
                sys.stderr.write(f"triage import: {path}: {err}\n")
                failed += 1
                continue
            name = survey.building.name
            if status == "added":
                sys.stdout.write(f"imported {survey.survey_id}  {name}  ({path})\n")
            else:
                sys.stdout.write(f"unchanged {survey.survey_id}  {name}  ({path}: the identical "
                                 "survey is stored already)\n")
            sys.stdout.flush()
    finally:
        st.close()
    return 1 if failed else 0


def resolve_id(st: Store, given: str) -> str:
    """A survey id from the whole id or an unambiguous start of it."""
    if st.has_survey(given):
        return given
    ids = [r.id for r in st.list_surveys(include_hidden=True) if r.id.startswith(given.lower())]
    if len(ids) == 1:
        return ids[0]
    if not ids:
        raise UserError(f"{given}: no survey with this id in {st.path} (see 'triage list')")
    raise UserError(f"{given}: {len(ids)} surveys start with this; give more of the id")


def run_export(args: argparse.Namespace) -> int:
    """Write one survey as triage-survey/1 JSON that imports back to the same survey."""
    st = open_store(args, create=False, refresh=False)
    try:
        sid = resolve_id(st, args.id)
        data = st.load_survey(sid).to_json_dict()
    finally:
        st.close()
    out = Path(args.output)
    text = json.dumps(data, indent=2, ensure_ascii=False) + "\n"
    part = out.with_name(out.name + ".part")
    try:
        part.write_text(text, encoding="utf-8")
        part.replace(out)
    except OSError as err:
        part.unlink(missing_ok=True)
        raise UserError(f"{out}: cannot be written ({err.strerror})") from None
    sys.stdout.write(f"exported {sid} to {out}\n")
    return 0


def _yes(v: bool | None) -> str:
    return "—" if v is None else ("yes" if v else "no")


def run_list(args: argparse.Namespace) -> int:
    """One row per survey: id, building, time, tier, provisional, edited since report, conflict."""
    from triage.assess import CAUTION, tier_words

    st = open_store(args, create=False)
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
                     f"{_yes(r.provisional):<11}  {since:<12}  "
                     f"{'CONFLICT' if r.conflict else '—'}{hidden}")
    lines.append(f"{len(rows)} survey{'s' if len(rows) != 1 else ''}")
    sys.stdout.write("\n".join(lines) + "\n")
    return 0


def run_backup(args: argparse.Namespace) -> int:
    """A consistent single-file copy of the database, WAL content included."""
    from triage.store import StoreError

    st = open_store(args, create=False, refresh=False)
    try:
        out = st.backup_to(args.output)
    except StoreError as err:
        raise UserError(str(err)) from None
    finally:
        st.close()
    sys.stdout.write(f"backed up {st.path} to {out}\n")
    return 0
