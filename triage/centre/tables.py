"""The centre's data tables: their columns, keys, and what a laptop sends and may read.

Every row a laptop sends goes into one of these five tables, and none is ever changed or
removed (see `schema` for the grants). The columns the server fills itself (`seq`,
`received_at`, `sent_by`) are marked here, so the grants and sync's INSERTs are made from one
list.
"""

from __future__ import annotations

# Column of each data table: (name, SQL type and constraints, filled by the laptop).
TABLES: dict[str, list[tuple[str, str, bool]]] = {
    "versions": [
        ("seq", "bigint GENERATED ALWAYS AS IDENTITY", False),
        ("survey_id", "text NOT NULL", True),
        ("state", "text NOT NULL", True),           # sha256 of JSON, hidden flag, change ids
        ("doc_sha256", "text NOT NULL", True),
        ("alt_id", "text NOT NULL", True),          # the id kept under if it is a conflict
        ("changes", "text[] NOT NULL", True),       # sorted change ids this version holds
        ("revision", "integer NOT NULL", True),
        ("hidden", "boolean NOT NULL", True),
        ("building_id", "text NOT NULL", True),
        ("building", "text NOT NULL", True),
        ("address", "text NOT NULL", True),
        ("lat", "double precision", True),
        ("lon", "double precision", True),
        ("inspector", "text NOT NULL", True),
        ("at", "text NOT NULL", True),
        ("at_utc", "text NOT NULL", True),
        ("conflict_of", "text", True),              # as the laptop had it (from its merges)
        ("source", "text", True),
        ("created_at", "text NOT NULL", True),
        ("updated_at", "text NOT NULL", True),
        ("origin", "text NOT NULL", True),          # the laptop database's db_id
        ("doc", "text NOT NULL", True),             # canonical triage-survey JSON
        ("received_at", "timestamptz NOT NULL DEFAULT now()", False),
        ("sent_by", "text NOT NULL DEFAULT current_user", False),
    ],
    "changes": [
        ("seq", "bigint GENERATED ALWAYS AS IDENTITY", False),
        ("survey_id", "text NOT NULL", True),
        ("uid", "text NOT NULL", True),
        ("local_seq", "bigint NOT NULL", True),     # its order in the sending laptop's log
        ("revision", "integer NOT NULL", True),
        ("op", "text NOT NULL", True),
        ("path", "text NOT NULL", True),
        ("old", "text", True),
        ("new", "text", True),
        ("at", "text NOT NULL", True),
        ("who", "text NOT NULL", True),
        ("undoes", "text", True),
        ("origin", "text NOT NULL", True),
        ("received_at", "timestamptz NOT NULL DEFAULT now()", False),
        ("sent_by", "text NOT NULL DEFAULT current_user", False),
    ],
    "assessments": [
        ("seq", "bigint GENERATED ALWAYS AS IDENTITY", False),
        ("survey_id", "text NOT NULL", True),
        ("doc_sha256", "text NOT NULL", True),
        ("engine", "text NOT NULL", True),          # engine version that computed it
        ("tier", "text", True),
        ("level", "text", True),
        ("gov_storey", "text", True),
        ("gov_dir", "text", True),
        ("gov_basis", "text", True),
        ("provisional", "boolean", True),
        ("json", "text NOT NULL", True),
        ("computed_by", "text NOT NULL", True),     # 'laptop' or 'centre'
        ("origin", "text NOT NULL", True),
        ("received_at", "timestamptz NOT NULL DEFAULT now()", False),
        ("sent_by", "text NOT NULL DEFAULT current_user", False),
    ],
    "reports": [
        ("survey_id", "text NOT NULL", True),
        ("revision", "integer NOT NULL", True),
        ("at", "text NOT NULL", True),
        ("path", "text", True),
        ("fingerprint", "text", True),
        ("who", "text NOT NULL", True),
        ("origin", "text NOT NULL", True),
        ("received_at", "timestamptz NOT NULL DEFAULT now()", False),
        ("sent_by", "text NOT NULL DEFAULT current_user", False),
    ],
    "photos": [
        ("sha256", "text NOT NULL", True),
        ("data", "bytea NOT NULL", True),
        ("size", "bigint NOT NULL", True),
        ("origin", "text NOT NULL", True),
        ("received_at", "timestamptz NOT NULL DEFAULT now()", False),
        ("sent_by", "text NOT NULL DEFAULT current_user", False),
    ],
}

KEYS: dict[str, tuple[str, ...]] = {
    "versions": ("survey_id", "state"),
    "changes": ("survey_id", "uid"),
    "assessments": ("survey_id", "doc_sha256", "engine"),
    "reports": ("survey_id", "revision", "at"),
    "photos": ("sha256",),
}

# What the field role may read: the keys sync compares, nothing of the surveys themselves.
FIELD_SELECT = KEYS

SENT = {t: [c for c, _, laptop in cols if laptop] for t, cols in TABLES.items()}


def create_tables() -> str:
    """CREATE TABLE of each data table (schema version 1)."""
    out = []
    for table, cols in TABLES.items():
        body = ",\n  ".join(f"{name} {typ}" for name, typ, _ in cols)
        out.append(f"CREATE TABLE triage.{table} (\n  {body},\n"
                   f"  PRIMARY KEY ({', '.join(KEYS[table])})\n)")
    return ";\n".join(out) + ";\n"
