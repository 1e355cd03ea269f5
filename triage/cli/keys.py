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

from .errors import UserError

PASSPHRASE_ENV = "TRIAGE_KEY_PASSPHRASE"


def add_parser(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg,unused-ignore]
    """Register `key` and its subcommands `new`, `trust` and `list`."""
    p = sub.add_parser("key", help="inspectors' signing keys and the keys this laptop trusts")
    ks = p.add_subparsers(dest="key_command", metavar="new|trust|list", required=True,
                          parser_class=type(p))
    n = ks.add_parser("new", help="make an ECDSA P-256 signing key with its certificate "
                      "(and trust it here)")
    n.add_argument("--name", required=True, help="the signer's name, as printed on reports")
    n.add_argument("--id", required=True, dest="signer_id",
                   help="the signer's registration or staff id")
    n.add_argument("-o", "--output", required=True, metavar="KEYFILE",
                   help="the private key file to write (mode 600); the public key goes "
                   "beside it as .pub")
    n.add_argument("--no-passphrase", action="store_true",
                   help=f"leave the key unencrypted (else {PASSPHRASE_ENV} or a prompt)")
    n.set_defaults(func=run_key_new)
    t = ks.add_parser("trust", help="trust another inspector's public key on this laptop")
    t.add_argument("pubfile", metavar="PUBFILE")
    t.set_defaults(func=run_key_trust)
    ls = ks.add_parser("list", help="the public keys this laptop trusts")
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

    passphrase = None if args.no_passphrase else _new_passphrase()
    try:
        key, pub = new_key(args.name, args.signer_id, Path(args.output), passphrase)
    except (ValueError, TriageError) as err:
        raise UserError(str(err)) from None
    sys.stdout.write(f"key written to {args.output} (mode 600), public key and certificate "
                     f"to {pub}\n"
                     f"fingerprint {key.fingerprint} ({key.name}, id {key.id}); "
                     "trusted on this laptop\n")
    return 0


def run_key_trust(args: argparse.Namespace) -> int:
    """Add a public key to this laptop's trusted keys."""
    from triage.report.keys import trust_key

    try:
        pub = trust_key(Path(args.pubfile))
    except ValueError as err:
        raise UserError(str(err)) from None
    sys.stdout.write(f"trusted {pub.fingerprint} ({pub.name}, id {pub.id})\n")
    return 0


def run_key_list(args: argparse.Namespace) -> int:
    """Print the trusted keys, one a line."""
    from triage.report.keys import home, trusted_keys

    try:
        keys = trusted_keys()
    except ValueError as err:
        raise UserError(str(err)) from None
    if not keys:
        sys.stdout.write(f"no trusted keys yet (kept in {home()})\n")
    for k in keys:
        kind = "" if k.certificate is not None else "  (Ed25519, signs the first way)"
        sys.stdout.write(f"{k.fingerprint}  {k.name} (id {k.id}){kind}\n")
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
