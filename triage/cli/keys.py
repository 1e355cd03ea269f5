"""`triage key new|trust|list`: inspectors' signing keys and the keys this laptop trusts.

The passphrase of a key comes from TRIAGE_KEY_PASSPHRASE, else a prompt. Heavy libraries
(cryptography) are imported inside the functions, so the command line starts quickly.
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path
from typing import Any

from triage.errors import TriageError

from .common import add_command, add_format
from .errors import UserError
from .streams import input_path, refuse_std, status, write_json

PASSPHRASE_ENV = "TRIAGE_KEY_PASSPHRASE"


def add_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register `key` and its subcommands `new`, `trust` and `list`."""
    p = add_command(sub, "key", "inspectors' signing keys and the keys this laptop trusts",
                    description=("Make a signing key, trust another inspector's public key, "
                                 "or list the keys trusted here (kept in the data folder, "
                                 "or $TRIAGE_HOME)."))
    ks = p.add_subparsers(dest="key_command", metavar="new|trust|list", required=True,
                          parser_class=type(p), title="actions")
    n = add_command(ks, "new", "make an ECDSA P-256 signing key with its certificate (and "
                    "trust it here)", description=(
                        "Make an ECDSA P-256 signing key with a self-signed certificate, write "
                        "it (never over an existing file) with its public key beside it, and "
                        "trust it on this laptop. The passphrase comes from "
                        f"{PASSPHRASE_ENV}, else a prompt."))
    n.add_argument("--name", required=True, help="the signer's name, as printed on reports")
    n.add_argument("--id", required=True, dest="signer_id",
                   help="the signer's registration or staff id")
    n.add_argument("-o", "--output", required=True, metavar="KEYFILE",
                   help="the private key file to write (mode 600; never over an existing "
                   "file); the public key goes beside it as KEYFILE.pub")
    n.add_argument("--no-passphrase", action="store_true",
                   help=f"leave the key unencrypted (else {PASSPHRASE_ENV} or a prompt)")
    n.set_defaults(func=run_key_new)
    t = add_command(ks, "trust", "trust another inspector's public key on this laptop",
                    description=("Add a public key file (.pub, as 'triage key new' writes it) "
                                 "to the keys this laptop trusts; trusting it again is "
                                 "harmless."))
    t.add_argument("pubfile", metavar="PUBFILE", help="the .pub file to trust; - reads it from "
                   "standard input")
    t.set_defaults(func=run_key_trust)
    ls = add_command(ks, "list", "the public keys this laptop trusts", description=(
        "The keys this laptop trusts, one a line: fingerprint, name and id."))
    add_format(ls, "triage-keys/1", "one key a line")
    ls.set_defaults(func=run_key_list)


def _new_passphrase() -> str:
    env = os.environ.get(PASSPHRASE_ENV)
    if env:
        return env
    if not sys.stdin.isatty():
        raise UserError(f"no passphrase: set {PASSPHRASE_ENV}, or use --no-passphrase")
    import getpass

    first = getpass.getpass("passphrase for the new key: ")
    if not first:
        raise UserError("passphrase: must not be empty (or use --no-passphrase)")
    if getpass.getpass("the same passphrase again: ") != first:
        raise UserError("passphrase: the two entries differ; no key was written")
    return first


def run_key_new(args: argparse.Namespace) -> int:
    """Make a key, write it and its public key, trust it, print the fingerprint."""
    from triage.report.keys import new_key

    refuse_std(args.output, "-o", "a private key is written to a file, with its public key "
               "beside it; give the file's name")
    passphrase = None if args.no_passphrase else _new_passphrase()
    try:
        key, pub = new_key(args.name, args.signer_id, Path(args.output), passphrase)
    except (ValueError, TriageError) as err:
        raise UserError(str(err)) from None
    status(f"key written to {args.output} (mode 600), public key and certificate to {pub}")
    status(f"fingerprint {key.fingerprint} ({key.name}, id {key.id}); trusted on this laptop")
    return 0


def run_key_trust(args: argparse.Namespace) -> int:
    """Add a public key to this laptop's trusted keys."""
    from triage.report.keys import trust_key

    try:
        with input_path(args.pubfile, ".pub") as path:
            try:
                pub = trust_key(path)
            except ValueError as err:
                raise UserError(str(err).replace(str(path), args.pubfile)) from None
    except ValueError as err:
        raise UserError(str(err)) from None
    status(f"trusted {pub.fingerprint} ({pub.name}, id {pub.id})")
    return 0


def run_key_list(args: argparse.Namespace) -> int:
    """Print the trusted keys, one a line."""
    from triage.paths import data_home as home
    from triage.report.keys import trusted_keys
    from triage.safetext import visible_line

    try:
        keys = trusted_keys()
    except ValueError as err:
        raise UserError(str(err)) from None
    if args.format == "json":
        write_json({"format": "triage-keys/1", "folder": str(home()), "keys": [
            {"fingerprint": k.fingerprint, "name": k.name, "id": k.id,
             "algorithm": k.algorithm,
             "signs": "PAdES B-B" if k.certificate is not None else "Ed25519 (first way)"}
            for k in keys]})
        return 0
    if not keys:
        status(f"no trusted keys yet (kept in {home()})")
    for k in keys:
        kind = "" if k.certificate is not None else "  (Ed25519, signs the first way)"
        sys.stdout.write(f"{k.fingerprint}  {visible_line(k.name)} (id {visible_line(k.id)})"
                         f"{kind}\n")
    return 0


def load_signing_key(path: str) -> Any:
    """The private key of a key file, asking for its passphrase when it has one."""
    from triage.report.keys import key_is_encrypted, load_key

    p = Path(path)
    try:
        passphrase = None
        if key_is_encrypted(p):
            passphrase = os.environ.get(PASSPHRASE_ENV)
            if not passphrase:
                if not sys.stdin.isatty():
                    raise UserError(f"{path}: the key is protected by a passphrase; set "
                                    f"{PASSPHRASE_ENV}")
                import getpass

                passphrase = getpass.getpass(f"passphrase for {path}: ")
        return load_key(p, passphrase)
    except ValueError as err:
        raise UserError(str(err)) from None
