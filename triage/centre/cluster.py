"""A throwaway PostgreSQL cluster in a temporary folder, for the tests and the benchmark.

    with Cluster.start() as pg:         # initdb, postgres on 127.0.0.1:<free port>
        url = pg.url("triage")          # postgresql://triage_admin:…@127.0.0.1:PORT/triage
        pg.createdb("triage")

    with Cluster.start_centre(logins={"laptop1": ("pw", "triage_field")}) as pg:
        pg.centre_db("area")            # a copy of a database `triage centre init` made

`start_centre` is what the centre's tests and `bench.centre_bench` both start from: a
database `template_centre` initialised by `triage.centre.schema.init` (the roles with it)
and a login in one of the roles for each name given; each test or measurement copies it.

The server runs from the PostgreSQL binaries found on PATH or in
`/usr/lib/postgresql/<major>/bin` (Debian's place). initdb refuses to run as root, so as root
the server runs as the `postgres` system user (`runuser`), the folder handed to that user;
otherwise as the current user. Connections: TCP on 127.0.0.1 with SCRAM passwords (so wrong
passwords are refused as on a real centre), and a Unix socket in the folder. Stopped
(immediate) and the folder removed on exit. Nothing here imports psycopg but `start_centre`
(through `init`); the rest runs programs.
"""

from __future__ import annotations

import os
import secrets
import shutil
import socket
import subprocess
import tempfile
import time
from dataclasses import dataclass, field
from pathlib import Path

SUPERUSER = "triage_admin"
TEMPLATE = "template_centre"


def find_bindir() -> Path | None:
    """The folder holding initdb and pg_ctl: PATH first, then Debian's newest major version."""
    found = shutil.which("initdb")
    if found:
        return Path(found).resolve().parent
    base = Path("/usr/lib/postgresql")
    if base.is_dir():
        majors = sorted((p for p in base.iterdir() if (p / "bin" / "initdb").exists()),
                        key=lambda p: int(p.name) if p.name.isdigit() else 0)
        if majors:
            return majors[-1] / "bin"
    return None


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


@dataclass
class Cluster:
    """A running throwaway cluster: its folder, port and superuser password."""

    folder: Path
    port: int
    password: str
    bindir: Path
    as_user: str | None
    settings: dict[str, str] = field(default_factory=dict)

    @classmethod
    def start(cls, settings: dict[str, str] | None = None) -> Cluster:
        """Initdb in a new temporary folder and start the server; raises RuntimeError."""
        bindir = find_bindir()
        if bindir is None:
            raise RuntimeError("no PostgreSQL server binaries (initdb) found; install "
                               "PostgreSQL (Debian: apt-get install postgresql)")
        as_user = "postgres" if os.geteuid() == 0 else None
        folder = Path(tempfile.mkdtemp(prefix="triage-pg-"))
        password = secrets.token_hex(16)
        pwfile = folder / "pw"
        pwfile.write_text(password + "\n")
        if as_user:
            shutil.chown(folder, as_user)
            shutil.chown(pwfile, as_user)
        pg = cls(folder, _free_port(), password, bindir, as_user, dict(settings or {}))
        try:
            pg._run("initdb", "-D", str(pg.data), "-U", SUPERUSER, f"--pwfile={pwfile}",
                    "--auth-local=trust", "--auth-host=scram-sha-256", "-E", "UTF8",
                    "--locale=C", "--no-sync")
            pwfile.unlink()
            opts = {"listen_addresses": "127.0.0.1", "port": str(pg.port),
                    "unix_socket_directories": str(folder), "max_connections": "60",
                    "logging_collector": "off", **pg.settings}
            conf = "".join(f"{k} = '{v}'\n" for k, v in opts.items())
            with open(pg.data / "postgresql.auto.conf", "a") as fh:
                fh.write(conf)
            pg._run("pg_ctl", "-D", str(pg.data), "-l", str(folder / "log"), "-w", "-t", "60",
                    "start")
        except BaseException:
            pg.stop()
            raise
        return pg

    @classmethod
    def start_centre(cls, settings: dict[str, str] | None = None,
                     logins: dict[str, tuple[str, str]] | None = None) -> Cluster:
        """`start`, then `TEMPLATE` made by `init`, and logins: {name: (password, role)}."""
        from .schema import init

        pg = cls.start(settings)
        try:
            pg.createdb(TEMPLATE)
            init(pg.url(TEMPLATE))
            for name, (password, role) in (logins or {}).items():
                pg.sql(f"CREATE ROLE {name} LOGIN PASSWORD '{password}' IN ROLE {role}")
        except BaseException:
            pg.stop()
            raise
        return pg

    def centre_db(self, name: str) -> None:
        """A new database copied from `TEMPLATE` (as init leaves one; a file copy, quick)."""
        self.sql(f"CREATE DATABASE {name} TEMPLATE {TEMPLATE} STRATEGY FILE_COPY")

    @property
    def data(self) -> Path:
        """The cluster's data folder."""
        return self.folder / "data"

    def _cmd(self, prog: str, *args: str) -> list[str]:
        cmd = [str(self.bindir / prog), *args]
        return ["runuser", "-u", self.as_user, "--", *cmd] if self.as_user else cmd

    def _run(self, prog: str, *args: str) -> None:
        got = subprocess.run(self._cmd(prog, *args), capture_output=True, text=True,
                             cwd=self.folder, check=False)
        if got.returncode != 0:
            log = self.folder / "log"
            tail = log.read_text(errors="replace")[-2000:] if log.exists() else ""
            raise RuntimeError(f"{prog} failed ({got.returncode}): {got.stderr.strip()} "
                               f"{got.stdout.strip()[-500:]} {tail}")

    def url(self, dbname: str = "postgres", user: str = SUPERUSER,
            password: str | None = None) -> str:
        """A connection URL over TCP (the superuser's password unless another is given)."""
        pw = self.password if password is None and user == SUPERUSER else password
        auth = f"{user}:{pw}@" if pw else f"{user}@"
        return f"postgresql://{auth}127.0.0.1:{self.port}/{dbname}"

    def psql_args(self, dbname: str = "postgres") -> list[str]:
        """Psql arguments for the superuser over the socket (trust)."""
        return [str(self.bindir / "psql"), "-h", str(self.folder), "-p", str(self.port),
                "-U", SUPERUSER, "-d", dbname, "-v", "ON_ERROR_STOP=1", "-qAt"]

    def sql(self, statement: str, dbname: str = "postgres") -> str:
        """Run SQL as the superuser through psql; its output, stripped."""
        got = subprocess.run([*self.psql_args(dbname), "-c", statement], capture_output=True,
                             text=True, check=False)
        if got.returncode != 0:
            raise RuntimeError(f"psql: {got.stderr.strip()}")
        return got.stdout.strip()

    def createdb(self, name: str) -> None:
        """A new empty database."""
        self.sql(f'CREATE DATABASE "{name}"')

    def stop(self) -> None:
        """Stop the server at once and remove the folder."""
        if (self.data / "postmaster.pid").exists():
            for _ in range(2):
                try:
                    self._run("pg_ctl", "-D", str(self.data), "-m", "immediate", "-w", "stop")
                    break
                except RuntimeError:
                    time.sleep(0.5)
        shutil.rmtree(self.folder, ignore_errors=True)

    def __enter__(self) -> Cluster:
        return self

    def __exit__(self, *exc: object) -> None:
        self.stop()
