"""The coordination centre on PostgreSQL: schema, sync, reads. The only place importing psycopg.

    triage centre init URL        schema (versioned migrations), roles, views   -> schema.py
    triage sync --to URL          what this laptop holds and the centre lacks   -> sync.py
    triage centre reassess URL    every current version with this engine        -> reassess.py
    triage --db URL list|...      the reading commands on the server            -> reader.py

`connect` opens connections and keeps the password out of every message; `cluster` starts a
throwaway server for the tests and the benchmark. Depends on `store` (the local side) and
`model`; nothing below it knows it exists. psycopg is imported inside functions, so the
command starts without it. How to run a centre: `docs/centre.md`.
"""

SCHEMES = ("postgresql://", "postgres://")

# The commands that may read from a centre (`triage --db URL COMMAND`); none of them writes there.
READ_COMMANDS = ("list", "export", "report", "compare", "summary")


def is_url(text: object) -> bool:
    """Whether `--db` names a centre (by the URL's scheme) rather than a database file."""
    return isinstance(text, str) and text.lower().startswith(SCHEMES)
