"""Connecting to the centre: the URL passed to libpq as given, shown only without its password.

Every libpq parameter of the URL (`sslmode`, `sslrootcert`, `connect_timeout`,
`application_name`, `options`, ...) passes through unchanged; a password may be in the URL, in
`PGPASSWORD` or in `~/.pgpass`, as libpq allows. Messages name the server by `redact(url)`:
the URL with the password (in the user part or as a `password=` parameter) left out, and the
text libpq returns is cleaned of the password too before it is shown.
"""

from __future__ import annotations

import re
from typing import TYPE_CHECKING
from urllib.parse import parse_qsl, quote, unquote, urlencode, urlsplit, urlunsplit

from triage.store import StoreError

from . import SCHEMES, is_url

if TYPE_CHECKING:
    import psycopg

__all__ = ["SCHEMES", "CentreError", "clean", "connect", "first_line", "is_url", "redact"]


class CentreError(StoreError):
    """A refusal about the centre: one line naming the server (never its password)."""


def _password(url: str) -> str | None:
    try:
        parts = urlsplit(url)
    except ValueError:
        return None
    pw = parts.password
    if pw is None:
        for k, v in parse_qsl(parts.query, keep_blank_values=True):
            if k == "password":
                pw = v
    return unquote(pw) if pw else None


def redact(url: str) -> str:
    """The URL without its password: `postgresql://field7@centre.example/triage?sslmode=…`."""
    try:
        parts = urlsplit(url)
        host = parts.hostname or ""
        if parts.port is not None:
            host = f"{host}:{parts.port}"
        if ":" in (parts.hostname or "") and parts.hostname:   # an IPv6 address
            host = f"[{parts.hostname}]" + (f":{parts.port}" if parts.port else "")
        user = f"{quote(unquote(parts.username), safe='')}@" if parts.username else ""
        query = urlencode([(k, v) for k, v in parse_qsl(parts.query, keep_blank_values=True)
                           if k != "password"])
        return urlunsplit((parts.scheme, user + host, parts.path, query, ""))
    except ValueError:
        return "the centre (its URL could not be read)"


def clean(text: str, url: str) -> str:
    """Text with the URL's password taken out, wherever libpq may have echoed it."""
    pw = _password(url)
    out = text
    if pw:
        out = out.replace(pw, "***")
        out = out.replace(quote(pw, safe=""), "***")
    return re.sub(r"(password\s*=\s*)\S+", r"\1***", out)


def first_line(err: BaseException, url: str) -> str:
    """Libpq's message as one line, without the password, 'connection failed:' dropped."""
    text = " ".join(str(err).split())
    text = re.sub(r"^connection failed:\s*", "", text)
    text = re.sub(r"connection to server at \"[^\"]*\"(, port \d+)? failed:\s*", "", text)
    text = re.sub(r"connection to server on socket \"[^\"]*\" failed:\s*", "", text)
    text = text.replace("FATAL:  ", "").replace("FATAL: ", "")
    return clean(text.strip() or type(err).__name__, url)


def connect(url: str, *, autocommit: bool = False) -> psycopg.Connection:
    """A connection, or a `CentreError` in one line (wrong password, unreachable, bad URL)."""
    try:
        import psycopg
    except ImportError:
        raise CentreError("the PostgreSQL client library psycopg is not installed; install "
                          "it (pip install 'psycopg[binary]') to use a centre") from None

    where = redact(url)
    try:
        conn = psycopg.connect(url, autocommit=autocommit)
    except psycopg.OperationalError as err:
        msg = first_line(err, url)
        if "password authentication failed" in msg or "no password supplied" in msg:
            hint = "check the user name and password"
        elif "does not exist" in msg:
            hint = "check the database and user names"
        elif any(s in msg for s in ("Connection refused", "timeout", "could not translate",
                                    "No route", "Network is unreachable", "timed out")):
            hint = "is the server running and reachable from here?"
        else:
            hint = "check the URL and the server"
        raise CentreError(f"{where}: cannot connect ({msg}); {hint}") from None
    except (psycopg.ProgrammingError, psycopg.InterfaceError, ValueError) as err:
        raise CentreError(f"{where}: not a usable PostgreSQL URL "
                          f"({first_line(err, url)})") from None
    return conn
