"""`python -m triage` runs the `triage` command."""

from triage.cli import entry

entry()
